package pixels

import (
	"context"
	"math"
	"sync"

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
	// T and Phi are the time delay (M, regularised as in raytrace.Timing)
	// and azimuth φ − φ_o (radians) per order; nil unless Model.Timing.
	T, Phi [][]float32
	// Photons is the number of photons traced to make the frame.
	Photons int64
	// refined is the spectrum collapsed from the refined samples, if any.
	refined *Spectrum
}

// PixelAlpha returns α of the centre of column i.
func PixelAlpha(r scene.Resolved, i int) float64 {
	return r.Screen.CenterAlpha + (float64(i)+0.5-float64(r.Screen.Width)/2)*r.PixelSize
}

// PixelBeta returns β of the centre of row j (row 0 at the top).
func PixelBeta(r scene.Resolved, j int) float64 {
	return r.Screen.CenterBeta + (float64(r.Screen.Height)/2-float64(j)-0.5)*r.PixelSize
}

// RenderScene renders the scene's frame: one photon per pixel centre, or with
// adaptive refinement when the scene asks for it.
func RenderScene(ctx context.Context, r scene.Resolved, progress func(rows int)) (*Frame, error) {
	if r.Refine.Depth > 0 {
		f, _, _, err := RenderRefined(ctx, r, Refinement{Depth: r.Refine.Depth, TolR: r.Refine.TolR, TolG: r.Refine.TolG}, true, progress)
		return f, err
	}
	return Render(ctx, r, progress)
}

// Render traces one photon through the centre of every pixel, on all
// cores; the result does not depend on scheduling. progress, if not nil,
// is called with the number of finished rows (from one goroutine at a
// time). It stops early, returning ctx.Err(), when ctx is cancelled.
func Render(ctx context.Context, r scene.Resolved, progress func(rows int)) (*Frame, error) {
	m, err := NewModel(r)
	if err != nil {
		return nil, err
	}
	w, h, n := r.Screen.Width, r.Screen.Height, r.Disk.Orders
	f := newFrame(r, m)
	var mu sync.Mutex
	done := 0
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
		}
		if progress != nil {
			mu.Lock()
			done++
			progress(done)
			mu.Unlock()
		}
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	f.Photons = int64(w) * int64(h)
	return f, nil
}

// newFrame allocates the records of the scene's frame.
func newFrame(r scene.Resolved, m Model) *Frame {
	w, h, n := r.Screen.Width, r.Screen.Height, r.Disk.Orders
	f := &Frame{Res: r, Model: m, W: w, H: h, Orders: n,
		Fate: make([]raytrace.Fate, w*h), First: make([]int8, w*h)}
	alloc := func() [][]float32 {
		out := make([][]float32, n)
		for k := range out {
			out[k] = make([]float32, w*h)
		}
		return out
	}
	f.R, f.G, f.Line, f.Bol = alloc(), alloc(), alloc(), alloc()
	if m.Timing {
		f.T, f.Phi = alloc(), alloc()
	}
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
		hit := s.Hits[o]
		if !hit.Seen {
			f.R[o][k], f.G[o][k], f.Line[o][k], f.Bol[o][k] = nan, nan, nan, nan
			continue
		}
		f.R[o][k], f.G[o][k] = float32(hit.R), float32(hit.G)
		f.Line[o][k], f.Bol[o][k] = float32(hit.Line), float32(hit.Bol)
	}
	if f.T != nil {
		for o := 0; o < f.Orders; o++ {
			f.T[o][k], f.Phi[o][k] = float32(s.Hits[o].T), float32(s.Hits[o].Phi)
		}
	}
}

// FirstSeen returns, per pixel, a quantity of the first order seen (NaN
// where no order is seen): pass f.R or f.G.
func (f *Frame) FirstSeen(q [][]float32) []float32 {
	out := make([]float32, f.W*f.H)
	for k := range out {
		if o := f.First[k]; o >= 0 {
			out[k] = q[o][k]
		} else {
			out[k] = float32(math.NaN())
		}
	}
	return out
}

// Total returns, per pixel, the sum over seen orders of q (NaN where none
// is seen): pass f.Line or f.Bol.
func (f *Frame) Total(q [][]float32) []float32 {
	out := make([]float32, f.W*f.H)
	for k := range out {
		if f.First[k] < 0 {
			out[k] = float32(math.NaN())
			continue
		}
		var s float64
		for o := 0; o < f.Orders; o++ {
			if v := q[o][k]; !math.IsNaN(float64(v)) {
				s += float64(v)
			}
		}
		out[k] = float32(s)
	}
	return out
}

// Window returns the screen window's pixel-edge ranges in M.
func (f *Frame) Window() (a0, a1, b0, b1 float64) {
	r := f.Res
	hw, hh := float64(f.W)*r.PixelSize/2, float64(f.H)*r.PixelSize/2
	return r.Screen.CenterAlpha - hw, r.Screen.CenterAlpha + hw, r.Screen.CenterBeta - hh, r.Screen.CenterBeta + hh
}
