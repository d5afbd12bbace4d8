package raytrace

import (
	"errors"
	"fmt"
	"math"
)

// MaxSourceHeight bounds the height of an AxisSource, in M: far beyond any
// height at which the hole matters, and small enough that h² and the
// regularised times (about h + 2 ln h) keep their digits.
const MaxSourceHeight = 1e6

// AxisSource is a point source at rest on the spin axis, at Boyer–Lindquist
// radius h (its height above the hole), emitting isotropically in its own
// rest frame: the geometry of Martocchia & Matt (1996, MNRAS 282, L53).
// Its photons have λ = 0 (no angular momentum about the axis) and a Carter
// constant fixed by the emission angle (Eta). Emit follows them forward in
// time with the closed forms of the package, with the Mino-time integrals
// started at r = h instead of at infinity. Like Observer it is a plain
// value, safe for concurrent use; NewAxisSource is the only way to one.
type AxisSource struct {
	spin, height, horizon float64
	sigma, delta          float64 // Σ = h² + a² and Δ(h) at the source
}

// NewAxisSource returns the source at height h above a hole of spin a.
// Domain: -1 < a < 1, r₊ < h ≤ MaxSourceHeight (with Δ(h) > 0 by a margin
// of 1e-9 h², so that the source's frame exists).
func NewAxisSource(spin, height float64) (AxisSource, error) {
	if err := ValidSpin(spin); err != nil {
		return AxisSource{}, err
	}
	rh := Horizon(spin)
	if math.IsNaN(height) || !(height <= MaxSourceHeight) {
		return AxisSource{}, fmt.Errorf("source height %v M outside (r₊, %g] M", height, float64(MaxSourceHeight))
	}
	d := (height - rh) * (height - spin*spin/rh) // Δ = (h − r₊)(h − r₋)
	if !(height > rh) || !(d > 1e-9*height*height) {
		return AxisSource{}, fmt.Errorf("source height %v M is not outside the horizon r₊ = %.6g M", height, rh)
	}
	return AxisSource{spin: spin, height: height, horizon: rh, sigma: height*height + spin*spin, delta: d}, nil
}

// Spin returns the hole's spin a.
func (s AxisSource) Spin() float64 { return s.spin }

// Height returns the source's radius h in M.
func (s AxisSource) Height() float64 { return s.height }

// Horizon returns the hole's horizon radius r₊.
func (s AxisSource) Horizon() float64 { return s.horizon }

// Eta returns the Carter constant η of the photon emitted at angle ψ
// (radians) from the outward direction of the axis in the source's rest
// frame: ψ = 0 straight up, ψ = π straight down at the hole.
//
// On the axis the static frame has e_t = sqrt(Σ/Δ) ∂_t, e_r = sqrt(Δ/Σ) ∂_r
// (metric of Boyer–Lindquist with θ = 0, Σ = h² + a²). A photon with
// p_t = −1 and λ = 0 has local energy sqrt(Σ/Δ) and radial momentum
// sqrt(R(h))/sqrt(ΔΣ), R = Σ² − Δ(η + a²) (Carter 1968; Bardeen 1973), so
// cos ψ = sqrt(R(h))/Σ and
//
//	η = sin²ψ Σ²/Δ − a²
//
// (for a = 0 the impact parameter h sin ψ/sqrt(1 − 2/h) of Synge 1966).
// Domain: any ψ; η ≥ −a².
func (s AxisSource) Eta(psi float64) float64 {
	sn := math.Sin(psi)
	return sn*sn*s.sigma*s.sigma/s.delta - s.spin*s.spin
}

// LocalEnergy returns E_source/E_∞ = sqrt(Σ/Δ) at the source, the energy a
// photon with p_t = −1 has in the source's rest frame (u^t of the static
// source on the axis; −g_tt = Δ/Σ there). The shift of a photon from the
// source to gas with −p·u = E_gas is E_gas/LocalEnergy.
func (s AxisSource) LocalEnergy() float64 { return math.Sqrt(s.sigma / s.delta) }

// SourceCrossing is one passage of a source photon through the equatorial
// plane, in the order the photon makes them (forward in time).
type SourceCrossing struct {
	R    float64 // Boyer–Lindquist radius, M
	Mino float64 // Mino time since emission
	// Time is the Boyer–Lindquist time since emission, in M.
	Time float64
	// Outbound: the photon moves to larger r there (p_r > 0).
	Outbound bool
}

// SourcePath is one source photon, from Emit. Reuse one per goroutine.
type SourcePath struct {
	Psi, Eta float64 // emission angle (from the outward axis) and Carter constant
	Fate     Fate    // horizon or infinity
	Mino     float64 // total Mino time to the horizon or to infinity
	// Crossings are the first equatorial crossings, at most the orders
	// asked of Emit.
	Crossings []SourceCrossing
	// CosInf is cos θ of the direction in which an escaping photon leaves
	// (NaN for a captured one).
	CosInf float64
	// Arrival is the regularised time of an escaping photon at infinity:
	// the limit of t − t_e − (r + 2 ln r) as r → ∞, t_e the time of
	// emission (NaN for a captured one). Arrival minus an Observer's
	// Timing.Delay of an event is the time between the emission and the
	// event as a distant observer in that direction sees them.
	Arrival float64
}

// ErrSourceRoots reports a photon whose radial roots fall in a case the
// closed forms do not cover (two real roots with the larger outside the
// horizon and no escape): it does not occur for λ = 0 photons outside
// the horizon (Gralla & Lupsasca 2020, PRD 101, 044032, sec. III), and
// Emit reports it rather than guess.
var ErrSourceRoots = errors.New("raytrace: source photon in an unexpected radial root case")

// Emit follows the photon emitted at angle psi (radians, see Eta) forward
// in time to the horizon or to infinity and records its first orders
// equatorial crossings. It allocates nothing once cap(p.Crossings) ≥ orders.
//
// Angular motion. With x = cos θ and λ = 0, (dx/dτ)² = (1 − x²)(η + a²x²),
// solved from the pole by
//
//	x(τ) = cn(sqrt(η + a²) τ | k),  k = a²/(η + a²)
//
// (differentiate; for k > 1, η < 0, cn(v|k) = dn(v sqrt(k)|1/k), DLMF
// 22.17.4). For η > 0 the plane x = 0 is reached at the Mino times
// τ_n = (2n + 1) K(k)/sqrt(η + a²), and G_t = ∫cos²θ dτ there is
// (2n + 1)[K(k) − R_D(0, 1 − k, 1)/3]/sqrt(η + a²) (∫sn² = R_D/3 over a
// quarter period, DLMF 19.25.1); η ≤ 0 photons never reach the plane.
//
// Radial motion. A photon through r = h that can reach infinity lies on
// the path of a photon from infinity with the same constants, so r(τ) is
// the closed form r(τ_path)
// of Trace (Gralla & Lupsasca 2020, eqs. A6–A13, B45–B58) at
// τ_path = τ_h − τ (emitted outward) or τ_h + τ (inward), where τ_h is
// that path's Mino time from infinity to h (the horizon formula of Trace
// with r₊ replaced by h). The time since emission is the difference of
// the regularised I_t of TraceTimed at the two path points plus a² G_t.
// Photons with η ≤ 0 and no real root (case IV) escape when emitted
// outward (R > 0 everywhere) and fall in otherwise; their Mino time and
// arrival are Gauss–Legendre quadratures in u = 1/r (smooth there), as
// Trace does for such photons. A source below the photon orbits also emits
// photons caught between the horizon and a turning point r3 < r4 (see
// emitBound).
//
// Domain: any ψ. Accuracy: as TraceTimed (see timing_test.go and
// source_test.go). The only error is ErrSourceRoots.
func (s AxisSource) Emit(psi float64, orders int, p *SourcePath) error {
	a := s.spin
	a2 := a * a
	h := s.height
	rh := s.horizon
	eta := s.Eta(psi)
	p.Psi, p.Eta = psi, eta
	p.Crossings = p.Crossings[:0]
	p.CosInf, p.Arrival = math.NaN(), math.NaN()
	cosPsi := math.Cos(psi)
	outward := cosPsi > 0
	ea := eta + a2 // sin²ψ Σ²/Δ ≥ 0
	if !(ea > 0) {
		// Along the axis (ψ = 0 or π): x stays 1.
		ea = 0
		eta = -a2
	}
	A := a2 - eta
	B := 2 * ea
	C := -a2 * eta

	if !(eta > 0) {
		// No crossing: fate and, for escapes, Mino time and arrival.
		if !outward {
			p.Fate = Captured
			p.Mino = minoQuad(A, B, C, 1/rh) - minoQuad(A, B, C, 1/h)
			return nil
		}
		p.Fate = Escaped
		p.Mino = minoQuad(A, B, C, 1/h)
		p.Arrival = arrivalQuad(a, A, B, C, 1/h) + a2*axisGt(ea, a2, p.Mino)
		p.CosInf = axisCos(ea, a2, p.Mino)
		return nil
	}

	q := radialRoots(A, B, C)
	var rad radial
	escapes := false
	switch {
	case q.cs == FourReal && q.r3 > rh && h < (q.r3+q.r4)/2:
		return s.emitBound(q, eta, outward, orders, p)
	case q.cs == FourReal && q.r4 > rh:
		rad.initI(&q, rh, true)
		escapes = true
	case q.cs == FourReal:
		rad.initI(&q, rh, false)
	case q.cs == TwoReal && q.r2 < rh:
		rad.initII(&q, rh)
	default:
		return ErrSourceRoots
	}
	th := rad.minoFromInfinity(q, h)
	// The source photon's path runs over τ_path in [lo, hi] of the
	// photon from infinity, from τ_h in the direction dir.
	dir := 1.0
	end := rad.total
	if outward {
		dir, end = -1, 0
	}
	var rt radialTimer
	rt.init(&q, &rad, a, 0, rh)
	it0, _ := rt.at(th, h, nil)
	total := math.Abs(end - th)
	p.Mino = total
	if outward || escapes {
		p.Fate = Escaped
		// Path point equivalent to infinity behind the photon: the path
		// is symmetric about its turning point.
		pe := th
		if !outward {
			pe = 2*rad.turn - th
		}
		itEnd, _ := rt.at(pe, h, nil)
		p.Arrival = itEnd + a2*axisGt(ea, a2, total)
		p.CosInf = axisCos(ea, a2, total)
	} else {
		p.Fate = Captured
	}
	sq := math.Sqrt(ea)
	mc := eta / ea // 1 − k
	kq := ellipK(mc)
	gq := kq / sq
	tq := (kq - CarlsonRD(0, mc, 1)/3) / sq
	for n := 0; n < orders; n++ {
		tau := float64(2*n+1) * gq
		if !(tau < total) {
			break
		}
		tp := th + dir*tau
		r := rad.at(tp)
		if r < rh {
			r = rh
		}
		it, _ := rt.at(tp, r, nil)
		p.Crossings = append(p.Crossings, SourceCrossing{
			R:        r,
			Mino:     tau,
			Time:     dir*(it-it0) + a2*float64(2*n+1)*tq,
			Outbound: outward || tp > rad.turn,
		})
	}
	return nil
}

// emitBound is Emit for a photon between the horizon and the turning point
// r3 of four real roots r1 < r2 < r3 < r4 (a source below the photon
// orbit; the photon falls in whichever way it leaves). For r2 ≤ r ≤ r3
// (Byrd & Friedman 1971, Handbook of Elliptic Integrals, 254.00 with
// 256.00's modulus)
//
//	∫_r^{r3} dr/sqrt(R) = g F(arcsin sqrt(r42 (r3 − r)/(r32 (r4 − r))) | k),
//	g = 2/sqrt(r31 r42),  k = r32 r41/(r31 r42),
//
// so with Y = F(…)/g, r(Y) = r3 − r32 r43 sn²Y/(r42 − r32 sn²Y) (even in
// Y, Y = 0 at r3). The photon runs along Y from Y_h, decreasing when
// emitted outward. The time since emission is the Gauss–Legendre
// quadrature of dt/dτ = r² + 2r + 4 + (8r − 4a²)/Δ + a² cos²θ over Y,
// smooth there (the radial part by quadrature, the angular closed form).
func (s AxisSource) emitBound(q quartic, eta float64, outward bool, orders int, p *SourcePath) error {
	a := s.spin
	a2 := a * a
	rh := s.horizon
	rm := a2 / rh
	r31, r41 := q.r3-q.r1, q.r4-q.r1
	r32, r42 := q.r3-q.r2, q.r4-q.r2
	m := r32 * r41 / (r31 * r42)
	mc := q.r21 * q.r43 / (r31 * r42)
	scale := math.Sqrt(r31*r42) / 2
	yOf := func(r float64) float64 {
		den := r32 * (q.r4 - r)
		s2 := min(1, max(0, r42*(q.r3-r)/den))
		c2 := max(0, q.r43*(r-q.r2)/den)
		return ellipFsc(s2, c2, mc)
	}
	rOf := func(y float64) float64 {
		sn, _, _ := jacobi(math.Abs(y), m, mc)
		s2 := sn * sn
		return q.r3 - r32*q.r43*s2/(r42-r32*s2)
	}
	rate := func(y float64) float64 {
		r := rOf(y)
		return r*r + 2*r + 4 + (8*r-4*a2)/((r-rh)*(r-rm))
	}
	// ∫ rate dY from y0 to y1 (either order) with minoQuad's rule on
	// panels of at most 0.2 in Y.
	integral := func(y0, y1 float64) float64 {
		n := int(math.Ceil(math.Abs(y1-y0)/0.2)) + 1
		d := (y1 - y0) / float64(n)
		sum := 0.0
		for i := range n {
			for k, x := range legendre.x {
				sum += legendre.w[k] * rate(y0+(float64(i)+x)*d)
			}
		}
		return math.Abs(sum * d)
	}
	yh, yrh := yOf(s.height), yOf(rh)
	dir := 1.0
	total := (yrh - yh) / scale
	if outward {
		dir = -1
		total = (yh + yrh) / scale
	}
	p.Fate, p.Mino = Captured, total
	ea := eta + a2
	sq := math.Sqrt(ea)
	mct := eta / ea
	kq := ellipK(mct)
	tq := (kq - CarlsonRD(0, mct, 1)/3) / sq
	for n := 0; n < orders; n++ {
		tau := float64(2*n+1) * kq / sq
		if !(tau < total) {
			break
		}
		y := yh + dir*scale*tau
		r := max(rh, rOf(y))
		var tr float64
		if outward && y < 0 {
			tr = (integral(yh, 0) + integral(0, y)) / scale
		} else {
			tr = integral(yh, y) / scale
		}
		p.Crossings = append(p.Crossings, SourceCrossing{R: r, Mino: tau, Time: tr + a2*float64(2*n+1)*tq, Outbound: outward && y > 0})
	}
	return nil
}

// minoFromInfinity returns the Mino time from infinity to radius r ≥ the
// outer root on the inward leg of the photon of roots q: the horizon
// formulas of initI and initII with r₊ replaced by r.
func (rd radial) minoFromInfinity(q quartic, r float64) float64 {
	if rd.cs == FourReal {
		den := rd.r41 * (r - rd.r3)
		s2 := rd.r31 * (r - rd.r4) / den
		c2 := rd.r43 * (r - q.r1) / den
		x := ellipFsc(min(1, max(0, s2)), max(0, c2), rd.mc)
		return (rd.x0 - x) / rd.scale
	}
	cn := (rd.num0 - r*rd.den0) / (r*rd.den1 - rd.num1)
	return (rd.x0 - ellipFcos(cn, rd.mc)) / rd.scale
}

// axisCos returns cos θ = cn(sqrt(η + a²) τ | a²/(η + a²)) of a λ = 0
// photon a Mino time τ after it left the pole (see Emit), given
// ea = η + a² ≥ 0.
func axisCos(ea, a2, tau float64) float64 {
	if !(ea > 0) {
		return 1
	}
	k := a2 / ea
	v := math.Sqrt(ea) * tau
	if k <= 1 {
		_, cn, _ := jacobi(v, k, 1-a2/ea)
		return cn
	}
	// cn(v|k) = dn(v sqrt(k)|1/k) (DLMF 22.17.4).
	_, _, dn := jacobi(v*math.Sqrt(k), 1/k, 1-1/k)
	return dn
}

// axisGt returns G_t = ∫cos²θ dτ over the first tau of Mino time from the
// pole of a λ = 0 photon (see Emit), given ea = η + a²: with
// v = sqrt(η + a²) τ and k = a²/(η + a²), ∫₀^v cn²(·|k) = v − S(v|k), S of
// sn2Integral; for k > 1 (η < 0), cn²(v|k) = dn²(u|1/k) with u = v sqrt(k)
// (DLMF 22.17.4) and dn² = 1 − (1/k) sn², so ∫ = [u − S(u|1/k)/k]/sqrt(k).
func axisGt(ea, a2, tau float64) float64 {
	if !(ea > 0) {
		return tau
	}
	k := a2 / ea
	v := math.Sqrt(ea) * tau
	if k <= 1 {
		return (v - sn2Integral(v, k, 1-k)) / math.Sqrt(ea)
	}
	mu := 1 / k
	u := v * math.Sqrt(k)
	return (u - mu*sn2Integral(u, mu, 1-mu)) / math.Sqrt(a2)
}

// sn2Integral returns S(v|m) = ∫₀^v sn²(w|m) dw for any real v and
// 0 ≤ m ≤ 1 (mc = 1 − m): sn² is even with period 2K, so with
// v = 2jK + w, |w| ≤ K, S = 2j S(K) + sign(w) S(|w|), where
// S(w) = (s³/3) R_D(c², d², 1) for 0 ≤ w ≤ K (s, c, d = sn, cn, dn of w;
// DLMF 19.25.9 with 22.16.21) and S(K) = R_D(0, mc, 1)/3.
func sn2Integral(v, m, mc float64) float64 {
	kq := ellipK(mc)
	j := math.Round(v / (2 * kq))
	w := v - 2*j*kq
	sum := 0.0
	if j != 0 {
		sum = 2 * j * CarlsonRD(0, mc, 1) / 3
	}
	if w != 0 {
		sn, cn, dn := jacobi(math.Abs(w), m, mc)
		sum += math.Copysign(math.Abs(sn*sn*sn)*CarlsonRD(cn*cn, dn*dn, 1)/3, w)
	}
	return sum
}

// arrivalQuad returns the regularised radial part of the time from r = 1/u0
// to infinity, lim ∫ dt − (r + 2 ln r), of a λ = 0 photon moving outward
// with no radial root beyond (η ≤ 0), by the fixed Gauss–Legendre rule of
// minoQuad in u = 1/r. The radial rate is r² + 2r + 4 + (8r − 4a²)/Δ
// (TraceTimed with λ = 0) and dτ = du/sqrt(P), P = 1 + A u² + B u³ + C u⁴;
// subtracting (1 + 2/r) dr = (1 + 2u)/u² du leaves the regular integrand
//
//	[4 + u(8 − 4a²u)/(1 − 2u + a²u²)]/sqrt(P) − (1 + 2u)(A + Bu + Cu²)/(sqrt(P)(1 + sqrt(P)))
//
// and the boundary term −(r + 2 ln r) at the source.
func arrivalQuad(a, A, B, C, u0 float64) float64 {
	a2 := a * a
	sum := 0.0
	for i, t := range legendre.x {
		u := t * u0
		u2 := u * u
		sp := math.Sqrt(1 + A*u2 + B*u2*u + C*u2*u2)
		f := (4+u*(8-4*a2*u)/(1-2*u+a2*u2))/sp - (1+2*u)*(A+B*u+C*u2)/(sp*(1+sp))
		sum += legendre.w[i] * f
	}
	r := 1 / u0
	return sum*u0 - (r + 2*math.Log(r))
}

// ErrNoDirect reports that no photon of the source reaches the observer
// without first crossing the equatorial plane.
var ErrNoDirect = errors.New("raytrace: no direct photon from the source to the observer")

// Direct returns the emission angle ψ (radians, see Eta) and the
// regularised Arrival (SourcePath) of the photon that travels from the
// source straight to a distant observer at inclination θo (degrees,
// 0 ≤ θo < 90): the escaping photon of least ψ with CosInf = cos θo, found
// by bisection in ψ to rounding. The time between a flash of the source
// seen directly and an event with Timing.Delay D seen from the same
// direction is then (t_event − t_emit) + D − Arrival.
func (s AxisSource) Direct(inclinationDeg float64) (psi, arrival float64, err error) {
	if !(inclinationDeg >= 0 && inclinationDeg < 90) {
		return 0, 0, fmt.Errorf("raytrace: direct photon needs an inclination in [0, 90) degrees, not %v", inclinationDeg)
	}
	co, _ := cosSinDeg(inclinationDeg)
	var p SourcePath
	above := func(psi float64) (bool, error) {
		if err := s.Emit(psi, 1, &p); err != nil {
			return false, err
		}
		// Still above the observer's direction, and not yet through the plane.
		return p.Fate == Escaped && len(p.Crossings) == 0 && p.CosInf > co, nil
	}
	if co == 1 {
		if err := s.Emit(0, 0, &p); err != nil {
			return 0, 0, err
		}
		return 0, p.Arrival, nil
	}
	// Scan for the first angle past the observer's direction.
	const steps = 720
	lo, hi := 0.0, math.NaN()
	for i := 1; i <= steps; i++ {
		x := math.Pi * float64(i) / steps
		up, err := above(x)
		if err != nil {
			return 0, 0, err
		}
		if !up {
			hi = x
			break
		}
		lo = x
	}
	if math.IsNaN(hi) {
		return 0, 0, ErrNoDirect
	}
	for hi-lo > 4e-16*hi {
		mid := (lo + hi) / 2
		if mid <= lo || mid >= hi {
			break
		}
		up, err := above(mid)
		if err != nil {
			return 0, 0, err
		}
		if up {
			lo = mid
		} else {
			hi = mid
		}
	}
	psi = (lo + hi) / 2
	if err := s.Emit(psi, 1, &p); err != nil {
		return 0, 0, err
	}
	if p.Fate != Escaped || len(p.Crossings) > 0 || math.Abs(p.CosInf-co) > 1e-6 {
		return 0, 0, ErrNoDirect
	}
	return psi, p.Arrival, nil
}
