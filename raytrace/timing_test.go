package raytrace

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// timingScale is the size against which a time or azimuth error is judged:
// 1 plus the magnitudes of what was compared, and the crossing radii (far
// crossings carry delays of order r).
func timingErr(got, want float64, scale ...float64) float64 {
	s := 1 + math.Abs(want)
	for _, v := range scale {
		s += math.Abs(v)
	}
	return math.Abs(got-want) / s
}

// TestTimingMatchesIntegrator checks TraceTimed against the independent
// Dormand–Prince integration of dt/dτ and dφ/dτ (IntegrateTimed) over
// many seeded random rays, drawn as in TestClosedFormMatchesIntegrator:
// for every crossing of two rays A and B of one observer, the regularised
// delay, the delay differences between the crossings of A and between A
// and B (the physical quantities, independent of the regularisation), and
// the azimuth, all to 1e-8 of their size.
func TestTimingMatchesIntegrator(t *testing.T) {
	n := 10000
	if testing.Short() {
		n = 1000
	}
	rng := rand.New(rand.NewPCG(20261202, 11))
	var ca, ia, cb, ib TimedPath
	mismatch, nearMiss, polar := 0, 0, 0
	var worstT, worstDiff, worstPhi, worstNearPole float64
	compared := 0
	for i := 0; i < n; i++ {
		a := -0.999 + 1.998*rng.Float64()
		inc := 180 * rng.Float64()
		switch i % 50 {
		case 0:
			inc = 0
		case 1:
			inc = 90
		case 2:
			inc = 180
		}
		ray := func() (float64, float64) { return -15 + 30*rng.Float64(), -15 + 30*rng.Float64() }
		alA, beA := ray()
		alB, beB := ray()
		if i%10 == 9 { // far rays and near-extremal holes
			a = math.Copysign(1-math.Pow(10, -3-9*rng.Float64()), a)
			f := math.Pow(10, 3*rng.Float64())
			alA, beA = alA*f, beA*f
		}
		o, err := NewObserver(a, inc)
		if err != nil {
			t.Fatal(err)
		}
		o.TraceTimed(alA, beA, 3, &ca)
		o.TraceTimed(alB, beB, 1, &cb)
		if err := o.IntegrateTimed(alA, beA, 3, 1e-13, &ia); err != nil {
			t.Fatalf("a=%v i=%v α=%v β=%v: %v", a, inc, alA, beA, err)
		}
		if err := o.IntegrateTimed(alB, beB, 1, 1e-13, &ib); err != nil {
			t.Fatalf("a=%v i=%v α=%v β=%v: %v", a, inc, alB, beB, err)
		}
		if nearCritical(o, alA, beA, 1e-9) || nearCritical(o, alB, beB, 1e-9) {
			nearMiss++
			continue
		}
		if len(ca.Times) != len(ia.Times) || len(cb.Times) != len(ib.Times) {
			mismatch++
			t.Errorf("a=%v i=%v: crossing counts %d/%d, %d/%d", a, inc, len(ca.Times), len(ia.Times), len(cb.Times), len(ib.Times))
			continue
		}
		// λ = 0 photons pass over a pole, where φ jumps; the integrator
		// does not see the jump (see IntegrateTimed).
		checkPhi := ca.Lambda != 0
		if !checkPhi {
			polar++
		}
		// The integrator resolves x = cos θ to about its tolerance; over a
		// pass near a pole the sweep λ∫dτ/sin²θ magnifies that by
		// 1/min sin²θ = 1/(1 − u₊), with u₊ the larger root of
		// η + A u − a² u² (Carter 1968): allow for it (10× margin).
		phiTol := 1e-8 + 10*1e-13/polarGap(a, ca.Lambda, ca.Eta)
		tTol := 1e-8 + extremalAllowance(a)
		phiTol += extremalAllowance(a)
		bad := false
		for k := range ca.Times {
			c, d := ca.Times[k], ia.Times[k]
			r := ca.Crossings[k].R
			e := timingErr(c.Delay, d.Delay, r)
			worstT = math.Max(worstT, e)
			if e > tTol {
				bad = true
			}
			if k > 0 {
				e := timingErr(c.Delay-ca.Times[0].Delay, d.Delay-ia.Times[0].Delay, r, ca.Crossings[0].R, d.Delay, ia.Times[0].Delay)
				worstDiff = math.Max(worstDiff, e)
				bad = bad || e > tTol
			}
			if len(cb.Times) > 0 {
				e := timingErr(c.Delay-cb.Times[0].Delay, d.Delay-ib.Times[0].Delay, r, cb.Crossings[0].R, d.Delay, ib.Times[0].Delay)
				worstDiff = math.Max(worstDiff, e)
				bad = bad || e > tTol
			}
			if checkPhi {
				e := timingErr(c.DeltaPhi, d.DeltaPhi)
				if phiTol < 2e-8+extremalAllowance(a) {
					worstPhi = math.Max(worstPhi, e)
				} else {
					worstNearPole = math.Max(worstNearPole, e/phiTol)
				}
				bad = bad || e > phiTol
			}
			compared++
		}
		if bad {
			mismatch++
			if mismatch < 10 {
				t.Errorf("a=%v i=%v α=%v β=%v: closed form %+v, integrator %+v (crossings %+v)", a, inc, alA, beA, ca.Times, ia.Times, ca.Crossings)
			}
		}
	}
	t.Logf("%d ray pairs, %d crossings compared: %d mismatches, %d within 1e-9 of the critical curve, %d with λ = 0 (φ not compared); worst relative error: delay %.2e, delay differences %.2e, azimuth %.2e (%.2f of the allowance near a pole)",
		n, compared, mismatch, nearMiss, polar, worstT, worstDiff, worstPhi, worstNearPole)
}

// extremalAllowance is the closed form's own rounding error near
// extremality, relative to the size of the delay or azimuth: the partial
// fractions C±/(r − r±) and A±/(r − r±) of the rates have coefficients of
// order 1/(r₊ − r₋) and opposite signs (see radialTimer), so the rounding
// of I± (about 1e-12 of their size) is magnified by that factor. Measured
// worst over these tests: 2.7e-12/(r₊ − r₋); the allowance is
// 1e-11/(r₊ − r₋): below 1e-8 for |a| < 0.99999, 3.5e-6 at |a| = 1 − 1e-12.
func extremalAllowance(a float64) float64 {
	return 1e-11 / (2 * math.Sqrt((1-a)*(1+a)))
}

// polarGap returns 1 − u₊ = λ²/(a² − a²u₋) for a photon with η > 0, from
// the roots u± of η + (a² − η − λ²) u − a² u² (the angular potential in
// u = cos²θ; Carter 1968), computed here by the quadratic formula.
func polarGap(a, lambda, eta float64) float64 {
	A := a*a - eta - lambda*lambda
	if a == 0 {
		return lambda * lambda / (eta + lambda*lambda)
	}
	// a²u² − A u − η = 0: u₋ = (A − sqrt(A² + 4a²η)) / (2a²).
	um := (A - math.Sqrt(A*A+4*a*a*eta)) / (2 * a * a)
	return lambda * lambda / (a * a * (1 - um))
}

// compareTimed traces (α, β) both ways and returns the worst error of the
// delays, delay differences and azimuths (as in
// TestTimingMatchesIntegrator), in units of 1e-8 times the allowance (so
// 1e-8 means: at the allowance), and whether the crossing counts agree.
func compareTimed(t *testing.T, o Observer, alpha, beta float64, orders int, tol float64) (worst float64, ok bool) {
	t.Helper()
	var c, d TimedPath
	o.TraceTimed(alpha, beta, orders, &c)
	if err := o.IntegrateTimed(alpha, beta, orders, tol, &d); err != nil {
		t.Fatalf("a=%v i=%v α=%v β=%v: %v", o.Spin(), o.InclinationDeg(), alpha, beta, err)
	}
	if len(c.Times) != len(d.Times) || c.Fate != d.Fate {
		return 0, false
	}
	phiTol := 1e-8 + 10*tol/polarGap(o.Spin(), c.Lambda, c.Eta) + extremalAllowance(o.Spin())
	tTol := 1e-8 + extremalAllowance(o.Spin())
	for k := range c.Times {
		r := c.Crossings[k].R
		worst = math.Max(worst, timingErr(c.Times[k].Delay, d.Times[k].Delay, r)*1e-8/tTol)
		if k > 0 {
			worst = math.Max(worst, timingErr(c.Times[k].Delay-c.Times[k-1].Delay, d.Times[k].Delay-d.Times[k-1].Delay,
				r, c.Crossings[k-1].R, d.Times[k].Delay, d.Times[k-1].Delay)*1e-8/tTol)
		}
		if c.Lambda != 0 {
			worst = math.Max(worst, timingErr(c.Times[k].DeltaPhi, d.Times[k].DeltaPhi)*1e-8/phiTol)
		}
	}
	return worst, true
}

// TestTimingNearExtremal: spins to 1 − 1e-12, where r₊ − r₋ → 0 and the
// partial fractions C±, A± grow like 1/(r₊ − r₋) with opposite signs,
// against the integrator, including rays near the shadow's vertical piece
// α ≈ −2/sin θo (Bardeen 1973) whose crossings lie near the horizon.
func TestTimingNearExtremal(t *testing.T) {
	rng := rand.New(rand.NewPCG(77, 1))
	worst, count := 0.0, 0
	for _, a := range []float64{1 - 1e-12, -(1 - 1e-12), 1 - 1e-9, 0.999} {
		for _, inc := range []float64{17, 60, 85, 90, 120} {
			o, err := NewObserver(a, inc)
			if err != nil {
				t.Fatal(err)
			}
			n := 12
			if testing.Short() {
				n = 4
			}
			for i := 0; i < n; i++ {
				al, be := -10+20*rng.Float64(), -10+20*rng.Float64()
				if i%2 == 1 && a > 0 { // just outside the vertical piece
					al = -2/o.SinInclination() - 0.05*rng.Float64()
					be = -1.5 + 3*rng.Float64()
				}
				if nearCritical(o, al, be, 1e-9) {
					continue
				}
				w, ok := compareTimed(t, o, al, be, 3, 1e-13)
				if !ok {
					t.Errorf("a=%v i=%v α=%v β=%v: crossing counts or fates differ", a, inc, al, be)
					continue
				}
				count++
				worst = math.Max(worst, w)
				if w > 1e-8 {
					t.Errorf("a=%v i=%v α=%v β=%v: error %.2e", a, inc, al, be, w)
				}
			}
		}
	}
	t.Logf("%d near-extremal rays, worst error %.2e of the allowance", count, worst*1e8)
}

// TestTimingNearExtremalCounterRotating: rays just outside the vertical
// piece of the shadow edge of a counter-rotating near-extremal hole, at
// α ≈ +2/sin θo (the mirror image of the a → 1 edge, Bardeen 1973),
// whose crossings lie near the horizon and whose integrals from infinity
// pass close to the turning point r4 ≈ r₊, against the integrator.
func TestTimingNearExtremalCounterRotating(t *testing.T) {
	rng := rand.New(rand.NewPCG(78, 2))
	worst, count := 0.0, 0
	for _, a := range []float64{-(1 - 1e-12), -(1 - 1e-9), -(1 - 2e-7)} {
		for _, inc := range []float64{17, 60, 85, 90, 120} {
			o, err := NewObserver(a, inc)
			if err != nil {
				t.Fatal(err)
			}
			n := 16
			if testing.Short() {
				n = 4
			}
			for i := 0; i < n; i++ {
				al := 2/o.SinInclination() + 0.05*rng.Float64()
				be := -1.5 + 3*rng.Float64()
				if i%2 == 1 { // near the middle of the piece: |α − 2/sin θo| < 1.5e-3, |β| < 0.02
					al = 2/o.SinInclination() + 1.5e-3*(2*rng.Float64()-1)
					be = -0.02 + 0.04*rng.Float64()
				}
				if nearCritical(o, al, be, 1e-9) {
					continue
				}
				// Only escaping photons: the captured ones just inside
				// the edge keep the two-evaluation form, which errs by up
				// to 2e-4 of the delay at crossings within 1e-6 of the
				// horizon here (see TraceTimed).
				var p Path
				o.Trace(al, be, 0, &p)
				if p.Fate != Escaped {
					continue
				}
				w, ok := compareTimed(t, o, al, be, 3, 1e-13)
				if !ok {
					t.Errorf("a=%v i=%v α=%v β=%v: crossing counts or fates differ", a, inc, al, be)
					continue
				}
				count++
				worst = math.Max(worst, w)
				if w > 1e-8 {
					t.Errorf("a=%v i=%v α=%v β=%v: error %.2e of the allowance", a, inc, al, be, w*1e8)
				}
			}
		}
	}
	t.Logf("%d rays, worst error %.2e of the allowance", count, worst*1e8)
}

// TestTimingNearExtremalEdge: escaping rays at the vertical piece of the
// shadow edge of near-extremal holes (α ≈ ∓2/sin θo, Bardeen 1973), found
// by a seeded random scan, where the integrals from infinity as a
// difference of two evaluations (at infinity and at the crossing) lost
// up to 1.5e-4 of the delay; added in one evaluation (radialTimer.sumsI)
// they are within the allowance, against the integrator.
func TestTimingNearExtremalEdge(t *testing.T) {
	for _, c := range [][4]float64{ // a, θo, α, β
		{-0.9999999992529687, 125.35377860285091, 2.4522524231627045, -0.002423910011037219},
		{-0.9999998135311192, 88.84099468452524, 2.0014670792370093, 0.015981882400965416},
		{-0.9999999987546334, 126.75575773847572, 2.4963414244498003, 0.00451804390166657},
		{0.9999999401487483, 120.43208502446106, -2.320115653287856, 0.04557287585827847},
		{0.9999999997953919, 113.64948230927158, -2.1833999764069536, -0.30148797985691045},
	} {
		o, err := NewObserver(c[0], c[1])
		if err != nil {
			t.Fatal(err)
		}
		w, ok := compareTimed(t, o, c[2], c[3], 3, 1e-13)
		if !ok {
			t.Errorf("a=%v i=%v α=%v β=%v: crossing counts or fates differ", c[0], c[1], c[2], c[3])
			continue
		}
		if w > 1e-8 {
			t.Errorf("a=%v i=%v α=%v β=%v: error %.2e of the allowance", c[0], c[1], c[2], c[3], w*1e8)
		}
	}
}

// TestTimingGrazing: rays a relative 1e-3 to 1e-7 outside and inside the
// critical curve (Bardeen 1973), which wind around the hole before they
// cross, against the integrator, up to six crossings.
func TestTimingGrazing(t *testing.T) {
	worst, count := 0.0, 0
	for _, a := range []float64{0, 0.6, -0.9, 0.99} {
		for _, inc := range []float64{30, 75} {
			o, err := NewObserver(a, inc)
			if err != nil {
				t.Fatal(err)
			}
			for i, q := range o.CriticalCurve(24) {
				if i%6 != 0 {
					continue
				}
				for _, f := range []float64{1 + 1e-3, 1 + 1e-5, 1 + 1e-7, 1 - 1e-5} {
					w, ok := compareTimed(t, o, q.Alpha*f, q.Beta*f, 6, 1e-13)
					if !ok {
						t.Errorf("a=%v i=%v α=%v β=%v: crossing counts or fates differ", a, inc, q.Alpha*f, q.Beta*f)
						continue
					}
					count++
					worst = math.Max(worst, w)
					if w > 1e-7 {
						t.Errorf("a=%v i=%v α=%v β=%v (f = %v): error %.2e", a, inc, q.Alpha*f, q.Beta*f, f, w)
					}
				}
			}
		}
	}
	t.Logf("%d grazing rays, worst relative error %.2e", count, worst)
}

// TestSchwarzschildAzimuthStep: at a = 0 a photon moves in a plane through
// the centre, whose line of nodes holds all its equatorial crossings, so
// successive crossings differ in azimuth by exactly π, backward against
// the sense of λ (Schwarzschild geodesics; e.g. Chandrasekhar 1983, The
// Mathematical Theory of Black Holes, §20).
func TestSchwarzschildAzimuthStep(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	var p TimedPath
	worst, count := 0.0, 0
	for i := 0; i < 2000; i++ {
		inc := 180 * rng.Float64()
		if i%20 == 0 {
			inc = 0
		}
		o, _ := NewObserver(0, inc)
		al, be := -12+24*rng.Float64(), -12+24*rng.Float64()
		o.TraceTimed(al, be, 5, &p)
		for k := 1; k < len(p.Times); k++ {
			d := p.Times[k].DeltaPhi - p.Times[k-1].DeltaPhi
			// λ = 0 (on the axis) continues the limit λ → 0 from
			// λ = −α sin θo.
			want := -math.Pi
			if p.Lambda < 0 || (p.Lambda == 0 && al >= 0) {
				want = math.Pi
			}
			e := math.Abs(d - want)
			worst = math.Max(worst, e)
			count++
			if e > 1e-11 {
				t.Errorf("i=%v α=%v β=%v: crossings %d, %d differ by %.15g rad, want %.15g", inc, al, be, k-1, k, d, want)
			}
		}
	}
	t.Logf("%d successive crossings, worst |Δφ ∓ π| = %.2e", count, worst)
}

// TestSchwarzschildSubimageDelay: at a = 0, photons close to the critical
// impact parameter b = √27 (Synge 1966) wind near the photon sphere r = 3,
// and successive crossings there are half an orbit apart in time: the
// coordinate angular velocity of the circular photon orbit is 1/√27
// (Bardeen, Press & Teukolsky 1972), so the delay tends to π√27 M
// ≈ 16.32 M, the delay between successive photon-ring subimages (Johnson
// et al. 2020, Sci. Adv. 6, eaaz1310). The independent integrator confirms
// the same delays.
func TestSchwarzschildSubimageDelay(t *testing.T) {
	want := math.Pi * math.Sqrt(27)
	for _, inc := range []float64{20, 60, 90} {
		o, _ := NewObserver(0, inc)
		for _, psi := range []float64{0.3, 2.0, 4.4} {
			b := math.Sqrt(27) * (1 + 1e-13)
			al, be := b*math.Cos(psi), b*math.Sin(psi)
			var p, q TimedPath
			o.TraceTimed(al, be, 16, &p)
			if len(p.Times) < 8 {
				t.Fatalf("i=%v ψ=%v: only %d crossings", inc, psi, len(p.Times))
			}
			// Deep in the winding, where successive crossings both lie
			// within 1e-3 M of r = 3.
			deep := 0
			for k := 1; k < len(p.Times); k++ {
				if math.Abs(p.Crossings[k].R-3) > 1e-3 || math.Abs(p.Crossings[k-1].R-3) > 1e-3 {
					continue
				}
				deep++
				d := p.Times[k].Delay - p.Times[k-1].Delay
				if math.Abs(d-want) > 1e-4 {
					t.Errorf("i=%v ψ=%v: crossings %d, %d at r = %.6f, %.6f differ by %.8f M, want π√27 = %.8f M", inc, psi, k-1, k, p.Crossings[k-1].R, p.Crossings[k].R, d, want)
				}
			}
			if deep < 3 {
				t.Errorf("i=%v ψ=%v: only %d pairs of crossings near r = 3", inc, psi, deep)
			}
			if err := o.IntegrateTimed(al, be, 16, 1e-13, &q); err != nil {
				t.Fatal(err)
			}
			for k := 1; k < len(q.Times) && k < len(p.Times); k++ {
				if math.Abs(p.Crossings[k].R-3) > 1e-3 || math.Abs(p.Crossings[k-1].R-3) > 1e-3 {
					continue
				}
				d := q.Times[k].Delay - q.Times[k-1].Delay
				if math.Abs(d-want) > 1e-4 {
					t.Errorf("integrator, i=%v ψ=%v: crossings %d, %d differ by %.8f M, want %.8f M", inc, psi, k-1, k, d, want)
				}
			}
		}
	}
}

// TestTimingOnAxis: an observer exactly on the axis (θo = 0° or 180°) has
// λ = 0 for every photon and the closed form takes the limit θo → 0 (see
// newAngularTimer). Off the axis by ε the values must approach it: the
// difference at ε = 1e-9° is at most a fifth of that at 1e-8° (it shrinks
// like ε) or at rounding level.
func TestTimingOnAxis(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	var p, q1, q2 TimedPath
	count := 0
	for _, a := range []float64{0, 0.7, -0.95} {
		for _, axis := range []float64{0, 180} {
			o0, _ := NewObserver(a, axis)
			off := func(e float64) Observer {
				o, _ := NewObserver(a, math.Abs(axis-e))
				return o
			}
			o1, o2 := off(1e-8), off(1e-9)
			for i := 0; i < 50; i++ {
				al, be := -9+18*rng.Float64(), -9+18*rng.Float64()
				o0.TraceTimed(al, be, 3, &p)
				o1.TraceTimed(al, be, 3, &q1)
				o2.TraceTimed(al, be, 3, &q2)
				if len(p.Times) != len(q1.Times) || len(p.Times) != len(q2.Times) {
					t.Fatalf("a=%v α=%v β=%v: %d, %d and %d crossings", a, al, be, len(p.Times), len(q1.Times), len(q2.Times))
				}
				for k := range p.Times {
					for _, f := range []func(Timing) float64{
						func(v Timing) float64 { return v.Delay },
						func(v Timing) float64 { return v.DeltaPhi },
					} {
						v0, v1, v2 := f(p.Times[k]), f(q1.Times[k]), f(q2.Times[k])
						e1, e2 := math.Abs(v1-v0), math.Abs(v2-v0)
						count++
						if e2 > 0.2*e1+1e-10*(1+math.Abs(v0)) {
							t.Errorf("a=%v θo=%v α=%v β=%v crossing %d: %v on the axis, %v and %v at 1e-8° and 1e-9° off", a, axis, al, be, k, v0, v1, v2)
						}
					}
				}
			}
		}
	}
	if count == 0 {
		t.Fatal("no crossings compared")
	}
}

// TestTimingInvariants: on the grid of TestExtremes (spins to 1 − 1e-12,
// inclinations at and next to 0°, 90°, 180°, screen points from 0 to 30 M,
// and rays within 1e-12 of the critical curve), every delay and azimuth is
// finite and, off the critical curve, the delay grows with the order:
// Boyer–Lindquist t is a time
// function outside the horizon, so it decreases along the photon traced
// backward (e.g. Misner, Thorne & Wheeler 1973, §33.2).
func TestTimingInvariants(t *testing.T) {
	spins := []float64{0, 1e-12, -1e-12, 0.5, -0.7, 1 - 1e-9, -(1 - 1e-9), 0.999999999999}
	incs := []float64{0, 1e-9, 30, 89.999999, 90, 90.000001, 150, 180}
	screen := []float64{0, 1e-13, -1e-7, 0.5, -2.1, 4.9, 7, -12, 30}
	var p TimedPath
	// onCurve: rays within 1e-12 of the critical curve, where the double
	// root r3 = r4 is split at rounding level and the crossings themselves
	// are ambiguous (see TestClosedFormMatchesIntegrator): there only
	// finiteness is required, and a crossing that the trace puts on the
	// horizon itself (its clamp at the end of a capture) has t → ∞.
	check := func(o Observer, al, be float64, onCurve bool) {
		o.TraceTimed(al, be, 6, &p)
		ordered := !onCurve && !nearCritical(o, al, be, 1e-9)
		if len(p.Times) != len(p.Crossings) {
			t.Fatalf("a=%v i=%v α=%v β=%v: %d times for %d crossings", o.Spin(), o.InclinationDeg(), al, be, len(p.Times), len(p.Crossings))
		}
		for k, tm := range p.Times {
			onHorizon := p.Crossings[k].R == o.Horizon() && onCurve
			bad := math.IsNaN(tm.Delay) || math.IsNaN(tm.DeltaPhi) ||
				(!onHorizon && (math.IsInf(tm.Delay, 0) || math.IsInf(tm.DeltaPhi, 0)))
			if bad || (ordered && k > 0 && !(tm.Delay > p.Times[k-1].Delay)) {
				t.Fatalf("a=%v i=%v α=%v β=%v: crossings %+v, times %+v", o.Spin(), o.InclinationDeg(), al, be, p.Crossings, p.Times)
			}
		}
	}
	for _, a := range spins {
		for _, inc := range incs {
			o, err := NewObserver(a, inc)
			if err != nil {
				t.Fatal(err)
			}
			for _, al := range screen {
				for _, be := range screen {
					check(o, al, be, false)
				}
			}
			for i, q := range o.CriticalCurve(40) {
				if i%5 != 0 {
					continue
				}
				for _, f := range []float64{1 - 1e-12, 1, 1 + 1e-12} {
					check(o, q.Alpha*f, q.Beta*f, true)
				}
			}
		}
	}
}

// legendreQuad integrates f(sin²θ)/sqrt(1 − m sin²θ) over θ from 0 to φ
// (0 ≤ φ < π) by Gauss–Legendre quadrature (gonum), independently of the
// Carlson functions: the Legendre forms of Z(u) = ∫₀^u sn² (f = s) and
// P_N(u) = ∫₀^u du'/(1 − N sn²) (f = 1/(1 − N s)), φ = am u (DLMF 19.2.4–7).
// The integrands peak at θ = π/2 (width sqrt(1 − m), or sqrt(1 − N)):
// the range is split there and the nodes crowded towards it.
func legendreQuad(f func(s float64) float64, phi, m float64) float64 {
	g := func(th float64) float64 {
		s := math.Sin(th)
		return f(s*s) / math.Sqrt(1-m*s*s)
	}
	p1 := math.Min(phi, math.Pi/2)
	// θ = p1 (1 − (1 − x)²) on [0, p1], θ = π/2 + (φ − π/2) x² beyond.
	lo := func(x float64) float64 { return g(p1*(1-(1-x)*(1-x))) * 2 * p1 * (1 - x) }
	sum := quad.Fixed(lo, 0, 1, 600, quad.Legendre{}, 0)
	if phi > math.Pi/2 {
		d := phi - math.Pi/2
		hi := func(x float64) float64 { return g(math.Pi/2+d*x*x) * 2 * d * x }
		sum += quad.Fixed(hi, 0, 1, 600, quad.Legendre{}, 0)
	}
	return sum
}

// TestAdditionTheorems checks the addition theorems that TraceTimed uses
// to add the integrals from infinity (see radialTimer.sumsI):
// Z(u+v) = Z(u) + Z(v) + s_u s_v s_w (DLMF 22.16.27 with ℰ = u − mZ) and
// P_N(u+v) = P_N(u) + P_N(v) + N·addQ(k², t, G) (Whittaker & Watson
// 1927, §22.741), against quadrature of the Legendre forms, for
// characteristics on both sides of 0, m and 1 and sums beyond K.
func TestAdditionTheorems(t *testing.T) {
	for _, m := range []float64{0.3, 0.9, 0.999} {
		k := ellipK(1 - m)
		for _, n := range []float64{-30, -0.2, 0.1, 0.5 * m, (1 + m) / 2, 0.999, 1.5} {
			for _, uv := range [][2]float64{{0.1, 0.2}, {0.5, 0.7}, {0.3, k - 0.4}, {0.9 * k, 0.05 * k}, {0.6 * k, 0.7 * k}, {0.95 * k, 0.9 * k}} {
				u, v := uv[0], uv[1]
				w := u + v
				su, cu, _ := jacobi(u, m, 1-m)
				sv, cv, _ := jacobi(v, m, 1-m)
				sw, cw, dw := jacobi(w, m, 1-m)
				if n*math.Max(sw*sw, math.Max(su*su, sv*sv)) >= 1 || (n > 1 && w > k) {
					continue // a pole of 1/(1 − N sn²) on the path
				}
				am := func(s, c float64) float64 { return math.Atan2(s, c) }
				pf := func(s float64) float64 { return 1 / (1 - n*s) }
				zf := func(s float64) float64 { return s }
				P := func(s, c float64) float64 { return legendreQuad(pf, am(s, c), m) }
				Z := func(s, c float64) float64 { return legendreQuad(zf, am(s, c), m) }
				tt := su * sv * sw
				G := 1 - n*sw*sw + n*su*sv*cw*dw
				k2 := n * (m - n) * (1 - n)
				dp := P(sw, cw) - P(su, cu) - P(sv, cv)
				dz := Z(sw, cw) - Z(su, cu) - Z(sv, cv)
				kq := math.Sqrt(math.Abs(k2))
				near(t, fmt.Sprintf("P_N addition m=%v N=%v u=%v v=%v", m, n, u, v), n*addQ(k2, kq, 1/kq, tt, G), dp, 1e-12*(1+math.Abs(P(sw, cw))))
				near(t, fmt.Sprintf("Z addition m=%v u=%v v=%v", m, u, v), tt, dz, 1e-12*(1+math.Abs(Z(sw, cw))))
			}
		}
	}
}

// TestTimingAdditionMatchesTwoEvaluations: the radial integrals from
// infinity by the addition theorems (one evaluation at the point: sumsI
// for escaping photons with four real roots, addII for two real roots)
// agree with their difference of two evaluations, at infinity and at the
// point, with Jacobi functions computed afresh (the form used for later
// crossings and captured four-root photons), at points before and after
// the turning point, including the quarter period K itself (where the
// addition theorem's cn and dn of F0 + Y cancel and jacobi is used, and
// where case II passes from δ < K to δ > K).
func TestTimingAdditionMatchesTwoEvaluations(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	worst, count, nearK, two := 0.0, 0, 0, 0
	for i := 0; i < 900; i++ {
		a := -0.999 + 1.998*rng.Float64()
		o, _ := NewObserver(a, 5+170*rng.Float64())
		al, be := -15+30*rng.Float64(), -15+30*rng.Float64()
		if i%3 == 0 { // grazing the critical curve, outside and inside
			cc := o.CriticalCurve(12)
			q := cc[rng.IntN(len(cc))]
			f := 1 + math.Copysign(math.Pow(10, -2-6*rng.Float64()), rng.Float64()-0.5)
			al, be = q.Alpha*f, q.Beta*f
		}
		lambda, eta := o.constants(al, be)
		var p Path
		var in timingInput
		o.trace(lambda, eta, be, 1, &p, &in)
		if !in.ok || (in.rad.cs == FourReal && p.Fate != Escaped) {
			continue
		}
		var rt radialTimer
		rt.init(&in.q, &in.rad, a, lambda, o.horizon)
		var taus []float64
		k := ellipK(rt.mc)
		if in.rad.cs == FourReal {
			taus = []float64{0.1 * p.Turn, 0.5 * p.Turn, 0.97 * p.Turn, 1.2 * p.Turn, 1.9 * p.Turn}
			if k > rt.x0 && k < 2*rt.x0 {
				taus = append(taus, k/rt.scale)
				nearK++
			}
		} else {
			two++
			taus = []float64{0.1 * p.Mino, 0.5 * p.Mino, 0.9 * p.Mino, 0.999 * p.Mino}
			if k/rt.scale < p.Mino {
				taus = append(taus, k/rt.scale)
				nearK++
			}
		}
		for _, tau := range taus {
			var jac pathJacobi
			r := in.rad.eval(tau, &jac)
			it, ip := rt.at(tau, r, &jac)
			it2, ip2 := rt.at(tau, r, nil)
			e := math.Max(timingErr(it, it2, r), timingErr(ip, ip2)) / (1 + extremalAllowance(a)*1e8)
			worst = math.Max(worst, e)
			count++
			if e > 1e-11 {
				t.Errorf("a=%v α=%v β=%v τ=%v (turn %v): addition %v %v, two evaluations %v %v", a, al, be, tau, p.Turn, it, ip, it2, ip2)
			}
		}
	}
	if nearK == 0 || two == 0 {
		t.Errorf("%d photons reached the quarter period, %d had two real roots", nearK, two)
	}
	t.Logf("%d points (%d photons with two real roots, %d past K), worst relative difference %.2e", count, two, nearK, worst)
}

// TestTraceTimedPathIsTrace checks that TraceTimed's crossings are Trace's
// to the last bit: the timed trace shares the duplication of the angular
// R_F with the timing's R_D and R_J (carlsonRF2DJ) and takes K with the
// AGM sum of ∫sn² (ellipKSn2), which must not move the path.
func TestTraceTimedPathIsTrace(t *testing.T) {
	rng := rand.New(rand.NewPCG(43, 47))
	tp := TimedPath{Path: Path{Crossings: make([]Crossing, 0, 4)}, Times: make([]Timing, 0, 4)}
	p := Path{Crossings: make([]Crossing, 0, 4)}
	for i := 0; i < 20000; i++ {
		spin := -0.999 + 1.998*rng.Float64()
		if i%5 == 0 {
			spin = math.Copysign(1-math.Pow(10, -3-6*rng.Float64()), spin)
		}
		o, err := NewObserver(spin, 180*rng.Float64())
		if err != nil {
			t.Fatal(err)
		}
		al, be := -15+30*rng.Float64(), -15+30*rng.Float64()
		o.Trace(al, be, 4, &p)
		o.TraceTimed(al, be, 4, &tp)
		if len(p.Crossings) != len(tp.Crossings) || p.Mino != tp.Mino || p.Fate != tp.Fate {
			t.Fatalf("a=%g (%g, %g): Trace %+v, TraceTimed %+v", spin, al, be, p, tp.Path)
		}
		for k := range p.Crossings {
			if p.Crossings[k] != tp.Crossings[k] {
				t.Fatalf("a=%g (%g, %g) crossing %d: %+v vs %+v", spin, al, be, k, p.Crossings[k], tp.Crossings[k])
			}
		}
	}
}

// TestTraceTimedReuse checks that a TimedPath reused from ray to ray gives
// the times of a fresh one to the last bit: TraceTimed keeps its working
// state in the TimedPath and clears only its flags (timedWork), so a field
// read before it is written would carry the previous ray's value. The rays
// mix every case in random order: escaping and captured photons with four
// real roots and with two, crossings past the fourth (integrals from
// infinity set on first need) and past K, near-extremal spins, β = 0,
// observers on the axis and in the plane, and spins near 0 (r₋ terms
// skipped).
func TestTraceTimedReuse(t *testing.T) {
	rng := rand.New(rand.NewPCG(61, 67))
	reused := TimedPath{Path: Path{Crossings: make([]Crossing, 0, 6)}, Times: make([]Timing, 0, 6)}
	incl := []float64{0, 90, 180}
	for i := 0; i < 20000; i++ {
		spin := -0.999 + 1.998*rng.Float64()
		switch i % 7 {
		case 0:
			spin = math.Copysign(1-math.Pow(10, -3-6*rng.Float64()), spin)
		case 1:
			spin = math.Copysign(math.Pow(10, -12*rng.Float64()), spin)
		}
		th := 180 * rng.Float64()
		if i%11 == 0 {
			th = incl[rng.IntN(len(incl))]
		}
		o, err := NewObserver(spin, th)
		if err != nil {
			t.Fatal(err)
		}
		al, be := -15+30*rng.Float64(), -15+30*rng.Float64()
		if i%13 == 0 {
			be = 0
		}
		if i%3 == 0 { // near the critical curve: several crossings
			ph := 2 * math.Pi * rng.Float64()
			rc := 4.5 + 1.5*rng.Float64()
			al, be = rc*math.Cos(ph), rc*math.Sin(ph)
		}
		orders := 1 + rng.IntN(6)
		fresh := TimedPath{}
		o.TraceTimed(al, be, orders, &fresh)
		o.TraceTimed(al, be, orders, &reused)
		if len(fresh.Times) != len(reused.Times) {
			t.Fatalf("a=%g θo=%g (%g, %g): %d times fresh, %d reused", spin, th, al, be, len(fresh.Times), len(reused.Times))
		}
		for k := range fresh.Times {
			f, r := fresh.Times[k], reused.Times[k]
			if math.Float64bits(f.Delay) != math.Float64bits(r.Delay) || math.Float64bits(f.DeltaPhi) != math.Float64bits(r.DeltaPhi) {
				t.Fatalf("a=%g θo=%g (%g, %g) crossing %d: fresh %+v, reused %+v", spin, th, al, be, k, f, r)
			}
		}
	}
}

// TestAddQElementary checks addQ's elementary forms for k² > 0 against
// t R_C(G², G² − k²t²) by carlsonRC (its series, logarithm and principal
// value, DLMF 19.2.17–19.2.20) and against artanh(v)/k, artanh(1/v)/k by
// the standard library (the same values: DLMF 19.2.18, 19.2.20), over both
// signs of G and v = k t/|G| from 1e-6 to 1e3 on both sides of 1.
func TestAddQElementary(t *testing.T) {
	rng := rand.New(rand.NewPCG(53, 59))
	worstRC, worstAtanh := 0.0, 0.0
	for i := 0; i < 100000; i++ {
		k2 := math.Pow(10, -4+6*rng.Float64())
		kq := math.Sqrt(k2)
		G := math.Pow(10, -3+4*rng.Float64())
		if i%2 == 1 {
			G = -G
		}
		v := math.Pow(10, -6+9*rng.Float64())
		if math.Abs(v-1) < 1e-6 {
			continue // the logarithmic singularity itself
		}
		tt := v * math.Abs(G) / kq
		got := addQ(k2, kq, 1/kq, tt, G)
		want := math.Atanh(min(v, 1/v)) / kq
		// Near v = 1 every form loses digits like 1/|1 − v| (in v itself).
		scale := math.Abs(1-v) / (1 + math.Abs(1-v))
		worstAtanh = max(worstAtanh, math.Abs(got/want-1)*scale)
		if v < 10 { // carlsonRC takes a plain logarithm of (v+1)/(v−1)
			g2 := G * G
			worstRC = max(worstRC, math.Abs(got/(tt*carlsonRC(g2, g2-k2*tt*tt))-1)*scale)
		}
	}
	if worstRC > 1e-14 || worstAtanh > 1e-14 {
		t.Errorf("addQ: worst scaled relative difference %g against t R_C, %g against artanh; want ≤ 1e-14", worstRC, worstAtanh)
	}
}
