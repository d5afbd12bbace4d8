package pixels

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// criticalAlpha returns α of the critical curve's prograde side at β, by
// bisection on the photon's fate (captured inside, escaped outside).
func criticalAlpha(o raytrace.Observer, beta float64) float64 {
	var p raytrace.Path
	in, out := 0.0, -2/o.SinInclination()-1
	for i := 0; i < 200; i++ {
		mid := (in + out) / 2
		o.Trace(mid, beta, 0, &p)
		if p.Fate == raytrace.Captured {
			in = mid
		} else {
			out = mid
		}
	}
	return (in + out) / 2
}

func TestExtremeSpinCrossingsMatchIntegrator(t *testing.T) {
	// Closed form vs our Dormand–Prince integrator at tolerance 1e-13 for
	// photons grazing the near-extremal vertical piece of the shadow edge
	// (Bardeen 1973), where step-based methods struggle.
	rng := rand.New(rand.NewPCG(9, 9))
	var pc, pi raytrace.Path
	for k := 6; k <= 12; k += 2 {
		a := 1 - math.Pow(10, float64(-k))
		o, _ := raytrace.NewObserver(a, 75)
		s, c := o.SinInclination(), o.CosInclination()
		bmax := math.Sqrt(3 + c*c - 4*c*c/(s*s))
		eps := math.Cbrt(1 - a)
		worst, n := 0.0, 0
		for i := 0; i < 40; i++ {
			beta := bmax * (2*rng.Float64() - 1) * 0.9
			ac := criticalAlpha(o, beta)
			al := ac - eps*math.Pow(10, -2*rng.Float64()) // just outside
			o.Trace(al, beta, 3, &pc)
			if err := o.Integrate(al, beta, 3, 1e-13, &pi); err != nil {
				t.Fatalf("a=1-1e-%d: %v", k, err)
			}
			if pc.Fate != pi.Fate || len(pc.Crossings) != len(pi.Crossings) {
				t.Errorf("a=1-1e-%d α=%v β=%v: closed form %v %v, integrator %v %v", k, al, beta, pc.Fate, pc.Crossings, pi.Fate, pi.Crossings)
				continue
			}
			for j := range pc.Crossings {
				e := math.Abs(pc.Crossings[j].R-pi.Crossings[j].R) / pi.Crossings[j].R
				worst = math.Max(worst, e)
				n++
				if e > 1e-8 {
					t.Errorf("a=1-1e-%d α=%v β=%v crossing %d: r %v vs integrator %v", k, al, beta, j, pc.Crossings[j].R, pi.Crossings[j].R)
				}
			}
		}
		t.Logf("a = 1 - 1e-%d: %d crossings, worst relative difference in r %.2e", k, n, worst)
	}
}

func TestNearHorizonEmissionOnVerticalPiece(t *testing.T) {
	// Emission from just outside the horizon of a near-extremal hole reaches
	// a distant observer only close to the vertical piece of the critical
	// curve (Bardeen 1973), within a few (1-a)^{1/3}, a distance that
	// shrinks as a → 1. Windows across that piece are rendered with a
	// transparent disk (the front of an opaque disk hides this light at
	// 75°) and the band r ∈ [r_isco, 1 + 2(r_isco - 1)] is located in them.
	//
	// Split by the photons' fate: those that escape to infinity (just
	// outside the critical curve) arrive with 1/√3 ≤ g ≤ √3 (measured
	// here, and checked ray by ray against raytrace.Integrate in
	// TestNearHorizonRedshiftByFate); those that end at the horizon (just
	// inside it) arrive redder, below 1/√3.
	prev := math.Inf(1)
	lo, hi := 1/math.Sqrt(3), math.Sqrt(3)
	for k := 6; k <= 12; k += 2 {
		a := 1 - math.Pow(10, float64(-k))
		eps := math.Cbrt(1 - a)
		esc := [2]float64{math.Inf(1), math.Inf(-1)}
		capt := esc
		dmax, pixels := 0.0, 0
		for _, beta := range []float64{-1.2, 0, 0.9} {
			o, _ := raytrace.NewObserver(a, 75)
			ac := criticalAlpha(o, beta)
			s := scene.Default()
			s.Hole.Spin, s.Observer.InclinationDeg = a, 75
			s.Screen.Width, s.Screen.Height = 96, 96
			s.Screen.FieldOfView = 24 * eps
			s.Screen.CenterAlpha, s.Screen.CenterBeta = ac-8*eps, beta
			s.Disk.Orders = 4
			s.Disk.Opaque = false
			r, err := s.Resolve()
			if err != nil {
				t.Fatal(err)
			}
			r.BandMin, r.BandMax = r.ISCO, 1+2*(r.ISCO-1)
			f, err := Render(context.Background(), r, nil, KeepAll|KeepBand)
			if err != nil {
				t.Fatal(err)
			}
			rep, err := f.LocateBand()
			if err != nil {
				t.Fatal(err)
			}
			n := 0
			for _, c := range rep.Pixels {
				n += c
			}
			if n == 0 {
				continue
			}
			pixels += n
			for _, ord := range rep.Orders {
				if e := ord.Escaping; e.GMin != nil {
					esc = [2]float64{math.Min(esc[0], *e.GMin), math.Max(esc[1], *e.GMax)}
				}
				if c := ord.Captured; c.GMin != nil {
					capt = [2]float64{math.Min(capt[0], *c.GMin), math.Max(capt[1], *c.GMax)}
				}
			}
			dmax = math.Max(dmax, *rep.CriticalDistanceMax)
		}
		t.Logf("a = 1 - 1e-%d: %d pixels, g escaping %.5f … %.5f, captured %.5f … %.5f, farthest %.3g M = %.3g (1-a)^(1/3) from the critical curve",
			k, pixels, esc[0], esc[1], capt[0], capt[1], dmax, dmax/eps)
		if pixels == 0 || math.IsInf(esc[0], 1) {
			t.Errorf("a=1-1e-%d: no escaping near-horizon emission found", k)
			continue
		}
		if esc[0] < lo || esc[1] > hi {
			t.Errorf("a=1-1e-%d: escaping g range %v … %v leaves [1/√3, √3]", k, esc[0], esc[1])
		}
		if !(capt[0] > 0) || capt[1] > hi || !(capt[0] < lo) {
			t.Errorf("a=1-1e-%d: captured g range %v … %v leaves (0, √3] or does not reach below 1/√3", k, capt[0], capt[1])
		}
		if dmax > 8*eps || !(dmax < prev) {
			t.Errorf("a=1-1e-%d: emission %v from the critical curve (8 (1-a)^(1/3) = %v, previous spin %v)", k, dmax, 8*eps, prev)
		}
		prev = dmax
	}
}

func TestNearHorizonRedshiftByFate(t *testing.T) {
	// Ray by ray with the independent integrator (raytrace.Integrate at
	// tolerance 1e-12, not the closed form): at a = 1 - 1e-8, θo = 75°,
	// photons just outside the vertical piece of the critical curve
	// (Bardeen 1973) escape, and every crossing of theirs with the disk
	// gas at r ≤ 1.01 arrives with 1/√3 ≤ g ≤ √3 (our measurement, which
	// the render of TestNearHorizonEmissionOnVerticalPiece finds too);
	// photons just inside it end at the horizon, and some of their
	// crossings at r ≤ 1.01 arrive with g < 1/√3.
	a := 1 - 1e-8
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg = a, 75
		s.Disk.Orders, s.Disk.Opaque = 4, false
	})
	m, err := NewModel(r)
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := 1/math.Sqrt(3), math.Sqrt(3)
	escMin, escMax, captMin := math.Inf(1), math.Inf(-1), math.Inf(1)
	var p raytrace.Path
	var betas []float64
	for b := -1.6; b < 1.65; b += 0.2 {
		betas = append(betas, b)
	}
	if testing.Short() {
		betas = []float64{-0.6, 0.6}
	}
	for _, beta := range betas {
		ac := criticalAlpha(m.Obs, beta)
		for e := -7.0; e <= -1.5; e += 0.25 {
			for _, side := range []float64{-1, 1} { // outside, inside
				al := ac + side*math.Pow(10, e)
				if err := m.Obs.Integrate(al, beta, 4, 1e-12, &p); err != nil {
					t.Fatal(err)
				}
				for _, c := range p.Crossings {
					if c.R > 1.01 {
						continue
					}
					g, ok := m.RedshiftAt(c, p.Lambda, p.Eta)
					if !ok {
						continue
					}
					switch {
					case side < 0 && p.Fate == raytrace.Escaped:
						escMin, escMax = math.Min(escMin, g), math.Max(escMax, g)
						if g < lo || g > hi {
							t.Errorf("β %v, α = α_c - %.1e: escaping photon, crossing r = %v, g = %v outside [1/√3, √3]", beta, math.Pow(10, e), c.R, g)
						}
					case side > 0 && p.Fate == raytrace.Captured:
						captMin = math.Min(captMin, g)
					default:
						t.Errorf("β %v, α %v: fate %v on the %v side of the critical curve", beta, al, p.Fate, side)
					}
				}
			}
		}
	}
	t.Logf("integrated crossings at r ≤ 1.01: escaping g %.5f … %.5f, captured g from %.5f", escMin, escMax, captMin)
	if math.IsInf(escMin, 1) || !(captMin < lo) {
		t.Errorf("escaping g from %v, captured from %v: want escaping crossings and captured ones below 1/√3", escMin, captMin)
	}
}

func TestVerticalPieceFirstCrossing(t *testing.T) {
	// At a = 1 - 1e-8, θo = 75°, the critical curve's prograde side lies at
	// α ≈ -2/sin θo for |β| below sqrt(3 + cos²θo - 4 cot²θo) (Bardeen
	// 1973, the extremal limit). The photons just outside it cross the
	// equatorial plane first (nearest the observer) at a radius that
	// depends strongly on β: about 1.24 M at β ≈ 0.5, 1.48 M at β = 0 and
	// 4.2 M at β = -1 (our measurement; every value checked against
	// raytrace.Integrate at tolerance 1e-12). All lie on the default disk
	// (ISCO … 30 M), so an opaque disk stops these photons there, before
	// they reach their near-horizon crossings.
	a := 1 - 1e-8
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg = a, 75
		s.Disk.Orders, s.Disk.Opaque = 4, true
	})
	m, err := NewModel(r)
	if err != nil {
		t.Fatal(err)
	}
	sn, cs := m.Obs.SinInclination(), m.Obs.CosInclination()
	bmax := math.Sqrt(3 + cs*cs - 4*cs*cs/(sn*sn))
	want := map[float64][2]float64{0.5: {1.23, 1.25}, 0: {1.47, 1.49}, -1: {4.2, 4.27}}
	var pc, pi raytrace.Path
	var smp Sample
	rmin, rmax := math.Inf(1), math.Inf(-1)
	for _, beta := range []float64{-1.4, -1.2, -1, -0.6, -0.2, 0, 0.2, 0.5, 0.6, 0.8, 1.0, 1.2, 1.4} {
		ac := criticalAlpha(m.Obs, beta)
		if d := math.Abs(ac + 2/sn); d > 2*math.Cbrt(1-a) || math.Abs(beta) > bmax {
			t.Fatalf("β %v: critical α %v is %v from -2/sin θo (|β| ≤ %v)", beta, ac, d, bmax)
		}
		al := ac - 1e-6
		m.Obs.Trace(al, beta, 4, &pc)
		if err := m.Obs.Integrate(al, beta, 4, 1e-12, &pi); err != nil {
			t.Fatal(err)
		}
		if pi.Fate != raytrace.Escaped || len(pi.Crossings) == 0 || len(pc.Crossings) == 0 {
			t.Fatalf("β %v: integrated fate %v with %d crossings", beta, pi.Fate, len(pi.Crossings))
		}
		r0 := pi.Crossings[0].R
		if e := math.Abs(pc.Crossings[0].R-r0) / r0; e > 1e-8 {
			t.Errorf("β %v: first crossing %v, integrator %v", beta, pc.Crossings[0].R, r0)
		}
		rmin, rmax = math.Min(rmin, r0), math.Max(rmax, r0)
		if w, ok := want[beta]; ok && (r0 < w[0] || r0 > w[1]) {
			t.Errorf("β %v: first crossing at r = %v, want %v … %v", beta, r0, w[0], w[1])
		}
		m.Shade(al, beta, &pc, &smp)
		if smp.First != 0 || smp.Hits[0].R != pc.Crossings[0].R {
			t.Errorf("β %v: an opaque disk does not stop the photon at its first crossing r = %v (first seen %d)", beta, r0, smp.First)
		}
		var later []float64
		for _, c := range pi.Crossings[1:] {
			later = append(later, math.Round(c.R*1e5)/1e5)
		}
		t.Logf("β = %5.2f: α_c = %.7f, first crossing r = %.4f M, then %v", beta, ac, r0, later)
	}
	if rmax < 3*rmin {
		t.Errorf("first crossings span only %v … %v M along the vertical piece", rmin, rmax)
	}
}

func TestNearHorizonDirectImage(t *testing.T) {
	// With an opaque disk at a = 1 - 1e-8, θo = 75°, light from r ≤ 1.01
	// still reaches the observer, in the direct image only: a thin ring of
	// photons that end at the horizon, hugging the disk's image of the
	// horizon (the pixels whose photons fall in without meeting the disk),
	// strongly redshifted and faint. Our measurement (400² pixels, depth
	// 4, 64 M field): g ≈ 5e-4 … 0.03, 6e-8 of the window's line flux; the
	// photon at the ring's most covered pixel is checked with
	// raytrace.Integrate.
	if testing.Short() {
		t.Skip("renders a refined 160² window")
	}
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg = 1-1e-8, 75
		s.Disk.Orders, s.Disk.Opaque = 4, true
		s.Screen.Width, s.Screen.Height = 160, 160
		s.Screen.FieldOfView = 64
		s.Refine.Depth = 4
		s.Band.RMin, s.Band.RMax = "horizon", "1.01"
	})
	f, err := RenderScene(context.Background(), r, nil, KeepAll|KeepBand)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := f.LocateBand()
	if err != nil {
		t.Fatal(err)
	}
	d := rep.Orders[0].Captured
	t.Logf("direct, captured: area %.3g M², flux fraction %.3g, g %.3g … %.3g, %d pixels", d.Area, d.FluxFraction, *d.GMin, *d.GMax, rep.Pixels[0])
	if d.GMin == nil || !(*d.GMin > 1e-4) || !(*d.GMax < 0.05) || !(d.FluxFraction > 1e-8 && d.FluxFraction < 1e-6) {
		t.Errorf("direct image of r ≤ 1.01: g %v … %v, flux fraction %v", d.GMin, d.GMax, d.FluxFraction)
	}
	if rep.Orders[0].Escaping.Area != 0 || d.Area != rep.Area {
		t.Errorf("band light outside the captured direct image: %+v", rep.Orders)
	}
	// Every pixel of the ring lies within two pixels of the disk's image
	// of the horizon.
	best, bestFrac := -1, float32(0)
	for k, v := range f.Band[0] {
		if v == 0 {
			continue
		}
		if v > bestFrac {
			best, bestFrac = k, v
		}
		i, j, near := k%f.W, k/f.W, false
		for y := max(0, j-2); y <= min(f.H-1, j+2) && !near; y++ {
			for x := max(0, i-2); x <= min(f.W-1, i+2); x++ {
				if f.Fate[y*f.W+x] == raytrace.Captured && f.First[y*f.W+x] < 0 {
					near = true
					break
				}
			}
		}
		if !near {
			t.Errorf("ring pixel (%d, %d) is more than two pixels from the horizon's image", i, j)
		}
	}
	var p raytrace.Path
	al, be := PixelAlpha(r, best%f.W), PixelBeta(r, best/f.W)
	if err := f.Model.Obs.Integrate(al, be, 4, 1e-12, &p); err != nil {
		t.Fatal(err)
	}
	if p.Fate != raytrace.Captured || len(p.Crossings) == 0 || p.Crossings[0].R > 1.05 {
		t.Errorf("ring pixel (%v, %v), %.2f in the band: integrated fate %v, crossings %v", al, be, bestFrac, p.Fate, p.Crossings)
	}
}
