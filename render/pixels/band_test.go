package pixels

import (
	"context"
	"math"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// bandCount is a uniform count of the photons of a window whose seen
// crossing of order 0 lies in the scene's band.
type bandCount struct {
	area, flux float64   // M², Σ g³ ε L ΔΩ
	frac       []float64 // per pixel: fraction of the photons in the band
	pairs      []int     // per pixel: neighbouring photon pairs split by the band's edges
}

// countBand traces n × n photons per pixel of r on a square grid of
// spacing δ = h/n shifted by (ox, oy) δ from the pixel corners, each
// standing for its δ² cell, and counts those in [r.BandMin, r.BandMax].
func countBand(t *testing.T, r scene.Resolved, n int, ox, oy float64) bandCount {
	t.Helper()
	m, err := NewModel(r)
	if err != nil {
		t.Fatal(err)
	}
	w, h := r.Screen.Width, r.Screen.Height
	nx, ny := w*n, h*n
	d := r.PixelSize / float64(n)
	a0 := r.Screen.CenterAlpha - float64(w)*r.PixelSize/2
	b1 := r.Screen.CenterBeta + float64(h)*r.PixelSize/2
	in := make([]bool, nx*ny)
	line := make([]float64, nx*ny)
	parallel(context.Background(), ny, m.Orders, func(j int, p *raytrace.Path, s *Sample) {
		for i := 0; i < nx; i++ {
			m.Shade(a0+(float64(i)+ox)*d, b1-(float64(j)+oy)*d, p, s)
			if hh := &s.Hits[0]; hh.Seen && hh.R >= r.BandMin && hh.R <= r.BandMax {
				in[j*nx+i], line[j*nx+i] = true, hh.Line
			}
		}
	})
	c := bandCount{frac: make([]float64, w*h), pairs: make([]int, w*h)}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			k, px := j*nx+i, (j/n)*w+i/n
			if in[k] {
				c.area += d * d
				c.flux += line[k] * d * d
				c.frac[px] += 1 / float64(n*n)
			}
			if i > 0 && in[k] != in[k-1] {
				c.pairs[px]++
			}
			if j > 0 && in[k] != in[k-nx] {
				c.pairs[px]++
			}
		}
	}
	return c
}

func TestBandAreaConverges(t *testing.T) {
	// A band of source radii about a fifth of a pixel wide on the screen,
	// measured by the areas of the refinement's sample cells at depths
	// 2 … 5, against uniform counts of 48 × 48 photons per pixel on four
	// shifted grids (an independent estimate that does not use the
	// refinement's cells or its splitting).
	//
	// Tolerance. A count on a randomly shifted grid of spacing δ misses
	// the area of a smooth region by a random amount whose spread grows
	// as δ^{3/2} (Kendall 1948, Q. J. Math. 19, 1: lattice points in a
	// random oval). The spread σ of the four counts measures it at
	// δ = h/48; depth 5 samples the band on the grid h/32, 3/2 coarser, so
	// its error is about (3/2)^{3/2} σ ≈ 1.84 σ, and the mean of the
	// counts is off by about σ/2. Depth 5 must agree with that mean within
	// three times their combined spread, in area and in flux; the area's
	// successive differences must shrink, and depth 5 must be closer to
	// the counts than depth 2 in both.
	if testing.Short() {
		t.Skip("traces 5 million photons")
	}
	s := scene.Default()
	s.Hole.Spin, s.Observer.InclinationDeg = 0.9, 60
	s.Screen.Width, s.Screen.Height = 24, 24
	s.Screen.FieldOfView = 12
	s.Disk.Orders = 1
	s.Band.RMin, s.Band.RMax = "isco", "isco*1.05"
	var areas, fluxes []float64
	var deep *Frame
	for depth := 2; depth <= 5; depth++ {
		s.Refine.Depth = depth
		r, err := s.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		f, err := RenderScene(context.Background(), r, nil, KeepAll|KeepBand)
		if err != nil {
			t.Fatal(err)
		}
		rep, err := f.LocateBand()
		if err != nil {
			t.Fatal(err)
		}
		areas, fluxes = append(areas, rep.Area), append(fluxes, rep.Flux)
		deep = f
		t.Logf("depth %d: area %.6g M², flux %.6g, %d photons", depth, rep.Area, rep.Flux, rep.Photons)
	}
	const n = 48
	r := deep.Res
	var counts []bandCount
	for _, off := range [][2]float64{{0.5, 0.5}, {0.1, 0.7}, {0.8, 0.3}, {0.35, 0.05}} {
		counts = append(counts, countBand(t, r, n, off[0], off[1]))
	}
	stats := func(q func(c bandCount) float64) (mean, sd float64) {
		for _, c := range counts {
			mean += q(c) / float64(len(counts))
		}
		for _, c := range counts {
			sd += (q(c) - mean) * (q(c) - mean) / float64(len(counts)-1)
		}
		return mean, math.Sqrt(sd)
	}
	am, as := stats(func(c bandCount) float64 { return c.area })
	fm, fs := stats(func(c bandCount) float64 { return c.flux })
	t.Logf("counts of %d² photons per pixel: area %.6g ± %.2g M², flux %.6g ± %.2g", n, am, as, fm, fs)
	last := len(areas) - 1
	for _, q := range []struct {
		name     string
		v        []float64
		mean, sd float64
	}{{"area", areas, am, as}, {"flux", fluxes, fm, fs}} {
		tol := 3 * math.Hypot(1.84*q.sd, q.sd/2)
		if e := math.Abs(q.v[last] - q.mean); e > tol {
			t.Errorf("%s at depth 5: %v, counts %v ± %v: differ by %v > %v", q.name, q.v[last], q.mean, q.sd, e, tol)
		}
		if !(math.Abs(q.v[last]-q.mean) < math.Abs(q.v[0]-q.mean)) {
			t.Errorf("%s at depth 5 (%v) no closer to the counts (%v) than at depth 2 (%v)", q.name, q.v[last], q.mean, q.v[0])
		}
	}
	for k := 2; k <= last; k++ {
		if !(math.Abs(areas[k]-areas[k-1]) < math.Abs(areas[k-1]-areas[k-2])) {
			t.Errorf("area: difference depth %d − %d (%v) not below depth %d − %d (%v)", k+2, k+1, areas[k]-areas[k-1], k+1, k, areas[k-1]-areas[k-2])
		}
	}
	// Per pixel: a count misplaces at most the cells cut by the band's
	// edges, two per split pair of neighbours; on the grid h/32 there are
	// 48/32 times fewer, each (48/32)² larger. So the depth-5 fraction and
	// the count's differ by at most (1 + 3/2) · 2 · pairs / 48² (worst case,
	// not a spread).
	c := counts[0]
	worst, touched := 0.0, 0
	for k, v := range c.frac {
		got := float64(deep.Band[0][k])
		bound := 2.5 * 2 * float64(c.pairs[k]) / (n * n)
		if got > 0 || v > 0 {
			touched++
		}
		worst = math.Max(worst, math.Abs(got-v)/math.Max(bound, 1e-300))
		if math.Abs(got-v) > bound {
			t.Errorf("pixel %d: band fraction %v, count %v (bound %v)", k, got, v, bound)
		}
	}
	t.Logf("%d pixels touch the band; largest per-pixel difference %.2f of its bound", touched, worst)
}

func TestBandBookkeeping(t *testing.T) {
	// The band report holds the flux of the same samples as the spectrum
	// (flux = Σ I ΔΩ, Cunningham 1975), its areas are those of the masks,
	// and its two sides add up to the order's share; with one photon per
	// pixel (depth 0) the masks are 0 or 1.
	for _, depth := range []int{0, 3} {
		r := resolve(t, func(s *scene.Scene) {
			s.Hole.Spin, s.Observer.InclinationDeg = 0.7, 70
			s.Screen.Width, s.Screen.Height = 40, 32
			s.Screen.FieldOfView = 16
			s.Disk.Opaque = false
			s.Refine.Depth = depth
			s.Band.RMin, s.Band.RMax = "horizon", "isco*1.5"
			lo, hi := 0.1, 20.0
			s.Spectrum.MinKeV, s.Spectrum.MaxKeV = &lo, &hi
		})
		f, err := RenderScene(context.Background(), r, nil, KeepAll|KeepBand)
		if err != nil {
			t.Fatal(err)
		}
		rep, err := f.LocateBand()
		if err != nil {
			t.Fatal(err)
		}
		spec := f.Spectrum()
		// At depth 0 the spectrum reads the float32 pixel records.
		if want := spec.Sum() + spec.Below + spec.Above; math.Abs(rep.WindowFlux-want) > 1e-6*want {
			t.Errorf("depth %d: window flux %v, spectrum %v", depth, rep.WindowFlux, want)
		}
		px := r.PixelSize * r.PixelSize
		area := 0.0
		for o, ord := range rep.Orders {
			mask := 0.0
			for _, v := range f.Band[o] {
				if depth == 0 && v != 0 && v != 1 {
					t.Fatalf("depth 0: mask value %v", v)
				}
				mask += float64(v) * px
			}
			sides := ord.Escaping.Area + ord.Captured.Area
			if math.Abs(mask-sides) > 1e-5*math.Max(sides, px) {
				t.Errorf("depth %d order %d: mask area %v, sides %v", depth, o, mask, sides)
			}
			if ff := ord.Escaping.FluxFraction + ord.Captured.FluxFraction; math.Abs(ff-rep.FluxFraction[o]) > 1e-12 {
				t.Errorf("depth %d order %d: sides' flux fraction %v, order %v", depth, o, ff, rep.FluxFraction[o])
			}
			area += sides
		}
		if math.Abs(area-rep.Area) > 1e-12*area || rep.Area == 0 || rep.Orders[0].Captured.Area == 0 {
			t.Errorf("depth %d: area %v, sum of sides %v; captured side of order 0 %v", depth, rep.Area, area, rep.Orders[0].Captured.Area)
		}
		if math.Abs(rep.Flux/rep.WindowFlux-rep.FluxFractionAll) > 1e-12 {
			t.Errorf("depth %d: flux %v / window %v ≠ fraction %v", depth, rep.Flux, rep.WindowFlux, rep.FluxFractionAll)
		}
	}
	// A frame rendered without the band records has no band to report.
	f, err := Render(context.Background(), resolve(t, func(s *scene.Scene) { s.Screen.Width, s.Screen.Height = 4, 4 }), nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.LocateBand(); err != ErrNoBand {
		t.Errorf("LocateBand without KeepBand: %v", err)
	}
}
