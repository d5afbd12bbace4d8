package raytrace

import (
	"fmt"
	"math"
)

// ValidSpin reports an error unless -1 < a < 1 and a is finite.
func ValidSpin(a float64) error {
	if math.IsNaN(a) || !(a > -1 && a < 1) {
		return fmt.Errorf("spin %v outside the open interval (-1, 1)", a)
	}
	return nil
}

// Horizon returns the outer event-horizon radius r₊ = 1 + sqrt(1 - a²)
// of a Kerr black hole (Boyer–Lindquist; e.g. Bardeen, Press & Teukolsky 1972).
// Domain: -1 < a < 1 (|a| = 1 gives 1).
func Horizon(a float64) float64 {
	return 1 + math.Sqrt((1-a)*(1+a))
}

// ISCO returns the radius of the innermost stable circular equatorial orbit
// for signed spin a: a > 0 prograde, a < 0 retrograde
// (Bardeen, Press & Teukolsky 1972, ApJ 178, 347, eq. 2.21). Domain: -1 < a < 1.
func ISCO(a float64) float64 {
	z1 := 1 + math.Cbrt((1-a)*(1+a))*(math.Cbrt(1+a)+math.Cbrt(1-a))
	z2 := math.Sqrt(3*a*a + z1*z1)
	s := 1.0
	if a < 0 {
		s = -1
	}
	return 3 + z2 - s*math.Sqrt((3-z1)*(3+z1+2*z2))
}

// PhotonOrbits returns the radii of the prograde (co-rotating) and
// retrograde circular equatorial photon orbits,
// r = 2{1 + cos[(2/3) arccos(∓|a|)]} (Bardeen, Press & Teukolsky 1972, eq. 2.18).
// For a < 0 the disk's prograde direction is the hole's retrograde one; this
// function speaks of the hole's rotation: pro ≤ retro always. Domain: -1 < a < 1.
func PhotonOrbits(a float64) (pro, retro float64) {
	b := math.Abs(a)
	pro = 2 * (1 + math.Cos(2.0/3.0*math.Acos(-b)))
	retro = 2 * (1 + math.Cos(2.0/3.0*math.Acos(b)))
	return pro, retro
}

// Orbit holds the constants of a circular equatorial geodesic that orbits
// in the +φ direction (prograde for a > 0, retrograde for a < 0).
type Orbit struct {
	E     float64 // specific energy -u_t
	L     float64 // specific angular momentum u_φ
	Omega float64 // angular velocity dφ/dt
	Ut    float64 // u^t
}

// CircularOrbit returns the circular-orbit constants at radius r for signed
// spin a (Bardeen, Press & Teukolsky 1972, eqs. 2.12–2.13 and 2.16):
//
//	E   = (r^{3/2} - 2 r^{1/2} + a) / (r^{3/4} sqrt(r^{3/2} - 3 r^{1/2} + 2a))
//	L   = (r² - 2a r^{1/2} + a²)     / (r^{3/4} sqrt(r^{3/2} - 3 r^{1/2} + 2a))
//	Ω   = 1 / (r^{3/2} + a)
//	u^t = (r^{3/2} + a) / (r^{3/4} sqrt(r^{3/2} - 3 r^{1/2} + 2a))
//
// Domain: r above the circular photon orbit (the square root is real); it
// returns ok = false otherwise. Stable orbits need r ≥ ISCO(a).
func CircularOrbit(a, r float64) (o Orbit, ok bool) {
	x := math.Sqrt(r)
	x3 := r * x
	d := x3 - 3*x + 2*a
	if !(d > 0) {
		return Orbit{}, false
	}
	den := math.Sqrt(x) * x * math.Sqrt(d) // r^{3/4} sqrt(...)
	o.E = (x3 - 2*x + a) / den
	o.L = (r*r - 2*a*x + a*a) / den
	o.Omega = 1 / (x3 + a)
	o.Ut = (x3 + a) / den
	return o, true
}

// Efficiency returns the radiative efficiency 1 - E(r_isco) of a thin disk
// with zero torque at the ISCO (Bardeen, Press & Teukolsky 1972; Novikov &
// Thorne 1973). Domain: -1 < a < 1.
func Efficiency(a float64) float64 {
	o, _ := CircularOrbit(a, ISCO(a))
	return 1 - o.E
}
