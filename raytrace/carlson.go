package raytrace

import "math"

// Carlson's symmetric elliptic integrals R_C, R_D and R_J (Carlson 1995,
// Numer. Algorithms 10, 13; DLMF §19.16, §19.36(i)). gonum's mathext
// provides R_F and R_D but not R_J; R_J and its companions below share one
// duplication loop so that a caller needing R_D and several R_J with the
// same x, y, z pays for the square roots of x, y, z once.

// carlsonTol is the r of Carlson (1995): the duplication of R_D and R_J stops
// when the truncated series is accurate to about r; 1e-16 gives full
// double precision.
const carlsonTol = 1e-16

// carlsonQJ is the stopping factor of R_D and R_J: the duplication stops
// once the deviations from the mean are below 1/carlsonQJ of it.
// Carlson's (1995) rule (r/4)^{-1/6} for his fifth-order series becomes
// (r/4)^{-1/8} ≈ 119 for the seventh-order one (carlsonSeriesJ), whose
// remainder is of eighth order: about 1.2 duplications fewer than the
// 584 of the fifth-order rule. carlson_test.go checks the results against
// quadrature and published values.
var carlsonQJ = math.Pow(carlsonTol/4, -1.0/8)

// carlsonMaxIter bounds the duplication loop. The deviation from the mean
// shrinks by 4 per step, so even arguments spread over 600 decades converge
// in about 500 steps; real calls need 5 to 30.
const carlsonMaxIter = 600

// CarlsonRC returns R_C(x, y) = ½ ∫₀^∞ (t+x)^{-1/2} (t+y)^{-1} dt for
// x ≥ 0, y ≠ 0, and its Cauchy principal value for y < 0 (Carlson 1995,
// eq. 2.14; DLMF 19.2.20). Closed forms (DLMF 19.2.17–19.2.19):
//
//	0 ≤ x < y:  arctan(sqrt((y−x)/x)) / sqrt(y − x)
//	y < x:      [ln(sqrt x + sqrt(x − y)) − ½ ln|y|] / sqrt(x − y)
//
// with a series in 1 − y/x where x and y nearly agree. It returns NaN
// outside the domain.
func CarlsonRC(x, y float64) float64 {
	if !(x >= 0) || y == 0 || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) {
		return math.NaN()
	}
	return carlsonRC(x, y)
}

func carlsonRC(x, y float64) float64 {
	if x == 0 {
		if y < 0 {
			return 0 // principal value: sqrt(x/(x−y)) R_C(x−y, −y) → 0
		}
		return math.Pi / 2 / math.Sqrt(y)
	}
	u := (x - y) / x // R_C = x^{-1/2} f(u), f(u) = artanh(√u)/√u
	if math.Abs(u) < 1e-3 {
		// f(u) = Σ u^k/(2k+1), to u⁵: error below 1e-19.
		return (1 + u*(1.0/3+u*(1.0/5+u*(1.0/7+u*(1.0/9+u/11))))) / math.Sqrt(x)
	}
	if y > x {
		return math.Atan(math.Sqrt(-u)) / math.Sqrt(y-x)
	}
	return rcLogNumerator(x, y) / math.Sqrt(x-y)
}

// rcLogNumerator returns ln(sqrt x + sqrt(x − y)) − ½ ln|y| for y < x,
// y ≠ 0, with one logarithm and without cancellation: for 0 < y < x it is
// artanh(√u) = ½ log1p(2√u(1 + √u) x/y) with u = (x − y)/x (the argument
// 2√u/(1 − √u) of the usual form, with 1 − √u = (y/x)/(1 + √u)); for
// y < 0 it is ½ ln((√x + √(x − y))²/|y|), every term positive.
func rcLogNumerator(x, y float64) float64 {
	if y > 0 {
		s := math.Sqrt((x - y) / x)
		return 0.5 * math.Log1p(2*s*(1+s)*(x/y))
	}
	d := x - y
	return 0.5 * math.Log((x+d+2*math.Sqrt(x*d))/(-y))
}

// rcRegular returns R_C(x, y) + ½ ln|y| / sqrt(x − y) in the limit y → 0
// at fixed x > 0, namely ln(2 sqrt x)/sqrt x: the finite part of R_C at its
// logarithmic singularity (from the y < x form of CarlsonRC). Callers add
// −½ L/sqrt x themselves, with L the regularised value of ln|y|.
func rcRegular(x float64) float64 {
	return math.Log(2*math.Sqrt(x)) / math.Sqrt(x)
}

// CarlsonRD returns R_D(x, y, z) = (3/2) ∫₀^∞ [(t+x)(t+y)]^{-1/2} (t+z)^{-3/2} dt
// for x, y ≥ 0 (at most one zero) and z > 0 (Carlson 1995, eq. 2.28;
// DLMF 19.16.5). Unlike gonum's EllipticRD it accepts arguments down to
// the smallest normal numbers (the near-critical photons need that). It
// returns NaN outside the domain.
func CarlsonRD(x, y, z float64) float64 {
	if !(x >= 0 && y >= 0 && z > 0) || x+y == 0 || math.IsInf(x+y+z, 0) {
		return math.NaN()
	}
	var rj [1]float64
	return carlsonDJ(x, y, z, nil, rj[:0])
}

// CarlsonRJ returns R_J(x, y, z, p) = (3/2) ∫₀^∞ [(t+x)(t+y)(t+z)]^{-1/2} (t+p)^{-1} dt
// for x, y, z ≥ 0 (at most one zero) and p ≠ 0; for p < 0 it is the Cauchy
// principal value (Carlson 1995; DLMF 19.16.2, 19.20.14). Duplication algorithm of Carlson (1995, sec. 2.4). It returns
// NaN outside the domain.
func CarlsonRJ(x, y, z, p float64) float64 {
	if !(x >= 0 && y >= 0 && z >= 0) || p == 0 || math.IsNaN(p) ||
		(x == 0 && y == 0) || (x == 0 && z == 0) || (y == 0 && z == 0) ||
		math.IsInf(x+y+z+math.Abs(p), 0) {
		return math.NaN()
	}
	return carlsonRJ(x, y, z, p)
}

func carlsonRJ(x, y, z, p float64) float64 {
	var out [1]float64
	carlsonDJ(x, y, z, []float64{p}, out[:0])
	return out[0]
}

// carlsonDJ returns R_D(x, y, z) and appends R_J(x, y, z, p) for each p in
// ps to out (which must have capacity len(ps); nothing is allocated then).
// Negative p are handled by the principal-value transformation of
// Carlson (1995; DLMF 19.20.14), which needs R_J at a positive q (run in
// the same loop), R_F and R_C. Arguments as for CarlsonRJ, z > 0.
func carlsonDJ(x, y, z float64, ps []float64, out []float64) float64 {
	// Positive p go straight to the loop; negative p are mapped to a
	// positive q = y + (z − y)(y − x)/(y − p), with y the middle one of
	// x, y, z (Carlson 1995; DLMF 19.20.14).
	var qs [4]float64
	n := len(ps)
	if n > len(qs) {
		panic("raytrace: carlsonDJ takes at most 4 values of p")
	}
	neg := false
	for i, p := range ps {
		qs[i] = p
		if p < 0 {
			neg = true
		}
	}
	// Sorted copy for the principal-value map.
	lo, mid, hi := sort3(x, y, z)
	if neg {
		for i, p := range ps {
			if p < 0 {
				qs[i] = mid + (hi-mid)*(mid-lo)/(mid-p)
			}
		}
	}
	var rj [4]float64
	rd := carlsonLoop(x, y, z, qs[:n], rj[:n])
	for i, p := range ps {
		v := rj[i]
		if p < 0 {
			q := qs[i]
			// (y − p) R_J(x,y,z,p) = (q − y) R_J(x,y,z,q) − 3 R_F(x,y,z)
			// + 3 R_C(xz/y, pq/y), y the middle argument (Carlson 1995).
			rf := carlsonRF(x, y, z)
			v = ((q-mid)*v - 3*rf + 3*carlsonRC(lo*hi/mid, p*q/mid)) / (mid - p)
		}
		out = append(out, v)
	}
	return rd
}

func sort3(a, b, c float64) (lo, mid, hi float64) {
	if a > b {
		a, b = b, a
	}
	if b > c {
		b, c = c, b
	}
	if a > b {
		a, b = b, a
	}
	return a, b, c
}

// carlsonRF is R_F(x, y, z) by duplication (Carlson 1995, sec. 2.2:
// A₀ = (x+y+z)/3, deviations X = 4^{-n}(A₀ − x)/A_n, Y likewise,
// Z = −X − Y, E2 = XY − Z², E3 = XYZ), with the seventh-order series of
// DLMF 19.36.1,
//
//	R_F = A_n^{-1/2}(1 − E2/10 + E3/14 + E2²/24 − 3E2E3/44 − 5E2³/208
//	      + 3E3²/104 + E2²E3/16),
//
// whose eighth-order remainder lets the duplication stop once the
// deviations are below (3ε)^{1/8} of the mean. Domain x, y, z ≥ 0, at most
// one of them zero; unlike gonum's EllipticRF (the same algorithm) it
// accepts arguments down to the smallest normal numbers and spends nothing
// on checking them, which the photon paths' two evaluations per ray
// (trace) do not need: their arguments are valid by construction.
func carlsonRF(x, y, z float64) float64 {
	a0, q := carlsonStartF(x, y, z)
	x0, y0 := x, y
	a := a0
	fac := 1.0
	for i := 0; i < carlsonMaxIter && fac*q >= a; i++ {
		x, y, z, a = carlsonStepF(x, y, z, a)
		fac *= 0.25
	}
	return carlsonSeriesF(a0, x0, y0, a, fac)
}

// carlsonStartF returns the initial mean a0 of R_F's duplication and its
// stopping scale q = max|a0 − x|/(3ε)^{1/8}: the steps go on while
// 4^{-n} q ≥ A_n (see carlsonRF).
func carlsonStartF(x, y, z float64) (a0, q float64) {
	const tol = 1.2674918778210762e-02 // (3ε)^{1/8}
	a0 = (x + y + z) / 3
	return a0, max(math.Abs(a0-x), math.Abs(a0-y), math.Abs(a0-z)) / tol
}

// carlsonStepF is one duplication step of R_F (Carlson 1995, sec. 2.2):
// λ = √x√y + √x√z + √y√z, each argument and the mean a to (· + λ)/4.
func carlsonStepF(x, y, z, a float64) (float64, float64, float64, float64) {
	sx, sy, sz := math.Sqrt(x), math.Sqrt(y), math.Sqrt(z)
	lam := sx*sy + sx*sz + sy*sz
	return carlsonNext(sx, sy, sz), carlsonNext(sy, sx, sz), carlsonNext(sz, sx, sy), (a + lam) * 0.25
}

// carlsonNext is a duplication step's new argument (x + λ)/4 written as
// (√x + √y)(√x + √z)/4 (λ = √x√y + √x√z + √y√z): the same value, with
// two dependent operations after the square roots instead of four, which
// shortens the chain from one step's square roots to the next's.
func carlsonNext(sx, sy, sz float64) float64 {
	return (sx + sy) * (sx + sz) * 0.25
}

// carlsonRF2 returns R_F(xa, ya, 1) and R_F(xb, yb, 1), each by the steps
// of carlsonRF (so the same results to the last bit), in one loop: the two
// chains of square roots are independent, and side by side the processor
// overlaps them.
func carlsonRF2(xa, ya, xb, yb float64) (float64, float64) {
	za, zb := 1.0, 1.0
	a0a, qa := carlsonStartF(xa, ya, za)
	a0b, qb := carlsonStartF(xb, yb, zb)
	x0a, y0a, x0b, y0b := xa, ya, xb, yb
	aa, ab := a0a, a0b
	faca, facb := 1.0, 1.0
	for i := 0; i < carlsonMaxIter; i++ {
		goA, goB := faca*qa >= aa, facb*qb >= ab
		if !goA && !goB {
			break
		}
		if goA {
			xa, ya, za, aa = carlsonStepF(xa, ya, za, aa)
			faca *= 0.25
		}
		if goB {
			xb, yb, zb, ab = carlsonStepF(xb, yb, zb, ab)
			facb *= 0.25
		}
	}
	return carlsonSeriesF(a0a, x0a, y0a, aa, faca), carlsonSeriesF(a0b, x0b, y0b, ab, facb)
}

// carlsonRF2DJ is carlsonRF2 that also returns R_D(xb, yb, 1) and
// R_J(xb, yb, 1, p), p > 0, from the square roots of the second chain:
// the timed trace needs all three at the observer's angular amplitude.
// The two R_F are those of carlsonRF2 to the last bit (the second chain
// runs carlsonRF's steps and its series uses the mean and factor at the
// step where R_F's own test stops it); R_D and R_J follow carlsonLoop's
// rule (Carlson 1995, eqs. 2.29–2.31, 2.37–2.39), with the arguments of
// the shared steps. withA false leaves out the first chain (fa = 0).
func carlsonRF2DJ(xa, ya, xb, yb, p float64, withA bool) (fa, fb, rd, rj float64) {
	za, zb := 1.0, 1.0
	a0a, qa := carlsonStartF(xa, ya, za)
	a0b, qb := carlsonStartF(xb, yb, zb)
	x0a, y0a, x0b, y0b := xa, ya, xb, yb
	aa, ab := a0a, a0b
	faca, facb := 1.0, 1.0
	// R_D and R_J of the second chain, as carlsonLoop1.
	ad0 := (xb + yb + 3) / 5
	lo, _, hi := sort3(xb, yb, 1)
	ad := ad0
	aj0 := (xb + yb + 1 + 2*p) / 5
	aj := aj0
	delta := (p - xb) * (p - yb) * (p - 1)
	maxDev := max(ad0-lo, hi-ad0, aj0-min(lo, p), max(hi, p)-aj0)
	qj := carlsonQJ * maxDev
	facj := 1.0
	sumD, sumJ := 0.0, 0.0
	// Each test, once false, stays false: its values stop changing.
	for i := 0; i < carlsonMaxIter; i++ {
		goA := withA && faca*qa >= aa
		goF, goJ := facb*qb >= ab, facj*qj >= min(ad, aj)
		if !goA && !goF && !goJ {
			break
		}
		if goA {
			xa, ya, za, aa = carlsonStepF(xa, ya, za, aa)
			faca *= 0.25
		}
		if !goF && !goJ {
			continue
		}
		sx, sy, sz := math.Sqrt(xb), math.Sqrt(yb), math.Sqrt(zb)
		lam := sx*sy + sx*sz + sy*sz
		if goJ {
			sumD += facj / (sz * (zb + lam))
			t, e, inv := carlsonTermJ(p, delta, sx, sy, sz, facj*facj*facj, facj)
			sumJ += carlsonFixJ(t, e, inv, facj)
			p = (p + lam) * 0.25
			aj = (aj + lam) * 0.25
			ad = (ad + lam) * 0.25
			facj *= 0.25
		}
		if goF {
			ab = (ab + lam) * 0.25
			facb *= 0.25
		}
		xb, yb, zb = carlsonNext(sx, sy, sz), carlsonNext(sy, sx, sz), carlsonNext(sz, sx, sy)
	}
	if withA {
		fa = carlsonSeriesF(a0a, x0a, y0a, aa, faca)
	}
	fb = carlsonSeriesF(a0b, x0b, y0b, ab, facb)
	rd = carlsonEndD(ad0, ad, x0b, y0b, facj) + 3*sumD
	rj = carlsonEndJ(aj0, aj, x0b, y0b, 1, facj) + 6*sumJ
	return fa, fb, rd, rj
}

// carlsonSeriesF is the series end of carlsonRF: initial mean a0, initial
// x, y, final mean a and factor 4^{-n}.
func carlsonSeriesF(a0, x0, y0, a, fac float64) float64 {
	X := fac * (a0 - x0) / a
	Y := fac * (a0 - y0) / a
	Z := -X - Y
	e2 := X*Y - Z*Z
	e3 := X * Y * Z
	const k2, k3, k22, k23, k222, k33, k223 = -1.0 / 10, 1.0 / 14, 1.0 / 24, -3.0 / 44, -5.0 / 208, 3.0 / 104, 1.0 / 16
	return (1 + e2*(k2+e2*(k22+e2*k222)) + e3*(k3+e3*k33) + e2*e3*(k23+e2*k223)) / math.Sqrt(a)
}

// carlsonLoop runs the duplication of Carlson (1995) for R_D(x, y, z) and
// R_J(x, y, z, p_i), all p_i > 0 (at most 4), writing the R_J into rj.
// With A₀ = (x+y+z+2p)/5, δ = (p−x)(p−y)(p−z), each step n adds
// 4^{-n} R_C(1, 1 + e_n)/d_n to the R_J sum, where
// d_n = (√p+√x)(√p+√y)(√p+√z) and e_n = 4^{-3n} δ/d_n², and
// 4^{-n}/(√z (z+λ)) to the R_D sum; at the end the seventh-order Taylor
// series in the deviations from the mean is added (Carlson 1995, eqs.
// 2.29–2.31 and 2.37–2.39; DLMF 19.36.2; see carlsonSeriesJ). One loop
// serves all: the square roots of x, y, z and the mean shifts λ are
// shared.
func carlsonLoop(x, y, z float64, ps []float64, rj []float64) float64 {
	n := len(ps)
	switch n {
	case 1:
		return carlsonLoop1(x, y, z, ps, rj)
	case 3:
		return carlsonLoop3(x, y, z, math.Sqrt(x), math.Sqrt(y), math.Sqrt(z), ps, rj)
	}
	var pv, a0, av, delta, sum [4]float64
	// R_D is R_J with p = z; its mean is (x + y + 3z)/5.
	ad0 := (x + y + 3*z) / 5
	lo, _, hi := sort3(x, y, z)
	ad := ad0
	maxDev := max(ad0-lo, hi-ad0)
	minA := ad0
	for i := 0; i < n; i++ {
		p := ps[i]
		pv[i] = p
		a := (x + y + z + 2*p) / 5
		a0[i], av[i] = a, a
		delta[i] = (p - x) * (p - y) * (p - z)
		// The mean lies between the smallest and largest argument.
		maxDev = max(maxDev, a-min(lo, p), max(hi, p)-a)
		minA = min(minA, a)
	}
	// Stop when 4^{-k} Q < min A_k; the A_k shrink together with 4^{-k}
	// once λ dominates, so it is enough to compare with the initial means
	// scaled as they evolve (tracked in minA).
	q := carlsonQJ * maxDev
	x0, y0, z0 := x, y, z
	fac := 1.0
	sumD := 0.0
	for it := 0; it < carlsonMaxIter && fac*q >= minA; it++ {
		sx, sy, sz := math.Sqrt(x), math.Sqrt(y), math.Sqrt(z)
		lam := sx*sy + sx*sz + sy*sz
		sumD += fac / (sz * (z + lam))
		f3 := fac * fac * fac
		for i := range pv[:n] {
			t, e, inv := carlsonTermJ(pv[i], delta[i], sx, sy, sz, f3, fac)
			sum[i] += carlsonFixJ(t, e, inv, fac)
			pv[i] = (pv[i] + lam) * 0.25
			av[i] = (av[i] + lam) * 0.25
		}
		x, y, z = (x+lam)*0.25, (y+lam)*0.25, (z+lam)*0.25
		ad = (ad + lam) * 0.25
		minA = ad
		for _, a := range av[:n] {
			minA = min(minA, a)
		}
		fac *= 0.25
	}
	sumD = carlsonEndD(ad0, ad, x0, y0, fac) + 3*sumD
	for i := 0; i < n; i++ {
		rj[i] = carlsonEndJ(a0[i], av[i], x0, y0, z0, fac) + 6*sum[i]
	}
	return sumD
}

// carlsonLoop3 is carlsonLoop for exactly three p (the timing's ν and
// the two horizons), with the same operations in the same order, so the
// same results to the last bit (carlson_test.go checks that), but with
// its running values in scalars instead of arrays, which the compiler
// keeps in registers. sx, sy, sz are the square roots of x, y, z for the
// first step: the timing knows them as |cn|, dn and 1 (sn2Integrals).
func carlsonLoop3(x, y, z, sx, sy, sz float64, ps []float64, rj []float64) float64 {
	p0, p1, p2 := ps[0], ps[1], ps[2]
	ad0 := (x + y + 3*z) / 5
	lo, _, hi := sort3(x, y, z)
	ad := ad0
	a00 := (x + y + z + 2*p0) / 5
	a01 := (x + y + z + 2*p1) / 5
	a02 := (x + y + z + 2*p2) / 5
	av0, av1, av2 := a00, a01, a02
	d0 := (p0 - x) * (p0 - y) * (p0 - z)
	d1 := (p1 - x) * (p1 - y) * (p1 - z)
	d2 := (p2 - x) * (p2 - y) * (p2 - z)
	maxDev := max(ad0-lo, hi-ad0)
	maxDev = max(maxDev, a00-min(lo, p0), max(hi, p0)-a00)
	maxDev = max(maxDev, a01-min(lo, p1), max(hi, p1)-a01)
	maxDev = max(maxDev, a02-min(lo, p2), max(hi, p2)-a02)
	// Every mean moves by a ↦ (a + λ)/4, which keeps their order: the
	// smallest stays the smallest, so it alone is followed (minA is the
	// same value carlsonLoop's min over all of them gives).
	minA := min(ad0, a00, a01, a02)
	q := carlsonQJ * maxDev
	x0, y0, z0 := x, y, z
	fac := 1.0
	sumD, s0, s1, s2 := 0.0, 0.0, 0.0, 0.0
	for it := 0; it < carlsonMaxIter && fac*q >= minA; it++ {
		if it > 0 {
			sx, sy, sz = math.Sqrt(x), math.Sqrt(y), math.Sqrt(z)
		}
		lam := sx*sy + sx*sz + sy*sz
		sumD += fac / (sz * (z + lam))
		f3 := fac * fac * fac
		t0, e0, i0 := carlsonTermJ(p0, d0, sx, sy, sz, f3, fac)
		t1, e1, i1 := carlsonTermJ(p1, d1, sx, sy, sz, f3, fac)
		t2, e2, i2 := carlsonTermJ(p2, d2, sx, sy, sz, f3, fac)
		if !(math.Abs(e0) < 3e-4 && math.Abs(e1) < 3e-4 && math.Abs(e2) < 3e-4) {
			t0 = carlsonFixJ(t0, e0, i0, fac)
			t1 = carlsonFixJ(t1, e1, i1, fac)
			t2 = carlsonFixJ(t2, e2, i2, fac)
		}
		s0 += t0
		s1 += t1
		s2 += t2
		p0, p1, p2 = (p0+lam)*0.25, (p1+lam)*0.25, (p2+lam)*0.25
		av0, av1, av2 = (av0+lam)*0.25, (av1+lam)*0.25, (av2+lam)*0.25
		x, y, z = (x+lam)*0.25, (y+lam)*0.25, (z+lam)*0.25
		ad = (ad + lam) * 0.25
		minA = (minA + lam) * 0.25
		fac *= 0.25
	}
	sumD = carlsonEndD(ad0, ad, x0, y0, fac) + 3*sumD
	rj[0] = carlsonEndJ(a00, av0, x0, y0, z0, fac) + 6*s0
	rj[1] = carlsonEndJ(a01, av1, x0, y0, z0, fac) + 6*s1
	rj[2] = carlsonEndJ(a02, av2, x0, y0, z0, fac) + 6*s2
	return sumD
}

// carlsonLoop1 is carlsonLoop for exactly one p (the angular timing's
// observer part), with carlsonLoop's operations in its order, so the same
// results to the last bit (carlson_test.go), in scalars.
func carlsonLoop1(x, y, z float64, ps []float64, rj []float64) float64 {
	p0 := ps[0]
	ad0 := (x + y + 3*z) / 5
	lo, _, hi := sort3(x, y, z)
	ad := ad0
	a00 := (x + y + z + 2*p0) / 5
	av0 := a00
	d0 := (p0 - x) * (p0 - y) * (p0 - z)
	maxDev := max(ad0-lo, hi-ad0)
	maxDev = max(maxDev, a00-min(lo, p0), max(hi, p0)-a00)
	minA := min(ad0, a00)
	q := carlsonQJ * maxDev
	x0, y0, z0 := x, y, z
	fac := 1.0
	sumD, s0 := 0.0, 0.0
	for it := 0; it < carlsonMaxIter && fac*q >= minA; it++ {
		sx, sy, sz := math.Sqrt(x), math.Sqrt(y), math.Sqrt(z)
		lam := sx*sy + sx*sz + sy*sz
		sumD += fac / (sz * (z + lam))
		t0, e0, i0 := carlsonTermJ(p0, d0, sx, sy, sz, fac*fac*fac, fac)
		s0 += carlsonFixJ(t0, e0, i0, fac)
		p0 = (p0 + lam) * 0.25
		av0 = (av0 + lam) * 0.25
		x, y, z = (x+lam)*0.25, (y+lam)*0.25, (z+lam)*0.25
		ad = (ad + lam) * 0.25
		minA = min(ad, av0)
		fac *= 0.25
	}
	sumD = carlsonEndD(ad0, ad, x0, y0, fac) + 3*sumD
	rj[0] = carlsonEndJ(a00, av0, x0, y0, z0, fac) + 6*s0
	return sumD
}

// carlsonTermJ is one duplication step's term 4^{-n} R_C(1, 1 + e_n)/d_n
// of R_J (see carlsonLoop), for the current p and square roots of x, y, z,
// δ and f3 = fac³, with R_C by its short series; it also returns e_n and
// 1/d_n for carlsonFixJ, which redoes the rare steps where |e_n| is too
// large for the series. (Split in two so that this part is inlined.)
func carlsonTermJ(p, delta, sx, sy, sz, f3, fac float64) (term, e, inv float64) {
	sp := math.Sqrt(p)
	inv = 1 / ((sp + sx) * (sp + sy) * (sp + sz))
	e = f3 * delta * inv * inv
	rc := 1 - e*(1.0/3-e*(1.0/5-e*(1.0/7-e*(1.0/9)))) // rc1's short series
	return fac * rc * inv, e, inv
}

// carlsonFixJ returns the term of carlsonTermJ, with R_C(1, 1 + e) by
// rc1 where |e| ≥ 3e-4.
func carlsonFixJ(term, e, inv, fac float64) float64 {
	if e < 3e-4 && e > -3e-4 {
		return term
	}
	return fac * rc1(e) * inv
}

// carlsonEndD is the series part of R_D at the end of the duplication
// (R_J with p = z): deviations X, Y from the mean, Z = −(X+Y)/3, for the
// initial mean a0 and final mean a (see carlsonLoop).
func carlsonEndD(a0, a, x0, y0, fac float64) float64 {
	ia := fac / a
	X := (a0 - x0) * ia
	Y := (a0 - y0) * ia
	Z := -(X + Y) / 3
	xy, zz := X*Y, Z*Z
	e2 := xy - 6*zz
	e3 := (3*xy - 8*zz) * Z
	e4 := 3 * (xy - zz) * zz
	e5 := xy * Z * zz
	return fac * carlsonSeriesJ(e2, e3, e4, e5) / (a * math.Sqrt(a))
}

// carlsonEndJ is the series part of R_J at the end of the duplication:
// fac·T(E2…E5)/A^{3/2} for the initial mean a0 and final mean a (see
// carlsonLoop).
func carlsonEndJ(a0, a, x0, y0, z0, fac float64) float64 {
	ia := fac / a
	X := (a0 - x0) * ia
	Y := (a0 - y0) * ia
	Z := (a0 - z0) * ia
	P := -(X + Y + Z) / 2
	P2 := P * P
	xyz := X * Y * Z
	e2 := X*Y + X*Z + Y*Z - 3*P2
	e3 := xyz + 2*e2*P + 4*P2*P
	e4 := (2*xyz + e2*P + 3*P2*P) * P
	e5 := xyz * P2
	return fac * carlsonSeriesJ(e2, e3, e4, e5) / (a * math.Sqrt(a))
}

// carlsonSeriesJ is the Taylor series of R_J (and R_D) about the mean to
// seventh order in the deviations, in the elementary symmetric functions
// E2…E5 of (X, Y, Z, P, P) (DLMF 19.36.2; Carlson 1995, eq. 2.39 to fifth
// order):
//
//	1 − 3E2/14 + E3/6 + 9E2²/88 − 3E4/22 − 9E2E3/52 + 3E5/26
//	  − E2³/16 + 3E3²/40 + 3E2E4/20 + 45E2²E3/272 − 9(E3E4 + E2E5)/68
//
// Its error is of eighth order, which lets the duplication stop at
// deviations of 1/carlsonQJ = (r/4)^{1/8} instead of (r/4)^{1/6}.
func carlsonSeriesJ(e2, e3, e4, e5 float64) float64 {
	// Coefficients as constants: a division by a constant is not turned
	// into a multiplication by the compiler.
	const (
		k2, k3, k22, k4, k23, k5    = -3.0 / 14, 1.0 / 6, 9.0 / 88, -3.0 / 22, -9.0 / 52, 3.0 / 26
		k222, k33, k24, k223, k3425 = -1.0 / 16, 3.0 / 40, 3.0 / 20, 45.0 / 272, -9.0 / 68
	)
	return 1 + e2*(k2+e2*(k22+e2*k222)) + e3*(k3+e3*k33) + e4*k4 + e5*k5 +
		e2*(e3*(k23+e2*k223)+e4*k24) + (e3*e4+e2*e5)*k3425
}

// rc1 returns R_C(1, 1 + e) for e > −1: arctan(√e)/√e for e > 0,
// artanh(√−e)/√−e for e < 0 (DLMF 19.2.17–19.2.18), by its series
// 1 − e/3 + e²/5 − … for small |e| (the duplication makes e shrink by 64
// per step, so after the first step the series is what runs).
func rc1(e float64) float64 {
	// Σ (−e)^k/(2k+1), cut where the next term is below 1e-17.
	switch ae := math.Abs(e); {
	case ae < 4e-6:
		return 1 - e*(1.0/3-e*(1.0/5))
	case ae < 3e-4:
		return 1 - e*(1.0/3-e*(1.0/5-e*(1.0/7-e*(1.0/9))))
	case ae < 0.03:
		return 1 - e*(1.0/3-e*(1.0/5-e*(1.0/7-e*(1.0/9-e*(1.0/11-e*(1.0/13-e*(1.0/15-e*(1.0/17-e*(1.0/19-e*(1.0/21))))))))))
	}
	if e > 0 {
		s := math.Sqrt(e)
		return math.Atan(s) / s
	}
	s := math.Sqrt(-e)
	return math.Atanh(s) / s
}

// bulirschCel returns Bulirsch's general complete elliptic integral
//
//	cel(kc, p, a, b) = ∫₀^{π/2} (a cos²φ + b sin²φ) / ((cos²φ + p sin²φ) sqrt(cos²φ + kc² sin²φ)) dφ
//
// for kc ≠ 0 and p ≠ 0 (a Cauchy principal value for p < 0), by
// Bulirsch's quadratically convergent transformation (Bulirsch 1969,
// Numer. Math. 13, 305, algorithm cel3). With kc² = 1 − m it gives
// K(m) = cel(kc, 1, 1, 1), ∫ sin²φ/sqrt(1 − m sin²φ) = cel(kc, 1, 0, 1) and
// Π(n|m) = cel(kc, 1 − n, 1, 1) (DLMF 19.2.11) at the cost of a few square
// roots, far less than an incomplete integral.
func bulirschCel(kc, p, a, b float64) float64 {
	const ca = 1e-8 // quadratic convergence: the error is then below ca²
	qc := math.Abs(kc)
	e := qc
	em := 1.0
	if p > 0 {
		p = math.Sqrt(p)
		b /= p
	} else {
		f := qc * qc
		q := 1 - f
		g := 1 - p
		f -= p
		q *= b - a*p
		p = math.Sqrt(f / g)
		a = (a - b) / g
		b = -q/(g*g*p) + a*p
	}
	for i := 0; i < 64; i++ {
		f := a
		a += b / p
		g := e / p
		b += f * g
		b += b
		p += g
		g = em
		em += qc
		if math.Abs(g-qc) <= g*ca {
			break
		}
		qc = math.Sqrt(e)
		qc += qc
		e = qc * em
	}
	return math.Pi / 2 * (b + a*em) / (em * (em + p))
}
