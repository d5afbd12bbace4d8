package scene

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// ErgPerKeV is the energy of 1 keV in erg: 1 eV = 1.602176634e-19 J
// exactly (SI 2019 definition of the elementary charge).
const ErgPerKeV = 1.602176634e-9

// Bounds of emission.line_luminosity_erg_s, in erg/s.
const MinLineLuminosity, MaxLineLuminosity = 1e-30, 1e60

// resolvePhotonRate validates emission.line_luminosity_erg_s and sets
// PhotonRate and PhotonNorm. It needs the disk's edges, emissivity and
// limb law, and the mass and distance (a luminosity alone has no flux).
//
// Definition: L = E_line Ṅ, with Ṅ the disk's photon emission rate in the
// line, both faces, counted per unit time t of a distant clock. With a
// line list ([[lines]]) L is the total over the lines, L = Σ_l E_l Ṅ_l
// with Ṅ_l = F_l Ṅ (F_l the line's weight over the sum of the weights,
// RestLines), so Ṅ = L / Ē with Ē = Σ_l F_l E_l (RestLines.MeanKeV); each
// line carries the luminosity F_l E_l Ṅ. The number
// of emission events in an element of the disk's worldsheet is
// N dτ dA = N √|h| dt dr dφ, h the metric induced on θ = π/2 by the Kerr
// metric in Boyer–Lindquist coordinates (Bardeen, Press & Teukolsky 1972,
// ApJ 178, 347): the (t, φ) block has determinant −Δ and g_rr = r²/Δ, so
// √|h| = r for any spin and any gas velocity in the plane. Hence
// Ṅ = ∫∫ N(r) r dr dφ over the emitting disk (Inner to the outer edge,
// the plunging region included when it shines), where N(r) = K ε(r) is
// the comoving photon rate per unit proper time and comoving area, both
// faces, and ε the scene's emissivity law ([emission]'s; the lines of a
// list share its photons, RestLines):
//
//	K = Ṅ / (2π ∫ ε(r) r dr)   [photons s⁻¹ per M² of disk].
//
// The comoving photon number intensity of one face is then
// n(r, μ) = N(r) f(μ) / (4π ∫₀¹ f μ dμ), f the limb law (its flux from
// one face, 2π ∫ n μ dμ, is N/2), so PhotonNorm = K / (4π ∫₀¹ f μ dμ)
// and n = PhotonNorm ε f. The renderer's pixels hold g³ ε f, and I_obs =
// g³ n (Liouville; Cunningham 1975, ApJ 202, 788), which the unit
// factors below convert.
func (r *Resolved) resolvePhotonRate() error {
	l := r.Emission.LineLuminosityErgS
	if l == nil {
		return nil
	}
	const key = "emission.line_luminosity_erg_s"
	if !(*l >= MinLineLuminosity && *l <= MaxLineLuminosity) {
		return fieldErr(key, *l, "must be a luminosity from %g to %g erg/s", MinLineLuminosity, MaxLineLuminosity)
	}
	if !(r.DistanceCm > 0) {
		return fieldErr(key, *l, "needs black_hole.mass_msun and a distance (distance_kpc or distance_mpc) to give a flux")
	}
	area := r.Emissivity.AreaIntegral(r.Inner, r.Disk.OuterRadius, r.ISCO)
	if !(area > 0) || math.IsInf(area, 0) {
		return fieldErr(key, *l, "cannot be spread over the disk: its emissivity integral over %.6g–%.6g M is %g (novikov-thorne is 0 inside the ISCO)", r.Inner, r.Disk.OuterRadius, area)
	}
	r.PhotonRate = *l / (r.meanLineKeV() * ErgPerKeV)
	k := r.PhotonRate / (2 * math.Pi * area)
	r.PhotonNorm = k / (4 * math.Pi * r.Limb.FluxMoment())
	return nil
}

// AreaIntegral returns ∫ ε(r) r dr from rIn to rOut (0 < rIn < rOut, in M),
// the disk-area integral of the law, by Gauss–Legendre quadrature
// (quad.Legendre, 16 points) on 64 panels equally spaced in ln r per
// stretch between the law's kinks (the break radius; isco, where
// novikov-thorne starts and a lamp-lit disk's gas starts to plunge; the
// lamp's table is smooth, log-linear between bin centres, which 64 panels
// resolve to about 1e-4); in ln r a power law is a smooth exponential
// (r^{2−q}), which the panels resolve to about machine precision for
// every index Resolve allows (Press et al., Numerical Recipes, 3rd ed.,
// sec. 4.6). Closed form for PowerLaw, checked in the tests:
// (rOut^{2−q} − rIn^{2−q}) / (2 − q), ln(rOut/rIn) at q = 2.
func (e Emissivity) AreaIntegral(rIn, rOut, isco float64) float64 {
	if !(rIn > 0 && rOut > rIn) {
		return 0
	}
	var kink float64
	switch e.Kind {
	case BrokenPowerLaw:
		kink = e.RBreak
	case NovikovThorne, Lamp:
		kink = isco // Lamp: the gas changes motion there (plunging inside)
	}
	cuts := []float64{rIn, rOut}
	if kink > rIn && kink < rOut {
		cuts = []float64{rIn, kink, rOut}
	}
	// In u = ln r: ε r dr = ε(eᵘ) e^{2u} du.
	f := func(u float64) float64 { r := math.Exp(u); return e.At(r) * r * r }
	const panels, points = 64, 16
	sum := 0.0
	for i := 1; i < len(cuts); i++ {
		u0, u1 := math.Log(cuts[i-1]), math.Log(cuts[i])
		h := (u1 - u0) / panels
		for p := range panels {
			sum += quad.Fixed(f, u0+float64(p)*h, u0+float64(p+1)*h, points, quad.Legendre{}, 0)
		}
	}
	return sum
}

// FluxMoment returns ∫₀¹ f(μ) μ dμ of the limb law f: 1/2 for Isotropic,
// 1/2 + 2.06/3 for Laor (1 + 2.06 μ; Laor 1991, ApJ 376, 90). The flux
// leaving one face of a surface of intensity n₀ f(μ) is 2π n₀ times it.
// An invalid law gives 0.
func (l Limb) FluxMoment() float64 {
	switch l.Kind {
	case Isotropic:
		return 0.5
	case Laor:
		return 0.5 + 2.06/3
	}
	return 0
}

// Physical reports whether the scene gives mass, distance and a line
// luminosity, so that fluxes and intensities have physical units.
func (r Resolved) Physical() bool { return r.PhotonNorm > 0 && r.DistanceCm > 0 && r.GravRadiusCm > 0 }

// PixelSolidAngle returns the solid angle of one pixel in sr, when mass
// and distance are given (else 0): (PixelSize GM/(c² D))².
func (r Resolved) PixelSolidAngle() float64 {
	side := r.PixelSize * r.MicroArcsecPerM * math.Pi / (180 * 3600e6)
	return side * side
}

// SpectrumPerUnit returns the factor that turns the spectrum's relative
// flux density (sum over pixels of g³ ε f ΔαΔβ per keV, ΔαΔβ in M²) into
// photons cm⁻² s⁻¹ keV⁻¹: PhotonNorm / D², D in cm (the solid angle of a
// pixel is ΔαΔβ (GM/c²)²/D², and PhotonNorm is per M² of disk, so M
// cancels). 0 unless Physical.
func (r Resolved) SpectrumPerUnit() float64 {
	if !r.Physical() {
		return 0
	}
	return r.PhotonNorm / (r.DistanceCm * r.DistanceCm)
}

// IntensityPerUnit returns the factor that turns the line intensity map
// (g³ ε f summed over orders) into photons cm⁻² s⁻¹ sr⁻¹:
// PhotonNorm / (GM/c²)², GM/c² in cm. 0 unless Physical.
func (r Resolved) IntensityPerUnit() float64 {
	if !r.Physical() {
		return 0
	}
	return r.PhotonNorm / (r.GravRadiusCm * r.GravRadiusCm)
}

// BolometricPerUnit returns the factor that turns the bolometric map
// (g⁴ ε f summed over orders; with a line list g⁴ f RestLines.EnergyAt)
// into erg cm⁻² s⁻¹ sr⁻¹: IntensityPerUnit times E_line in erg (an
// observed photon carries g E_line), RestLines.MeanKeV for a list. 0
// unless Physical.
func (r Resolved) BolometricPerUnit() float64 {
	return r.IntensityPerUnit() * r.meanLineKeV() * ErgPerKeV
}

// meanLineKeV is the mean rest energy of a line photon: emission.line_kev,
// or RestLines.MeanKeV for a line list.
func (r Resolved) meanLineKeV() float64 {
	if r.RestLines.List {
		return r.RestLines.MeanKeV
	}
	return r.Emission.LineKeV
}
