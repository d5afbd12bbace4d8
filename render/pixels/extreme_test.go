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
	// shrinks as a → 1, and never bluer than g = √3 (common practice, no
	// source). Windows across that piece are rendered with a transparent
	// disk (the front of an opaque disk hides this light at 75°) and the
	// band r ∈ [r_isco, 1 + 2(r_isco - 1)] is located in them.
	//
	// The lower bound g ≥ 1/√3 sometimes quoted with it does not hold here:
	// the higher-order images of that band reach g ≈ 0.24, so only g > 0 is
	// asserted on that side and the extremes are logged.
	prev := math.Inf(1)
	for k := 6; k <= 12; k += 2 {
		a := 1 - math.Pow(10, float64(-k))
		eps := math.Cbrt(1 - a)
		gmin, gmax, dmax, pixels := math.Inf(1), math.Inf(-1), 0.0, 0
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
			gmin, gmax = math.Min(gmin, *rep.GMin), math.Max(gmax, *rep.GMax)
			dmax = math.Max(dmax, *rep.CriticalDistanceMax)
		}
		t.Logf("a = 1 - 1e-%d: %d pixels, g %.5f … %.5f, farthest %.3g M = %.3g (1-a)^(1/3) from the critical curve", k, pixels, gmin, gmax, dmax, dmax/eps)
		if pixels == 0 {
			t.Errorf("a=1-1e-%d: no near-horizon emission found", k)
			continue
		}
		if !(gmin > 0) || gmax > math.Sqrt(3) {
			t.Errorf("a=1-1e-%d: g range %v … %v leaves (0, √3]", k, gmin, gmax)
		}
		if dmax > 8*eps || !(dmax < prev) {
			t.Errorf("a=1-1e-%d: emission %v from the critical curve (8 (1-a)^(1/3) = %v, previous spin %v)", k, dmax, 8*eps, prev)
		}
		prev = dmax
	}
}
