package pixels

import (
	"fmt"
	"math"
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
	var records []struct {
		name string
		q    [][]float32
	}
	for _, rec := range []struct {
		name string
		q    [][]float32
	}{{"source radius", f.R}, {"redshift factor g", f.G}, {"line intensity", f.Line}, {"bolometric intensity", f.Bol}} {
		if rec.q != nil {
			records = append(records, rec)
		}
	}
	for k := 0; k < f.W*f.H && len(records) > 0; k++ {
		var line, bol float64
		for o := 0; o < f.Orders; o++ {
			nan := 0
			for _, rec := range records {
				if math.IsNaN(float64(rec.q[o][k])) {
					nan++
				}
			}
			if nan == len(records) {
				continue // order o not seen at pixel k
			}
			for _, rec := range records {
				if v := float64(rec.q[o][k]); math.IsNaN(v) || math.IsInf(v, 0) {
					return nil, &NonFiniteError{Quantity: rec.name, Order: o, Pixel: [2]int{k % f.W, k / f.W}, Bin: -1, Value: v}
				}
			}
			if f.Line != nil {
				line += float64(f.Line[o][k])
			}
			if f.Bol != nil {
				bol += float64(f.Bol[o][k])
			}
		}
		for _, t := range []struct {
			name string
			v    float64
		}{{"line intensity", line}, {"bolometric intensity", bol}} {
			if v := float64(float32(t.v)); math.IsInf(v, 0) || math.IsNaN(v) {
				return nil, &NonFiniteError{Quantity: t.name, Order: -1, Pixel: [2]int{k % f.W, k / f.W}, Bin: -1, Value: v}
			}
		}
	}
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
