package raytrace_test

import (
	"fmt"
	"math"

	"kerrscope/raytrace"
)

// Configure an observer: NewObserver validates the spin and the
// inclination and derives the horizon and the viewing angle once.
func ExampleNewObserver() {
	if _, err := raytrace.NewObserver(1.2, 60); err != nil {
		fmt.Println("error:", err)
	}
	o, err := raytrace.NewObserver(0.6, 90)
	if err != nil {
		fmt.Println("error:", err)
		return
	}
	// r₊ = 1 + sqrt(1 - a²) = 1.8 at a = 0.6 (Bardeen, Press & Teukolsky 1972).
	fmt.Printf("a = %g, θo = %g°: r₊ = %.6f, cos θo = %g, sin θo = %g\n",
		o.Spin(), o.InclinationDeg(), o.Horizon(), o.CosInclination(), o.SinInclination())
	// The zero value is a Schwarzschild hole seen face-on.
	var zero raytrace.Observer
	fmt.Printf("zero value: a = %g, θo = %g°, r₊ = %g\n", zero.Spin(), zero.InclinationDeg(), zero.Horizon())
	// Output:
	// error: spin 1.2 outside the open interval (-1, 1)
	// a = 0.6, θo = 90°: r₊ = 1.800000, cos θo = 0, sin θo = 1
	// zero value: a = 0, θo = 0°, r₊ = 2
}

// Trace one photon backward from the screen and list where it crossed the
// equatorial plane. This one passes close to the shadow's edge and crosses
// three times before coming in from infinity. Crossing 0 is the last one
// before the photon reaches the observer (the direct image of the disk),
// crossing 1 the one before it, and so on.
func ExampleObserver_Trace() {
	o, err := raytrace.NewObserver(0.9, 80) // spin a, inclination θo in degrees
	if err != nil {
		fmt.Println(err)
		return
	}
	var p raytrace.Path
	o.Trace(6.8, 0.5, 5, &p) // (α, β) in M; list up to 5 crossings
	fmt.Printf("λ = %.6f, η = %.6f, root case %v\n", p.Lambda, p.Eta, p.Roots)
	for n, c := range p.Crossings {
		dir := "inward"
		if c.Outbound {
			dir = "outward"
		}
		fmt.Printf("crossing %d: r = %.6f M, Mino time %.6f /M, left the plane %s\n", n, c.R, c.Mino, dir)
	}
	fmt.Printf("it came from %v (total Mino time %.6f /M)\n", p.Fate, p.Mino)
	// Output:
	// λ = -6.696693, η = 1.619882, root case I (four real roots)
	// crossing 0: r = 4.936627 M, Mino time 0.291103 /M, left the plane outward
	// crossing 1: r = 4.172530 M, Mino time 0.755830 /M, left the plane inward
	// crossing 2: r = 41.102960 M, Mino time 1.220557 /M, left the plane inward
	// it came from infinity (total Mino time 1.244992 /M)
}

// Check a closed-form trace against the independent Dormand–Prince
// integrator of the same geodesic equations (much slower; for tests and
// spot checks). The photon is the one of the Trace example.
func ExampleObserver_Integrate() {
	o, err := raytrace.NewObserver(0.9, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	var closed, numeric raytrace.Path
	o.Trace(6.8, 0.5, 5, &closed)
	if err := o.Integrate(6.8, 0.5, 5, 1e-12, &numeric); err != nil {
		fmt.Println(err)
		return
	}
	for n := range min(len(closed.Crossings), len(numeric.Crossings)) {
		fmt.Printf("crossing %d: r = %.6f M (closed form), %.6f M (integrated)\n",
			n, closed.Crossings[n].R, numeric.Crossings[n].R)
	}
	fmt.Println("fates:", closed.Fate, numeric.Fate)
	// Output:
	// crossing 0: r = 4.936627 M (closed form), 4.936627 M (integrated)
	// crossing 1: r = 4.172530 M (closed form), 4.172530 M (integrated)
	// crossing 2: r = 41.102960 M (closed form), 41.102960 M (integrated)
	// fates: infinity infinity
}

// The redshift factor g = ν_observed/ν_emitted of a thin Keplerian disk on
// a 3×3 grid of screen points, from raytrace's exports alone. Gas on a
// circular orbit has four-velocity u = u^t (∂t + Ω ∂φ); a photon with
// p_t = -1 and p_φ = λ then has g = 1 / (u^t (1 - Ω λ)) (Cunningham 1975,
// ApJ 202, 788), with u^t and Ω of the circular orbit (Bardeen, Press &
// Teukolsky 1972). Only the direct image (crossing 0) is used, and only
// where it lands on the disk, between the ISCO and 20 M.
func ExampleCircularOrbit_redshift() {
	const a, inclination, outer = 0.9, 60.0, 20.0
	o, err := raytrace.NewObserver(a, inclination)
	if err != nil {
		fmt.Println(err)
		return
	}
	isco := raytrace.ISCO(a)
	fmt.Printf("ISCO %.6f M\n", isco)
	var p raytrace.Path
	for _, beta := range []float64{8, 0, -8} {
		for _, alpha := range []float64{-8, 0, 8} {
			o.Trace(alpha, beta, 1, &p)
			cell := "    off disk"
			if len(p.Crossings) > 0 {
				r := p.Crossings[0].R
				if orb, ok := raytrace.CircularOrbit(a, r); ok && r >= isco && r <= outer {
					g := 1 / (orb.Ut * (1 - orb.Omega*p.Lambda))
					cell = fmt.Sprintf("g = %.6f", g)
				}
			} else if p.Fate == raytrace.Captured {
				cell = "from horizon"
			}
			fmt.Printf("  %s", cell)
		}
		fmt.Println()
	}
	// Output:
	// ISCO 2.320883 M
	//   g = 1.038927  g = 0.795159  g = 0.734068
	//   g = 1.198127  from horizon  g = 0.564887
	//   g = 1.005765  g = 0.903545  g = 0.836821
}

// The edge of the black hole's shadow: the critical curve of Bardeen (1973),
// the screen image of the spherical photon orbits. For a = 0 it is the
// circle of radius √27 M = 5.196152 M at any inclination (Synge 1966). Seen
// edge-on (θo = 90°) its extremes in α are α = -λ of the two circular
// equatorial photon orbits: for a = 0.99 the prograde one at r = 1.167642 M
// and the retrograde one at r = 3.991103 M (Bardeen, Press & Teukolsky 1972,
// eq. 2.18), so spin flattens the shadow's left side and shifts it right.
func ExampleObserver_CriticalCurve() {
	for _, a := range []float64{0, 0.99} {
		o, err := raytrace.NewObserver(a, 90)
		if err != nil {
			fmt.Println(err)
			return
		}
		amin, amax := math.Inf(1), math.Inf(-1)
		for _, q := range o.CriticalCurve(200) { // a closed polyline of screen points
			amin, amax = math.Min(amin, q.Alpha), math.Max(amax, q.Alpha)
		}
		fmt.Printf("a = %g, θo = 90°: shadow from α = %.6f to %.6f M\n", a, amin, amax)
	}
	o, err := raytrace.NewObserver(0, 60)
	if err != nil {
		fmt.Println(err)
		return
	}
	curve := o.CriticalCurve(100)
	for i := len(curve) / 8; i < len(curve); i += len(curve) / 4 {
		q := curve[i]
		fmt.Printf("a = 0, θo = 60°: (α, β) = (%.6f, %.6f) M, radius %.6f M\n", q.Alpha, q.Beta, math.Hypot(q.Alpha, q.Beta))
	}
	// Output:
	// a = 0, θo = 90°: shadow from α = -5.196152 to 5.196152 M
	// a = 0.99, θo = 90°: shadow from α = -2.251724 to 6.983323 M
	// a = 0, θo = 60°: (α, β) = (-5.190308, 0.246371) M, radius 5.196152 M
	// a = 0, θo = 60°: (α, β) = (2.158560, 4.726586) M, radius 5.196152 M
	// a = 0, θo = 60°: (α, β) = (2.007508, -4.792693) M, radius 5.196152 M
	// a = 0, θo = 60°: (α, β) = (-5.192866, -0.184775) M, radius 5.196152 M
}
