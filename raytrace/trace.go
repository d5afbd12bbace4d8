package raytrace

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// Numerical policy of the closed-form trace. These are choices of this
// package, not constants of the physics; the tests in extremes_test.go and
// the cross-checks against Integrate and the reference rays guard them.
const (
	// nearExtremalSpin and nearExtremalLambda gate refineNearPair: the
	// radial roots are re-polished with R(r) in its physical form only if
	// |a| > nearExtremalSpin and |λ - 2a| < nearExtremalLambda. Two roots
	// crowd together at r ≈ 1 only as |a| → 1 for photons with λ → 2a: at
	// a = 1 the spherical photon orbits have λ(r) = 1 + r(2 - r) (Bardeen
	// 1973, with Δ = (r - 1)²), which tends to 2 at the horizon r = 1.
	// Both bounds are generous; refineNearPair keeps a root only where
	// Newton's method settles well inside the gap to its neighbour, so the
	// gate bounds where its extra iterations are spent.
	nearExtremalSpin   = 0.9
	nearExtremalLambda = 0.5

	// minCaseIIComplement is the floor on the complementary parameter
	// 1 - k of case II. It reaches 0 only on the critical curve itself,
	// where K(k) ≈ ½ ln(16/(1 - k)) (DLMF §19.12) diverges; the floor
	// keeps K ≈ 347 finite (a very long but finite Mino time), in the same
	// spirit as the split of an exact double root in radialRoots. Any
	// positive normal number far below the values real rays produce would
	// do; 1e-300 stays clear of the subnormal range (below 2.2e-308).
	minCaseIIComplement = 1e-300

	// minoQuadNodes is the size of the fixed Gauss–Legendre rule of
	// minoQuad. A fixed rule keeps the result the same on every call and
	// allocation-free; 64 nodes is a generous choice for its integrand,
	// which is smooth and bounded on the whole range for the photons that
	// use it (no root of R in the range).
	minoQuadNodes = 64
)

// Fate is where a photon traced backward from the observer ends.
type Fate uint8

const (
	// Captured: the photon came out of the horizon (it falls in when traced backward).
	Captured Fate = iota + 1
	// Escaped: the photon turned around and came from infinity.
	Escaped
)

// String returns "horizon" or "infinity".
func (f Fate) String() string {
	switch f {
	case Captured:
		return "horizon"
	case Escaped:
		return "infinity"
	}
	return "unknown"
}

// Crossing is one passage of the photon through the equatorial plane,
// counted backward from the observer (order 0 is the last crossing before
// the photon reaches the observer).
type Crossing struct {
	R    float64 // Boyer–Lindquist radius of the crossing, in M
	Mino float64 // Mino time from the observer, backward, in 1/M
	// Outbound: the photon left this point moving to larger r (p_r > 0).
	Outbound bool
}

// Path is the result of tracing one photon. Reuse one Path per goroutine:
// Trace overwrites it and reuses its Crossings buffer.
type Path struct {
	Lambda, Eta float64  // constants of motion λ = L/E, η = Q/E²
	Fate        Fate     // horizon or infinity
	Roots       RootCase // case of the radial potential
	Mino        float64  // total Mino time of the backward ray
	Turn        float64  // Mino time of the radial turning point; +Inf if none
	Crossings   []Crossing
}

// Observer is a distant observer at a given inclination from the spin axis
// of a Kerr black hole of spin a. It is a plain value, safe for concurrent
// use and cheap to copy.
//
// NewObserver is the only way to configure one: it validates the spin and
// the inclination and derives cos θo, sin θo and the horizon r₊ once, so an
// observer cannot hold values that disagree with each other. The zero value
// Observer{} is usable and behaves exactly as NewObserver(0, 0): a
// Schwarzschild hole (a = 0) seen face-on (θo = 0°). Compare observers by
// their accessors, not with ==, since Observer{} and NewObserver(0, 0) hold
// different fields.
type Observer struct {
	spin    float64 // a, signed, -1 < a < 1
	incl    float64 // θo in degrees, 0 ≤ θo ≤ 180
	cos     float64 // cos θo (exact at 0°, 90°, 180°)
	sin     float64 // sin θo
	horizon float64 // r₊ ≥ 1 once configured; 0 marks the zero value
}

// faceOnSchwarzschild is NewObserver(0, 0), which the zero value stands for.
var faceOnSchwarzschild = Observer{spin: 0, incl: 0, cos: 1, sin: 0, horizon: 2}

// resolved returns o, or faceOnSchwarzschild for the zero value. r₊ ≥ 1
// for every spin NewObserver accepts, so r₊ = 0 can only be Observer{}.
// Every exported method calls it once on entry; the unexported ones may
// then read the fields directly.
func (o Observer) resolved() Observer {
	if o.horizon == 0 {
		return faceOnSchwarzschild
	}
	return o
}

// NewObserver validates the spin (-1 < a < 1) and the inclination θo in
// degrees (0 ≤ θo ≤ 180) and returns the observer.
func NewObserver(spin, inclinationDeg float64) (Observer, error) {
	if err := ValidSpin(spin); err != nil {
		return Observer{}, err
	}
	if math.IsNaN(inclinationDeg) || inclinationDeg < 0 || inclinationDeg > 180 {
		return Observer{}, fmt.Errorf("inclination %v° outside [0°, 180°]", inclinationDeg)
	}
	c, s := cosSinDeg(inclinationDeg)
	return Observer{spin: spin, incl: inclinationDeg, cos: c, sin: s, horizon: Horizon(spin)}, nil
}

// cosSinDeg returns cos and sin of an angle in degrees in [0, 180], exact
// (0 or ±1) at 0°, 90° and 180°: floating-point cos(π/2) is 6e-17, which
// would put a spurious crossing near r ~ 1e17 for an observer in the plane.
func cosSinDeg(deg float64) (c, s float64) {
	switch deg {
	case 0:
		return 1, 0
	case 90:
		return 0, 1
	case 180:
		return -1, 0
	}
	flip := deg > 90
	if flip {
		deg = 180 - deg
	}
	s, c = math.Sincos(deg * math.Pi / 180)
	if flip {
		c = -c
	}
	return c, s
}

// Spin returns the signed spin a of the observer's black hole.
func (o Observer) Spin() float64 { return o.resolved().spin }

// InclinationDeg returns the inclination θo from the spin axis in degrees,
// as given to NewObserver.
func (o Observer) InclinationDeg() float64 { return o.resolved().incl }

// Horizon returns r₊ of the observer's black hole.
func (o Observer) Horizon() float64 { return o.resolved().horizon }

// CosInclination returns cos θo, exactly 0 at 90°.
func (o Observer) CosInclination() float64 { return o.resolved().cos }

// SinInclination returns sin θo, exactly 0 at 0° and 180°.
func (o Observer) SinInclination() float64 { return o.resolved().sin }

// Constants returns λ and η of the photon that reaches the screen at
// (α, β): λ = -α sin θo, η = β² + (α² - a²) cos²θo (Bardeen 1973).
func (o Observer) Constants(alpha, beta float64) (lambda, eta float64) {
	return o.resolved().constants(alpha, beta)
}

func (o Observer) constants(alpha, beta float64) (lambda, eta float64) {
	a := o.spin
	lambda = -alpha * o.sin
	eta = beta*beta + (alpha-a)*(alpha+a)*o.cos*o.cos
	return lambda, eta
}

// Trace follows the photon that arrives at screen point (α, β) backward in
// closed form and records up to orders equatorial crossings in p (which it
// overwrites; p.Crossings is reused). It allocates nothing once
// cap(p.Crossings) ≥ orders.
//
// Angular motion: τ_n = (2n+1)G_θ + s(G_θ - G_o), s = sign(β) sign(cos θo)
// (Gralla & Lupsasca 2020, PRD 101, 044032, eqs. 80–82). Radial motion:
// r(τ) from the Jacobi sn (case I) and cn (case II) forms of Gralla &
// Lupsasca (2020, eqs. A6–A13 and B45–B58), with the symbols of the
// package documentation. Domain: any finite α, β; η ≤ 0 photons never
// cross the plane.
func (o Observer) Trace(alpha, beta float64, orders int, p *Path) {
	o = o.resolved()
	lambda, eta := o.constants(alpha, beta)
	o.trace(lambda, eta, beta, orders, p, nil)
}

// trace is Trace for the resolved observer. If tm is not nil and the photon
// crosses the plane, it also receives what TraceTimed needs (timing.go).
func (o Observer) trace(lambda, eta, beta float64, orders int, p *Path, tm *timingInput) {
	a := o.spin
	p.Lambda, p.Eta = lambda, eta
	p.Crossings = p.Crossings[:0]
	p.Turn = math.Inf(1)

	A := a*a - eta - lambda*lambda
	lma := lambda - a
	B := 2 * (eta + lma*lma)
	C := -a * a * eta
	q := radialRoots(A, B, C)
	if math.Abs(a) > nearExtremalSpin && math.Abs(lambda-2*a) < nearExtremalLambda {
		// Near-extremal holes: roots crowd at r ≈ 1 (see refineNearPair).
		q.refineNearPair(a, lambda, eta)
	}
	p.Roots = q.cs
	rh := o.horizon

	// The angular motion (x = cos θ, (dx/dτ)² = a²(u₊ - x²)(x² - u₋)),
	// set up first where the photon escapes with four real roots and
	// crosses the plane, so that the F of its radial and of its angular
	// motion run side by side (ellipFsc2).
	var ang angularMotion
	var gobs float64
	paired := q.cs == FourReal && q.r4 > rh && eta > 0 && orders > 0 && beta != 0
	// The timed trace builds the radial solution where the timing reads
	// it, instead of copying it there.
	var radLocal radial
	rad := &radLocal
	if tm != nil {
		rad = &tm.rad
		*rad = radial{}
	}
	if paired {
		ang = o.angularMotion(A, eta, beta)
		s2, c2, mc := caseIAmplitude(&q)
		var f0, g float64
		if tm != nil && s2 > 0 && ang.s2 > 0 && o.sin != 0 {
			f0, g = tm.angularF(s2, c2, mc, &ang, o.sin*o.sin, true)
		} else {
			f0, g = ellipFsc2(s2, c2, mc, ang.s2, ang.c2, ang.mc)
		}
		rad.initIF0(&q, rh, true, f0)
		gobs = g / ang.sw
	}

	// Radial solution: total Mino time and r(τ).
	switch {
	case paired:
		p.Fate = Escaped
		p.Turn = rad.turn
	case q.cs == FourReal && q.r4 > rh:
		rad.initI(&q, rh, true)
		p.Fate = Escaped
		p.Turn = rad.turn
	case q.cs == FourReal:
		rad.initI(&q, rh, false)
		p.Fate = Captured
	case q.cs == TwoReal && q.r2 < rh:
		rad.initII(&q, rh)
		p.Fate = Captured
	case q.cs == TwoReal:
		// r2 ≥ r₊ with complex r3,4 would be a turning point outside the
		// horizon; it does not occur for photons from infinity (Gralla &
		// Lupsasca 2020, sec. III), but stay safe: treat by quadrature.
		p.Fate = Escaped
		p.Mino = 2 * minoQuad(A, B, C, 1/q.r2)
		p.Turn = p.Mino / 2
		return
	default:
		p.Fate = Captured
		p.Mino = minoQuad(A, B, C, 1/rh)
		return
	}
	p.Mino = rad.total
	if !(eta > 0) {
		// No crossing; degenerate root sets (e.g. λ = η = 0 at a = 0,
		// R = r⁴) leave the elliptic forms 0/0, so integrate directly.
		if math.IsNaN(p.Mino) || math.IsInf(p.Mino, 0) {
			if p.Fate == Captured {
				p.Mino = minoQuad(A, B, C, 1/rh)
			} else {
				p.Mino = 2 * minoQuad(A, B, C, 1/q.r4)
			}
		}
		return
	}
	if orders <= 0 {
		return
	}

	// Angular Mino times.
	if !paired {
		ang = o.angularMotion(A, eta, beta)
	}
	w, up, mcTheta, sw := ang.w, ang.up, ang.mc, ang.sw
	var gq float64
	if tm != nil && mcTheta > 0 && !math.IsInf(mcTheta, 1) {
		k, zk := ellipKSn2(mcTheta)
		gq = k / sw
		tm.zk, tm.haveZK = zk, true
	} else {
		gq = ellipK(mcTheta) / sw
	}
	c := o.cos
	var tau0 float64
	if beta == 0 {
		tau0 = gq
	} else {
		s2, c2 := ang.s2, ang.c2
		switch {
		case paired:
		case tm != nil && s2 > 0 && o.sin != 0:
			_, g := tm.angularF(0, 0, 0, &ang, o.sin*o.sin, false)
			gobs = g / sw
		default:
			gobs = ellipFsc(s2, c2, mcTheta) / sw
		}
		sgn := 1.0
		if (beta < 0) != (c < 0) && c != 0 {
			sgn = -1
		}
		tau0 = gq + sgn*(gq-gobs)
		if tm != nil {
			tm.sgn, tm.gobs, tm.s2, tm.c2 = sgn, gobs, s2, c2
		}
	}
	if tm != nil {
		tm.set(q, w, up, mcTheta, sw, gq, beta == 0)
	}
	for n := 0; n < orders; n++ {
		tau := tau0 + 2*float64(n)*gq
		if !(tau < p.Mino) {
			break
		}
		var r float64
		if tm != nil && n < len(tm.jac) {
			r = rad.eval(tau, &tm.jac[n])
		} else {
			r = rad.at(tau)
		}
		if r < rh { // rounding at the very end of a capture
			r = rh
		}
		p.Crossings = append(p.Crossings, Crossing{R: r, Mino: tau, Outbound: tau < p.Turn})
	}
}

// angularMotion is the polar motion of a photon that crosses the plane
// (η > 0): x = cos θ, (dx/dτ)² = a²(u₊ − x²)(x² − u₋) (package
// documentation), and the amplitude of the observer's latitude.
type angularMotion struct {
	w, up, mc, sw float64 // a² u₋ < 0, u₊, 1 − m (m = −η a²/w² ≤ 0), sqrt(−w)
	s2, c2        float64 // sin²φ = cos²θo/u₊ and cos²φ of the observer (β ≠ 0)
}

// angularMotion sets up the polar motion for A = a² − η − λ², η and β.
func (o Observer) angularMotion(A, eta, beta float64) angularMotion {
	a := o.spin
	s := math.Sqrt(A*A + 4*a*a*eta)
	var am angularMotion
	if A > 0 {
		am.w = -2 * a * a * eta / (A + s)
	} else {
		am.w = (A - s) / 2
	}
	am.up = -eta / am.w
	am.mc = 1 + eta*a*a/(am.w*am.w)
	am.sw = math.Sqrt(-am.w)
	if beta != 0 {
		// cos²φ = (u₊ − cos²θo)/u₊ written without cancellation:
		// u₊ − cos²θo = sin²θo β² / (a² cos²θo − w).
		c := o.cos
		am.s2 = min(1, c*c/am.up)
		am.c2 = min(1, o.sin*o.sin*beta*beta/((a*a*c*c-am.w)*am.up))
	}
	return am
}

// radial is the closed-form r(τ) of one photon.
type radial struct {
	cs    RootCase
	total float64 // total Mino time
	turn  float64 // Mino time at the turning point (+Inf if none)
	// case I
	r3, r4, r31, r41 float64
	r42, r43         float64
	// case II
	ap, bp       float64 // A', B'
	num0, num1   float64 // B' r2 - A' r1, B' r2 + A' r1
	den0, den1   float64 // B' - A', B' + A'
	scale, x0, m float64 // X = scale τ - x0; parameter m
	mc           float64 // 1 - m
	c0, r21      float64 // case II: cn X0 = (A' - B')/(A' + B'), r2 - r1
	// sn, cn, dn of X0 (case I: of F0), set once for at.
	sn0, cn0, dn0 float64
	// The AGM of the parameter, set once for every r(τ) of the photon
	// (jacobi); agmOK is false where jacobi's special cases m = 0 or
	// mc = 0 apply.
	agm   agmTable
	agmOK bool
}

// setAGM prepares rd.agm for rd.m and rd.mc.
func (rd *radial) setAGM() {
	rd.agmOK = rd.m > 0 && rd.mc > 0 && !math.IsNaN(rd.m)
	if rd.agmOK {
		rd.agm.set(rd.mc)
	}
}

// jacobi returns sn, cn and dn of u for the photon's parameter.
func (rd *radial) jacobi(u float64) (sn, cn, dn float64) {
	if rd.agmOK && !math.IsNaN(u) && !math.IsInf(u, 0) {
		return rd.agm.jacobi(u)
	}
	return jacobi(u, rd.m, rd.mc)
}

// initI sets up case I, four real roots (Gralla & Lupsasca 2020,
// sec. IV): k = r32 r41/(r31 r42), F0 = F(arcsin sqrt(r31/r41)|k),
// X = ½ sqrt(r31 r42) τ - F0,
// r = (r4 r31 - r3 r41 sn²X)/(r31 - r41 sn²X).
func (rd *radial) initI(q *quartic, rh float64, escapes bool) {
	s2, c2, mc := caseIAmplitude(q)
	rd.initIF0(q, rh, escapes, ellipFsc(s2, c2, mc))
}

// caseIAmplitude returns sin², cos² of the amplitude of F0 and 1 − k of
// case I (see initI): r31/r41, r43/r41 and r21 r43/(r31 r42).
func caseIAmplitude(q *quartic) (s2, c2, mc float64) {
	r31 := q.r3 - q.r1
	r41 := q.r4 - q.r1
	r42 := q.r4 - q.r2
	return r31 / r41, q.r43 / r41, q.r21 * q.r43 / (r31 * r42)
}

// initIF0 is initI given F0.
func (rd *radial) initIF0(q *quartic, rh float64, escapes bool, f0 float64) {
	r31 := q.r3 - q.r1
	r41 := q.r4 - q.r1
	r32 := q.r3 - q.r2
	r42 := q.r4 - q.r2
	m := r32 * r41 / (r31 * r42)
	mc := q.r21 * q.r43 / (r31 * r42)
	scale := math.Sqrt(r31*r42) / 2
	*rd = radial{cs: FourReal, r3: q.r3, r4: q.r4, r31: r31, r41: r41, r42: r42, r43: q.r43,
		scale: scale, x0: f0, m: m, mc: mc, turn: math.Inf(1),
		sn0: math.Sqrt(r31 / r41), cn0: math.Sqrt(q.r43 / r41), dn0: math.Sqrt(q.r43 / r42)}
	rd.setAGM()
	if escapes {
		rd.turn = f0 / scale
		rd.total = 2 * f0 / scale
		return
	}
	// Horizon at X_h = -F(arcsin sqrt(r31 (r₊ - r4)/(r41 (r₊ - r3))) | k).
	num := r31 * (rh - q.r4)
	den := r41 * (rh - q.r3)
	s2 := num / den
	c2 := q.r43 * (rh - q.r1) / den // 1 - s2
	xh := -ellipFsc(min(1, s2), max(0, c2), mc)
	rd.total = (xh + f0) / scale
}

// initII sets up case II, r1 < r2 real and r3 = conj(r4) (Gralla &
// Lupsasca 2020, sec. IV): A' = |r3 - r2|, B' = |r3 - r1|,
// k = ((A' + B')² - r21²)/(4A'B'), X0 = F(arccos((A'-B')/(A'+B'))|k),
// X = sqrt(A'B') τ - X0,
// r = ((B'r2 - A'r1) + (B'r2 + A'r1) cn X)/((B' - A') + (B' + A') cn X).
func (rd *radial) initII(q *quartic, rh float64) {
	d2 := q.re34 - q.r2
	d1 := q.re34 - q.r1
	im2 := q.im34 * q.im34
	ap := math.Sqrt(d2*d2 + im2)
	bp := math.Sqrt(d1*d1 + im2)
	r21 := q.r21
	m := ((ap+bp)*(ap+bp) - r21*r21) / (4 * ap * bp)
	// 1 - k = (r21 - A' + B')(r21 + A' - B')/(4A'B'); near the critical
	// curve r21 + A' - B' → 0 like im34², so write it without cancellation.
	small := r21 + ap - bp
	if d2 > 0 {
		small = im2 * (bp - ap + r21) / ((ap + d2) * (bp + d1))
	}
	mc := (r21 - ap + bp) * small / (4 * ap * bp)
	if !(mc > minCaseIIComplement) {
		mc = minCaseIIComplement // the critical curve itself: see radialRoots
	}
	x0 := ellipFcos((ap-bp)/(ap+bp), mc)
	scale := math.Sqrt(ap * bp)
	*rd = radial{cs: TwoReal, ap: ap, bp: bp,
		num0: bp*q.r2 - ap*q.r1, num1: bp*q.r2 + ap*q.r1,
		den0: bp - ap, den1: bp + ap,
		scale: scale, x0: x0, m: m, mc: mc, turn: math.Inf(1),
		c0: (ap - bp) / (ap + bp), r21: r21}
	rd.setAGM()
	rd.sn0 = math.Sqrt((1 - rd.c0) * (1 + rd.c0))
	rd.dn0 = math.Sqrt(1 - m*rd.sn0*rd.sn0)
	cnh := (rd.num0 - rh*rd.den0) / (rh*rd.den1 - rd.num1)
	rd.total = (x0 - ellipFcos(cnh, mc)) / scale
}

// at returns r(τ) for 0 ≤ τ ≤ total. Both cases are evaluated in a form
// that stays exact where the photon is far away (τ → 0, and τ → total for
// an escaping photon), where the textbook forms divide two vanishing
// differences: with X = δ - X₀ the addition theorem for the Jacobi functions
// (DLMF 22.8.1–2) gives
//
//	case I:  r = r3 + r31 r43 / (r41 (s0 - sn X)(s0 + sn X)),  s0 = sn F0
//	case II: r = (B'r2 + A'r1)/(A'+B') + 2A'B'r21 / ((A'+B')² (cn X - cn X0))
//
// with s0 + sn X and cn X - cn X0 written through sn δ, cn δ, dn δ.
func (rd *radial) at(tau float64) float64 { return rd.eval(tau, nil) }

// pathJacobi is what the timing (radialTimer.at) needs of a point of the
// radial path: Y = |X| (case I) or X0 − scale·τ (case II), sn, cn, dn of
// Y, and the sign s with which the integrals from infinity to the point
// run (∫ = J(Y∞) + s J(Y)).
type pathJacobi struct {
	y, sn, cn, dn, sgn float64
	den                float64 // D of the addition theorem (see eval)
	// δ = X0 − Y (case I: folded onto the incoming half) and its sn,
	// cn, dn, from which the timing adds the integrals from infinity
	// (radialTimer.sumsI).
	d, sd, cd, dd float64
}

// eval is at; if jac is not nil it also receives the pathJacobi of the
// point, from the addition theorem (DLMF 22.8.1–3) with Y = X0 − δ
// in both cases (δ folded in case I): sn Y = (s0 cd dd − sd c0 d0)/D,
// cn Y = (c0 cd + s0 d0 sd dd)/D, dn Y = (d0 dd + m s0 c0 sd cd)/D,
// D = 1 − m s0² sd² = dd² + m c0² sd².
func (rd *radial) eval(tau float64, jac *pathJacobi) float64 {
	if rd.cs == FourReal {
		// r(X) is even in X: fold the outgoing half onto the incoming one.
		d := rd.scale * tau
		if tau > rd.turn {
			d = rd.scale * (rd.total - tau)
		}
		sd, cd, dd := rd.jacobi(d)
		// sn F0 = sqrt(r31/r41), cn F0 = sqrt(r43/r41), dn F0 = sqrt(r43/r42).
		s0, c0, d0 := rd.sn0, rd.cn0, rd.dn0
		den := 1 - rd.m*s0*s0*sd*sd
		snx := (sd*c0*d0 - s0*cd*dd) / den
		if jac != nil {
			rd.pathJacobi(jac, d, sd, cd, dd)
			jac.sn = math.Abs(sd*c0*d0-s0*cd*dd) / jac.den
			if tau > rd.turn {
				jac.sgn = 1
			}
		}
		// 1 - cd dd = sd²(1 + m - m sd²)/(1 + cd dd), δ ≤ K.
		omcd := sd * sd * (1 + rd.m - rd.m*sd*sd) / (1 + cd*dd)
		plus := (s0*(omcd-rd.m*s0*s0*sd*sd) + sd*c0*d0) / den
		return rd.r3 + rd.r31*rd.r43/(rd.r41*(s0-snx)*plus)
	}
	d := rd.scale * tau
	sd, cd, dd := rd.jacobi(d)
	c0, s0, d0 := rd.c0, rd.sn0, rd.dn0
	cm1 := cd - 1
	if cd > 0 {
		cm1 = -sd * sd / (1 + cd)
	}
	den := 1 - rd.m*s0*s0*sd*sd
	diff := (c0*(cm1+rd.m*s0*s0*sd*sd) + s0*d0*sd*dd) / den
	if jac != nil {
		rd.pathJacobi(jac, d, sd, cd, dd)
		jac.sn = math.Abs(s0*cd*dd-sd*c0*d0) / jac.den
	}
	return rd.num1/rd.den1 + 2*rd.ap*rd.bp*rd.r21/(rd.den1*rd.den1*diff)
}

// pathJacobi fills y, cn, dn, D and sgn = −1 of jac for the point δ of the
// path (see eval); eval sets sn and, past the turning point, sgn.
func (rd *radial) pathJacobi(jac *pathJacobi, d, sd, cd, dd float64) {
	s0, c0, d0 := rd.sn0, rd.cn0, rd.dn0
	if rd.cs != FourReal {
		c0 = rd.c0
	}
	// D = 1 − m s0² sd² = dd² + m c0² sd², without the cancellation of
	// the first form near the critical curve (m → 1, sd, s0 → 1).
	den := dd*dd + rd.m*c0*c0*sd*sd
	jac.y = rd.x0 - d
	jac.cn = (c0*cd + s0*d0*sd*dd) / den
	jac.dn = (d0*dd + rd.m*s0*c0*sd*cd) / den
	jac.sgn = -1
	jac.den = den
	jac.d, jac.sd, jac.cd, jac.dd = d, sd, cd, dd
}

// legendre is the fixed Gauss–Legendre rule of minoQuad on [0, 1], set up
// once.
var legendre = func() struct{ x, w []float64 } {
	x := make([]float64, minoQuadNodes)
	w := make([]float64, minoQuadNodes)
	quad.Legendre{}.FixedLocations(x, w, 0, 1)
	return struct{ x, w []float64 }{x, w}
}()

// minoQuad returns ∫₀^{uMax} du / sqrt(1 + A u² + B u³ + C u⁴), the Mino
// time from infinity to r = 1/uMax, by fixed Gauss–Legendre quadrature
// with minoQuadNodes nodes (gonum). It serves only photons with no real root outside the horizon
// and η ≤ 0, which never cross the equatorial plane, so the crossings
// stay closed-form. The integrand is smooth there (no root in the range).
func minoQuad(A, B, C, uMax float64) float64 {
	sum := 0.0
	for i, t := range legendre.x {
		u := t * uMax
		u2 := u * u
		v := 1 + A*u2 + B*u2*u + C*u2*u2
		if v <= 0 {
			return math.NaN()
		}
		sum += legendre.w[i] / math.Sqrt(v)
	}
	return sum * uMax
}
