package pixels

import (
	"context"
	"math"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

func resolve(t *testing.T, edit func(s *scene.Scene)) scene.Resolved {
	t.Helper()
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 64, 64
	edit(&s)
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func render(t *testing.T, r scene.Resolved) *Frame {
	t.Helper()
	f, err := Render(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

func TestFaceOnSchwarzschildRedshift(t *testing.T) {
	// Face-on Schwarzschild disk: g = sqrt(1 - 3/r) at every disk pixel
	// (Cunningham 1975, ApJ 202, 788; transverse Doppler plus gravitational shift).
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin = 0
		s.Observer.InclinationDeg = 0
		s.Screen.Width, s.Screen.Height = 96, 96
		s.Disk.Opaque = false
	})
	f := render(t, r)
	n := 0
	for o := 0; o < f.Orders; o++ {
		for k, g := range f.G[o] {
			if math.IsNaN(float64(g)) {
				continue
			}
			rr := float64(f.R[o][k])
			want := math.Sqrt(1 - 3/rr)
			if math.Abs(float64(g)-want) > 2e-6 {
				t.Fatalf("order %d pixel %d: g = %v at r = %v, want %v", o, k, g, rr, want)
			}
			n++
		}
	}
	if n < 1000 {
		t.Fatalf("only %d disk pixels", n)
	}
}

func TestNarrowRingSpectrumSupport(t *testing.T) {
	// A ring of Keplerian gas at r0: every photon from it has
	// g = 1/(u^t (1 - Ω λ)) (Cunningham 1975), so the spectrum's support must
	// span exactly g(λmin)…g(λmax) over the photons that hit it, with u^t and
	// Ω from the circular-orbit formulas of Bardeen, Press & Teukolsky 1972.
	for _, c := range []struct{ a, inc float64 }{{0, 0}, {0.7, 40}, {-0.5, 75}} {
		r0 := 10.0
		r := resolve(t, func(s *scene.Scene) {
			s.Hole.Spin, s.Observer.InclinationDeg = c.a, c.inc
			inner := r0
			s.Disk.InnerRadius = &inner
			s.Disk.OuterRadius = r0 * (1 + 2e-4)
			s.Screen.Width, s.Screen.Height = 400, 400
			s.Screen.FieldOfView = 26
			s.Disk.Orders = 1
			s.Spectrum.Bins = 400
		})
		f := render(t, r)
		orb, _ := raytrace.CircularOrbit(c.a, r0)
		lmin, lmax := math.Inf(1), math.Inf(-1)
		for k := range f.First {
			if f.First[k] != 0 {
				continue
			}
			l, _ := f.Model.Obs.Constants(PixelAlpha(r, k%f.W), PixelBeta(r, k/f.W))
			lmin, lmax = math.Min(lmin, l), math.Max(lmax, l)
		}
		gAt := func(l float64) float64 { return 1 / (orb.Ut * (1 - orb.Omega*l)) }
		spec := f.Spectrum()
		lo, hi := -1, -1
		for k, v := range spec.Total() {
			if v > 0 {
				if lo < 0 {
					lo = k
				}
				hi = k
			}
		}
		binOf := func(g float64) int { return int((g*r.Emission.LineKeV - r.MinKeV) / spec.Width()) }
		t.Logf("a=%v i=%v: support bins %d..%d, Keplerian %d..%d", c.a, c.inc, lo, hi, binOf(gAt(lmin)), binOf(gAt(lmax)))
		if c.inc == 0 && lo != hi {
			t.Errorf("a=%v face-on ring: support bins %d..%d, want one bin", c.a, lo, hi)
		}
		// The ring's radial width (2e-4 r0) may move g by at most one bin.
		if abs(lo-binOf(gAt(lmin))) > 1 || abs(hi-binOf(gAt(lmax))) > 1 {
			t.Errorf("a=%v i=%v: support bins %d..%d, Keplerian g range gives %d..%d", c.a, c.inc, lo, hi, binOf(gAt(lmin)), binOf(gAt(lmax)))
		}
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

func TestSpectrumFluxBookkeeping(t *testing.T) {
	// Σ_bins F ΔE equals Σ_pixels I ΔΩ (the flux is the image integral of I,
	// Cunningham 1975, ApJ 202, 788): binning conserves flux.
	r := resolve(t, func(s *scene.Scene) {
		s.Disk.Opaque = false
		s.Screen.Width, s.Screen.Height = 128, 96
		lo, hi := 0.5, 12.0
		s.Spectrum.MinKeV, s.Spectrum.MaxKeV = &lo, &hi
	})
	f := render(t, r)
	spec := f.Spectrum()
	sum := 0.0
	for _, v := range f.Total(f.Line) {
		if !math.IsNaN(float64(v)) {
			sum += float64(v)
		}
	}
	sum *= r.PixelSize * r.PixelSize
	got := spec.Sum() + spec.Below + spec.Above
	if math.Abs(got-sum) > 1e-6*sum {
		t.Errorf("spectrum holds %v, image %v", got, sum)
	}
	// The sub-pixel spread (a linear model of g across each pixel) may carry
	// a trace past the physical g range at this coarse resolution, no more.
	if spec.Below+spec.Above > 1e-4*sum {
		t.Errorf("flux outside 0.5–12 keV: %v of %v", spec.Below+spec.Above, sum)
	}
	// Gaussian broadening keeps the flux that stays in range.
	b := spec.Broaden(150)
	if math.Abs(b.Sum()-spec.Sum()) > 1e-3*spec.Sum() {
		t.Errorf("broadening changed the flux: %v -> %v", spec.Sum(), b.Sum())
	}
}

func TestShadowSchwarzschildArea(t *testing.T) {
	// Captured area = π · 27 (Synge 1966), to the pixel-area tolerance:
	// the edge pixels, perimeter / h, each off by at most h².
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin = 0
		s.Observer.InclinationDeg = 50
		s.Screen.Width, s.Screen.Height = 200, 200
		s.Screen.FieldOfView = 12
	})
	f := render(t, r)
	n := 0
	for _, v := range f.Fate {
		if v == raytrace.Captured {
			n++
		}
	}
	h := r.PixelSize
	area := float64(n) * h * h
	want := 27 * math.Pi
	tol := 2 * math.Pi * math.Sqrt(27) * h
	if math.Abs(area-want) > tol {
		t.Errorf("captured area %v, want %v ± %v", area, want, tol)
	}
}

func TestShadowEdgeOnCriticalCurve(t *testing.T) {
	// Every pixel on the ray-traced edge lies within a pixel of the
	// analytic critical curve (Bardeen 1973).
	for _, a := range []float64{0, 0.9, -0.6} {
		r := resolve(t, func(s *scene.Scene) {
			s.Hole.Spin = a
			s.Observer.InclinationDeg = 70
			s.Screen.Width, s.Screen.Height = 160, 160
			s.Screen.FieldOfView = 14
		})
		f := render(t, r)
		curve := f.Model.Obs.CriticalCurve(2000)
		edges := 0
		for j := 1; j < f.H-1; j++ {
			for i := 1; i < f.W-1; i++ {
				k := j*f.W + i
				if f.Fate[k] != raytrace.Captured {
					continue
				}
				if f.Fate[k-1] == raytrace.Captured && f.Fate[k+1] == raytrace.Captured && f.Fate[k-f.W] == raytrace.Captured && f.Fate[k+f.W] == raytrace.Captured {
					continue
				}
				edges++
				d := distanceToPolyline(PixelAlpha(r, i), PixelBeta(r, j), curve)
				if d > r.PixelSize {
					t.Errorf("a=%v: edge pixel (%d,%d) is %.3g pixels from the critical curve", a, i, j, d/r.PixelSize)
				}
			}
		}
		if edges < 100 {
			t.Errorf("a=%v: only %d edge pixels", a, edges)
		}
	}
}

func distanceToPolyline(x, y float64, pts []raytrace.ScreenPoint) float64 {
	best := math.Inf(1)
	for i := range pts {
		p, q := pts[i], pts[(i+1)%len(pts)]
		dx, dy := q.Alpha-p.Alpha, q.Beta-p.Beta
		l2 := dx*dx + dy*dy
		t := 0.0
		if l2 > 0 {
			t = math.Max(0, math.Min(1, ((x-p.Alpha)*dx+(y-p.Beta)*dy)/l2))
		}
		best = math.Min(best, math.Hypot(x-p.Alpha-t*dx, y-p.Beta-t*dy))
	}
	return best
}
