package scene

import (
	"fmt"
	"math"

	"kerrscope/raytrace"
)

// Polarisation is the linear polarisation of the disk's emission:
// synchrotron-like, the electric vector along k × B in the gas's rest
// frame, with a magnetic field whose direction in that frame has the
// components FieldRadial, FieldAzimuthal and FieldVertical (any mixture;
// only the direction counts), as in the ring model of Narayan et al. 2021,
// ApJ 912, 35. Fraction is the emitted polarisation fraction; SinPower p
// makes the emitted intensity ∝ sin^p θ_B, θ_B the angle between the
// photon and the field in the gas's frame (0: no dependence). The Stokes
// outputs are made only for the polarisation map.
type Polarisation struct {
	FieldRadial    float64 `toml:"field_radial"`
	FieldAzimuthal float64 `toml:"field_azimuthal"`
	FieldVertical  float64 `toml:"field_vertical"`
	Fraction       float64 `toml:"fraction"`
	SinPower       float64 `toml:"sin_power"`
}

// Limits of the polarisation keys.
const (
	// MaxSinPower bounds polarisation.sin_power: synchrotron emissivity
	// goes as sin^{(s+1)/2} θ_B for electrons of power-law index s
	// (Rybicki & Lightman 1979, Radiative Processes in Astrophysics,
	// sec. 6.4), so a few units cover every physical case.
	MaxSinPower = 10
	// MaxFieldComponent bounds the field components (only the direction
	// counts; the bound keeps their squares finite).
	MaxFieldComponent = 1e100
)

// DefaultPolarisation is a purely azimuthal (toroidal) field and the
// maximum fraction of optically thin synchrotron light from electrons of
// power-law index s = 3, (s + 1)/(s + 7/3) = 0.75 (Rybicki & Lightman
// 1979, sec. 6.5), with no angle dependence of the intensity.
func DefaultPolarisation() Polarisation {
	return Polarisation{FieldAzimuthal: 1, Fraction: 0.75}
}

// PolarisationModel is the validated emission model (Resolved.Polar).
type PolarisationModel struct {
	B        [3]float64 // unit field direction: radial, azimuthal, vertical (+z)
	Fraction float64
	SinPower float64
}

// resolvePolarisation validates the polarisation keys.
func (p Polarisation) resolve() (PolarisationModel, error) {
	for _, c := range []struct {
		key string
		v   float64
	}{{"polarisation.field_radial", p.FieldRadial}, {"polarisation.field_azimuthal", p.FieldAzimuthal}, {"polarisation.field_vertical", p.FieldVertical}} {
		if !(math.Abs(c.v) <= MaxFieldComponent) {
			return PolarisationModel{}, fieldErr(c.key, c.v, "must be a number within ±%g (a field component in the gas frame; only the direction counts)", float64(MaxFieldComponent))
		}
	}
	n := math.Sqrt(p.FieldRadial*p.FieldRadial + p.FieldAzimuthal*p.FieldAzimuthal + p.FieldVertical*p.FieldVertical)
	if !(n > 0) {
		return PolarisationModel{}, &FieldError{Key: "polarisation.field_azimuthal", Value: "0",
			Allowed: "the field needs a direction: field_radial, field_azimuthal and field_vertical are all 0"}
	}
	if !(p.Fraction >= 0 && p.Fraction <= 1) {
		return PolarisationModel{}, fieldErr("polarisation.fraction", p.Fraction, "must be from 0 to 1")
	}
	if !(p.SinPower >= 0 && p.SinPower <= MaxSinPower) {
		return PolarisationModel{}, fieldErr("polarisation.sin_power", p.SinPower, "must be from 0 (intensity independent of the field angle) to %d", MaxSinPower)
	}
	return PolarisationModel{B: [3]float64{p.FieldRadial / n, p.FieldAzimuthal / n, p.FieldVertical / n},
		Fraction: p.Fraction, SinPower: p.SinPower}, nil
}

// Velocity returns the contravariant Boyer–Lindquist 4-velocity of the
// gas at the equatorial radius r (u^θ = 0): Keplerian for r ≥ r_isco,
// plunging inside (see Redshift for the sources). Domain: r > r₊.
func (g Gas) Velocity(r float64) raytrace.Vector {
	ut, ur, uphi := g.velocity(r)
	return raytrace.Vector{ut, ur, 0, uphi}
}

// GasFrame is the orthonormal frame of the gas at one equatorial radius:
// U its 4-velocity, and the spatial axes R (radial), Phi (azimuthal, the
// sense of the orbit) and Z (along +z, the spin axis's northern end), by
// Gram–Schmidt on ∂_r, ∂_φ against U with the Kerr metric, and
// Z = −∂_θ/r (∂_θ is orthogonal to the others at θ = π/2).
type GasFrame struct {
	U, R, Phi, Z raytrace.Vector
}

// Frame returns the gas frame at radius r > r₊.
func (g Gas) Frame(r float64) GasFrame {
	u := g.Velocity(r)
	dot := func(v, w raytrace.Vector) float64 { return raytrace.Dot(g.a, r, v, w) }
	// X + (X·u) u is X with its part along u removed (u·u = −1).
	proj := func(x raytrace.Vector, e ...raytrace.Vector) raytrace.Vector {
		c := dot(x, u)
		for i := range x {
			x[i] += c * u[i]
		}
		for _, b := range e {
			c := dot(x, b)
			for i := range x {
				x[i] -= c * b[i]
			}
		}
		n := math.Sqrt(dot(x, x))
		for i := range x {
			x[i] /= n
		}
		return x
	}
	er := proj(raytrace.Vector{0, 1, 0, 0})
	ep := proj(raytrace.Vector{0, 0, 0, 1}, er)
	return GasFrame{U: u, R: er, Phi: ep, Z: raytrace.Vector{0, 0, -1 / r, 0}}
}

// Emitted is the polarised light of one crossing in the gas frame.
type Emitted struct {
	F raytrace.Vector // polarisation 4-vector ∝ k̂ × B̂ in the gas frame (f·k = f·u = 0)
	// SinB is sin θ_B, the sine of the angle between the photon and the
	// field in the gas frame; the intensity goes as SinB^SinPower.
	SinB float64
	// Angle is the emitted electric-vector angle in the gas frame, in
	// radians in (−π/2, π/2]: from the disk normal +z projected across
	// the ray (n̂ ∝ ẑ − (ẑ·k̂) k̂) toward k̂ × n̂ — the sense of the IAU
	// angle (north through east) for a viewer looking back along the
	// ray, with n̂ as north. For a ray along ±z the reference is +r.
	Angle float64
	OK    bool // false where k̂ ∥ B̂ (no polarisation) or the frame fails
}

// Emit returns the emitted polarisation for the photon of forward wave
// vector k (raytrace.EquatorialMomentum) at the frame's radius r: the
// photon's direction in the gas frame k̂^i = (k·e_i)/(−k·u), the electric
// vector f^i = k̂ × B̂ (synchrotron, e.g. Rybicki & Lightman 1979, sec.
// 6.5; the model of Narayan et al. 2021, ApJ 912, 35), f^μ = Σ f^i e_i^μ.
func (m PolarisationModel) Emit(fr GasFrame, a, r float64, k raytrace.Vector) Emitted {
	dot := func(v, w raytrace.Vector) float64 { return raytrace.Dot(a, r, v, w) }
	e := -dot(k, fr.U)
	kh := [3]float64{dot(k, fr.R) / e, dot(k, fr.Phi) / e, dot(k, fr.Z) / e}
	b := m.B
	f := [3]float64{kh[1]*b[2] - kh[2]*b[1], kh[2]*b[0] - kh[0]*b[2], kh[0]*b[1] - kh[1]*b[0]}
	s := math.Sqrt(f[0]*f[0] + f[1]*f[1] + f[2]*f[2])
	out := Emitted{SinB: math.Min(1, s)}
	if !(s > 1e-12) || !(e > 0) {
		return out
	}
	for i := range out.F {
		out.F[i] = (f[0]*fr.R[i] + f[1]*fr.Phi[i] + f[2]*fr.Z[i]) / s
	}
	// Reference axes across the ray: n̂ from +z (or +r if the ray runs
	// along z), t̂ = k̂ × n̂.
	ref := [3]float64{0, 0, 1}
	if math.Abs(kh[2]) > 1-1e-12 {
		ref = [3]float64{1, 0, 0}
	}
	c := ref[0]*kh[0] + ref[1]*kh[1] + ref[2]*kh[2]
	n := [3]float64{ref[0] - c*kh[0], ref[1] - c*kh[1], ref[2] - c*kh[2]}
	t := [3]float64{kh[1]*n[2] - kh[2]*n[1], kh[2]*n[0] - kh[0]*n[2], kh[0]*n[1] - kh[1]*n[0]}
	out.Angle = foldAngle(math.Atan2(f[0]*t[0]+f[1]*t[1]+f[2]*t[2], f[0]*n[0]+f[1]*n[1]+f[2]*n[2]))
	out.OK = true
	return out
}

// foldAngle maps a direction angle to the polarisation angle in (−π/2, π/2].
func foldAngle(x float64) float64 {
	for x > math.Pi/2 {
		x -= math.Pi
	}
	for x <= -math.Pi/2 {
		x += math.Pi
	}
	return x
}

// String describes the field for captions.
func (m PolarisationModel) String() string {
	return fmt.Sprintf("B (r, φ, z) = (%.3g, %.3g, %.3g), fraction %.3g", m.B[0], m.B[1], m.B[2], m.Fraction)
}

// SkyAngle returns the polarisation angle on the sky of the screen
// electric vector (Eα, Eβ), in the IAU convention: radians from north
// through east, folded into (−π/2, π/2], with the projected spin axis
// (+β) at position angle paDeg (SkyOffset gives east and north; the IAU
// definition of polarisation angles, Transactions of the IAU XVB, 1974).
func SkyAngle(ea, eb, paDeg float64) float64 {
	east, north := SkyOffset(ea, eb, paDeg)
	return foldAngle(math.Atan2(east, north))
}

// NeedsPolarisation reports whether the scene asks for the polarisation
// map, the one output that needs the Stokes parameters of the crossings.
func (s Scene) NeedsPolarisation() bool { return s.Output.Has(PolarisationMap) }

// PolarisationMap is the name of the polarisation map.
const PolarisationMap = "polarisation"
