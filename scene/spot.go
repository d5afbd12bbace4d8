package scene

import (
	"fmt"
	"math"
	"strconv"

	"kerrscope/raytrace"
)

// Spot is a bright patch of gas on a circular equatorial orbit, seen in
// observer time by "kerrscope spot". Its pattern turns rigidly at the
// Keplerian angular velocity of its centre; its gas shines with the
// redshift of the local disk gas.
type Spot struct {
	Radius float64 `toml:"radius"` // orbit radius of the centre, M
	// Size is the Gaussian width σ in M (profile gaussian) or the radial
	// width of the annular patch (profile annulus).
	Size float64 `toml:"size"`
	// Contrast is the spot's peak emissivity in units of the steady
	// disk's at the spot radius (gaussian), or its emissivity in units of
	// the steady disk's at the same radius (annulus).
	Contrast float64 `toml:"contrast"`
	// PhaseDeg is the azimuth of the centre at emission time t = 0,
	// degrees from the observer's azimuth, in the sense of the rotation.
	PhaseDeg float64 `toml:"phase_deg"`
	Profile  string  `toml:"profile"` // gaussian or annulus
	// ArcDeg is the azimuthal extent of the annular patch, degrees; 360
	// covers the whole ring.
	ArcDeg float64 `toml:"arc_deg"`
	// Alone: no steady disk, the spot is the only light and every
	// crossing through it adds light (optically thin).
	Alone   bool    `toml:"alone"`
	Frames  int     `toml:"frames"`  // frames of the movie
	Periods float64 `toml:"periods"` // observer time covered, in orbital periods
}

// SpotProfile is the shape of a spot's emissivity.
type SpotProfile int

const (
	_ SpotProfile = iota
	// SpotGaussian: exp(−d²/2σ²) in the distance d on the disk plane.
	SpotGaussian
	// SpotAnnulus: uniform over |r − r_s| ≤ size/2, |φ − φ_s| ≤ arc/2.
	SpotAnnulus
)

// Limits of a spot movie.
const (
	MaxSpotFrames  = 4096
	MaxSpotPeriods = 1000
)

// SpotEmission is a validated spot: its emissivity ε_s(r, φ, t) on the
// disk plane at Boyer–Lindquist time t.
type SpotEmission struct {
	Profile  SpotProfile
	Radius   float64 // r_s, M
	Size     float64 // σ (gaussian) or radial width (annulus), M
	Peak     float64 // gaussian: contrast × ε_disk(r_s)
	Contrast float64
	Phase    float64 // φ_s at t = 0, radians
	HalfArc  float64 // annulus: half the azimuthal extent, radians
	Omega    float64 // Keplerian angular velocity of the centre, 1/M
	Disk     Emissivity
	Alone    bool
	// Inner, Outer bound the radii where the spot shines (M): where its
	// profile exceeds about 1e-8 of its peak (gaussian, 6σ) or its edges
	// (annulus), cut to the emitting disk's inner edge.
	Inner, Outer float64
}

// Period is the orbital period of the spot's centre in M,
// 2π(r^{3/2} + a) (Bardeen, Press & Teukolsky 1972, eq. 2.16).
func (s SpotEmission) Period() float64 { return 2 * math.Pi / s.Omega }

// Azimuth returns φ_s(t) = φ_0 + Ω t, radians, not reduced modulo 2π.
func (s SpotEmission) Azimuth(t float64) float64 { return s.Phase + s.Omega*t }

// At returns the spot's emissivity at radius r and azimuth offset
// dphi = φ − φ_s(t) from its centre. Gaussian profile:
//
//	ε_s = contrast ε_disk(r_s) exp(−d²/2σ²),  d² = r² + r_s² − 2 r r_s cos(dphi),
//
// cut to 0 beyond d = 6σ (below 2e-16 of the peak), d being the distance
// on the equatorial plane in Boyer–Lindquist r, φ
// taken as flat polar coordinates (common practice for hot-spot models).
// Annulus: contrast ε_disk(r) where |r − r_s| ≤ size/2 and
// |dphi mod 2π| ≤ arc/2, else 0. Domain: r > 0, finite dphi.
func (s SpotEmission) At(r, dphi float64) float64 {
	if r < s.Inner || r > s.Outer {
		return 0
	}
	switch s.Profile {
	case SpotGaussian:
		x := (r*r + s.Radius*s.Radius - 2*r*s.Radius*math.Cos(dphi)) / (2 * s.Size * s.Size)
		if x > 36 {
			return 0 // beyond 6σ: below e^-36 = 2e-16 of the peak
		}
		return s.Peak * math.Exp(-x)
	case SpotAnnulus:
		if math.Abs(math.Remainder(dphi, 2*math.Pi)) <= s.HalfArc {
			return s.Contrast * s.Disk.At(r)
		}
	}
	return 0
}

// DefaultSpot is the built-in spot: a Gaussian of σ = 0.6 M at 6 M, ten
// times the disk's emissivity there, one period in 64 frames.
func DefaultSpot() Spot {
	return Spot{Radius: 6, Size: 0.6, Contrast: 10, Profile: "gaussian", ArcDeg: 30, Frames: 64, Periods: 1}
}

// ResolveSpot validates the scene's spot against its resolved disk and
// returns it. A refused value is a *FieldError naming the spot key.
func ResolveSpot(r Resolved) (SpotEmission, error) {
	sp := r.Spot
	var s SpotEmission
	if r.RestLines.List {
		return s, &FieldError{Key: "lines", Value: fmt.Sprintf("%d lines", len(r.RestLines.Lines)), Allowed: "a spot shines in the one line emission.line_kev; remove the [[lines]] list"}
	}
	switch sp.Profile {
	case "gaussian":
		s.Profile = SpotGaussian
	case "annulus":
		s.Profile = SpotAnnulus
	default:
		return s, fieldErr("spot.profile", strconv.Quote(sp.Profile), "must be gaussian or annulus")
	}
	if !(sp.Radius >= r.ISCO && sp.Radius <= MaxLength) {
		return s, fieldErr("spot.radius", sp.Radius, "must be a circular orbit from the ISCO, %.6g M, to %g M", r.ISCO, MaxLength)
	}
	if !sp.Alone && !(sp.Radius >= r.Inner && sp.Radius <= r.Disk.OuterRadius) {
		return s, fieldErr("spot.radius", sp.Radius, "must lie on the disk, from %.6g to %.6g M (or set spot.alone)", r.Inner, r.Disk.OuterRadius)
	}
	if !(sp.Size > 0 && sp.Size <= sp.Radius) {
		return s, fieldErr("spot.size", sp.Size, "must be positive and at most spot.radius = %v M", sp.Radius)
	}
	if !(sp.Contrast > 0 && sp.Contrast <= 1e6) {
		return s, fieldErr("spot.contrast", sp.Contrast, "must be from above 0 to 1e6 (emissivity in units of the disk's at the spot)")
	}
	if !(math.Abs(sp.PhaseDeg) <= 360) {
		return s, fieldErr("spot.phase_deg", sp.PhaseDeg, "must be within ±360 degrees")
	}
	if !(sp.ArcDeg > 0 && sp.ArcDeg <= 360) {
		return s, fieldErr("spot.arc_deg", sp.ArcDeg, "must be from above 0 to 360 degrees")
	}
	if sp.Frames < 1 || sp.Frames > MaxSpotFrames {
		return s, fieldErr("spot.frames", sp.Frames, "must be between 1 and %d", MaxSpotFrames)
	}
	if !(sp.Periods > 0 && sp.Periods <= MaxSpotPeriods) {
		return s, fieldErr("spot.periods", sp.Periods, "must be from above 0 to %d orbital periods", MaxSpotPeriods)
	}
	o, ok := raytrace.CircularOrbit(r.Hole.Spin, sp.Radius)
	if !ok {
		return s, fieldErr("spot.radius", sp.Radius, "has no circular orbit at spin %v", r.Hole.Spin)
	}
	s.Radius, s.Size, s.Contrast, s.Alone = sp.Radius, sp.Size, sp.Contrast, sp.Alone
	s.Phase = sp.PhaseDeg * math.Pi / 180
	s.HalfArc = sp.ArcDeg * math.Pi / 360
	s.Omega = o.Omega
	s.Disk = r.Emissivity
	s.Peak = sp.Contrast * r.Emissivity.At(sp.Radius)
	if s.Profile == SpotGaussian {
		if !(s.Peak > 0) {
			return s, fieldErr("spot.radius", sp.Radius, "the disk's emissivity (%s) is 0 there, so the spot's peak would be 0; move it outward", r.Emission.Emissivity)
		}
		s.Inner, s.Outer = sp.Radius-6*sp.Size, sp.Radius+6*sp.Size
	} else {
		s.Inner, s.Outer = sp.Radius-sp.Size/2, sp.Radius+sp.Size/2
		if !sp.Alone && (s.Inner < r.Inner || s.Outer > r.Disk.OuterRadius) {
			return s, fieldErr("spot.size", sp.Size, "the annulus %.6g–%.6g M must lie on the disk, %.6g–%.6g M (or set spot.alone)", s.Inner, s.Outer, r.Inner, r.Disk.OuterRadius)
		}
	}
	s.Inner = math.Max(s.Inner, r.Inner)
	if !sp.Alone {
		s.Outer = math.Min(s.Outer, r.Disk.OuterRadius)
	}
	return s, nil
}
