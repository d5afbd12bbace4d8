package scene

import (
	"math"

	"kerrscope/raytrace"
)

// rTolerance is the relative size, against the sum of the magnitudes of its
// two terms, below which a negative radial potential R(r) is taken to be
// rounding and clamped to 0.
const rTolerance = 1e-8

// Gas is the 4-velocity field of a thin equatorial disk around a Kerr black
// hole of spin a, orbiting in the +φ direction: Keplerian circular orbits
// for r ≥ r_isco and geodesic plunging flow for r₊ < r < r_isco. Build it
// with NewGas; it is a small value, safe to copy and to share between
// goroutines. The zero Gas describes no disk: its Redshift always reports
// ok = false.
type Gas struct {
	a     float64 // signed spin
	a2    float64 // a²
	rh    float64 // outer horizon r₊
	risco float64 // innermost stable circular orbit
	e, l  float64 // specific energy -u_t and angular momentum u_φ at r_isco
	urc   float64 // sqrt(2 / (3 r_isco)), the plunge-speed coefficient
}

// NewGas returns the disk flow for signed spin a (a > 0 prograde disk,
// a < 0 retrograde). It precomputes r₊, r_isco and the ISCO's E and L
// (Bardeen, Press & Teukolsky 1972, ApJ 178, 347). Domain: -1 < a < 1;
// it returns an error otherwise.
func NewGas(a float64) (Gas, error) {
	if err := raytrace.ValidSpin(a); err != nil {
		return Gas{}, err
	}
	risco := raytrace.ISCO(a)
	o, _ := raytrace.CircularOrbit(a, risco) // r_isco lies above the photon orbit
	return Gas{
		a:     a,
		a2:    a * a,
		rh:    raytrace.Horizon(a),
		risco: risco,
		e:     o.E,
		l:     o.L,
		urc:   math.Sqrt(2 / (3 * risco)),
	}, nil
}

// Spin returns the signed spin a the flow was built for.
func (g Gas) Spin() float64 { return g.a }

// Redshift returns g = E_obs/E_emit for a photon with λ = L/E and η = Q/E²
// emitted by the disk gas at Boyer–Lindquist radius r in the equatorial
// plane; outbound reports whether the photon left the gas with p_r > 0.
//
// For r ≥ r_isco the gas is on a Keplerian circular orbit (Cunningham 1975,
// ApJ 202, 788):
//
//	g = 1 / (u^t (1 − Ω λ)),  Ω = 1/(r^{3/2} + a).
//
// For r₊ < r < r_isco it plunges on the geodesic with the ISCO's E and L,
// whose radial velocity is u^r = −sqrt(2/(3 r_isco)) (r_isco/r − 1)^{3/2}
// (Mummery & Balbus 2019, PRL 123, 171104), with u^t and u^φ from u_t = −E,
// u_φ = L and the inverse Kerr metric at θ = π/2 (Cunningham 1975):
//
//	g = 1 / (u^t − λ u^φ − p_r u^r),  p_r = ±sqrt(R(r))/Δ,
//	R(r) = (r² + a² − aλ)² − Δ [η + (λ − a)²],  Δ = r² − 2r + a²,
//
// with + for an outbound photon. The photon must be able to be at r:
// R(r) < 0 beyond rounding (relative 1e-8) gives ok = false, smaller
// negative values are taken as 0.
//
// Domain: r₊ < r < ∞ and finite λ, η. Outside it, and whenever the result
// is not a finite positive number (a non-positive one means the photon,
// normalised to E = 1, is not future-directed at r, as happens for large λ
// in the ergoregion), Redshift returns (0, false). It does not
// allocate.
func (g Gas) Redshift(r, lambda, eta float64, outbound bool) (float64, bool) {
	if !(r > g.rh) || math.IsInf(r, 0) || math.IsNaN(lambda) || math.IsInf(lambda, 0) ||
		math.IsNaN(eta) || math.IsInf(eta, 0) || g.risco == 0 {
		return 0, false
	}
	r2 := r * r
	delta := r2 - 2*r + g.a2
	k := r2 + g.a2 - g.a*lambda
	lma := lambda - g.a
	p := k * k
	q := delta * (eta + lma*lma)
	rr := p - q
	if rr < 0 {
		if rr < -rTolerance*(p+math.Abs(q)) {
			return 0, false
		}
		rr = 0
	}

	var z float64
	if r >= g.risco {
		o, ok := raytrace.CircularOrbit(g.a, r)
		if !ok {
			return 0, false
		}
		z = 1 / (o.Ut * (1 - o.Omega*lambda))
	} else {
		dut, ur, duphi := g.plunge(r, r2, delta)
		pr := math.Sqrt(rr) // Δ p_r
		if !outbound {
			pr = -pr
		}
		z = delta / (dut - lambda*duphi - pr*ur)
	}
	if !(z > 0) || math.IsInf(z, 0) {
		return 0, false
	}
	return z, true
}

// plunge returns Δ u^t, u^r and Δ u^φ of the plunging gas at radius r
// (r₊ < r < r_isco), given r² and Δ. Scaling by Δ keeps u^t and u^φ finite
// at the horizon.
func (g Gas) plunge(r, r2, delta float64) (dut, ur, duphi float64) {
	s := r2 + g.a2
	dut = ((s*s-g.a2*delta)*g.e - 2*g.a*r*g.l) / r2
	duphi = (2*g.a*r*g.e + (delta-g.a2)*g.l) / r2
	x := g.risco/r - 1
	ur = -g.urc * x * math.Sqrt(x)
	return dut, ur, duphi
}

// velocity returns the contravariant Boyer–Lindquist components
// (u^t, u^r, u^φ) of the gas at radius r > r₊ (u^θ = 0): the flow
// Redshift uses, spelled out for checking.
func (g Gas) velocity(r float64) (ut, ur, uphi float64) {
	if r >= g.risco {
		o, _ := raytrace.CircularOrbit(g.a, r)
		return o.Ut, 0, o.Ut * o.Omega
	}
	r2 := r * r
	delta := r2 - 2*r + g.a2
	dut, ur, duphi := g.plunge(r, r2, delta)
	return dut / delta, ur, duphi / delta
}

// EmissionCosine returns cos δ = g sqrt(η)/r, the cosine of the angle between
// the photon and the disk normal in the rest frame of equatorial gas with
// u^θ = 0, for a photon of Carter constant η = Q/E² received with redshift g
// from radius r (Cunningham 1975, ApJ 202, 788; p_θ = ±sqrt(η) at θ = π/2).
// Domain: g > 0, r > 0, η ≥ 0. The result is clamped to [0, 1]; a negative η
// (rounding at the equator, where Θ(π/2) = η ≥ 0) or any input outside the
// domain or NaN gives 0.
func EmissionCosine(g, r, eta float64) float64 {
	if !(g > 0) || !(r > 0) || !(eta > 0) {
		return 0
	}
	c := g * math.Sqrt(eta) / r
	if c > 1 {
		return 1
	}
	if !(c >= 0) { // NaN from infinite inputs
		return 0
	}
	return c
}
