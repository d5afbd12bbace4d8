package raytrace

import (
	"math"
	"math/rand/v2"
	"testing"
)

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !(math.Abs(got-want) <= tol) {
		t.Errorf("%s = %.12g, want %.12g ± %g", what, got, want, tol)
	}
}

func TestHorizon(t *testing.T) {
	// r₊ = 1 + sqrt(1 - a²) (Boyer & Lindquist 1967; Bardeen, Press & Teukolsky 1972).
	near(t, "r+(0)", Horizon(0), 2, 0)
	near(t, "r+(0.6)", Horizon(0.6), 1.8, 1e-15)
	near(t, "r+(-0.6)", Horizon(-0.6), 1.8, 1e-15)
	near(t, "r+(1-1e-9)", Horizon(1-1e-9), 1+math.Sqrt(2e-9), 1e-12)
}

func TestISCOAndEfficiency(t *testing.T) {
	// Bardeen, Press & Teukolsky 1972, ApJ 178, 347 (values quoted to 4 decimals).
	near(t, "isco(0)", ISCO(0), 6, 1e-12)
	near(t, "isco(0.998)", ISCO(0.998), 1.2370, 5e-5)
	near(t, "isco(-0.998)", ISCO(-0.998), 8.9944, 5e-5)
	near(t, "efficiency(0)", Efficiency(0), 0.0572, 5e-5)
	near(t, "efficiency(0.998)", Efficiency(0.998), 0.3210, 5e-5)
	// Exact Schwarzschild value 1 - sqrt(8/9) (Bardeen, Press & Teukolsky 1972).
	near(t, "efficiency(0) exact", Efficiency(0), 1-math.Sqrt(8.0/9.0), 1e-14)
	// Extremal limits: r_isco → 1 prograde, 9 retrograde (same paper).
	near(t, "isco(1-1e-12)", ISCO(1-1e-12), 1, 1e-3)
	near(t, "isco(-1+1e-12)", ISCO(-1+1e-12), 9, 1e-6)
	// The ISCO is where dE/dr = 0 along circular orbits: an independent check
	// of the formula for random spins (BPT 1972 define it so).
	for _, a := range []float64{-0.9, -0.3, 0.2, 0.7, 0.95} {
		r := ISCO(a)
		e := func(r float64) float64 { o, _ := CircularOrbit(a, r); return o.E }
		h := 1e-4
		d := (e(r+h) - e(r-h)) / (2 * h)
		if math.Abs(d) > 1e-7 {
			t.Errorf("a=%v: dE/dr at ISCO = %g", a, d)
		}
	}
}

func TestPhotonOrbits(t *testing.T) {
	// Bardeen, Press & Teukolsky 1972: 3 for a = 0, 1 and 4 for |a| → 1.
	p, r := PhotonOrbits(0)
	near(t, "r_ph(0) pro", p, 3, 1e-14)
	near(t, "r_ph(0) retro", r, 3, 1e-14)
	p, r = PhotonOrbits(1 - 1e-12)
	near(t, "r_ph(1) pro", p, 1, 1e-3)
	near(t, "r_ph(1) retro", r, 4, 1e-6)
	// A circular photon orbit is a double root of R(r) for its λ, η
	// (Bardeen 1973): check R and R' vanish there.
	for _, a := range []float64{0.3, 0.9} {
		for _, t0 := range []float64{0, 1} {
			rr, l, e := criticalConstants(a, t0)
			A := a*a - e - l*l
			B := 2 * (e + (l-a)*(l-a))
			C := -a * a * e
			R := rr*rr*rr*rr + A*rr*rr + B*rr + C
			dR := 4*rr*rr*rr + 2*A*rr + B
			if math.Abs(R) > 1e-9 || math.Abs(dR) > 1e-9 {
				t.Errorf("a=%v t=%v: R=%g R'=%g", a, t0, R, dR)
			}
		}
	}
}

// TestPolish4 checks that polishing four roots side by side gives the
// one-at-a-time results to the last bit, over random quartics with four
// real roots near and far apart.
func TestPolish4(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 17))
	for i := 0; i < 20000; i++ {
		// r⁴ + A r² + B r + C with roots summing to zero.
		a, b, c := -10*rng.Float64(), 5*rng.Float64(), 1+20*rng.Float64()
		d := -(a + b + c)
		A := a*b + a*c + a*d + b*c + b*d + c*d
		B := -(a*b*c + a*b*d + a*c*d + b*c*d)
		C := a * b * c * d
		in := [4]float64{a * (1 + 1e-9), b * (1 - 1e-9), c * (1 + 3e-10), d * (1 - 2e-10)}
		g1, g2, g3, g4, o1, o2, o3, o4 := polish4(in[0], in[1], in[2], in[3], A, B, C)
		got := [4]float64{g1, g2, g3, g4}
		gok := [4]bool{o1, o2, o3, o4}
		for k, r := range in {
			w, ok := polish(r, A, B, C)
			if w != got[k] || ok != gok[k] {
				t.Fatalf("root %d of A=%g B=%g C=%g: %v,%v vs %v,%v", k, A, B, C, got[k], gok[k], w, ok)
			}
		}
	}
}
