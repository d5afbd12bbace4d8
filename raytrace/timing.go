package raytrace

import "math"

// Timing is the Boyer–Lindquist time and azimuth of one equatorial
// crossing, relative to the photon's arrival at the observer.
//
// Delay is t_o − t, the coordinate time the photon took from the crossing
// to the observer, regularised for an observer at infinity: the time to a
// distant observer at radius r_o grows like r_o + 2 ln r_o (in M), and Delay
// is the limit of t_o − t − (r_o + 2 ln r_o) as r_o → ∞. Only differences
// of Delay, between crossings of one photon or between photons, are
// physical; they do not depend on this choice.
//
// DeltaPhi is φ − φ_o, the azimuth of the crossing minus the observer's
// azimuth, in radians, not reduced modulo 2π (it counts the windings of
// near-critical photons). For an observer on the axis (θo = 0° or 180°),
// whose azimuth is undefined, it is the limit θo → 0, in which the first
// crossing lies toward the screen direction atan2(α, −β cos θo).
//
// Both diverge at the horizon, so a crossing that Trace places on r₊
// itself (its rounding clamp at the very end of a capture) has infinite
// Delay and DeltaPhi.
type Timing struct {
	Delay    float64 // regularised t_o − t, in M
	DeltaPhi float64 // φ − φ_o, in radians
}

// TimedPath is a Path together with the Timing of each crossing:
// Times[i] belongs to Crossings[i]. Reuse one per goroutine (it also holds
// TraceTimed's working state, about 2 KB, so that no call has to clear it
// whole).
type TimedPath struct {
	Path
	Times []Timing
	work  timedWork
}

// timedWork is TraceTimed's working state. Each call resets the flags
// that say what is set (timingInput.reset, radialTimer.reset); every other
// field is written before it is read in the case that reads it, which
// TestTraceTimedReuse checks against a fresh TimedPath for every ray.
type timedWork struct {
	in timingInput
	rt radialTimer
}

// TraceTimed is Trace plus the time delay and azimuth of every crossing in
// closed form (Gralla & Lupsasca 2020, PRD 101, 044032, sec. IV and
// appendices A–B). It allocates nothing once cap(tp.Crossings) and
// cap(tp.Times) ≥ orders. Domain as for Trace.
//
// The Mino-time rates of t and φ (Carter 1968; Bardeen 1973) split into a
// radial and an angular part,
//
//	dt/dτ = r² + 2r + 4 + [(8 − 2aλ) r − 4a²]/Δ  +  a² cos²θ
//	dφ/dτ = a (2r − aλ)/Δ                        +  λ / sin²θ
//
// so Δt = I_t + a² G_t and Δφ = I_φ + λ G_φ, where I are integrals over
// the radial path and G = ∫cos²θ dτ, ∫dτ/sin²θ over the angular one. With
// Δ = (r − r₊)(r − r₋) the radial integrands are r², r, 1 and
// 1/(r − r±); radialTimer expresses their integrals through Legendre's
// integrals of the first, second and third kind, evaluated with Carlson's
// R_F, R_D, R_J and R_C (carlson.go). The divergent ∫r² dτ and ∫r dτ are
// regularised as described for Timing. The integrals from infinity to
// each of the first four crossings take one evaluation of R_D and the
// R_J, at the Mino distance from infinity that the trace's r(τ) already
// carries, through the addition theorems of the elliptic integrals
// (radialTimer.sumsI, addII); none is spent at infinity itself.
//
// Accuracy: against an independent integration of the rates (see
// IntegrateTimed and timing_test.go) about 1e-10 of the delay and 1e-9
// rad, except near extremality, where the coefficients C±, A± grow like
// 1/(r₊ − r₋) with opposite signs and magnify the rounding of I±: the
// error grows to about 1e-12/(r₊ − r₋) of the size (1e-6 at
// |a| = 1 − 1e-12); for captured photons with four real roots near
// extremality, whose integrals are still a difference of two evaluations
// (radialTimer), where it reaches 2e-4 of the delay at a crossing 1e-6
// from the horizon (measured at a = −(1 − 1e-9), θo = 90°); and on the
// critical curve itself, where the crossings are ambiguous.
func (o Observer) TraceTimed(alpha, beta float64, orders int, tp *TimedPath) {
	o = o.resolved()
	lambda, eta := o.constants(alpha, beta)
	in := &tp.work.in
	in.reset()
	o.trace(lambda, eta, beta, orders, &tp.Path, in)
	tp.Times = tp.Times[:0]
	if len(tp.Crossings) == 0 || !in.ok {
		return
	}
	a := o.spin
	rt := &tp.work.rt
	rt.reset()
	rt.init(&in.q, &in.rad, a, lambda, o.horizon)
	ang := o.newAngularTimer(in, alpha, beta, lambda)
	for n, c := range tp.Crossings {
		var jac *pathJacobi
		if n < len(in.jac) {
			jac = &in.jac[n]
		}
		it, iphi := rt.at(c.Mino, c.R, jac)
		gt, lgphi := ang.at(n)
		tp.Times = append(tp.Times, Timing{Delay: it + a*a*gt, DeltaPhi: -(iphi + lgphi)})
	}
}

// timingInput carries what trace computed that the timing needs.
type timingInput struct {
	ok        bool
	q         quartic
	rad       radial
	w, up, mc float64 // a² u₋, u₊ and 1 − m of the angular motion
	sw, gq    float64 // sqrt(−w), G_θ
	beta0     bool    // β = 0: the observer sits at a turning point
	sgn, gobs float64 // s and G_o of the crossing times (β ≠ 0)
	s2, c2    float64 // sin², cos² of the observer's amplitude (β ≠ 0)
	// The Jacobi functions of the first crossings, from trace's r(τ).
	jac [4]pathJacobi
	// R_D(c², d², 1) and R_J(c², d², 1, sin²θo) at the observer's angular
	// amplitude, from the duplication of its R_F (angularF), if angDJ.
	angDJ        bool
	angRD, angRJ float64
	// ∫₀^K sn² of the angular motion, from the AGM of its K (ellipKSn2),
	// if haveZK.
	haveZK bool
	zk     float64
}

// angularF returns what ellipFsc2 returns for the radial amplitude (s2a,
// c2a, mca; withA) and the angular one of ang (ellipFsc alone when withA is
// false, fa = 0) and keeps R_D and R_J of the angular one, p = st2 > 0,
// from the same duplication (carlsonRF2DJ). Both amplitudes s2 > 0.
func (tm *timingInput) angularF(s2a, c2a, mca float64, ang *angularMotion, st2 float64, withA bool) (fa, fb float64) {
	ra, rb, rd, rj := carlsonRF2DJ(c2a, c2a+mca*s2a, ang.c2, ang.c2+ang.mc*ang.s2, st2, withA)
	tm.angDJ, tm.angRD, tm.angRJ = true, rd, rj
	return math.Sqrt(s2a) * ra, math.Sqrt(ang.s2) * rb
}

// reset clears what trace sets only in some cases (see timedWork).
func (tm *timingInput) reset() {
	tm.ok, tm.angDJ, tm.haveZK = false, false, false
}

// set records the roots and the angular motion; trace has built tm.rad
// in place.
func (tm *timingInput) set(q quartic, w, up, mc, sw, gq float64, beta0 bool) {
	tm.ok = tm.rad.cs == FourReal || tm.rad.cs == TwoReal
	tm.q = q
	tm.w, tm.up, tm.mc, tm.sw, tm.gq = w, up, mc, sw, gq
	tm.beta0 = beta0
}

// angularTimer holds G_t = ∫cos²θ dτ and λG_φ = λ∫dτ/sin²θ over a quarter
// oscillation (equator to turning latitude, q) and from the equator to the
// observer's latitude (o). With x = cos θ = sqrt(u₊) sn(ψ|m),
// ψ = sqrt(−w) τ (package documentation), ∫sn² dψ = (s³/3) R_D(c², d², 1)
// and ∫dψ/(1 − u₊ sn²) = Π(u₊; am ψ | m) = F + (u₊/3) s³ R_J(c², d², 1,
// 1 − u₊ s²) with s = sn ψ, c = cn ψ, d = dn ψ (DLMF 19.25.9, 19.25.14).
// The path to crossing n runs like its Mino time,
// G(τ_n) = (2n+1) G_q + s (G_q − G_o) (Gralla & Lupsasca 2020, eq. 80).
type angularTimer struct {
	tq, to   float64 // G_t quarter and observer parts
	pq, po   float64 // λG_φ quarter and observer parts
	sgn      float64
	observer bool // false when β = 0: the observer part equals the quarter
}

func (o Observer) newAngularTimer(in *timingInput, alpha, beta, lambda float64) angularTimer {
	var at angularTimer
	up, mc, sw := in.up, in.mc, in.sw
	a := o.spin
	var rj [1]float64
	// 1 − u₊ = λ²/(a² − w), without cancellation (u₊ → 1 as λ → 0).
	omu := lambda * lambda / (a*a - in.w)
	// Quarter oscillation: complete integrals by Bulirsch's cel, with
	// kc² = 1 − m: ∫sn² dψ = cel(kc, 1, 0, 1), Π(u₊|m) = cel(kc, 1 − u₊, 1, 1).
	kc := math.Sqrt(mc)
	rdq := 3 * in.zk // R_D(0, 1 − m, 1) = 3 ∫₀^K sn²
	if !in.haveZK {
		rdq = 3 * bulirschCel(kc, 1, 0, 1)
	}
	if omu > 0 {
		at.pq = lambda * bulirschCel(kc, omu, 1, 1) / sw
	} else {
		// λ → 0: the photon passes over a pole and its azimuth sweeps
		// by π per half oscillation: λ Π(u₊) → sign(λ)·(π/2) sqrt(−w) per
		// quarter (R_J(0, y, z, p) ≈ (3π/2)/sqrt(y z p) as p → 0, with
		// u₊ = 1, −w(1 − m) = η + a², a² − w = a² + η at λ = 0).
		at.pq = -sgnNonNeg(alpha) * math.Pi / 2
	}
	at.tq = up / sw * rdq / 3
	at.sgn = 1
	if in.beta0 {
		at.to, at.po = at.tq, at.pq
		return at
	}
	at.observer = true
	at.sgn = in.sgn
	s2, c2 := in.s2, in.c2
	d2 := c2 + mc*s2 // 1 − m s²
	s3 := s2 * math.Sqrt(s2)
	st2 := o.sin * o.sin // 1 − u₊ s² = sin²θo
	if s2 == 0 {
		return at // observer in the plane: G_o = 0
	}
	if st2 > 0 && omu > 0 {
		var rd float64
		if in.angDJ {
			rd, rj[0] = in.angRD, in.angRJ
		} else {
			rd = carlsonDJ(c2, d2, 1, []float64{st2}, rj[:0])
		}
		at.to = up / sw * s3 * rd / 3
		at.po = lambda * (in.gobs + up/(3*sw)*s3*rj[0])
		return at
	}
	rd := in.angRD
	if !in.angDJ {
		rd = CarlsonRD(c2, d2, 1)
	}
	at.to = up / sw * s3 * rd / 3
	if o.sin == 0 {
		// Observer on the axis (θo = 0° or 180°), λ = 0: the limit θo → 0
		// of λG_o is −sign(α) arctan(|α|/|β|) (R_J(x, y, z, p) ≈
		// 3 R_C(x, p)/sqrt(y z) as x, p → 0; then x/p → β²/(η + a²)), so
		// that the first crossing lies at φ − φ_o = atan2(α, −β cos θo)
		// (plus the radial part): the direction of the screen point.
		at.po = -sgnNonNeg(alpha) * math.Atan2(math.Abs(alpha), math.Abs(beta))
	}
	return at
}

// sgnNonNeg is the sign of v with sgnNonNeg(0) = 1.
func sgnNonNeg(v float64) float64 {
	if v < 0 {
		return -1
	}
	return 1
}

// at returns G_t and λG_φ from the observer to crossing n.
func (at angularTimer) at(n int) (gt, lgphi float64) {
	k := float64(2*n + 1)
	gt = k*at.tq + at.sgn*(at.tq-at.to)
	lgphi = k*at.pq + at.sgn*(at.pq-at.po)
	return gt, lgphi
}

// farRadius: beyond r − r3 > farRadius·(1 + |r3|) the case-I timing takes
// 1 − n sn² from the crossing radius instead of from sn (see
// radialTimer.at). There r43/(r − r3) is exact to rounding even for the
// uncertain roots of near-critical photons (their error, about 1e-10 of
// their size, is 1e-14 of r − r3), while n cn² − r43/r31 starts to
// cancel (by about r/r31). Any value between 1e3 and 1e6 would do.
const farRadius = 1e4

// rootPoleGap: in case II a horizon r± closer than rootPoleGap·(1 + r21)
// to the root r2 is treated as on it (see setupII). At that gap both ways
// err by about 1e-8 of ∫dτ/(r − r±), and it happens only for r₋ as a → 0
// (both are O(a²)), where the coefficients A₋, C₋ are O(a²) and O(a³).
const rootPoleGap = 1e-8

// radialTimer evaluates I_t and I_φ, the radial parts of Δt and Δφ, from
// infinity to a point of the radial path.
//
// The partial fractions of the rates (Δ = (r − r₊)(r − r₋)) are
//
//	[(8 − 2aλ) r − 4a²]/Δ = C₊/(r − r₊) + C₋/(r − r₋),  C± = ±2r±(2r± − aλ)/(r₊ − r₋)
//	a (2r − aλ)/Δ         = A₊/(r − r₊) + A₋/(r − r₋),  A± = ±a(2r± − aλ)/(r₊ − r₋)
//
// so I_t = I₂ + 2I₁ + 4τ + C₊I₊ + C₋I₋ and I_φ = A₊I₊ + A₋I₋ with
// I_k = ∫r^k dτ and I± = ∫dτ/(r − r±). I₂ is reduced with the identity
// r² = c² + R'(c)/(2(r − c)) ± d/dτ[sqrt(R)/(r − c)] for a root c of R
// (differentiate sqrt(R)/(r − c) along the path), which leaves a
// second-kind integral and a boundary term carrying the divergence r_o.
// The logarithmic divergence of I₁ sits in one R_C (case I) or one
// logarithm (case II), whose finite part gives the regularised value.
//
// Each integral from infinity is J(∞) ∓ J(Y) in the normal-form variable
// Y of the case. For the crossings whose Jacobi functions trace passed on
// (pathJacobi) it is added in one evaluation (sumsI, addII); otherwise
// (crossings past the fourth, captured photons with four real roots) it
// is the difference of the evaluations at the point (jI, jII) and at
// infinity (inf, set on first need).
type radialTimer struct {
	cs       RootCase
	cp, cm   float64 // C₊, C₋
	ap, am   float64 // A₊, A₋
	rp, rm   float64 // r₊, r₋
	skipM    bool    // r₋ terms below rounding (a → 0)
	scale    float64 // dX/dτ
	x0       float64 // X at infinity: F0 (case I), X0 (case II)
	m, mc    float64
	inf      [5]float64 // J_1, J_r, J_r² (elliptic part), J₊, J₋ at infinity, regularised
	breg     float64    // regularised boundary term of I₂ at infinity
	r1, r2   float64
	r3, r4   float64
	r31, r41 float64
	r42, r43 float64
	r32      float64
	n, nu    float64 // case I: n = r41/r31, ν = m/n = r32/r42
	d4p, d4m float64 // case I: r4 − r±
	// case I, per photon: 1/d4±, n r43/(3 d4±²), ν/3, n/3, r31 r32/2,
	// r43/r31, r43/r42
	id4p, id4m, kp, km      float64
	nu3, n3, k2, q431, q432 float64
	iscale                  float64 // 1/scale
	// case II
	re, im       float64
	apr, bpr     float64 // A', B'
	a0, a1       float64 // B'r2 − A'r1, B'r2 + A'r1
	b0, b1       float64 // B' − A', B' + A'
	r21          float64
	g            [3]float64 // γ of the poles at infinity, r₊, r₋
	p0, p1       [3]float64 // for r±: 1/(r − c) = (1/p1)[b1 − (2A'B'r21/p0)/(1 + γ cn)]
	compRD       float64    // R_D(0, 1−m, 1)
	compRJ       [3]float64 // R_J(0, 1−m, 1, ·) for each γ
	atRoot       [3]bool    // case II: the pole r± sits on the root r2 (see setupII)
	coefInf      float64    // 2A'B'r21/(b0 b1)
	logInfFinite float64    // ln(2A'B'r21/(b0 b1)): finite part of ln(1 + γ∞ cn) at infinity
	// inf is set on first need (infII, infI): the additions from
	// infinity (addI, addII) do without it.
	haveInf bool
	// The R_C of Π(n) at infinity (case I, e0 and sx0 = √x there, its
	// regularised value is ½ ln(e0)/sx0) and p (see addI), whether the photon
	// escapes with four real roots (escI), sn, cn, dn at infinity (of F0,
	// X0), and for the characteristics of the third kinds (case I: ν,
	// n₊, n₋; case II: those of jII): N, 1 − N, 1 − N sn² at infinity and
	// k² = N(m − N)(1 − N).
	escI               bool
	e0, sx0, pn        float64 // case I: the R_C of Π(n) at infinity (setupI, addI)
	s0, c0, d0         float64
	nch, omn, on0, kk2 [3]float64
	kq, ikq            [3]float64 // sqrt|k²| and its inverse (setK)
	// Complete integrals, set on first need: case I ∫₀^K sn² and
	// (P_N(K) − K)/N (zc, qc); case II compRD, compRJ.
	haveComp bool
	zc       float64
	qc       [3]float64
	// case II: 1 + γ cn at infinity for each pole, and the elementary
	// terms of the integrals at infinity (see addII).
	onegcInf [3]float64
	einf     [5]float64
}

// reset clears the flags of what is set on first need or only in some
// cases, so that init can set up a used radialTimer (see timedWork).
func (rt *radialTimer) reset() {
	rt.haveInf, rt.haveComp, rt.escI = false, false, false
	rt.atRoot = [3]bool{}
}

// init sets up rt, a zero or reset radialTimer, for the photon with radial roots
// q and radial solution rad (read only).
func (rt *radialTimer) init(q *quartic, rad *radial, a, lambda, rh float64) {
	rt.cs, rt.scale, rt.x0, rt.m, rt.mc, rt.iscale = rad.cs, rad.scale, rad.x0, rad.m, rad.mc, 1/rad.scale
	rt.rp = rh
	rt.rm = a * a / rh // r₋ = a²/r₊ without cancellation
	dr := 2 * math.Sqrt((1-a)*(1+a))
	rt.cp = 2 * rt.rp * (2*rt.rp - a*lambda) / dr
	rt.cm = -2 * rt.rm * (2*rt.rm - a*lambda) / dr
	rt.ap = a * (2*rt.rp - a*lambda) / dr
	rt.am = -a * (2*rt.rm - a*lambda) / dr
	// On the path r − r₋ > r − r₊ > 0, so 0 < I₋ < I₊: the r₋ terms are
	// below rounding of the r₊ terms when their coefficients are 1e-17 of
	// those (a → 0, where r₋ = a²/r₊ also meets the root r2 = O(a²) and
	// its own formula degenerates).
	rt.skipM = math.Abs(rt.cm) <= 1e-17*math.Abs(rt.cp) && math.Abs(rt.am) <= 1e-17*math.Abs(rt.ap)
	rt.r1, rt.r2 = q.r1, q.r2
	if rad.cs == FourReal {
		rt.setupI(q, rad)
	} else {
		rt.setupII(q, rad)
	}
}

// Case I (four real roots, r ≥ r4): r = r3 + r43/(1 − n sn²X), n = r41/r31,
// X = scale·τ − F0, r(X) even (Gralla & Lupsasca 2020, eq. B9). On
// 0 ≤ Y ≤ F0, with s, c, d = sn, cn, dn of Y:
//
//	∫₀^Y dX/(1 − n sn²X) = Π(n; am Y|m)
//	  = s R_C(c²d², (1 − ns²)(1 − νs²)) − (ν/3) s³ R_J(c², d², 1, 1 − νs²)
//
// (ν = m/n; the transformation n → m/n of DLMF 19.7.9, where for n > 1
// the F terms cancel), whose R_C holds the logarithm at infinity
// (s² = 1/n); ∫₀^Y sn² dX = (s³/3) R_D(c², d², 1) (DLMF 19.25.9); and
// ∫₀^Y dX/(r − c) = Y/d₄ − (n r43/d₄²)(s³/3) R_J(c², d², 1, 1 − n_c s²)
// with d₄ = r4 − c, n_c = n (r3 − c)/d₄ (a principal value where r4 < c,
// captured photons).
func (rt *radialTimer) setupI(q *quartic, rad *radial) {
	rt.r3, rt.r4 = q.r3, q.r4
	rt.r31, rt.r41, rt.r42, rt.r43 = rad.r31, rad.r41, rad.r42, rad.r43
	rt.r32 = q.r3 - q.r2
	rt.n = rt.r41 / rt.r31
	rt.nu = rt.r32 / rt.r42
	rt.d4p = rt.r4 - rt.rp
	rt.d4m = rt.r4 - rt.rm
	rt.id4p, rt.id4m = 1/rt.d4p, 1/rt.d4m
	rt.kp = rt.n * rt.r43 * rt.id4p * rt.id4p / 3
	rt.km = rt.n * rt.r43 * rt.id4m * rt.id4m / 3
	rt.nu3, rt.n3 = rt.nu/3, rt.n/3
	rt.k2 = rt.r31 * rt.r32 / 2
	rt.q431, rt.q432 = rt.r43/rt.r31, rt.r43/rt.r42
	// Infinity: s² = r31/r41, c² = r43/r41, d² = r43/r42.
	c2 := rt.r43 / rt.r41
	d2 := rt.r43 / rt.r42
	onu := rt.r43 * (rt.r31 + rt.r42) / (rt.r41 * rt.r42) // 1 − ν s²
	// ln y = ln r43 + ln(1 − νs²) − ln(r − r3): keep the finite part,
	// R_C → [ln(2√x) − ½ ln(r43 (1 − νs²))]/√x = ½ ln(4x/(r43 (1 − νs²)))/√x
	// with x = c²d² = r43²/(r41 r42) (rcRegular): rcInf = ½ ln(e0)/√x.
	rt.e0 = 4 * rt.r43 / (rt.r41 * rt.r42 * onu)
	rt.sx0 = math.Sqrt(c2 * d2)
	// sqrt((r−r1)(r−r2)(r−r4)/(r−r3)) = r + (r3 − r1 − r2 − r4)/2 + O(1/r).
	rt.breg = (rt.r3 - rt.r1 - rt.r2 - rt.r4) / 2
	if math.IsInf(rad.turn, 1) {
		return // captured: from J(F0) − J(Y) (infI)
	}
	// Escaping photons: the characteristics ν and n± = n (r3 − r±)/d₄±,
	// with 1 − N, m − N and 1 − N s0² written without cancellation:
	// 1 − ν = r43/r42, m − ν = m r43/r41, 1 − ν s0² = onu;
	// 1 − n_c = r43 (c − r1)/(r31 d₄), m − n_c = r41 r43 (c − r2)/(r31 r42 d₄),
	// 1 − n_c s0² = r43/d₄.
	rt.escI = true
	rt.s0, rt.c0, rt.d0 = rad.sn0, rad.cn0, rad.dn0
	// x − y of Π(n)'s R_C is (n − 1)(1 − ν) s² = p² s² with
	// n − 1 = r43/r31, 1 − ν = r43/r42 (see addI).
	rt.pn = rt.r43 / math.Sqrt(rt.r31*rt.r42)
	rt.nch[0], rt.omn[0], rt.on0[0] = rt.nu, rt.q432, onu
	rt.kk2[0] = rt.nu * (rt.m * rt.r43 / rt.r41) * rt.q432
	for i := range 2 {
		c, id4 := rt.rp, rt.id4p
		if i == 1 {
			c, id4 = rt.rm, rt.id4m
		}
		nc := rt.n * (rt.r3 - c) * id4
		omn := rt.r43 * (c - rt.r1) / rt.r31 * id4
		mmn := rt.r41 * rt.r43 * (c - rt.r2) / (rt.r31 * rt.r42) * id4
		rt.nch[i+1], rt.omn[i+1], rt.on0[i+1] = nc, omn, rt.r43*id4
		rt.kk2[i+1] = nc * mmn * omn
	}
	rt.setK()
}

// infI sets rt.inf, the case-I integrals from the turning point to
// infinity (Y = F0), on first need.
func (rt *radialTimer) infI() {
	rt.haveInf = true
	s2 := rt.r31 / rt.r41
	c2 := rt.r43 / rt.r41
	d2 := rt.r43 / rt.r42
	onu := rt.r43 * (rt.r31 + rt.r42) / (rt.r41 * rt.r42)
	rcInf := 0.5 * math.Log(rt.e0) / rt.sx0 // the regularised R_C (setupI)
	rt.inf = rt.jI(rt.x0, s2, c2, d2, onu, rt.r43*rt.id4p, rt.r43*rt.id4m, rcInf, true)
}

// The case-I integrals from infinity to a point of an escaping photon's
// path, without their value at infinity. With P_N(u) = ∫₀^u dX/(1 − N sn²X)
// and Z(u) = ∫₀^u sn²X dX, the addition theorems
//
//	Z(u+v) = Z(u) + Z(v) + s_u s_v s_w
//	P_N(u+v) = P_N(u) + P_N(v) + N t R_C(G², G² − k² t²)
//
// with w = u + v, t = s_u s_v s_w, G = 1 − N s_w² + N s_u s_v c_w d_w,
// k² = N(m − N)(1 − N) (for k² < 0 the R_C term is N arctan2(|k| t, G)/|k|)
// (Z: DLMF 22.16.27 for Jacobi's epsilon function, ℰ = u − mZ; P_N: Jacobi's
// addition theorem for the third kind, Whittaker & Watson 1927, §22.741,
// with N = m sn²a written without a) turn the integral from infinity
// (Y = F0) to the point Y into one evaluation: before the turning point,
// J(F0) − J(Y) = J(δ) + D(Y, δ) with δ = F0 − Y the distance from
// infinity that trace's r(τ) already carries; after it,
// J(F0) + J(Y) = J(F0 + Y) − D(F0, Y). The pole at infinity stays in
// the elementary R_C of Π(n) (see setupI), whose values at both ends
// are one logarithm (addI); the ν part has no pole (ν < m), and neither do n± for
// r1 < r± < r4: on 0 ≤ u ≤ 2K the radius of sn u covers only r ≥ r4 and
// r ≤ r1. For u > K, Z(u) = 2Z(K) − Z(2K − u) and likewise P_N, the
// complete values by Bulirsch's cel.

// addQ returns the addition term of P_N divided by N: t R_C(G², G² − k²t²)
// for k² > 0, t ≥ 0, G the G of the addition theorem, given k = sqrt|k²|
// and ik = 1/k; for k² < 0 the term arctan2(k t, G)/k. With v = k t/|G|,
// R_C(G², G²(1 − v²)) = artanh(v)/(v|G|) for v < 1 and its principal
// value arcoth(v)/(v|G|) for v > 1 (DLMF 19.2.18–19.2.20), so the term is
// ½ ln|(1 + v)/(1 − v)|/k, taken as ½ log1p(2v/(1 − v))/k or
// ½ log1p(2/(v − 1))/k so that nothing cancels, with its series
// t/|G| Σ v^{2j}/(2j + 1) for small v (as carlsonRC).
func addQ(k2, k, ik, t, G float64) float64 {
	if t == 0 {
		return 0
	}
	if k2 < 0 {
		return math.Atan2(k*t, G) * ik
	}
	g := math.Abs(G)
	if g == 0 {
		return 0 // the principal value's limit
	}
	tg := t / g
	v := k * tg
	w := v * v
	switch {
	case w < 1e-3:
		return tg * (1 + w*(1.0/3+w*(1.0/5+w*(1.0/7+w*(1.0/9+w/11)))))
	case v < 1:
		return 0.5 * math.Log1p(2*v/(1-v)) * ik
	}
	return 0.5 * math.Log1p(2/(v-1)) * ik
}

// setK sets k = sqrt|k²| and 1/k of each characteristic (addQ).
func (rt *radialTimer) setK() {
	for i := range rt.kk2 { // by index: ranging over the array would copy it
		rt.kq[i] = math.Sqrt(math.Abs(rt.kk2[i]))
		rt.ikq[i] = 1 / rt.kq[i]
	}
}

// sn2Integrals returns ∫₀^u sn² = (s³/3) R_D(c², d², 1) and, for each
// p = 1 − N s², (P_N(u) − u)/N = (s³/3) R_J(c², d², 1, p) (DLMF 19.25.9,
// 19.25.14; 0 ≤ u ≤ 2K), given s = sn u, c = cn u, d = dn u > 0, at most
// three p, the (P_N(u) − u)/N into q. For three positive p the
// duplication's first step takes the square roots of c², d², 1 as |c|,
// d, 1. (Results go through pointers here and below: arrays returned by
// value are copied through the stack in pieces that stall the loads after
// them.)
func sn2Integrals(s, c, d float64, ps []float64, q *[3]float64) (z float64) {
	c2, d2 := c*c, d*d
	var rd float64
	if len(ps) == 3 && ps[0] > 0 && ps[1] > 0 && ps[2] > 0 {
		rd = carlsonLoop3(c2, d2, 1, math.Abs(c), d, 1, ps, q[:])
	} else {
		rd = carlsonDJ(c2, d2, 1, ps, q[:0])
	}
	s3 := s * s * s / 3
	for i := range ps {
		q[i] *= s3
	}
	return s3 * rd
}

// completeI sets the complete integrals Z(K) and (P_N(K) − K)/N =
// R_J(0, 1 − m, 1, 1 − N)/3 (DLMF 19.25.2), by cel (see bulirschCel).
func (rt *radialTimer) completeI() {
	rt.haveComp = true
	kc := math.Sqrt(rt.mc)
	rt.zc = bulirschCel(kc, 1, 0, 1)
	for i := 0; i < rt.numPoles(); i++ {
		rt.qc[i] = bulirschCel(kc, rt.omn[i], 0, 1)
	}
}

// sumsI returns, for an escaping case-I photon, Σy, ΣZ and, in sq, ΣQ_N
// (Q_N = (P_N − y)/N): the integrals of 1, sn² and the third kinds from
// infinity to the point jac (see the addition theorems above).
func (rt *radialTimer) sumsI(jac *pathJacobi, sq *[3]float64) (sy, sz float64) {
	sY, cY, dY := jac.sn, jac.cn, jac.dn
	s0, c0, d0 := rt.s0, rt.c0, rt.d0
	var u, su, cu, du float64
	var t, sg float64
	var gg [3]float64 // G − (1 − N s_w²) = N s_u s_v c_w d_w, without N
	ng := rt.numPoles()
	if jac.sgn < 0 {
		// Before the turning point: u = δ, v = Y, w = F0.
		u, su, cu, du = jac.d, jac.sd, jac.cd, jac.dd
		t = sY * su * s0
		sg = 1
		for i := 0; i < ng; i++ {
			gg[i] = rt.on0[i] + rt.nch[i]*sY*su*c0*d0
		}
	} else {
		// After it: u = F0, v = Y, w = F0 + Y, whose sn, cn, dn follow
		// from those of F0 and Y (DLMF 22.8.1–3); below, su, cu, du
		// are those of w.
		// cn and dn of u lose digits near u = K; take them from jacobi
		// where they would cancel by more than 4.
		u = rt.x0 + jac.y
		den := dY*dY + rt.m*c0*c0*sY*sY // 1 − m s0² sY²
		a, b := c0*cY, s0*sY*d0*dY
		e, f := d0*dY, rt.m*s0*sY*c0*cY
		if math.Abs(a-b) >= 0.25*max(a, b) && e-f >= 0.25*e {
			su = (s0*cY*dY + sY*c0*d0) / den
			cu = (a - b) / den
			du = (e - f) / den
		} else {
			su, cu, du = jacobi(u, rt.m, rt.mc)
		}
		t = s0 * sY * su
		sg = -1
		for i := 0; i < ng; i++ {
			n := rt.nch[i]
			var onw float64 // 1 − N s_w²
			if n > 0 {
				onw = rt.omn[i] + n*cu*cu
			} else {
				onw = 1 - n*su*su
			}
			gg[i] = onw + n*s0*sY*cu*du
		}
	}
	sy = u
	if su == 0 {
		*sq = [3]float64{}
		return sy, 0
	}
	s2, c2 := su*su, cu*cu
	var ps [3]float64
	for i := 0; i < ng; i++ {
		if n := rt.nch[i]; n > 0 {
			ps[i] = rt.omn[i] + n*c2 // 1 − N s², N < 1
		} else {
			ps[i] = 1 - n*s2
		}
	}
	z := sn2Integrals(su, cu, du, ps[:ng], sq)
	if cu < 0 {
		if !rt.haveComp {
			rt.completeI()
		}
		z = 2*rt.zc - z
		for i := 0; i < ng; i++ {
			sq[i] = 2*rt.qc[i] - sq[i]
		}
	}
	sz = z + sg*t
	for i := 0; i < ng; i++ {
		sq[i] += sg * addQ(rt.kk2[i], rt.kq[i], rt.ikq[i], t, gg[i])
	}
	return sy, sz
}

// jI returns the case-I integrals ∫₀^Y of 1, r, r² (elliptic part), and
// 1/(r − r±) over X, given s² = sn²Y, c², d², 1 − νs² and 1 − n±s², and
// for the R_C either its second argument (1 − ns²)(1 − νs²) (reg = false)
// or its regularised value itself (reg = true, at infinity).
func (rt *radialTimer) jI(y, s2, c2, d2, onu, onp, onm, yc float64, reg bool) [5]float64 {
	var out [5]float64
	out[0] = y
	if s2 == 0 {
		return out
	}
	s := math.Sqrt(s2)
	s3 := s2 * s
	ps := [3]float64{onu, onp, onm}
	np := 3
	if rt.skipM {
		np = 2
	}
	var rj [3]float64
	rd := carlsonDJ(c2, d2, 1, ps[:np], rj[:0])
	x := c2 * d2
	rc := yc
	if !reg {
		rc = carlsonRC(x, yc)
	}
	pin := s*rc - rt.nu3*s3*rj[0] // Π(n; am Y | m)
	out[1] = rt.r3*y + rt.r43*pin
	out[2] = rt.r3*rt.r3*y - rt.k2*(y-rt.n3*s3*rd)
	out[3] = y*rt.id4p - rt.kp*s3*rj[1]
	if !rt.skipM {
		out[4] = y*rt.id4m - rt.km*s3*rj[2]
	}
	return out
}

// Case II (r1 < r2 real, r3,4 = re ∓ i·im): r = (a0 + a1 cn X)/(b0 + b1 cn X),
// X = scale·τ − X0 (Gralla & Lupsasca 2020, eq. B45), so on the path
// Y = −X runs from X0 (infinity, cn = (A'−B')/(A'+B')) down. Every
// integrand is a rational function of cn: with
// Q(γ; Y) = ∫₀^Y dY'/(1 + γ cn Y') (Byrd & Friedman 1971, 341.03),
//
//	r        = a1/b1 + (2A'B'r21/(b0 b1)) / (1 + γ∞ cn),   γ∞ = b1/b0
//	1/(r−c)  = (1/p1) [b1 − (2A'B'r21/p0) / (1 + γ_c cn)],  γ_c = p1/p0
//	1/(r−r1) = (1/(B'r21)) [b1 − 2A'/(1 + cn)]
//
// with p0 = B'(r2 − c) + A'(c − r1), p1 = B'(r2 − c) − A'(c − r1); and
// ∫₀^Y dY'/(1 + cn) = sn dn/(1 + cn) + m ∫₀^Y sn² (differentiate
// sn dn/(1 + cn)).
func (rt *radialTimer) setupII(q *quartic, rad *radial) {
	rt.re, rt.im = q.re34, q.im34
	rt.apr, rt.bpr = rad.ap, rad.bp
	rt.a0, rt.a1 = rad.num0, rad.num1
	rt.b0, rt.b1 = rad.den0, rad.den1
	rt.r21 = rad.r21
	ab := rt.apr * rt.bpr
	rt.coefInf = 2 * ab * rt.r21 / (rt.b0 * rt.b1)
	rt.logInfFinite = math.Log(rt.coefInf)
	rt.g[0] = rt.b1 / rt.b0
	for i := range 2 {
		c := rt.rp
		if i == 1 {
			c = rt.rm
		}
		p0 := rt.bpr*(rt.r2-c) + rt.apr*(c-rt.r1)
		p1 := rt.bpr*(rt.r2-c) - rt.apr*(c-rt.r1)
		rt.p0[i+1], rt.p1[i+1] = p0, p1
		rt.g[i+1] = p1 / p0
		// A pole on the root r2 (γ → −1) makes Q ill-conditioned, by
		// about ε r21/|c − r2|; replacing c by r2 costs |c − r2|/(r − r2).
		// The two meet near sqrt(ε): below, take the root's formula.
		if math.Abs(c-rt.r2) < rootPoleGap*(1+rt.r21) {
			rt.atRoot[i+1] = true
			rt.g[i+1] = 0 // not used; keeps the other formulas finite
		}
	}
	// The characteristics of the Π parts (see jII): for γ² > 1,
	// ν = m(γ² − 1)/γ² (1 − ν = mc + m/γ², m − ν = m/γ²); else
	// N = γ²/(γ² − 1) < 0 (1 − N = 1/(1 − γ²), m − N = m + γ²/(1 − γ²)).
	m, mc := rt.m, rt.mc
	ng := rt.numPoles()
	for i := 0; i < ng; i++ {
		g2 := rt.g[i] * rt.g[i]
		var n, omn, mmn float64
		if g2 > 1 {
			n, omn, mmn = m*(g2-1)/g2, mc+m/g2, m/g2
		} else {
			n, omn = g2/(g2-1), 1/(1-g2)
			mmn = m - n
		}
		rt.nch[i], rt.omn[i], rt.kk2[i] = n, omn, n*mmn*omn
	}
	rt.setK()
	// Infinity: cn = c0 = (A' − B')/(A' + B'), sn² = 4A'B'/(A'+B')².
	c0 := (rt.apr - rt.bpr) / (rt.apr + rt.bpr)
	s2 := 4 * ab / ((rt.apr + rt.bpr) * (rt.apr + rt.bpr))
	d2 := mc + m*c0*c0
	rt.s0, rt.c0, rt.d0 = math.Sqrt(s2), c0, math.Sqrt(d2)
	for i := 0; i < ng; i++ {
		if n := rt.nch[i]; n > 0 {
			rt.on0[i] = d2 + m*s2/(rt.g[i]*rt.g[i]) // 1 − ν s0²
		} else {
			rt.on0[i] = 1 - n*s2
		}
	}
	// 1 + γ cn at infinity for the poles r±: (r − c)(b0 + b1 cn)/p0 with
	// (b0 + b1 cn)(r − a1/b1) = 2A'B'r21/b1 as r → ∞.
	rt.onegcInf[0] = 0
	for i := 1; i < ng; i++ {
		rt.onegcInf[i] = 2 * ab * rt.r21 / (rt.b1 * rt.p0[i])
	}
	// The elementary terms at infinity (see addII).
	var zero [3]float64
	rt.einf = rt.combII(0, 0, zero, rt.s0, c0, rt.d0, rt.onegcInf, true, true)
	// sqrt((r−r2)((r−re)² + im²)/(r−r1)) = r + (r1 − r2 − 2re)/2 + O(1/r).
	rt.breg = (rt.r1 - rt.r2 - 2*rt.re) / 2
}

// completeII sets the complete integrals at Y = K (φ = π/2):
// R_D(0, mc, 1) = 3 cel(kc, 1, 0, 1) and R_J(0, mc, 1, 1 − N) =
// 3 cel(kc, 1 − N, 0, 1) (kc² = mc; DLMF 19.25.1–19.25.2 with 19.2.11).
func (rt *radialTimer) completeII() {
	rt.haveComp = true
	kc := math.Sqrt(rt.mc)
	rt.compRD = 3 * bulirschCel(kc, 1, 0, 1)
	for i := 0; i < rt.numPoles(); i++ {
		rt.compRJ[i] = 3 * bulirschCel(kc, rt.omn[i], 0, 1)
	}
}

// infII sets rt.inf, the case-II integrals from Y = 0 to infinity, on
// first need.
func (rt *radialTimer) infII() {
	rt.haveInf = true
	rt.inf = rt.jII(rt.x0, rt.s0, rt.c0, rt.d0, rt.onegcInf, true)
}

// poleArgs returns, for each case-II pole γ (numPoles of them), the
// fourth argument of its R_J at sn² = s2, cn² = c2, dn² = d2: 1 − ν s²
// with ν = m(γ² − 1)/γ² when γ² > 1, else 1 − N s² with N = γ²/(γ² − 1).
func (rt *radialTimer) poleArgs(s2, c2, d2 float64) [3]float64 {
	var ps [3]float64
	for i := 0; i < rt.numPoles(); i++ {
		g2 := rt.g[i] * rt.g[i]
		if g2 > 1 {
			ps[i] = d2 + rt.m*s2/g2 // 1 − ν s²
		} else {
			ps[i] = (1 - g2*c2) / (1 - g2) // 1 − N s²
		}
	}
	return ps
}

func (rt *radialTimer) numPoles() int {
	if rt.skipM {
		return 2
	}
	return 3
}

// jII returns the case-II integrals ∫₀^Y of 1, r, r² (elliptic part) and
// 1/(r − r±) over Y, given sn, cn, dn of Y (0 < Y < 2K) and 1 + γ cn for
// each pole (index 0: infinity; ignored if reg, where the regularised
// logarithm is used instead).
func (rt *radialTimer) jII(y, sn, cn, dn float64, onegc [3]float64, reg bool) [5]float64 {
	s2, c2, d2 := sn*sn, cn*cn, dn*dn
	s3 := s2 * sn
	eps := 1.0
	if cn < 0 {
		eps = -1
		if !rt.haveComp {
			rt.completeII()
		}
	}
	ng := rt.numPoles()
	ps := rt.poleArgs(s2, c2, d2)
	var rj [3]float64
	rd := carlsonDJ(c2, d2, 1, ps[:ng], rj[:0])
	// ∫₀^Y sn² = ε (s³/3) R_D(c², d², 1) + (1 − ε)(1/3) R_D(0, mc, 1), and
	// likewise Q_N(Y) = (P_N(Y) − Y)/N with R_J.
	dsn := (eps*s3*rd + (1-eps)*rt.compRD) / 3
	var qv [3]float64
	for i := 0; i < ng; i++ {
		qv[i] = (eps*s3*rj[i] + (1-eps)*rt.compRJ[i]) / 3
	}
	return rt.combII(y, dsn, qv, sn, cn, dn, onegc, reg, true)
}

// combII returns the case-II integrals of jII from Y, ∫₀^Y sn² (dsn), the
// Q_N(Y) of the Π parts (qv) and the elementary terms at the point (sn,
// cn, dn, onegc, reg as for jII). They are linear in y, dsn, qv and the
// elementary terms together; with elem false the elementary terms are
// left out (see addII).
func (rt *radialTimer) combII(y, dsn float64, qv [3]float64, sn, cn, dn float64, onegc [3]float64, reg, elem bool) [5]float64 {
	var out [5]float64
	out[0] = y
	m, mc := rt.m, rt.mc
	s2, c2, d2 := sn*sn, cn*cn, dn*dn
	eps := 1.0
	if cn < 0 {
		eps = -1
	}
	ng := rt.numPoles()
	var q [3]float64
	for i := 0; i < ng; i++ {
		g := rt.g[i]
		g2 := g * g
		p := 1 - g2
		qc := m + g2*mc
		var pi, om float64
		switch {
		case g2 > 1 && !elem:
			pi = -rt.nch[i] * qv[i]
		case g2 > 1:
			ps := d2 + m*s2/g2 // 1 − ν s²
			x := c2 * d2
			var rc, l1, l2 float64 // l1, l2: ln|1 + γ cn|, ln|γ cn − 1|
			if reg && i == 0 {
				// ln|y|, y = (1 − N s²)(1 − ν s²), 1 − N s² = (γcn−1)(γcn+1)/(γ²−1),
				// with ln|1 + γ∞ cn| → its finite part (cn → −1/γ∞).
				l1, l2 = rt.logInfFinite, math.Log(2)
				logy := l1 + l2 - math.Log(g2-1) + math.Log(ps)
				rc = rcRegular(x) - 0.5*logy/math.Sqrt(x)
			} else {
				l1 = math.Log(math.Abs(onegc[i]))
				l2 = math.Log(math.Abs(onegc[i] - 2))
				rc = carlsonRC(x, onegc[i]*(onegc[i]-2)/(g2-1)*ps)
			}
			pi = eps*sn*rc - rt.nch[i]*qv[i]
			// ω = −½ ln|(1+v)/(1−v)| / sqrt(−p Qc), v = (sn/dn) sqrt(Qc/−p),
			// 1 − v² = (γcn − 1)(γcn + 1)/(dn² (γ² − 1)).
			v := sn / dn * math.Sqrt(qc/-p)
			l1mv2 := l1 + l2 - math.Log(d2*(g2-1))
			om = -(math.Log1p(v) - 0.5*l1mv2) / math.Sqrt(-p*qc)
		default:
			pi = y + rt.nch[i]*qv[i]
			if elem {
				w := sn / dn
				om = math.Atan(w*math.Sqrt(qc/p)) / math.Sqrt(p*qc)
			}
		}
		q[i] = pi/p - g*om
	}
	out[1] = rt.a1/rt.b1*y + rt.coefInf*q[0]
	// ∫ dY/(1 + cn) = sn dn/(1 + cn) + m ∫sn²; sn/(1 + cn) = (1 − cn)/sn.
	var h float64
	switch {
	case !elem:
	case cn >= 0:
		h = sn * dn / (1 + cn)
	default:
		h = dn * (1 - cn) / sn
	}
	r1 := rt.r1
	out[2] = r1*r1*y - rt.bpr/2*(rt.b1*y-2*rt.apr*(h+m*dsn))
	ab2 := 2 * rt.apr * rt.bpr * rt.r21
	for i := 1; i < ng; i++ {
		if rt.atRoot[i] {
			// 1/(r − r2) = (1/(A'r21)) [−b1 + 2B'/(1 − cn)], and
			// ∫dY/(1 − cn) = −sn dn/(1 − cn) + m ∫sn² (shift Y by 2K in
			// the formula for 1/(1 + cn)); sn/(1 − cn) = (1 + cn)/sn.
			var g float64
			switch {
			case !elem:
			case cn <= 0:
				g = -sn * dn / (1 - cn)
			default:
				g = -dn * (1 + cn) / sn
			}
			out[i+2] = (-rt.b1*y + 2*rt.bpr*(g+m*dsn)) / (rt.apr * rt.r21)
			continue
		}
		out[i+2] = (rt.b1*y - ab2/rt.p0[i]*q[i]) / rt.p1[i]
	}
	return out
}

// at returns I_t (regularised) and I_φ from infinity to Mino time tau,
// where the photon is at radius r. jac, if not nil, holds the Jacobi
// functions of the point as trace computed them (radial.eval); else they
// are computed here.
func (rt *radialTimer) at(tau, r float64, jac *pathJacobi) (it, iphi float64) {
	var j [5]float64
	var sgn, bnd float64
	switch rt.cs {
	case FourReal:
		var y, sn, cn, dn float64
		if jac != nil {
			y, sn, cn, dn, sgn = jac.y, jac.sn, jac.cn, jac.dn, jac.sgn
		} else {
			xs := rt.scale*tau - rt.x0
			y = math.Abs(xs)
			sgn = 1
			if xs < 0 {
				sgn = -1
			}
			sn, cn, dn = jacobi(y, rt.m, rt.mc)
		}
		s2, c2 := sn*sn, cn*cn
		// 1 − n s² = r43/(r − r3). Near a double root r3 ≈ r4 (the
		// critical curve) the roots themselves are uncertain by about
		// sqrt(ε) of their size while r43 is not (radialRoots), so
		// r − r3 is taken from the radius only far out; elsewhere from
		// 1 − n s² = n c² − r43/r31, which then has no cancellation.
		onn := rt.n*c2 - rt.q431
		if r-rt.r3 > farRadius*(1+math.Abs(rt.r3)) {
			onn = rt.r43 / (r - rt.r3)
		}
		onu := rt.q432 + rt.nu*c2
		// sqrt(R)/(r − r3) with (r − r4)/(r − r3) = n s².
		bnd = math.Sqrt((r-rt.r1)*(r-rt.r2)*rt.n) * sn
		if rt.escI && jac != nil {
			var iv [5]float64
			rt.addI(jac, sn, c2*dn*dn, onn*onu, &iv)
			return rt.finish(&iv, sgn, bnd)
		}
		onp := (r - rt.rp) * onn * rt.id4p
		onm := (r - rt.rm) * onn * rt.id4m
		j = rt.jI(y, s2, c2, dn*dn, onu, onp, onm, onn*onu, false)
		if !rt.haveInf {
			rt.infI()
		}
	default:
		var y, sn, cn, dn float64
		if jac != nil {
			y, sn, cn, dn = jac.y, jac.sn, jac.cn, jac.dn
		} else {
			y = rt.x0 - rt.scale*tau
			sn, cn, dn = jacobi(y, rt.m, rt.mc)
		}
		sgn = -1
		var onegc [3]float64
		// b0 + b1 cn = (2A'B'r21/b1)/(r − a1/b1).
		bb := 2 * rt.apr * rt.bpr * rt.r21 / (rt.b1 * (r - rt.a1/rt.b1))
		onegc[0] = bb / rt.b0
		onegc[1] = (r - rt.rp) * bb / rt.p0[1]
		onegc[2] = (r - rt.rm) * bb / rt.p0[2]
		d1 := r - rt.re
		bnd = math.Sqrt((r - rt.r2) * (d1*d1 + rt.im*rt.im) / (r - rt.r1))
		if jac != nil {
			iv := rt.addII(jac, onegc)
			return rt.finish(&iv, sgn, bnd)
		}
		j = rt.jII(y, sn, cn, dn, onegc, false)
		if !rt.haveInf {
			rt.infII()
		}
	}
	var iv [5]float64
	for k := range iv {
		iv[k] = (rt.inf[k] + sgn*j[k]) * rt.iscale
	}
	return rt.finish(&iv, sgn, bnd)
}

// addI writes into iv the case-I integrals of 1, r, r² (elliptic part)
// and 1/(r − r±) from infinity to the point jac of an escaping photon, in
// τ (see sumsI), given sn Y, c²d² and (1 − n s²)(1 − ν s²) of the point
// (the R_C of Π(n), see setupI).
func (rt *radialTimer) addI(jac *pathJacobi, sn, x, yc float64, iv *[5]float64) {
	var sq [3]float64
	sy, sz := rt.sumsI(jac, &sq)
	// Π(n) from infinity: the R_C part at both ends, minus ν ΣQ_ν. With
	// x − y = p² s², s R_C(x, y) = artanh(v)/p, v = p s/√x, and
	// artanh v = ½ ln(x(1 + v)²/y) (1 − v² = y/x); at infinity v = 1 and
	// s0 R_C is regularised to ½ ln(e0)/p (p s0 = √x0, setupI). So both
	// ends take one logarithm: ln(e0 (x(1 + v)²/y)^sgn)/(2p).
	v := rt.pn * sn / math.Sqrt(x)
	num, den := x*(1+v)*(1+v), yc
	if jac.sgn < 0 {
		num, den = den, num
	}
	pin := 0.5*math.Log(rt.e0*num/den)/rt.pn - rt.nu*sq[0]
	iv[0] = sy
	iv[1] = rt.r3*sy + rt.r43*pin
	iv[2] = rt.r3*rt.r3*sy - rt.k2*(sy-rt.n*sz)
	iv[3] = sy*rt.id4p - 3*rt.kp*sq[1]
	iv[4] = 0
	if !rt.skipM {
		iv[4] = sy*rt.id4m - 3*rt.km*sq[2]
	}
	for k := range iv {
		iv[k] *= rt.iscale
	}
}

// addII returns the case-II integrals of 1, r, r² (elliptic part) and
// 1/(r − r±) from infinity to the point jac, in τ, with onegc as for jII:
// J(X0) − J(Y) is the difference of the elementary terms (at infinity,
// rt.einf, and at Y) plus the linear part (combII) of δ = X0 − Y and of
// ΣZ = Z(δ) + t and ΣQ_N = Q_N(δ) + addQ(k², k, 1/k, t, G), t = s_Y s_δ s_X0,
// G = 1 − N s²_X0 + N s_Y s_δ c_X0 d_X0 (the addition theorems of sumsI;
// the characteristics ν < m and N < 0 of jII have no poles).
func (rt *radialTimer) addII(jac *pathJacobi, onegc [3]float64) [5]float64 {
	sY := jac.sn
	sd, cd, dd := jac.sd, jac.cd, jac.dd
	ng := rt.numPoles()
	t := sY * sd * rt.s0
	var sz float64
	var sq [3]float64
	if sd != 0 {
		s2, c2, d2 := sd*sd, cd*cd, dd*dd
		ps := rt.poleArgs(s2, c2, d2)
		var q [3]float64
		z := sn2Integrals(sd, cd, dd, ps[:ng], &q)
		if cd < 0 { // δ > K: Z(δ) = 2Z(K) − Z(2K − δ), likewise Q_N
			if !rt.haveComp {
				rt.completeII()
			}
			z = 2*rt.compRD/3 - z
			for i := 0; i < ng; i++ {
				q[i] = 2*rt.compRJ[i]/3 - q[i]
			}
		}
		sz = z + t
		for i := 0; i < ng; i++ {
			g := rt.on0[i] + rt.nch[i]*sY*sd*rt.c0*rt.d0
			sq[i] = q[i] + addQ(rt.kk2[i], rt.kq[i], rt.ikq[i], t, g)
		}
	}
	lin := rt.combII(jac.d, sz, sq, 0, 1, 1, onegc, false, false)
	var zero [3]float64
	ey := rt.combII(0, 0, zero, sY, jac.cn, jac.dn, onegc, false, true)
	var iv [5]float64
	for k := range iv {
		iv[k] = (rt.einf[k] + lin[k] - ey[k]) * rt.iscale
	}
	return iv
}

// finish combines the integrals iv (in τ) into I_t and I_φ, with the
// boundary term bnd of I₂ taken with sign sgn.
func (rt *radialTimer) finish(iv *[5]float64, sgn, bnd float64) (it, iphi float64) {
	i2 := iv[2] + rt.breg + sgn*bnd
	it = i2 + 2*iv[1] + 4*iv[0] + rt.cp*iv[3]
	iphi = rt.ap * iv[3]
	if !rt.skipM {
		it += rt.cm * iv[4]
		iphi += rt.am * iv[4]
	}
	return it, iphi
}
