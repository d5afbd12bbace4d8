package pixels

import (
	"context"
	"math"

	"kerrscope/raytrace"
	"kerrscope/render/internal/workers"
	"kerrscope/scene"
)

// Frame holds the per-pixel records of one rendered image. Pixel (i, j)
// has i = 0 at the left and j = 0 at the top; index j*W + i.
type Frame struct {
	Res    scene.Resolved
	Model  Model
	W, H   int
	Orders int
	Fate   []raytrace.Fate
	First  []int8      // first order seen, -1 none
	R, G   [][]float32 // [order][pixel]; NaN where that order is not seen
	Line   [][]float32 // g³ ε L per order
	Bol    [][]float32 // g⁴ ε L per order
	// Behind is the line intensity g³ ε L, per order, of the crossings
	// that an earlier landing of an opaque disk hides (NaN elsewhere):
	// with Line it gives every order's own light, as a transparent disk
	// would show it (OrderLine). nil unless kept (KeepBehind) on an
	// opaque disk.
	Behind [][]float32
	// T and Phi are the time delay (M, regularised as in raytrace.Timing)
	// and azimuth φ − φ_o (radians) per order; nil unless Model.Timing.
	T, Phi [][]float32
	// Q and U are the Stokes parameters of the line intensity per order
	// (Hit.Q, Hit.U: IAU angles, north through east; NaN where that order
	// is not seen); nil unless kept (KeepStokes).
	Q, U [][]float32
	// Band is, per order, the fraction of each pixel's area whose seen
	// crossing of that order lies in the scene's band of source radii
	// [BandMin, BandMax] (0 … 1; with refinement, summed over the
	// samples' cells); nil unless the render kept KeepBand.
	Band [][]float32
	// R, G, Line, Bol and Band are nil when the render did not keep them (Keep).
	// Photons is the number of photons traced to make the frame.
	Photons int64
	// Clip, if not nil, is the estimate of the line flux outside the
	// window (EstimateClip), for a window the disk image touches the
	// border of (TouchesBorder); the outputs record it.
	Clip *Clip
	// refined is the spectrum collapsed from the refined samples, if any.
	refined *Spectrum
	// band is the band Band holds, bandSums its samples (LocateBand).
	band     bandRange
	bandSums *bandTally
}

// PixelAlpha returns α of the centre of column i.
func PixelAlpha(r scene.Resolved, i int) float64 {
	return r.Screen.CenterAlpha + (float64(i)+0.5-float64(r.Screen.Width)/2)*r.PixelSize
}

// PixelBeta returns β of the centre of row j (row 0 at the top).
func PixelBeta(r scene.Resolved, j int) float64 {
	return r.Screen.CenterBeta + (float64(r.Screen.Height)/2-float64(j)-0.5)*r.PixelSize
}

// Keep is a set of the per-order records of a frame (Frame.R, G, Line,
// Bol, Band). Each costs 4 bytes per pixel and image order; Fate and First,
// 2 bytes per pixel, are always kept.
type Keep uint8

const (
	KeepR    Keep = 1 << iota // source radius (maps: radius; FITS; bands)
	KeepG                     // redshift factor (maps: redshift; spectrum; FITS; bands)
	KeepLine                  // line intensity (maps: intensity; spectrum; FITS; bands)
	KeepBol                   // bolometric intensity (FITS)
	// KeepBand: the area of each pixel in the scene's band of source radii
	// (Frame.Band) and the band's sums (Frame.LocateBand), gathered from the
	// samples while rendering. Not in KeepAll: only the band outputs ask.
	KeepBand
	// KeepBehind keeps Frame.Behind, the light of the crossings an
	// opaque disk hides (maps: rings); nothing on a transparent disk,
	// whose Line holds them already. Not in KeepAll.
	KeepBehind
	// KeepStokes keeps Frame.Q and Frame.U (maps: polarisation), two
	// records per order; the model then carries each crossing's
	// polarisation to the screen. Not in KeepAll.
	KeepStokes
	KeepAll = KeepR | KeepG | KeepLine | KeepBol
)

// keepTiming marks the timing records, kept whenever the model traces
// time delays (Model.Timing).
const keepTiming Keep = 1 << 7

// keepOf is the set a render's optional argument asks for: all records
// unless one is given.
func keepOf(keep []Keep) Keep {
	if len(keep) == 0 {
		return KeepAll
	}
	return keep[0] & (KeepAll | KeepBand | KeepBehind | KeepStokes)
}

// BytesPerPixel is the memory of the records a frame with these records
// and image orders holds per pixel: 2 bytes for Fate and First and 4 per
// kept record and order (KeepBehind counted, as on an opaque disk;
// KeepStokes is two records, Q and U).
func (k Keep) BytesPerPixel(orders int) int64 {
	return 2 + 4*k.Records()*int64(orders)
}

// Records is the number of per-order float32 records k keeps
// (KeepStokes counts two).
func (k Keep) Records() int64 {
	n := int64(0)
	for b := k & (KeepAll | KeepBand | KeepBehind | KeepStokes); b != 0; b &= b - 1 {
		n++
	}
	if k&KeepStokes != 0 {
		n++
	}
	return n
}

// Has reports whether the frame holds all the records in k.
func (f *Frame) Has(k Keep) bool {
	for _, c := range [...]struct {
		k Keep
		q [][]float32
	}{{KeepR, f.R}, {KeepG, f.G}, {KeepLine, f.Line}, {KeepBol, f.Bol}, {KeepBand, f.Band}, {KeepStokes, f.Q}} {
		if k&c.k != 0 && c.q == nil {
			return false
		}
	}
	return k&KeepBehind == 0 || f.Behind != nil || !f.Model.Opaque
}

// RenderScene renders the scene's frame: one photon per pixel centre, or with
// adaptive refinement when the scene asks for it. keep, if given, chooses
// the records the frame keeps, as for Render.
func RenderScene(ctx context.Context, r scene.Resolved, progress func(rows int), keep ...Keep) (*Frame, error) {
	if r.Refine.Depth > 0 {
		f, _, _, err := renderRefined(ctx, r, Refinement{Depth: r.Refine.Depth, TolR: r.Refine.TolR, TolG: r.Refine.TolG}, keepOf(keep), true, progress)
		return f, err
	}
	return Render(ctx, r, progress, keep...)
}

// Render traces one photon through the centre of every pixel, on all
// cores; the result does not depend on scheduling. progress, if not nil,
// is called with the number of finished rows (from one goroutine at a
// time). It stops early, returning ctx.Err(), when ctx is cancelled.
//
// keep, if given, is the set of per-order records the frame keeps; the
// others are left nil, which saves their memory (Keep.BytesPerPixel).
// Without it every record is kept.
//
// The window is r's as it is: an automatic one (scene.Resolved.AutoField)
// is rendered at the provisional field Resolve gives it, which holds the
// whole disk loosely; FrameWindow tightens it first.
func Render(ctx context.Context, r scene.Resolved, progress func(rows int), keep ...Keep) (*Frame, error) {
	return renderRows(ctx, r, progress, keepOf(keep), false)
}

// renderRows is Render of the records keep; with check, every pixel's
// records are checked as CheckFinite checks them (checkSample) as they
// are stored, and the first bad pixel's error is returned.
func renderRows(ctx context.Context, r scene.Resolved, progress func(rows int), keep Keep, check bool) (*Frame, error) {
	m, err := NewModel(r)
	if err != nil {
		return nil, err
	}
	w, h, n := r.Screen.Width, r.Screen.Height, r.Disk.Orders
	m.Behind = m.Opaque && keep&KeepBehind != 0
	m.Stokes = keep&KeepStokes != 0
	f := newFrame(r, m, keep)
	var rowBand []bandTally
	if f.Band != nil {
		rowBand = make([]bandTally, h)
	}
	var rowErr []error
	check = check && len(finiteRecords(f)) > 0
	if check {
		rowErr = make([]error, h)
	}
	finished := workers.Counter(progress)
	parallel(ctx, h, n, func(j int, p *raytrace.Path, s *Sample) {
		beta := PixelBeta(r, j)
		var tp raytrace.TimedPath
		if m.Timing {
			tp.Crossings, tp.Times = p.Crossings, make([]raytrace.Timing, 0, n)
		}
		for i := 0; i < w; i++ {
			if m.Timing {
				m.ShadeTimed(PixelAlpha(r, i), beta, &tp, s)
			} else {
				m.Shade(PixelAlpha(r, i), beta, p, s)
			}
			f.store(j*w+i, s)
			if check && rowErr[j] == nil {
				rowErr[j] = f.checkSample(j*w+i, s)
			}
			if rowBand != nil {
				f.tallyCentre(i, j, s, &rowBand[j])
			}
		}
		finished()
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, err := range rowErr {
		if err != nil {
			return nil, err
		}
	}
	for j := range rowBand {
		f.bandSums.merge(&rowBand[j])
	}
	f.Photons = int64(w) * int64(h)
	return f, nil
}

// newFrame allocates the records of the scene's frame that keep names.
func newFrame(r scene.Resolved, m Model, keep Keep) *Frame {
	w, h, n := r.Screen.Width, r.Screen.Height, r.Disk.Orders
	f := &Frame{Res: r, Model: m, W: w, H: h, Orders: n,
		Fate: make([]raytrace.Fate, w*h), First: make([]int8, w*h)}
	alloc := func(k Keep) [][]float32 {
		if keep&k == 0 && k != keepTiming {
			return nil
		}
		out := make([][]float32, n)
		for o := range out {
			out[o] = make([]float32, w*h)
		}
		return out
	}
	f.R, f.G, f.Line, f.Bol = alloc(KeepR), alloc(KeepG), alloc(KeepLine), alloc(KeepBol)
	if f.Band = alloc(KeepBand); f.Band != nil {
		f.band, f.bandSums = bandRange{r.BandMin, r.BandMax}, &bandTally{}
	}
	if m.Behind {
		f.Behind = alloc(KeepBehind)
		for o := range f.Behind {
			fillNaN(f.Behind[o])
		}
	}
	if m.Timing {
		f.T, f.Phi = alloc(keepTiming), alloc(keepTiming)
	}
	f.Q, f.U = alloc(KeepStokes), alloc(KeepStokes)
	return f
}

// scratch is one goroutine's trace buffer and photon record.
type scratch struct {
	p raytrace.Path
	s Sample
}

// parallel runs job(i) for i in [0, count) on all cores; each goroutine
// has its own scratch path (for orders crossings) and sample. It stops
// handing out work once ctx is cancelled.
func parallel(ctx context.Context, count, orders int, job func(i int, p *raytrace.Path, s *Sample)) {
	workers.Each(ctx, count, func() *scratch {
		return &scratch{p: raytrace.Path{Crossings: make([]raytrace.Crossing, 0, orders)}}
	}, func(i int, w *scratch) { job(i, &w.p, &w.s) })
}

func (f *Frame) store(k int, s *Sample) {
	f.Fate[k] = s.Fate
	f.First[k] = int8(s.First)
	nan := float32(math.NaN())
	for o := 0; o < f.Orders; o++ {
		hit := &s.Hits[o]
		r, g, l, b := nan, nan, nan, nan
		if hit.Seen {
			r, g, l, b = float32(hit.R), float32(hit.G), float32(hit.Line), float32(hit.Bol)
		}
		f.put(o, k, r, g, l, b)
		if f.Behind != nil && hit.Behind {
			f.Behind[o][k] = float32(hit.Line)
		}
	}
	if f.T != nil {
		for o := 0; o < f.Orders; o++ {
			f.T[o][k], f.Phi[o][k] = float32(s.Hits[o].T), float32(s.Hits[o].Phi)
		}
	}
	if f.Q != nil {
		for o := 0; o < f.Orders; o++ {
			q, u := nan, nan
			if s.Hits[o].Seen {
				q, u = float32(s.Hits[o].Q), float32(s.Hits[o].U)
			}
			f.Q[o][k], f.U[o][k] = q, u
		}
	}
}

// put stores the records of order o at pixel k, those the frame keeps.
func (f *Frame) put(o, k int, r, g, l, b float32) {
	if f.R != nil {
		f.R[o][k] = r
	}
	if f.G != nil {
		f.G[o][k] = g
	}
	if f.Line != nil {
		f.Line[o][k] = l
	}
	if f.Bol != nil {
		f.Bol[o][k] = b
	}
}

// fillNaN sets every value of v to NaN.
func fillNaN(v []float32) {
	nan := float32(math.NaN())
	for k := range v {
		v[k] = nan
	}
}

// OrderLine is the line intensity of image order o at pixel k as a
// transparent disk shows it: the order's own crossing whether or not an
// earlier landing of an opaque disk hides it (Line, else Behind; NaN
// where the order's crossing misses the emitting disk). It needs Line
// and, on an opaque disk, Behind (KeepLine | KeepBehind).
func (f *Frame) OrderLine(o, k int) float32 {
	if v := f.Line[o][k]; !math.IsNaN(float64(v)) || f.Behind == nil {
		return v
	}
	return f.Behind[o][k]
}

// FirstSeen returns, per pixel, a quantity of the first order seen (NaN
// where no order is seen): pass f.R or f.G. A record the frame did not
// keep (nil) gives nil.
func (f *Frame) FirstSeen(q [][]float32) []float32 {
	if q == nil {
		return nil
	}
	out := make([]float32, f.W*f.H)
	for k := range out {
		out[k] = f.FirstSeenAt(q, k)
	}
	return out
}

// FirstSeenAt is FirstSeen(q)[k], without building the whole map.
func (f *Frame) FirstSeenAt(q [][]float32, k int) float32 {
	if o := f.First[k]; o >= 0 {
		return q[o][k]
	}
	return float32(math.NaN())
}

// Total returns, per pixel, the sum over seen orders of q (NaN where none
// is seen): pass f.Line or f.Bol. A record the frame did not keep (nil)
// gives nil.
func (f *Frame) Total(q [][]float32) []float32 {
	if q == nil {
		return nil
	}
	out := make([]float32, f.W*f.H)
	for k := range out {
		out[k] = f.TotalAt(q, k)
	}
	return out
}

// TotalAt is Total(q)[k], without building the whole map.
func (f *Frame) TotalAt(q [][]float32, k int) float32 {
	if f.First[k] < 0 {
		return float32(math.NaN())
	}
	var s float64
	for o := 0; o < f.Orders; o++ {
		if v := q[o][k]; !math.IsNaN(float64(v)) {
			s += float64(v)
		}
	}
	return float32(s)
}

// Window returns the screen window's pixel-edge ranges in M.
func (f *Frame) Window() (a0, a1, b0, b1 float64) {
	r := f.Res
	hw, hh := float64(f.W)*r.PixelSize/2, float64(f.H)*r.PixelSize/2
	return r.Screen.CenterAlpha - hw, r.Screen.CenterAlpha + hw, r.Screen.CenterBeta - hh, r.Screen.CenterBeta + hh
}
