package raytrace

import "math"

// RootCase classifies the radial potential R(r) = r⁴ + A r² + B r + C by
// its real roots (Gralla & Lupsasca 2020, PRD 101, 044032, sec. III).
type RootCase uint8

const (
	// FourReal: four real roots r1 < r2 < r3 < r4.
	FourReal RootCase = iota + 1
	// TwoReal: r1 < r2 real, r3 = conj(r4) complex.
	TwoReal
	// NoReal: two complex-conjugate pairs (only for η < 0).
	NoReal
)

// String names the case with the numbering of Gralla & Lupsasca (2020).
func (c RootCase) String() string {
	switch c {
	case FourReal:
		return "I (four real roots)"
	case TwoReal:
		return "II (two real roots)"
	case NoReal:
		return "IV (no real root)"
	}
	return "unknown"
}

// Numerical policy of the root finders (choices of this package; ε =
// 2.2e-16 is the float64 rounding unit).
const (
	// polishedSeparation: a root difference r2 - r1 or r4 - r3 is taken
	// from the polished roots when it exceeds this fraction of the largest
	// root modulus. Subtracting two polished roots leaves a relative error
	// of about ε · scale / difference, at most about 2e-10 above this
	// bound; below it (near-double roots) the closed forms 2 sqrt(D) keep
	// more digits.
	polishedSeparation = 1e-6

	// doubleRootSplit is how far, relative to max(1, r4), an exact double
	// root r3 = r4 is split: about two rounding units (2ε ≈ 4.4e-16), the
	// least that makes r4 - r3 positive.
	doubleRootSplit = 4e-16

	// nearDoubleResolvent: the resolvent cubic is treated as having a
	// near-double largest root (and solved in trigonometric form) when its
	// discriminant is below this fraction of q²/4: well above the
	// rounding noise of the discriminant (about ε relative to q²/4), so
	// rounding cannot turn a near-double root into a spurious complex pair.
	nearDoubleResolvent = 1e-10

	// resolventNewtonSteps, polishNewtonSteps and pairNewtonSteps bound the
	// guarded Newton iterations of resolventMax, polish and refineNearPair.
	// From the closed-form start at a simple root Newton's method
	// converges quadratically and needs only a few steps; at a near-double
	// root it is slow, and the bound stops it.
	resolventNewtonSteps = 8
	polishNewtonSteps    = 6
	pairNewtonSteps      = 12

	// polishResidual: polish reports a root as converged when |R(r)| is
	// below this fraction of the sum of the magnitudes of its terms,
	// r⁴ + |A| r² + |B r| + |C|: a few hundred ε, the rounding noise of
	// evaluating a quartic whose terms cancel.
	polishResidual = 1e-13

	// pairNewtonTol is the relative Newton step at which refineNearPair
	// stops (under ε, so in practice at the first step that rounds to
	// nothing). A refined root replaces the Ferrari value only if the gap
	// to its neighbour exceeds pairGapMargin times both the last Newton
	// steps and pairNewtonTol·|r|: Newton's method settled well inside
	// the gap.
	pairNewtonTol = 1e-16
	pairGapMargin = 1e3
)

// quartic holds the roots of R(r) in the form that the closed-form
// solutions need, with the differences that matter computed without
// cancellation.
type quartic struct {
	cs         RootCase
	r1, r2     float64 // real roots (cases I, II)
	r3, r4     float64 // real roots (case I); real part in case II is re34
	re34, im34 float64 // case II: r3,4 = re34 ∓ i im34
	r21, r43   float64 // r2 - r1, r4 - r3 (case I)
}

// radialRoots solves r⁴ + A r² + B r + C = 0 by Ferrari's method through
// the resolvent cubic 16y³ + 8Ay² + (A² - 4C)y - B²/4 = 0 with y = z²,
// z = (r3 + r4)/2, taking its largest real root (the pairing {r1,r2},{r3,r4}
// of Gralla & Lupsasca 2020, eqs. 95–96). Then r1,2 = -z ∓ sqrt(D12), r3,4 = z ∓ sqrt(D34) with
// D12 = -A/2 - z² + B/(4z), D34 = -A/2 - z² - B/(4z). Real roots are
// polished with a guarded Newton step. Domain: finite A, B ≥ 0, C.
func radialRoots(A, B, C float64) quartic {
	var q quartic
	y := resolventMax(A, B, C)
	z := math.Sqrt(y)
	var d12, d34 float64
	if z > 0 && B > 0 {
		t := B / (4 * z)
		d12 = -A/2 - y + t
		d34 = -A/2 - y - t
	} else {
		// Biquadratic: r⁴ + A r² + C, r² = (-A ± sqrt(A² - 4C))/2.
		z = 0
		disc := A*A - 4*C
		if disc < 0 {
			// Two complex pairs; the real parts vanish.
			q.cs = NoReal
			return q
		}
		s := math.Sqrt(disc)
		p := (-A + s) / 2 // larger r²
		n := C / p        // smaller r² (product = C)
		if p == 0 {
			n = (-A - s) / 2
		}
		// Pairs {-sqrt p, -sqrt n} and {sqrt n, sqrt p} when both ≥ 0.
		if n >= 0 {
			sp, sn := math.Sqrt(p), math.Sqrt(n)
			q.cs = FourReal
			q.r1, q.r2, q.r3, q.r4 = -sp, -sn, sn, sp
			q.r21, q.r43 = sp-sn, sp-sn
			return q
		}
		if p >= 0 {
			sp := math.Sqrt(p)
			q.cs = TwoReal
			q.r1, q.r2 = -sp, sp
			q.r21 = 2 * sp
			q.re34, q.im34 = 0, math.Sqrt(-n)
			return q
		}
		q.cs = NoReal
		return q
	}
	switch {
	case d12 >= 0 && d34 >= 0:
		s12, s34 := math.Sqrt(d12), math.Sqrt(d34)
		q.cs = FourReal
		q.r1, q.r2 = -z-s12, -z+s12
		q.r3, q.r4 = z-s34, z+s34
		var ok1, ok2, ok3, ok4 bool
		q.r1, q.r2, q.r3, q.r4, ok1, ok2, ok3, ok4 = polish4(q.r1, q.r2, q.r3, q.r4, A, B, C)
		if (!ok2 || !ok3) && ok1 && ok4 {
			// Ferrari's middle pair cancels badly when |r1|, r4 ≫ r2, r3
			// (large η near a near-extremal horizon): deflate with the two
			// outer roots (Vieta: r2 + r3 = -(r1 + r4), r2 r3 = C/(r1 r4))
			// and polish again.
			sum := -(q.r1 + q.r4)
			prod := C / (q.r1 * q.r4)
			if disc := sum*sum/4 - prod; disc >= 0 {
				h := sum/2 + math.Copysign(math.Sqrt(disc), sum)
				lo, hi := prod/h, h
				if lo > hi {
					lo, hi = hi, lo
				}
				q.r2, _ = polish(lo, A, B, C)
				q.r3, _ = polish(hi, A, B, C)
				s12 = (q.r2 - q.r1) / 2
				s34 = (q.r4 - q.r3) / 2
			}
		}
		q.r21 = 2 * s12
		q.r43 = 2 * s34
		// Prefer differences of the polished roots where they are well
		// separated; keep the closed forms for near-double roots.
		scale := max(math.Abs(q.r1), math.Abs(q.r4))
		if d := q.r2 - q.r1; d > polishedSeparation*scale {
			q.r21 = d
		}
		if d := q.r4 - q.r3; d > polishedSeparation*scale {
			q.r43 = d
		}
		if q.r2 > q.r3 { // roots of both pairs interleave: sort
			q.r2, q.r3 = q.r3, q.r2
			q.r21 = q.r2 - q.r1
			q.r43 = q.r4 - q.r3
		}
		// An exact double root r3 = r4 is the critical curve itself, where
		// the photon would wind forever; split it by about two rounding
		// units so the ray counts as just outside (finite winding, escape).
		if tiny := doubleRootSplit * max(1, math.Abs(q.r4)); q.r43 < tiny {
			q.r43 = tiny
			q.r3 = q.r4 - tiny
		}
	case d12 >= 0:
		s12 := math.Sqrt(d12)
		q.cs = TwoReal
		q.r1, _ = polish(-z-s12, A, B, C)
		q.r2, _ = polish(-z+s12, A, B, C)
		q.r21 = 2 * s12
		q.re34, q.im34 = z, math.Sqrt(-d34)
	default:
		q.cs = NoReal
	}
	return q
}

// resolventMax returns the largest real root y ≥ 0 of
// 16y³ + 8Ay² + (A² - 4C)y - B²/4 (Ferrari's resolvent), by the
// trigonometric or Cardano form of the cubic (DLMF 1.11(iii)) and Newton
// polishing.
func resolventMax(A, B, C float64) float64 {
	// Monic: y³ + p2 y² + p1 y + p0. Constants as reciprocals: a division
	// by a constant is not turned into a multiplication by the compiler.
	const third, twentySeventh = 1.0 / 3, 1.0 / 27
	p2 := A * 0.5
	p1 := (A*A - 4*C) * 0.0625
	p0 := -B * B * (1.0 / 64)
	// Depressed: y = t - p2/3, t³ + pt + q = 0.
	s3 := p2 * third
	p := p1 - p2*s3
	qq := 2*s3*s3*s3 - s3*p1 + p0
	var t float64
	disc := qq*qq*0.25 + p*p*p*twentySeventh
	// When the two largest roots nearly coincide (r2 ≈ r3, e.g. near the
	// horizon of a near-extremal hole), rounding can turn them into a
	// complex pair and Cardano's form would return the small root: use the
	// trigonometric form there, with its argument clamped.
	nearDouble := p < 0 && disc <= nearDoubleResolvent*(qq*qq*0.25)
	if disc > 0 && !nearDouble {
		s := math.Sqrt(disc)
		u := math.Cbrt(-qq/2 - math.Copysign(s, qq))
		v := 0.0
		if u != 0 {
			v = -p * third / u
		}
		t = u + v
	} else {
		m := 2 * math.Sqrt(max(0, -p*third))
		arg := 0.0
		if m > 0 {
			arg = 3 * qq / (p * m)
		}
		arg = max(-1, min(1, arg))
		t = m * cosThirdAcos(arg)
	}
	y := t - s3
	// Newton polish, keeping a step only if it lowers |f|: at a near-double
	// root f' ≈ 0 and an unguarded step would jump to the small root.
	f := ((y+p2)*y+p1)*y + p0
	for i := 0; i < resolventNewtonSteps && f != 0; i++ {
		df := (3*y+2*p2)*y + p1
		n := y - f/df
		fn := ((n+p2)*n+p1)*n + p0
		if !(math.Abs(fn) < math.Abs(f)) {
			break
		}
		y, f = n, fn
	}
	if y < 0 || math.IsNaN(y) {
		y = 0
	}
	return y
}

// cosThirdAcos returns cos(arccos(x)/3) for −1 ≤ x ≤ 1, the largest root
// c ∈ [½, 1] of 4c³ − 3c = x (the triple-angle identity
// cos 3θ = 4 cos³θ − 3 cos θ, on which the trigonometric solution of the
// cubic rests, DLMF 1.11(iii)).
// For x ≥ −0.99 it starts from a cubic in s = sqrt(1 + x) interpolating
// it at the four Chebyshev nodes of 0 ≤ s ≤ √2 (error below 1e-4) and
// takes two Halley steps, which reach rounding level (6e-16 relative
// against cos(acos(x)/3) over the range) at a third of the cost of the
// inverse and direct cosine. Near x = −1 the root turns double
// (4c³ − 3c + 1 = (c + 1)(2c − 1)²), Halley's method slows, and the
// trigonometric form is used.
func cosThirdAcos(x float64) float64 {
	if x < -0.99 {
		return math.Cos(math.Acos(x) / 3)
	}
	const c0, c1, c2, c3 = 0.50008772171218374, 0.40622366601013837, -0.047619499350291472, 0.0073251497556198449
	s := math.Sqrt(1 + x)
	c := c0 + s*(c1+s*(c2+s*c3))
	for i := 0; i < 2; i++ {
		cc := c * c
		f := (4*cc-3)*c - x
		d1 := 12*cc - 3
		c -= 2 * f * d1 / (2*d1*d1 - 24*c*f)
	}
	return c
}

// polish applies up to polishNewtonSteps Newton steps to a real root of
// r⁴ + A r² + B r + C, keeping a step only if it lowers |R|, and reports
// whether the residual reached rounding level (polishResidual).
func polish(r, A, B, C float64) (float64, bool) {
	r2 := r * r
	f := (r2+A)*r2 + B*r + C
	for i := 0; i < polishNewtonSteps && f != 0; i++ {
		df := (4*r2+2*A)*r + B
		if df == 0 {
			break
		}
		n := r - f/df
		n2 := n * n
		fn := (n2+A)*n2 + B*n + C
		if math.Abs(fn) >= math.Abs(f) {
			break
		}
		r, r2, f = n, n2, fn
	}
	terms := r2*r2 + math.Abs(A)*r2 + math.Abs(B*r) + math.Abs(C)
	return r, math.Abs(f) <= polishResidual*terms
}

// polish4 is polish applied to four roots at once: the same steps for
// each, so the same results to the last bit, but the four Newton
// iterations, each a chain of dependent multiplications and a division,
// run side by side and overlap in the processor instead of one after
// another.
func polish4(r1, r2, r3, r4, A, B, C float64) (p1, p2, p3, p4 float64, ok1, ok2, ok3, ok4 bool) {
	var r, r2s, f [4]float64
	var live [4]bool
	r = [4]float64{r1, r2, r3, r4}
	for k := range r {
		r2s[k] = r[k] * r[k]
		f[k] = (r2s[k]+A)*r2s[k] + B*r[k] + C
		live[k] = f[k] != 0
	}
	for i := 0; i < polishNewtonSteps && (live[0] || live[1] || live[2] || live[3]); i++ {
		for k := range r {
			if !live[k] {
				continue
			}
			df := (4*r2s[k]+2*A)*r[k] + B
			if df == 0 {
				live[k] = false
				continue
			}
			n := r[k] - f[k]/df
			n2 := n * n
			fn := (n2+A)*n2 + B*n + C
			if math.Abs(fn) >= math.Abs(f[k]) {
				live[k] = false
				continue
			}
			r[k], r2s[k], f[k] = n, n2, fn
			live[k] = fn != 0
		}
	}
	var ok [4]bool
	for k := range r {
		terms := r2s[k]*r2s[k] + math.Abs(A)*r2s[k] + math.Abs(B*r[k]) + math.Abs(C)
		ok[k] = math.Abs(f[k]) <= polishResidual*terms
	}
	return r[0], r[1], r[2], r[3], ok[0], ok[1], ok[2], ok[3]
}

// refineNearPair re-polishes the roots r2, r3, r4 of case I with R(r)
// evaluated in its physical form R = (r² + a² - aλ)² - Δ(r)(η + (λ - a)²),
// Δ = (r - 1)² - (1 - a)(1 + a) (Bardeen 1973), which keeps its relative
// accuracy where two roots crowd together near r = 1 for a → 1 and
// λ → 2 (there the polynomial coefficients lose it to cancellation). A
// root is replaced only if Newton's method settles on it well inside the
// gap to its neighbour; otherwise (a true near-double root, at the
// critical curve) the Ferrari values stand.
func (q *quartic) refineNearPair(a, lambda, eta float64) {
	if q.cs != FourReal {
		return
	}
	amb := a * (a - lambda)
	k := eta + (lambda-a)*(lambda-a)
	ca := (1 - a) * (1 + a)
	newton := func(r float64) (float64, float64) {
		step := math.Inf(1)
		for i := 0; i < pairNewtonSteps; i++ {
			p := r*r + amb
			d := (r-1)*(r-1) - ca
			f := p*p - d*k
			df := 4*r*p - 2*(r-1)*k
			if df == 0 || f == 0 {
				return r, 0
			}
			step = f / df
			r -= step
			if math.Abs(step) <= pairNewtonTol*math.Abs(r) {
				break
			}
		}
		return r, math.Abs(step)
	}
	r2, e2 := newton(q.r2)
	r3, e3 := newton(q.r3)
	r4, e4 := newton(q.r4)
	if !(r2 < r3 && r3 < r4) {
		return
	}
	if gap := r4 - r3; gap > pairGapMargin*(e3+e4) && gap > pairGapMargin*pairNewtonTol*math.Abs(r4) {
		q.r3, q.r4, q.r43 = r3, r4, gap
	}
	if gap := r3 - r2; gap > pairGapMargin*(e2+e3) && gap > pairGapMargin*pairNewtonTol*math.Abs(r3) {
		q.r2 = r2
		q.r21 = q.r2 - q.r1
	}
}
