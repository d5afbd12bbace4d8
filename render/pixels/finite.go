package pixels

import (
	"context"
	"fmt"
	"math"
	"sync/atomic"

	"kerrscope/render/internal/workers"
)

// NonFiniteError reports a value of a frame or of its spectrum that is not
// a finite number where one is needed: Quantity names it ("intensity",
// "spectrum", ...), Order is the image order (-1: summed over orders),
// Pixel the pixel (column, row from the top; -1, -1 for the spectrum) and
// Bin the spectrum bin (-1 for a map; Bins() for the flux outside the
// range).
type NonFiniteError struct {
	Quantity string
	Order    int
	Pixel    [2]int
	Bin      int
	Value    float64
}

func (e *NonFiniteError) Error() string {
	where := fmt.Sprintf("pixel (%d, %d)", e.Pixel[0], e.Pixel[1])
	if e.Bin >= 0 {
		where = fmt.Sprintf("bin %d", e.Bin)
	}
	order := fmt.Sprintf("image order %d", e.Order)
	if e.Order < 0 {
		order = "all image orders"
	}
	return fmt.Sprintf("%s of %s at %s is %v, not a finite number (the scene's values overflow the numbers it is kept in); nothing was written",
		e.Quantity, order, where, e.Value)
}

// CheckFinite reports the first value of the frame's records, of the maps
// summed over orders and of the frame's spectrum that is not finite, as a
// *NonFiniteError. A pixel where an order is not seen has NaN in all four
// records of that order (that is "no disk", not an error); where it is
// seen, all four must be finite, and so must their sums over the orders
// as float32. Every bin of the spectrum, per order and in total, and the
// flux outside its range must be finite.
//
// Records the frame did not keep (Keep) are not checked, nor is the
// spectrum unless the frame keeps what it is made of (g and the line
// intensity, or the refined samples). The spectrum it checked is
// returned (nil when none), so that callers need not collapse the frame
// again.
func CheckFinite(f *Frame) (*Spectrum, error) {
	if err := checkRecords(f); err != nil {
		return nil, err
	}
	return CheckedSpectrum(f)
}

// CheckedSpectrum is CheckFinite of the frame's spectrum alone, for a
// frame whose records were checked (RenderChecked): the spectrum, nil
// when the frame keeps nothing it is made of, or the *NonFiniteError of
// its first value that is not finite.
func CheckedSpectrum(f *Frame) (*Spectrum, error) {
	if f.refined == nil && !f.Has(KeepG|KeepLine) {
		return nil, nil
	}
	s := f.Spectrum()
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
	for o, ord := range s.Order {
		for b, v := range ord {
			if bad(v) {
				return nil, &NonFiniteError{Quantity: "spectrum", Order: o, Pixel: [2]int{-1, -1}, Bin: b, Value: v}
			}
		}
	}
	for b, v := range s.Total() {
		if bad(v) || bad(v/s.Width()) {
			return nil, &NonFiniteError{Quantity: "spectrum", Order: -1, Pixel: [2]int{-1, -1}, Bin: b, Value: v}
		}
	}
	for _, v := range []float64{s.Below, s.Above} {
		if bad(v) {
			return nil, &NonFiniteError{Quantity: "flux outside the energy range", Order: -1, Pixel: [2]int{-1, -1}, Bin: s.Bins(), Value: v}
		}
	}
	return &s, nil
}

// finiteRecord is one per-order record of a frame CheckFinite reads.
type finiteRecord struct {
	name string
	q    [][]float32
}

// finiteRecords are the records of the frame CheckFinite reads, those it
// keeps of R, G, Line and Bol.
func finiteRecords(f *Frame) []finiteRecord {
	var recs []finiteRecord
	for _, rec := range []finiteRecord{{"source radius", f.R}, {"redshift factor g", f.G}, {"line intensity", f.Line}, {"bolometric intensity", f.Bol}} {
		if rec.q != nil {
			recs = append(recs, rec)
		}
	}
	return recs
}

// finiteRows is the number of rows of one piece of checkRecords' work.
const finiteRows = 16

// checkRecords is CheckFinite of the frame's records: pieces of
// finiteRows rows are checked on all cores, and the error of the first
// bad pixel in pixel order is returned, as a scan from pixel 0 would find.
func checkRecords(f *Frame) error {
	recs := finiteRecords(f)
	if len(recs) == 0 || f.W*f.H == 0 {
		return nil
	}
	pieces := (f.H + finiteRows - 1) / finiteRows
	errs := make([]error, pieces)
	var firstBad atomic.Int64 // the first piece known to hold a bad pixel
	firstBad.Store(int64(pieces))
	workers.Each(context.Background(), pieces, func() struct{} { return struct{}{} }, func(n int, _ struct{}) {
		if int64(n) > firstBad.Load() {
			return // a piece before this one has the error already
		}
		k0, k1 := n*finiteRows*f.W, min(f.H, (n+1)*finiteRows)*f.W
		if errs[n] = checkPixels(f, recs, k0, k1); errs[n] != nil {
			for {
				old := firstBad.Load()
				if int64(n) >= old || firstBad.CompareAndSwap(old, int64(n)) {
					break
				}
			}
		}
	})
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// checkPixels checks pixels k0 ≤ k < k1 as CheckFinite says. An order
// whose first record is NaN is not seen, unless another record has a
// value; else the sum of its records in float64 is finite exactly when
// each record is (float32 values cannot overflow it). Only a pixel that
// fails these quick tests is looked at record by record (pixelError).
func checkPixels(f *Frame, recs []finiteRecord, k0, k1 int) error {
	for k := k0; k < k1; k++ {
		var line, bol float64
		for o := 0; o < f.Orders; o++ {
			if v := recs[0].q[o][k]; v != v { // NaN: order o not seen at pixel k, if all are NaN
				for _, rec := range recs[1:] {
					if v := rec.q[o][k]; v == v {
						return pixelError(f, recs, o, k)
					}
				}
				continue
			}
			sum := 0.0
			for _, rec := range recs {
				sum += float64(rec.q[o][k])
			}
			if sum-sum != 0 { // NaN or ±Inf in some record
				return pixelError(f, recs, o, k)
			}
			if f.Line != nil {
				line += float64(f.Line[o][k])
			}
			if f.Bol != nil {
				bol += float64(f.Bol[o][k])
			}
		}
		if v := float64(float32(line)); math.IsInf(v, 0) || math.IsNaN(v) {
			return &NonFiniteError{Quantity: "line intensity", Order: -1, Pixel: [2]int{k % f.W, k / f.W}, Bin: -1, Value: v}
		}
		if v := float64(float32(bol)); math.IsInf(v, 0) || math.IsNaN(v) {
			return &NonFiniteError{Quantity: "bolometric intensity", Order: -1, Pixel: [2]int{k % f.W, k / f.W}, Bin: -1, Value: v}
		}
	}
	return nil
}

// pixelError is the error of order o at pixel k, whose records are
// neither all NaN nor all finite: the first record that is NaN or
// infinite.
func pixelError(f *Frame, recs []finiteRecord, o, k int) error {
	for _, rec := range recs {
		if v := float64(rec.q[o][k]); math.IsNaN(v) || math.IsInf(v, 0) {
			return &NonFiniteError{Quantity: rec.name, Order: o, Pixel: [2]int{k % f.W, k / f.W}, Bin: -1, Value: v}
		}
	}
	return nil
}

// checkSample is checkPixels of pixel k from the sample s that store has
// just written there, read from s rather than from the records: an order
// not seen has NaN in every record (store), and a seen one has the
// float32 values of its hit, which are checked by the same rules.
func (f *Frame) checkSample(k int, s *Sample) error {
	kept := [4]bool{f.R != nil, f.G != nil, f.Line != nil, f.Bol != nil}
	var line, bol float64
	for o := 0; o < f.Orders; o++ {
		h := &s.Hits[o]
		if !h.Seen {
			continue
		}
		v := [4]float32{float32(h.R), float32(h.G), float32(h.Line), float32(h.Bol)}
		sum, values := 0.0, 0
		for i, x := range v {
			if kept[i] {
				sum += float64(x)
				if x == x {
					values++
				}
			}
		}
		if sum-sum != 0 { // NaN or ±Inf in some kept record
			if values == 0 {
				continue // all NaN: as not seen
			}
			return pixelError(f, finiteRecords(f), o, k)
		}
		if kept[2] {
			line += float64(v[2])
		}
		if kept[3] {
			bol += float64(v[3])
		}
	}
	if x := float64(float32(line)); math.IsInf(x, 0) || math.IsNaN(x) {
		return &NonFiniteError{Quantity: "line intensity", Order: -1, Pixel: [2]int{k % f.W, k / f.W}, Bin: -1, Value: x}
	}
	if x := float64(float32(bol)); math.IsInf(x, 0) || math.IsNaN(x) {
		return &NonFiniteError{Quantity: "bolometric intensity", Order: -1, Pixel: [2]int{k % f.W, k / f.W}, Bin: -1, Value: x}
	}
	return nil
}
