package raytrace

import (
	"math"
)

// transportHorizonMargin: Transport leaves the polarisation vector out of
// the error control where Δ/r² falls below it. Its components f^t and f^φ
// grow like 1/Δ toward the horizon (Boyer–Lindquist coordinates are
// singular there), and controlling them would shrink the steps without
// end; crossings that close to the horizon get the vector from steps
// sized for the orbit alone (a choice of this check, common practice).
const transportHorizonMargin = 1e-6

// transportState is the geodesic (u, du/dτ, x, dx/dτ) of geodesicODE
// followed by the polarisation vector in scaled Boyer–Lindquist components
// (f^t, f^r, f^θ/u, f^φ/u): the angular components of a vector of unit
// length fall off as 1/r, so the scaled ones stay of order 1 all the way
// from a distant observer.
type transportState [8]float64

// Transported is the outcome of Transport at one equatorial crossing.
type Transported struct {
	Crossing
	K     Vector     // forward wave vector k^μ (E = 1), from the integrated geodesic
	F     Vector     // the transported polarisation f^μ
	Kappa complex128 // Walker–Penrose constant of (K, F) at the crossing
	Up    bool       // the photon moves toward +z (from the integrated dx/dτ)
}

// transportODE is geodesicODE with the parallel-transport equation
// df^μ/dτ = −Γ^μ_αβ (dx^α/dτ) f^β, which holds in any parameter along the
// curve (here the backward Mino time). Γ is formed from the analytic first
// derivatives of the Kerr metric in Boyer–Lindquist coordinates,
// Γ^μ_αβ = ½ g^μν (∂_α g_νβ + ∂_β g_να − ∂_ν g_αβ) (any textbook, e.g.
// Misner, Thorne & Wheeler 1973, eq. 8.24), independently of the
// Walker–Penrose constant it checks.
type transportODE struct {
	geo       geodesicODE
	a, lambda float64
}

// velocity returns dx^μ/dτ in the backward Mino time at (u, x) for the
// state's du/dτ and dx/dτ: dr/dτ = −u'/u², dθ/dτ = −x'/sin θ, and
// dt/dτ, dφ/dτ the negated forward rates (Carter 1968; Bardeen 1973)
//
//	dt/dτ = (r² + a²)(r² + a² − aλ)/Δ + a(λ − a sin²θ)
//	dφ/dτ = a(r² + a² − aλ)/Δ + λ/sin²θ − a.
func (g transportODE) velocity(y transportState) Vector {
	u, x := y[0], y[2]
	a, l := g.a, g.lambda
	r := 1 / u
	s2 := (1 - x) * (1 + x)
	delta := r*r - 2*r + a*a
	w := r*r + a*a - a*l
	return Vector{
		-((r*r+a*a)*w/delta + a*(l-a*s2)),
		-y[1] / (u * u),
		-y[3] / math.Sqrt(s2),
		-(a*w/delta + l/s2 - a),
	}
}

// metricDerivs returns the Boyer–Lindquist metric g_μν of spin a at (r, θ)
// (x = cos θ), its inverse and its r and θ derivatives:
//
//	g_tt = −(1 − 2r/Σ), g_tφ = −2ar sin²θ/Σ,
//	g_φφ = (r² + a² + 2a²r sin²θ/Σ) sin²θ, g_rr = Σ/Δ, g_θθ = Σ
//
// (Boyer & Lindquist 1967; Bardeen, Press & Teukolsky 1972, eq. 2.1).
func metricDerivs(a, r, x float64) (inv, dr, dth [4][4]float64) {
	s2 := (1 - x) * (1 + x)
	s := math.Sqrt(s2)
	a2 := a * a
	sig := r*r + a2*x*x
	delta := r*r - 2*r + a2
	sr, sth := 2*r, -2*a2*s*x // ∂Σ/∂r, ∂Σ/∂θ
	gtt := -(1 - 2*r/sig)
	gtp := -2 * a * r * s2 / sig
	gpp := (r*r + a2 + 2*a2*r*s2/sig) * s2
	det := -delta * s2 // g_tt g_φφ − g_tφ²
	inv[0][0], inv[0][3], inv[3][0], inv[3][3] = gpp/det, -gtp/det, -gtp/det, gtt/det
	inv[1][1], inv[2][2] = delta/sig, 1/sig
	sig2 := sig * sig
	// r derivatives
	dr[0][0] = 2/sig - 2*r*sr/sig2
	dr[0][3] = -2*a*s2/sig + 2*a*r*s2*sr/sig2
	dr[3][0] = dr[0][3]
	dr[3][3] = 2*r*s2 + 2*a2*s2*s2/sig - 2*a2*r*s2*s2*sr/sig2
	dr[1][1] = sr/delta - sig*(2*r-2)/(delta*delta)
	dr[2][2] = sr
	// θ derivatives (d sin²θ/dθ = 2 sin θ cos θ)
	ds2 := 2 * s * x
	dth[0][0] = -2 * r * sth / sig2
	dth[0][3] = -2*a*r*ds2/sig + 2*a*r*s2*sth/sig2
	dth[3][0] = dth[0][3]
	dth[3][3] = (r*r+a2)*ds2 + 2*a2*r*2*s2*ds2/sig - 2*a2*r*s2*s2*sth/sig2
	dth[1][1] = sth / delta
	dth[2][2] = sth
	return inv, dr, dth
}

// christoffel returns Γ^μ_αβ v^α f^β at (r, x = cos θ).
func christoffel(a, r, x float64, v, f Vector) Vector {
	inv, dr, dth := metricDerivs(a, r, x)
	var t Vector // lowered: 2 Γ_ναβ v^α f^β
	for n := 0; n < 4; n++ {
		s := 0.0
		for b := 0; b < 4; b++ {
			s += (v[1]*dr[n][b] + v[2]*dth[n][b]) * f[b]
			s += (f[1]*dr[n][b] + f[2]*dth[n][b]) * v[b]
		}
		t[n] = s
	}
	for al := 0; al < 4; al++ {
		for b := 0; b < 4; b++ {
			t[1] -= v[al] * dr[al][b] * f[b]
			t[2] -= v[al] * dth[al][b] * f[b]
		}
	}
	var out Vector
	for m := 0; m < 4; m++ {
		for n := 0; n < 4; n++ {
			out[m] += inv[m][n] * t[n] / 2
		}
	}
	return out
}

// vector returns f^μ of the state (see transportState).
func (y transportState) vector() Vector {
	return Vector{y[4], y[5], y[6] * y[0], y[7] * y[0]}
}

func (g transportODE) deriv(y transportState) transportState {
	var gy odeState
	copy(gy[:4], y[:4])
	gd := g.geo.deriv(gy)
	u := y[0]
	v := g.velocity(y)
	df := christoffel(g.a, 1/u, y[2], v, y.vector())
	var d transportState
	copy(d[:4], gd[:4])
	d[4], d[5] = -df[0], -df[1]
	// d(f/u)/dτ = (df/dτ)/u − (f/u) u'/u
	d[6] = (-df[2] - y[6]*y[1]) / u
	d[7] = (-df[3] - y[7]*y[1]) / u
	return d
}

// step is one Dormand–Prince 5(4) step (the tableau of Integrate).
func (g transportODE) step(y transportState, h float64) (y5, errv transportState) {
	var k [7]transportState
	k[0] = g.deriv(y)
	for s := 1; s < 7; s++ {
		var ys transportState
		for i := range ys {
			acc := 0.0
			for j := 0; j < s; j++ {
				acc += dpA[s][j] * k[j][i]
			}
			ys[i] = y[i] + h*acc
		}
		k[s] = g.deriv(ys)
	}
	for i := range y5 {
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

// wave returns the forward wave vector k^μ (E = 1) of the state:
// k^μ = −(dx^μ/dτ)/Σ in the backward Mino time (dσ = Σ dτ).
func (g transportODE) wave(y transportState) Vector {
	v := g.velocity(y)
	r := 1 / y[0]
	sig := r*r + g.a*g.a*y[2]*y[2]
	return Vector{-v[0] / sig, -v[1] / sig, -v[2] / sig, -v[3] / sig}
}

// kappa is WalkerPenrose of the state.
func (g transportODE) kappa(y transportState) complex128 {
	th := math.Acos(max(-1, min(1, y[2])))
	if y[2] == 0 {
		th = math.Pi / 2
	}
	return WalkerPenrose(g.a, 1/y[0], th, g.wave(y), y.vector())
}

// Transport is an independent numerical check of the polarisation
// transport (WalkerPenrose, ScreenPolarisation): it follows the photon that
// arrives at (α, β) backward with the geodesic of Integrate and, alongside,
// parallel-transports the polarisation vector whose electric vector on the
// screen makes the angle chi (radians, from +α toward +β) with the α axis,
// by adaptive Dormand–Prince 5(4) integration of df^μ/dτ = −Γ^μ_αβ ẋ^α f^β
// with the Christoffel symbols from the metric's derivatives
// (transportODE). The geodesic starts exactly at infinity as in Integrate;
// the vector is set up one short exact step later, at r_o = 1/uStart (a
// static observer's frame: f ∝ cos χ e_φ̂ − sin χ e_θ̂, plus the multiple of
// ∂_t that makes f·k = 0), which is where the screen formula's O(1/r_o)
// error comes from. It records up to orders crossings of the plane, each
// with the wave vector, the transported vector and their Walker–Penrose
// constant, and returns the constant at the start. Domain: as Integrate,
// with 1e-12 ≤ uStart ≤ 1e-4.
func (o Observer) Transport(alpha, beta, chi, uStart float64, orders int, tol float64) (start complex128, out []Transported, err error) {
	o = o.resolved()
	a := o.spin
	lambda, eta := o.constants(alpha, beta)
	g := transportODE{
		geo: geodesicODE{A: a*a - eta - lambda*lambda, B: 2 * (eta + (lambda-a)*(lambda-a)), C: -a * a * eta, a2: a * a},
		a:   a, lambda: lambda,
	}
	// The exact start at infinity, then one step to u ≈ uStart (the
	// geodesic only: a fifth-order step of size 1e-8 is exact to rounding).
	y0, _ := g.geo.step(odeState{0, 1, o.cos, o.sin * beta}, uStart)
	y := transportState{y0[0], y0[1], y0[2], y0[3]}
	u, x := y[0], y[2]
	r := 1 / u
	sth := math.Sqrt((1 - x) * (1 + x))
	// Static frame at large r: e_θ̂ = ∂_θ/r, e_φ̂ = ∂_φ/(r sin θ) (to
	// O(1/r)). E along α is +e_φ̂, along β is −e_θ̂.
	sc, cc := math.Sincos(chi)
	fth := -sc / r
	fph := cc / (r * sth)
	// f^t from g(k, f) = 0 with the full metric (f^r = 0).
	ft := exactTime(a, r, x, g.wave(y), Vector{0, 0, fth, fph})
	y[4], y[5], y[6], y[7] = ft, 0, fth/u, fph/u
	start = g.kappa(y)

	uh := 1 / o.horizon
	tau, h := 0.0, initialStep*uStart
	for n := 0; n < maxSteps; n++ {
		y5, ev := g.step(y, h)
		errn := 0.0
		nd := len(y)
		if min(g.geo.delta(y[0]), g.geo.delta(y5[0])) < transportHorizonMargin {
			nd = 4 // f^t and f^φ diverge at the horizon: control the orbit only
		}
		for i := 0; i < nd; i++ {
			sc := tol * (1 + max(math.Abs(y[i]), math.Abs(y5[i])))
			errn = max(errn, math.Abs(ev[i])/sc)
		}
		if (errn > 1 || math.IsNaN(errn)) && !(y[1] < 0 && !(y5[0] > uStart)) {
			h *= max(minShrink, stepSafety*math.Pow(errn, stepExponent))
			if math.IsNaN(errn) {
				h /= 10
			}
			continue
		}
		best, kind := h, noEvent
		if y[2] != 0 && y5[2]*y[2] <= 0 {
			if hs := g.locate(y, h, 2, 0); hs < best {
				best, kind = hs, planeCrossing
			}
		}
		if y5[0] >= uh {
			if hs := g.locate(y, h, 0, uh); hs <= best {
				best, kind = hs, horizonReached
			}
		}
		if y[1] < 0 && !(y5[0] > uStart) { // back at r_o: the photon came from infinity
			if hs := g.locate(y, h, 0, uStart); hs <= best {
				best, kind = hs, infinityReached
			}
		}
		if kind != noEvent {
			ys, _ := g.step(y, best)
			switch kind {
			case planeCrossing:
				ys[2] = 0
				out = append(out, Transported{
					Crossing: Crossing{R: 1 / ys[0], Mino: tau + best, Outbound: ys[1] > 0},
					K:        g.wave(ys), F: ys.vector(), Kappa: g.kappa(ys), Up: ys[3] < 0,
				})
				if len(out) == orders {
					return start, out, nil
				}
			default:
				return start, out, nil
			}
			y, tau = ys, tau+best
			h = max(h-best, minRestep)
			continue
		}
		y, tau = y5, tau+h
		fac := maxGrow
		if errn > 0 {
			fac = min(maxGrow, stepSafety*math.Pow(errn, stepExponent))
		}
		// Steps grow with r from the start: cap them in proportion to u
		// far out, as Integrate caps them near the hole.
		h = min(h*fac, min(maxStep, max(y[0], uStart)))
	}
	return start, out, ErrNoConvergence
}

// exactTime returns the f^t that makes g(k, f) = 0 with the other
// components of f given, using the full metric; k_t ≠ 0 outside the
// ergoregion, where it is used (a distant observer).
func exactTime(a, r, x float64, k, f Vector) float64 {
	s2 := (1 - x) * (1 + x)
	sig := r*r + a*a*x*x
	delta := r*r - 2*r + a*a
	gtt := -(1 - 2*r/sig)
	gtp := -2 * a * r * s2 / sig
	gpp := (r*r + a*a + 2*a*a*r*s2/sig) * s2
	// k_t = gtt k^t + gtp k^φ; the rest of g(k, f) without f^t:
	kt := gtt*k[0] + gtp*k[3]
	rest := (gtp*k[0]+gpp*k[3])*f[3] + sig/delta*k[1]*f[1] + sig*k[2]*f[2]
	return -rest / kt
}

// locate finds the step hs in [0, h] at which component i of the solution
// from y equals target (illinois, as geodesicODE.locate).
func (g transportODE) locate(y transportState, h float64, i int, target float64) float64 {
	return illinois(h, y[i]-target, func(m float64) float64 {
		ym, _ := g.step(y, m)
		return ym[i] - target
	})
}
