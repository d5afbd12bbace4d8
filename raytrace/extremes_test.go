package raytrace

import (
	"math"
	"testing"
)

// checkInvariants asserts what must hold for any ray: finite results,
// crossings at or outside the horizon, strictly increasing Mino times
// inside the total, and no crossing for η ≤ 0 (at cos θ = 0 the angular
// potential (dx/dτ)² = η + A x² - a² x⁴ equals η, so such photons never
// reach the equatorial plane; Carter 1968).
func checkInvariants(t *testing.T, o Observer, alpha, beta float64, p *Path) {
	t.Helper()
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
	if bad(p.Lambda) || bad(p.Eta) || bad(p.Mino) || p.Mino <= 0 {
		t.Fatalf("a=%v i=%v α=%v β=%v: λ=%v η=%v total=%v", o.Spin(), o.InclinationDeg(), alpha, beta, p.Lambda, p.Eta, p.Mino)
	}
	if p.Fate != Captured && p.Fate != Escaped {
		t.Fatalf("a=%v i=%v α=%v β=%v: fate %v", o.Spin(), o.InclinationDeg(), alpha, beta, p.Fate)
	}
	if p.Eta <= 0 && len(p.Crossings) > 0 {
		t.Fatalf("a=%v i=%v α=%v β=%v: η=%v but %d crossings", o.Spin(), o.InclinationDeg(), alpha, beta, p.Eta, len(p.Crossings))
	}
	prev := 0.0
	for i, c := range p.Crossings {
		if bad(c.R) || bad(c.Mino) || c.R < o.Horizon() || !(c.Mino > prev) || c.Mino >= p.Mino {
			t.Fatalf("a=%v i=%v α=%v β=%v: crossing %d = %+v (r+ = %v, total %v)", o.Spin(), o.InclinationDeg(), alpha, beta, i, c, o.Horizon(), p.Mino)
		}
		prev = c.Mino
	}
}

func TestExtremes(t *testing.T) {
	spins := []float64{0, 1e-12, -1e-12, 0.5, -0.7, 1 - 1e-9, -(1 - 1e-9), 0.999999999999}
	incs := []float64{0, 1e-9, 30, 89.999999, 90, 90.000001, 150, 180}
	screen := []float64{0, 1e-13, -1e-7, 0.5, -2.1, 4.9, 7, -12, 30}
	var p Path
	for _, a := range spins {
		for _, inc := range incs {
			o, err := NewObserver(a, inc)
			if err != nil {
				t.Fatal(err)
			}
			for _, al := range screen {
				for _, be := range screen {
					o.Trace(al, be, 6, &p)
					checkInvariants(t, o, al, be, &p)
				}
			}
			// Rays within 1e-12 of the critical curve, both sides.
			for i, q := range o.CriticalCurve(40) {
				if i%5 != 0 {
					continue
				}
				for _, f := range []float64{1 - 1e-12, 1, 1 + 1e-12} {
					o.Trace(q.Alpha*f, q.Beta*f, 6, &p)
					checkInvariants(t, o, q.Alpha*f, q.Beta*f, &p)
				}
			}
		}
	}
}

func TestVorticalRaysFallIn(t *testing.T) {
	// η < 0 rays exist only near the poles; they never cross the plane and
	// fall into the hole (Gralla & Lupsasca 2020, sec. III). The integrator
	// confirms the fate independently.
	var p, q Path
	count := 0
	for _, a := range []float64{0.6, 0.99, -0.95} {
		for _, inc := range []float64{0, 3, 177, 180} {
			o, _ := NewObserver(a, inc)
			for al := -1.0; al <= 1.0; al += 0.125 {
				for be := -1.0; be <= 1.0; be += 0.125 {
					o.Trace(al, be, 3, &p)
					if p.Eta >= 0 {
						continue
					}
					count++
					checkInvariants(t, o, al, be, &p)
					if p.Fate != Captured {
						t.Errorf("a=%v i=%v α=%v β=%v: η<0 ray escapes", a, inc, al, be)
					}
					if err := o.Integrate(al, be, 3, 1e-12, &q); err != nil || q.Fate != Captured || len(q.Crossings) != 0 {
						t.Errorf("a=%v i=%v α=%v β=%v: integrator %v %v %v", a, inc, al, be, err, q.Fate, q.Crossings)
					}
					if math.Abs(q.Mino-p.Mino) > 1e-8*p.Mino {
						t.Errorf("a=%v i=%v α=%v β=%v: total Mino time %v, integrator %v", a, inc, al, be, p.Mino, q.Mino)
					}
				}
			}
		}
	}
	if count == 0 {
		t.Fatal("no η < 0 ray sampled")
	}
}

func TestNewObserverRejects(t *testing.T) {
	for _, c := range [][2]float64{{1, 45}, {-1, 45}, {math.NaN(), 45}, {0.5, -1}, {0.5, 180.0001}, {0.5, math.NaN()}, {math.Inf(1), 3}} {
		if _, err := NewObserver(c[0], c[1]); err == nil {
			t.Errorf("NewObserver(%v, %v) accepted", c[0], c[1])
		}
	}
}
