package spot

import (
	"context"
	"math"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// movieScene returns a small resolved scene and its spot.
func movieScene(t *testing.T, spin, incl float64, edit func(*scene.Scene)) (scene.Resolved, scene.SpotEmission) {
	t.Helper()
	s := scene.Default()
	s.Hole.Spin = spin
	s.Observer.InclinationDeg = incl
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 96, 96, 30
	s.Disk.Orders = 2
	s.Spot.Radius, s.Spot.Size, s.Spot.Alone = 7, 0.7, true
	if edit != nil {
		edit(&s)
	}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	sp, err := scene.ResolveSpot(r)
	if err != nil {
		t.Fatal(err)
	}
	return r, sp
}

func trace(t *testing.T, r scene.Resolved, sp scene.SpotEmission) *Table {
	t.Helper()
	tb, err := Trace(context.Background(), r, sp, nil)
	if err != nil {
		t.Fatal(err)
	}
	if tb.Crossings() == 0 {
		t.Fatal("no crossing shines")
	}
	return tb
}

// period measures the period of f(t) from its samples on [0, span]: the
// lag τ that minimises D(τ) = Σ_k (f(t_k + τ) − f(t_k))², located at the
// first lag of a 1 M grid over [lo, hi] that is a local minimum of D
// below 1e-3 of its largest value (multiples of the period are minima
// too), then refined by golden-section search.
func period(f func(t float64) float64, span, lo, hi float64) float64 {
	const n = 48
	base := make([]float64, n)
	for k := range base {
		base[k] = f(span * float64(k) / n)
	}
	d := func(tau float64) float64 {
		sum := 0.0
		for k := range base {
			v := f(span*float64(k)/n+tau) - base[k]
			sum += v * v
		}
		return sum
	}
	var grid []float64
	dmax := 0.0
	for tau := lo; tau <= hi; tau++ {
		grid = append(grid, d(tau))
		dmax = math.Max(dmax, grid[len(grid)-1])
	}
	best := math.NaN()
	for k := 1; k+1 < len(grid); k++ {
		if grid[k] <= grid[k-1] && grid[k] <= grid[k+1] && grid[k] < 1e-3*dmax {
			best = lo + float64(k)
			break
		}
	}
	if math.IsNaN(best) {
		return best
	}
	a, b := best-1, best+1
	g := (math.Sqrt(5) - 1) / 2
	for b-a > 1e-9*best {
		c, e := b-g*(b-a), a+g*(b-a)
		if d(c) < d(e) {
			b = e
		} else {
			a = c
		}
	}
	return (a + b) / 2
}

// The light curve and the centroid track repeat with the orbital period
// of the spot, 2π(r^{3/2} + a) M (Bardeen, Press & Teukolsky 1972, eq.
// 2.16), measured from the curves themselves over lags of 20 to 200 M.
func TestLightCurvePeriod(t *testing.T) {
	const a, rs = 0.5, 7.0
	r, sp := movieScene(t, a, 60, func(s *scene.Scene) { s.Screen.Width, s.Screen.Height = 64, 64 })
	tb := trace(t, r, sp)
	want := 2 * math.Pi * (math.Pow(rs, 1.5) + a)
	flux := func(x float64) float64 { return tb.At(x, nil, nil, false).Flux }
	cx := func(x float64) float64 { return tb.At(x, nil, nil, false).Alpha }
	cy := func(x float64) float64 { return tb.At(x, nil, nil, false).Beta }
	for _, c := range []struct {
		name string
		f    func(float64) float64
	}{{"flux", flux}, {"centroid α", cx}, {"centroid β", cy}} {
		got := period(c.f, 150, 20, 200)
		t.Logf("%s: period %.12g M, 2π(r^{3/2}+a) = %.12g M", c.name, got, want)
		if !(math.Abs(got-want) <= 1e-6*want) {
			t.Errorf("%s: period %.9g M, want %.9g M", c.name, got, want)
		}
	}
	// The curve does vary: at the period 2π r^{3/2} of a = 0 it does
	// not repeat.
	f0, f1 := flux(10), flux(10+2*math.Pi*math.Pow(rs, 1.5))
	if math.Abs(f1-f0) < 1e-3*f0 {
		t.Errorf("flux repeats after 2π r^{3/2} too (%g, %g): the test cannot tell the periods apart", f0, f1)
	}
}

// Face on (θo = 0) every point of an orbit is seen alike, so the flux
// does not change in time; what remains is the sampling of the moving
// image on the fixed pixel grid. The direct image (order 0) of the
// σ = 0.7 M spot is a smooth blob about 2 pixels of σ wide at 96² pixels
// of 0.31 M, and the pixel sum of a smooth, well-resolved blob errs by
// far less than its rounding (the grid sum of a Gaussian of width σ
// pixels errs by about 2 exp(−2π²σ²), common practice): tolerance 1e-7
// of the flux (measured: 6e-10). Order 1, a ring a few hundredths of a
// pixel thick, is not resolved at such sizes (its sum jumps by 5% at 96²
// pixels, 1.6% at 192²), so the check follows order 0 only. At 60° the
// same spot varies by more than 20%, so the check can fail.
func TestFaceOnFluxConstant(t *testing.T) {
	spread := func(incl float64) float64 {
		r, sp := movieScene(t, 0.9, incl, func(s *scene.Scene) { s.Disk.Orders = 1 })
		tb := trace(t, r, sp)
		lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
		times := tb.Times()
		for _, x := range times {
			f := tb.At(x, nil, nil, false).Flux
			lo, hi, sum = math.Min(lo, f), math.Max(hi, f), sum+f
		}
		return (hi - lo) / (sum / float64(len(times)))
	}
	face := spread(0)
	t.Logf("face on: (max − min)/mean of the flux = %.3g", face)
	if face > 1e-7 {
		t.Errorf("face on: flux varies by %.3g of its mean, want ≤ 1e-7", face)
	}
	if s := spread(60); s < 0.2 {
		t.Errorf("at 60°: flux varies by only %.3g of its mean; the face-on check would not tell", s)
	}
}

// A spot that covers a whole ring (annulus, 360°, contrast 1) shines like
// the steady disk between the same radii, at every observer time: its
// flux equals that of an independent render of the transparent disk with
// inner and outer edges at the annulus (sum over pixels and orders of
// g³ ε limb × pixel area, as in the spectrum). Tolerance 1e-6: the
// steady frame keeps each pixel's intensity in float32 (rounding 6e-8).
func TestRingFluxConservation(t *testing.T) {
	r, sp := movieScene(t, 0.9, 60, func(s *scene.Scene) {
		s.Spot.Profile, s.Spot.ArcDeg, s.Spot.Contrast, s.Spot.Radius, s.Spot.Size = "annulus", 360, 1, 6, 2
		s.Disk.Orders = 3
	})
	tb := trace(t, r, sp)
	s := r.Scene
	in := 5.0
	s.Disk.InnerRadius, s.Disk.OuterRadius, s.Disk.Opaque = &in, 7, false
	s.Output.Maps = []string{"intensity"}
	rd, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	f, err := pixels.Render(context.Background(), rd, nil)
	if err != nil {
		t.Fatal(err)
	}
	steady := 0.0
	for _, v := range f.Total(f.Line) {
		if !math.IsNaN(float64(v)) {
			steady += float64(v)
		}
	}
	steady *= rd.PixelSize * rd.PixelSize
	for _, x := range []float64{0, 37, 111.5} {
		got := tb.At(x, nil, nil, false).Flux
		t.Logf("t = %g M: ring spot %.12g, steady annulus %.12g", x, got, steady)
		if math.Abs(got-steady) > 1e-6*steady {
			t.Errorf("t = %g M: ring spot flux %.12g, steady annulus %.12g", x, got, steady)
		}
	}
}
