package raytrace

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// angleMod returns the difference of two polarisation angles modulo π,
// in [0, π/2].
func angleMod(x, y float64) float64 {
	d := math.Mod(x-y, math.Pi)
	if d < 0 {
		d += math.Pi
	}
	return math.Min(d, math.Pi-d)
}

// TestPolarisationMatchesTransport checks the closed-form polarisation
// transport against an independent numerical parallel transport
// (Observer.Transport: Christoffel symbols from the metric's derivatives,
// adaptive Dormand–Prince) on seeded random rays, every crossing up to the
// fourth, spins of both signs up to |a| = 1 − 1e-8:
//
//   - the Walker–Penrose constant is conserved along the numerical path
//     (Walker & Penrose 1970, Commun. Math. Phys. 18, 265), relative
//     change ≤ 1e-7;
//   - EquatorialMomentum and Observer.Up give the integrated wave vector
//     at each crossing (relative 1e-7, same vertical direction);
//   - the angle on the screen that ScreenPolarisation (Himwich et al.
//     2020, Phys. Rev. D 101, 084020) gives from the transported vector
//     and the closed-form wave vector at the crossing is the angle the
//     vector started with at the observer, to 1e-6 rad.
func TestPolarisationMatchesTransport(t *testing.T) {
	n := 400
	if testing.Short() {
		n = 60
	}
	rng := rand.New(rand.NewPCG(20261202, 14))
	spins := []float64{0, 0.5, -0.7, 0.9, 0.998, -0.998, 1 - 1e-8, -(1 - 1e-8)}
	var worstK, worstAng, worstP float64
	checked := 0
	for i := 0; i < n; i++ {
		a := spins[i%len(spins)]
		if i%3 == 2 {
			a = -0.999 + 1.998*rng.Float64()
		}
		inc := 1 + 178*rng.Float64()
		al := -12 + 24*rng.Float64()
		be := -12 + 24*rng.Float64()
		chi := math.Pi * rng.Float64()
		o, err := NewObserver(a, inc)
		if err != nil {
			t.Fatal(err)
		}
		if nearCritical(o, al, be, 1e-6) {
			continue
		}
		k0, out, err := o.Transport(al, be, chi, 1e-9, 4, 1e-13)
		if err != nil {
			t.Fatalf("a=%v i=%v α=%v β=%v: %v", a, inc, al, be, err)
		}
		var p Path
		o.Trace(al, be, 4, &p)
		if len(p.Crossings) != len(out) {
			t.Errorf("a=%v i=%v α=%v β=%v: %d crossings closed form, %d transported", a, inc, al, be, len(p.Crossings), len(out))
			continue
		}
		for m, c := range out {
			checked++
			if e := cmplx.Abs(c.Kappa-k0) / cmplx.Abs(k0); e > worstK {
				worstK = e
			}
			if c.Up != o.Up(be, m) {
				t.Errorf("a=%v i=%v α=%v β=%v order %d: integrated up=%v, Observer.Up %v", a, inc, al, be, m, c.Up, o.Up(be, m))
			}
			k := EquatorialMomentum(a, p.Lambda, p.Eta, c.R, c.Outbound, o.Up(be, m))
			for j := range k {
				if e := math.Abs(k[j]-c.K[j]) / (math.Abs(c.K[0]) + math.Abs(c.K[j])); e > worstP {
					worstP = e
				}
			}
			kap := WalkerPenrose(a, c.R, math.Pi/2, k, c.F)
			ea, eb, ok := o.ScreenPolarisation(al, be, kap)
			if !ok {
				t.Errorf("a=%v i=%v α=%v β=%v order %d: no screen angle", a, inc, al, be, m)
				continue
			}
			if d := angleMod(math.Atan2(eb, ea), chi); d > worstAng {
				worstAng = d
				if d > 1e-6 {
					t.Errorf("a=%v i=%v α=%v β=%v order %d r=%.6g: angle %.9f, transported %.9f", a, inc, al, be, m, c.R, math.Atan2(eb, ea), chi)
				}
			}
		}
	}
	if checked < n/2 {
		t.Fatalf("only %d crossings checked", checked)
	}
	if worstK > 1e-7 {
		t.Errorf("Walker–Penrose constant changes by %.3g along the path", worstK)
	}
	if worstP > 1e-7 {
		t.Errorf("closed-form wave vector differs by %.3g", worstP)
	}
	t.Logf("%d crossings: worst relative change of κ %.3g, of k %.3g, worst angle %.3g rad", checked, worstK, worstP, worstAng)
}

// TestWalkerPenroseGauge checks that κ does not change under f → f + c k
// and that it scales linearly with f (Walker & Penrose 1970).
func TestWalkerPenroseGauge(t *testing.T) {
	a, r := 0.8, 5.0
	k := EquatorialMomentum(a, 2.1, 9.5, r, true, false)
	f := Vector{0.3, -0.2, 0.05, 0.07}
	k1 := WalkerPenrose(a, r, math.Pi/2, k, f)
	var g Vector
	for i := range f {
		g[i] = 2*f[i] + 3.7*k[i]
	}
	k2 := WalkerPenrose(a, r, math.Pi/2, k, g)
	if cmplx.Abs(k2-2*k1) > 1e-12*cmplx.Abs(k1) {
		t.Errorf("κ(2f + c k) = %v, 2κ(f) = %v", k2, 2*k1)
	}
	if e := Dot(a, r, k, k); math.Abs(e) > 1e-12 {
		t.Errorf("k·k = %v, want 0 (null)", e)
	}
}
