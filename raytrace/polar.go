package raytrace

import (
	"math"
)

// Vector is a 4-vector by its contravariant Boyer–Lindquist components
// (t, r, θ, φ), in units of M.
type Vector [4]float64

// Dot returns the Kerr scalar product g_μν v^μ w^ν at (r, θ) = (r, π/2),
// the equatorial plane, for spin a (Boyer–Lindquist metric, e.g. Bardeen,
// Press & Teukolsky 1972, eq. 2.1, with Σ = r², sin θ = 1):
//
//	g_tt = −(1 − 2/r), g_tφ = −2a/r, g_φφ = r² + a² + 2a²/r,
//	g_rr = r²/Δ, g_θθ = r².
//
// Domain: r > r₊ (Δ > 0).
func Dot(a, r float64, v, w Vector) float64 {
	delta := r*r - 2*r + a*a
	gtt := -(1 - 2/r)
	gtp := -2 * a / r
	gpp := r*r + a*a + 2*a*a/r
	return gtt*v[0]*w[0] + gtp*(v[0]*w[3]+v[3]*w[0]) + gpp*v[3]*w[3] +
		r*r/delta*v[1]*w[1] + r*r*v[2]*w[2]
}

// EquatorialMomentum returns the forward-in-time wave vector k^μ = dx^μ/dσ
// (normalised to energy E = −k_t = 1) of the photon with λ = L/E and
// η = Q/E² at the equatorial radius r, from the first integrals of the
// geodesic at θ = π/2, Σ = r² (Carter 1968; Bardeen 1973):
//
//	r² k^t = (r² + a²)(r² + a² − aλ)/Δ + a(λ − a)
//	r² k^r = ±sqrt(R(r)),  R = (r² + a² − aλ)² − Δ[η + (λ − a)²]
//	r² k^θ = ∓sqrt(η)
//	r² k^φ = a(r² + a² − aλ)/Δ + λ − a
//
// with k^r > 0 when outbound (the photon left r moving outward) and k^θ < 0
// when up (moving toward +z, the spin axis's northern end: θ decreasing);
// Crossing.Outbound and Crossing.Up give both. A slightly negative R or η
// (rounding on a turning point) is taken as 0. Domain: r > r₊.
func EquatorialMomentum(a, lambda, eta, r float64, outbound, up bool) Vector {
	r2 := r * r
	delta := r2 - 2*r + a*a
	w := r2 + a*a - a*lambda
	lma := lambda - a
	rr := max(0, w*w-delta*(eta+lma*lma))
	kr := math.Sqrt(rr) / r2
	if !outbound {
		kr = -kr
	}
	kth := math.Sqrt(max(0, eta)) / r2
	if up {
		kth = -kth
	}
	return Vector{
		((r2+a*a)*w/delta + a*lma) / r2,
		kr,
		kth,
		(a*w/delta + lma) / r2,
	}
}

// WalkerPenrose returns the Walker–Penrose constant κ = κ1 + iκ2 of a photon
// with wave vector k and polarisation f (f·k = 0, f spacelike) at the
// Boyer–Lindquist point (r, θ) of a Kerr hole of spin a:
//
//	κ = (A − iB)(r − ia cos θ)
//	A = (k^t f^r − k^r f^t) + a sin²θ (k^r f^φ − k^φ f^r)
//	B = [(r² + a²)(k^φ f^θ − k^θ f^φ) − a(k^t f^θ − k^θ f^t)] sin θ
//
// (Walker & Penrose 1970, Commun. Math. Phys. 18, 265; in this form as in
// Himwich et al. 2020, Phys. Rev. D 101, 084020). κ is constant along the ray under parallel transport of
// f, unchanged by f → f + c k, and linear in k and f. Domain: any point
// outside the horizon.
func WalkerPenrose(a, r, theta float64, k, f Vector) complex128 {
	s, c := math.Sincos(theta)
	if theta == math.Pi/2 {
		s, c = 1, 0
	}
	A := (k[0]*f[1] - k[1]*f[0]) + a*s*s*(k[1]*f[3]-k[3]*f[1])
	B := ((r*r+a*a)*(k[3]*f[2]-k[2]*f[3]) - a*(k[0]*f[2]-k[2]*f[0])) * s
	return complex(A, -B) * complex(r, -a*c)
}

// ScreenPolarisation returns the unit electric vector (Eα, Eβ) on the
// screen of the photon arriving at (α, β) with Walker–Penrose constant κ:
//
//	ν = −(α + a sin θo)
//	Eα = (β κ2 − ν κ1) / sqrt((κ1² + κ2²)(β² + ν²))
//	Eβ = (β κ1 + ν κ2) / sqrt((κ1² + κ2²)(β² + ν²))
//
// (Himwich et al. 2020, Phys. Rev. D 101, 084020), exact for an observer
// at infinity, with α along +e_φ and β along −e_θ as in Constants.
// The sign of (Eα, Eβ) carries no meaning (κ → −κ flips it): the
// polarisation is a direction, defined modulo π. ok is false where the
// angle is undefined: κ = 0 (no polarisation) or β = ν = 0 (the one
// screen point α = −a sin θo, β = 0, whose photon has λ = a sin²θo and,
// for an observer off the axis, η < 0: it never meets the disk).
func (o Observer) ScreenPolarisation(alpha, beta float64, kappa complex128) (ea, eb float64, ok bool) {
	o = o.resolved()
	k1, k2 := real(kappa), imag(kappa)
	nu := -(alpha + o.spin*o.sin)
	ea = beta*k2 - nu*k1
	eb = beta*k1 + nu*k2
	n := math.Hypot(ea, eb)
	if !(n > 0) || math.IsInf(n, 0) {
		return 0, 0, false
	}
	return ea / n, eb / n, true
}

// Up reports whether the photon of the n-th crossing (order n, counted
// backward from the observer as in Trace) moves toward +z, the spin axis's
// northern end, as it crosses the plane. Traced backward, the photon
// leaves the observer's hemisphere first, so the last crossing (n = 0)
// heads into the observer's hemisphere and each earlier one alternates:
// up = (cos θo > 0) for even n, the opposite for odd n. An observer in the
// plane (cos θo = 0) counts as above it when β > 0, since the backward ray
// then first moves toward the pole θ = 0 (Bardeen 1973: k_θ = ±sqrt(Θ)).
func (o Observer) Up(beta float64, n int) bool {
	o = o.resolved()
	above := o.cos > 0 || (o.cos == 0 && beta > 0)
	return above == (n%2 == 0)
}
