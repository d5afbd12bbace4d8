package raytrace

import (
	"errors"
	"math"
)

// Dormand–Prince 5(4) tableau (Dormand & Prince 1980, J. Comput. Appl.
// Math. 6, 19; Hairer, Nørsett & Wanner, Solving ODEs I, table 5.2). The
// equations do not depend on τ, so the nodes c_i are not needed.
var (
	dpA = [7][6]float64{
		{},
		{1.0 / 5},
		{3.0 / 40, 9.0 / 40},
		{44.0 / 45, -56.0 / 15, 32.0 / 9},
		{19372.0 / 6561, -25360.0 / 2187, 64448.0 / 6561, -212.0 / 729},
		{9017.0 / 3168, -355.0 / 33, 46732.0 / 5247, 49.0 / 176, -5103.0 / 18656},
		{35.0 / 384, 0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84},
	}
	dpB5 = [7]float64{35.0 / 384, 0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84, 0}
	dpB4 = [7]float64{5179.0 / 57600, 0, 7571.0 / 16695, 393.0 / 640, -92097.0 / 339200, 187.0 / 2100, 1.0 / 40}
)

// Step-size control of Integrate: the standard controller for an embedded
// pair, h_new = h · min(maxGrow, max(minShrink, stepSafety · err^stepExponent))
// with err the error norm relative to the tolerance (Hairer, Nørsett &
// Wanner, Solving ODEs I, sec. II.4). The exponent -1/(q+1) follows from
// the order q = 4 of the lower member of the pair; the other values are the
// usual textbook choices (common practice).
const (
	stepExponent = -1.0 / 5
	stepSafety   = 0.9
	minShrink    = 0.1 // largest cut of a rejected step
	maxGrow      = 5.0 // largest growth after an accepted step

	// initialStep is the first trial step in Mino time; the controller
	// adapts it at once, so only its order of magnitude matters.
	initialStep = 1e-3
	// maxStep caps the step in Mino time, so that the event search
	// brackets stay short near the horizon and the plane; away from the
	// critical curve a whole ray takes a Mino time of order 1 (M = 1).
	maxStep = 0.5
	// minRestep is the smallest step taken after an event, so that the
	// integration always moves past it.
	minRestep = 1e-12
	// maxSteps bounds the work per ray; hitting it returns ErrNoConvergence.
	maxSteps = 2000000

	// locateMaxIter bounds the regula-falsi iterations of locate, and
	// locateRelTol is the bracket width, relative to the step, at which it
	// stops (below the rounding unit 2.2e-16, so in practice it runs until
	// the bracket stops shrinking or f vanishes).
	locateMaxIter = 100
	locateRelTol  = 1e-16
	// timedHorizonMargin: IntegrateTimed leaves t and φ out of the error
	// control where Δ/r² falls below it. Both diverge logarithmically at
	// the horizon, and controlling them there would shrink the steps
	// forever (the photon reaches r₊ in finite Mino time); crossings that
	// close to the horizon (r − r₊ ≲ 1e-9 r²/(r₊ − r₋)) get t and φ
	// from steps sized for the orbit alone.
	timedHorizonMargin = 1e-9

	// locateZero is the |f| below which locate takes the point as the root:
	// the event functions (u, u - 1/r₊, x, du/dτ) are of order 1, so this
	// only catches exact or underflowing zeros.
	locateZero = 1e-300
)

// event is what cuts an integration step short.
type event uint8

const (
	noEvent         event = iota
	planeCrossing         // x = cos θ changes sign: an equatorial crossing
	horizonReached        // u reaches 1/r₊: the photon came out of the horizon
	infinityReached       // u returns to 0: the photon came from infinity
)

// String names the event, for messages.
func (e event) String() string {
	switch e {
	case noEvent:
		return "none"
	case planeCrossing:
		return "equatorial plane"
	case horizonReached:
		return "horizon"
	case infinityReached:
		return "infinity"
	}
	return "unknown"
}

// odeState is (u, du/dτ, x, dx/dτ, S, Φ) with u = 1/r and x = cos θ; S
// and Φ carry the time and azimuth of IntegrateTimed (see timedRates) and
// stay 0 otherwise.
type odeState [6]float64

// geodesicODE holds the coefficients of the second-order Mino-time
// equations in u = 1/r and x = cos θ, both polynomial, so the integration
// starts exactly at infinity and passes turning points and the poles
// without special handling:
//
//	(du/dτ)² = 1 + A u² + B u³ + C u⁴,  d²u/dτ² = A u + (3/2) B u² + 2 C u³
//	(dx/dτ)² = η + A x² - a² x⁴,        d²x/dτ² = A x - 2 a² x³
//
// with A = a² - η - λ², B = 2[η + (λ - a)²], C = -a²η (Carter 1968; the
// u form follows from R(r) of Bardeen 1973 with r = 1/u).
type geodesicODE struct {
	A, B, C, a2 float64
	// timed: also integrate S and Φ (components 4 and 5); a and λ are
	// needed for their rates.
	timed     bool
	a, lambda float64
}

// delta returns Δ/r² = 1 − 2u + a²u², which vanishes at the horizons.
func (g geodesicODE) delta(u float64) float64 { return 1 - 2*u + g.a2*u*u }

// dim is the number of integrated components.
func (g geodesicODE) dim() int {
	if g.timed {
		return 6
	}
	return 4
}

func (g geodesicODE) deriv(y odeState) odeState {
	u, x := y[0], y[2]
	d := odeState{
		y[1],
		u * (g.A + u*(1.5*g.B+2*g.C*u)),
		y[3],
		x * (g.A - 2*g.a2*x*x),
	}
	if g.timed {
		d[4], d[5] = g.timedRates(y)
	}
	return d
}

// timedRates returns dS/dτ and dΦ/dτ. Φ is the azimuth integral of the
// forward-time rate dφ/dτ = a(2r − aλ)/Δ + λ/sin²θ (Carter 1968; Bardeen
// 1973), so the crossing's φ − φ_o is −Φ. The time rate
// dt/dτ = T = r² + 2r + 4 + [(8 − 2aλ)r − 4a²]/Δ + a² x² (the same
// rate, polynomial division by Δ) diverges at u = 0; S integrates
// T − (1 + 2/r)|dr/dτ| = T − (r² + 2r)|du/dτ| instead, which is finite at
// both ends of an escaping path: with the first integral
// (du/dτ)² = 1 + A u² + B u³ + C u⁴ the term (r² + 2r)(1 − |du/dτ|) is
// −(1 + 2u)(A + B u + C u²)/(1 + |du/dτ|). What was subtracted is an
// exact differential, so t_o − t − (r_o + 2 ln r_o) = S − (r + 2 ln r)
// before the radial turning point r_t and S + (r + 2 ln r) − 2(r_t + 2 ln r_t)
// after it.
func (g geodesicODE) timedRates(y odeState) (ds, dphi float64) {
	u, du, x := y[0], y[1], y[2]
	a, l := g.a, g.lambda
	delta := 1 - 2*u + g.a2*u*u // Δ/r²
	head := -(1 + 2*u) * (g.A + u*(g.B+g.C*u)) / (1 + math.Abs(du))
	ds = head + 4 + u*((8-2*a*l)-4*g.a2*u)/delta + g.a2*x*x
	dphi = a * u * (2 - a*l*u) / delta
	if l != 0 {
		dphi += l / ((1 - x) * (1 + x))
	}
	return ds, dphi
}

// step takes one Dormand–Prince step of size h and returns the fifth-order
// solution and the error estimate (fifth minus fourth order).
func (g geodesicODE) step(y odeState, h float64) (y5, errv odeState) {
	var k [7]odeState
	nd := g.dim()
	k[0] = g.deriv(y)
	for s := 1; s < 7; s++ {
		var ys odeState
		for i := 0; i < nd; i++ {
			acc := 0.0
			for j := 0; j < s; j++ {
				acc += dpA[s][j] * k[j][i]
			}
			ys[i] = y[i] + h*acc
		}
		k[s] = g.deriv(ys)
	}
	for i := 0; i < nd; i++ {
		s5, s4 := 0.0, 0.0
		for s := 0; s < 7; s++ {
			s5 += dpB5[s] * k[s][i]
			s4 += dpB4[s] * k[s][i]
		}
		y5[i] = y[i] + h*s5
		errv[i] = h * (s5 - s4)
	}
	return y5, errv
}

// ErrNoConvergence reports that the integrator hit its step limit.
var ErrNoConvergence = errors.New("raytrace: integrator exceeded its step limit")

// Integrate traces the photon arriving at (α, β) backward by adaptive
// Dormand–Prince 5(4) integration of the second-order Mino-time equations
// (see geodesicODE), started exactly at infinity (u = 0, du/dτ = 1), with
// mixed absolute/relative error tolerance tol per step, locating each
// equatorial crossing (x = 0), the horizon (u = 1/r₊) and the return to
// infinity (u = 0) by re-stepping from the step start with a secant
// (Illinois) search on the step size. It is an independent check of Trace
// and fills the same Path (Roots is left zero and Turn is +Inf unless a
// turning point is passed). It is far slower than Trace.
// Domain: any finite α, β; 1e-14 ≤ tol ≤ 1e-3.
func (o Observer) Integrate(alpha, beta float64, orders int, tol float64, p *Path) error {
	return o.resolved().integrate(alpha, beta, orders, tol, p, nil)
}

// IntegrateTimed is Integrate plus the Timing of each crossing, from
// Dormand–Prince integration of the rates of t and φ (see timedRates)
// alongside the orbit: an independent check of TraceTimed. The error
// control covers t and φ until the last requested crossing, after which
// they are no longer integrated. For λ = 0 photons (α = 0, or an observer
// on the axis) that pass exactly over a pole, where φ jumps, DeltaPhi
// lacks the jumps of ±π. Domain as for Integrate.
func (o Observer) IntegrateTimed(alpha, beta float64, orders int, tol float64, tp *TimedPath) error {
	tp.Times = tp.Times[:0]
	return o.resolved().integrate(alpha, beta, orders, tol, &tp.Path, &tp.Times)
}

func (o Observer) integrate(alpha, beta float64, orders int, tol float64, p *Path, times *[]Timing) error {
	a := o.spin
	lambda, eta := o.constants(alpha, beta)
	p.Lambda, p.Eta = lambda, eta
	p.Crossings = p.Crossings[:0]
	p.Turn = math.Inf(1)
	p.Roots = 0
	p.Fate = 0
	g := geodesicODE{A: a*a - eta - lambda*lambda, B: 2 * (eta + (lambda-a)*(lambda-a)), C: -a * a * eta, a2: a * a,
		timed: times != nil && orders > 0, a: a, lambda: lambda}
	// Backward, β > 0 moves toward smaller θ (larger x), and
	// (dx/dτ)² = sin²θo Θ(θo) = sin²θo β² at the observer (Bardeen 1973):
	// this form avoids the cancellation in η + A x² - a² x⁴ near the poles.
	x0 := o.cos
	dx0 := o.sin * beta
	y := odeState{0, 1, x0, dx0, 0, 0}
	uh := 1 / o.horizon
	tau := 0.0
	h := initialStep
	prevDu := 1.0
	// rt is r_t + 2 ln r_t at the radial turning point, once passed
	// (timed integration only; see timedRates).
	turnTerm := math.NaN()
	for n := 0; n < maxSteps; n++ {
		y5, ev := g.step(y, h)
		errn := 0.0
		nd := g.dim()
		if g.timed && min(g.delta(y[0]), g.delta(y5[0])) < timedHorizonMargin {
			nd = 4 // t and φ diverge at the horizon: control the orbit only
		}
		for i := 0; i < nd; i++ {
			sc := tol * (1 + max(math.Abs(y[i]), math.Abs(y5[i])))
			errn = max(errn, math.Abs(ev[i])/sc)
		}
		if errn > 1 || math.IsNaN(errn) {
			h *= max(minShrink, stepSafety*math.Pow(errn, stepExponent))
			if math.IsNaN(errn) {
				h = h / 10
			}
			continue
		}
		if g.timed && y[1] > 0 && y5[1] <= 0 && math.IsNaN(turnTerm) {
			// u at the turning point is flat in τ, so the located point
			// gives it to rounding.
			yt, _ := g.step(y, g.locate(y, h, func(s odeState) float64 { return s[1] }))
			turnTerm = 1/yt[0] - 2*math.Log(yt[0])
		}
		// Events inside [tau, tau+h]: earliest of plane, horizon, infinity.
		best, kind := h, noEvent
		if y[2] != 0 && y5[2]*y[2] <= 0 {
			if hs := g.locate(y, h, func(s odeState) float64 { return s[2] }); hs < best {
				best, kind = hs, planeCrossing
			}
		}
		if y5[0] >= uh {
			if hs := g.locate(y, h, func(s odeState) float64 { return s[0] - uh }); hs <= best {
				best, kind = hs, horizonReached
			}
		}
		if y5[0] <= 0 && tau > 0 {
			if hs := g.locate(y, h, func(s odeState) float64 { return s[0] }); hs <= best {
				best, kind = hs, infinityReached
			}
		}
		if kind != noEvent {
			ys, _ := g.step(y, best)
			switch kind {
			case planeCrossing:
				if len(p.Crossings) < orders {
					p.Crossings = append(p.Crossings, Crossing{R: 1 / ys[0], Mino: tau + best, Outbound: ys[1] > 0})
					if g.timed {
						u := ys[0]
						rr := 1/u - 2*math.Log(u) // r + 2 ln r
						d := ys[4] - rr
						if ys[1] < 0 {
							d = ys[4] + rr - 2*turnTerm
						}
						*times = append(*times, Timing{Delay: d, DeltaPhi: -ys[5]})
						if len(p.Crossings) == orders {
							g.timed = false // t and φ no longer needed
						}
					}
				}
				ys[2] = 0 // on the plane: the next step must not find it again
			case horizonReached:
				p.Fate, p.Mino = Captured, tau+best
				return nil
			case infinityReached:
				p.Fate, p.Mino = Escaped, tau+best
				return nil
			}
			y, tau = ys, tau+best
			// Nudge past the event so it is not found again.
			h = max(h-best, minRestep)
			continue
		}
		if prevDu > 0 && y5[1] <= 0 && math.IsInf(p.Turn, 1) {
			p.Turn = tau + g.locate(y, h, func(s odeState) float64 { return s[1] })
		}
		prevDu = y5[1]
		y, tau = y5, tau+h
		fac := maxGrow
		if errn > 0 {
			fac = min(maxGrow, stepSafety*math.Pow(errn, stepExponent))
		}
		h *= fac
		h = min(h, maxStep)
	}
	return ErrNoConvergence
}

// locate finds the step size hs in [0, h] at which f of the Dormand–Prince
// solution from y vanishes (illinois).
func (g geodesicODE) locate(y odeState, h float64, f func(odeState) float64) float64 {
	return illinois(h, f(y), func(m float64) float64 {
		ym, _ := g.step(y, m)
		return f(ym)
	})
}

// illinois finds s in [0, h] where f(s) = 0 by the Illinois variant of
// regula falsi, given f0 = f(0) and f(h) of the other sign; it stops when
// the bracket is below locateRelTol·h or |f| below locateZero.
func illinois(h, f0 float64, f func(s float64) float64) float64 {
	lo, hi := 0.0, h
	flo, fhi := f0, f(h)
	if flo == 0 {
		return 0
	}
	side := 0
	for i := 0; i < locateMaxIter; i++ {
		m := (lo*fhi - hi*flo) / (fhi - flo)
		if !(m > lo && m < hi) {
			m = (lo + hi) / 2
		}
		fm := f(m)
		if fm == 0 || hi-lo < locateRelTol*h || math.Abs(fm) < locateZero {
			return m
		}
		if (fm > 0) == (fhi > 0) {
			hi, fhi = m, fm
			if side == -1 {
				flo /= 2
			}
			side = -1
		} else {
			lo, flo = m, fm
			if side == 1 {
				fhi /= 2
			}
			side = 1
		}
	}
	return (lo + hi) / 2
}
