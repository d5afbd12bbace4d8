// Package raytrace traces photons through the Kerr spacetime in closed form.
//
// It knows about the black hole (spin a, mass M = 1) and about photons
// arriving at a distant observer; it knows nothing of disks, pixels or files.
//
// Units are geometric, G = c = M = 1: lengths are in M and Mino times
// (dimension 1/length) in 1/M. The spin a is signed, -1 < a < 1. Screen
// coordinates (α, β) follow Bardeen (1973): α to the right, β up along the
// projected spin axis.
//
// # Usage
//
// Build an observer with NewObserver (the only way to configure one; the
// zero value is a = 0 seen face-on), then trace the photon of a screen
// point backward from the observer. Reuse one Path per goroutine:
//
//	o, err := raytrace.NewObserver(0.9, 60) // spin a, inclination θo in degrees
//	if err != nil {
//		return err
//	}
//	var p raytrace.Path
//	o.Trace(3, 4, 2, &p) // (α, β) = (3, 4) M, up to 2 equatorial crossings
//	for n, c := range p.Crossings {
//		fmt.Println(n, c.R, c.Mino, c.Outbound) // radius, Mino time, direction
//	}
//	fmt.Println(p.Fate) // where the photon came from: horizon or infinity
//
// TraceTimed also gives each crossing's Boyer–Lindquist time delay and
// azimuth (Timing), in closed form; IntegrateTimed checks them.
//
// The crossing radii, with CircularOrbit, give the redshift of orbiting gas;
// CriticalCurve gives the edge of the black hole's shadow. The runnable
// examples in example_test.go show each in a few lines; they run with
// go test and are rendered by go doc -http:
//
//   - ExampleNewObserver: configuring an observer; the zero value.
//   - ExampleObserver_Trace: one photon's crossings and fate.
//   - ExampleObserver_Integrate: the same photon by numerical integration.
//   - ExampleCircularOrbit_redshift: g of a Keplerian disk on a 3×3 grid.
//   - ExampleObserver_CriticalCurve: the shadow's edge and its extent.
//
// Analyses built on it that need no pixels, a report of one photon and the
// widths of the lensing bands, are in package kerrscope/raytrace/survey.
//
// # Method
//
// A photon arriving at (α, β) has the constants of motion
// λ = L/E = -α sin θo and η = Q/E² = β² + (α² - a²) cos²θo (Bardeen
// 1973). In Mino time τ (dτ = dσ/Σ, σ the affine parameter scaled to
// E = 1, Σ = r² + a² cos²θ; Mino 2003, PRD 67, 084027) its motion
// separates (Carter 1968) into
//
//	(dr/dτ)² = R(r) = (r² + a² - aλ)² - Δ (η + (λ - a)²) = r⁴ + A r² + B r + C
//	(dx/dτ)² = η + A x² - a² x⁴,  x = cos θ
//
// with Δ = r² - 2r + a², A = a² - η - λ², B = 2[η + (λ - a)²] and
// C = -a²η. At the equator x = 0 the angular potential equals η, so a
// photon with η ≤ 0 never crosses the equatorial plane. Otherwise x
// oscillates between ±sqrt(u₊), where u₊ > 0 > u₋ are the roots of
// η + A u - a² u² in u = x²; the Mino time from the plane to a turning
// point is G_θ = K(u₊/u₋)/sqrt(-a² u₋) and from the observer's θo to
// the plane G_o = F(arcsin(cos θo/sqrt(u₊)) | u₊/u₋)/sqrt(-a² u₋),
// Legendre integrals of the first kind. Crossing n (n = 0 the last before
// the observer) happens at τ_n = (2n+1)G_θ + s(G_θ - G_o), with
// s = sign(β) sign(cos θo) (Gralla & Lupsasca 2020, PRD 101, 044032,
// eqs. 80–82).
//
// The radial motion follows from the roots of R(r), found by Ferrari's
// method (roots.go): four real roots r1 < r2 < r3 < r4 (case I) or two
// real roots and a complex pair (case II). A photon from infinity either
// turns at r4 > r₊ and escapes back to infinity, or falls to the horizon;
// r(τ) is a Jacobi sn (case I) or cn (case II) function of τ (Gralla &
// Lupsasca 2020, sec. IV), evaluated in forms that stay exact far from the
// hole. The crossing radii are r(τ_n). An independent Dormand–Prince 5(4)
// integrator (Integrate) of the same equations in u = 1/r exists to check
// Trace.
package raytrace
