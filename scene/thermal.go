package scene

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"

	"kerrscope/raytrace"
)

// Thermal is the disk's own thermal continuum: the Novikov–Thorne disk
// (zero torque at the ISCO) radiating the Page–Thorne flux as a
// colour-corrected blackbody. It is on when an accretion rate is given,
// as an Eddington ratio or in g/s (one of the two), and needs the mass
// and a distance.
type Thermal struct {
	// EddingtonRatio is L / L_Edd, with L = (1 − E_isco) Ṁ c² the
	// disk's luminosity and L_Edd that of ionised hydrogen.
	EddingtonRatio *float64 `toml:"eddington_ratio,omitempty"`
	// AccretionRateGS is Ṁ in g/s (rest mass through the disk).
	AccretionRateGS *float64 `toml:"accretion_rate_g_s,omitempty"`
	// ColorCorrection is f_col = T_colour / T_eff of the disk atmosphere.
	ColorCorrection float64 `toml:"color_correction"`
	// MinKeV and MaxKeV bound the continuum's energies (default: from the
	// disk's temperatures, ThermalDisk.defaultRange); Bins is the number
	// of energies, equally spaced in log E.
	MinKeV *float64 `toml:"energy_min_kev,omitempty"`
	MaxKeV *float64 `toml:"energy_max_kev,omitempty"`
	Bins   int      `toml:"bins"`
}

// DefaultColorCorrection is f_col = 1.7, the colour correction of the
// atmosphere of a disk around a stellar-mass hole near a tenth of the
// Eddington luminosity (Shimura & Takahara 1995, ApJ 445, 780).
const DefaultColorCorrection = 1.7

// Limits of the thermal keys.
const (
	MinEddingtonRatio, MaxEddingtonRatio = 1e-12, 1e3
	MinAccretionRate, MaxAccretionRate   = 1e-10, 1e35 // g/s
	MinColorCorrection                   = 1.0
	MaxColorCorrection                   = 10.0
	MaxThermalBins                       = 1 << 16
	// MinThermalKeV and MaxThermalKeV bound the continuum's energies.
	MinThermalKeV, MaxThermalKeV = 1e-12, 1e6
)

// Physical constants in cgs units.
const (
	// speedOfLight is c in cm/s (exact, SI definition of the metre).
	speedOfLight = 2.99792458e10
	// planckErgS is h in erg s and boltzmannErgK is k in erg/K (exact, SI 2019).
	planckErgS    = 6.62607015e-27
	boltzmannErgK = 1.380649e-16
	// stefanBoltzmann is σ = 2π⁵k⁴/(15h³c²) in erg cm⁻² s⁻¹ K⁻⁴ (CODATA
	// 2018, exact from h, k and c).
	stefanBoltzmann = 5.670374419e-5
	// protonMassG is m_p in g and thomsonCm2 is σ_T in cm² (CODATA 2018).
	protonMassG = 1.67262192369e-24
	thomsonCm2  = 6.6524587321e-25
	// KeVPerKelvin is k/(1 keV): 1 K is 8.617333262e-8 keV (CODATA 2018).
	KeVPerKelvin = boltzmannErgK / ErgPerKeV
	// planckPhotons is 2 (1 keV)³/(h³ c²), the factor of PhotonIntensity:
	// 2E²/(h³c²) photons cm⁻² s⁻¹ sr⁻¹ erg⁻¹ with E in erg is
	// planckPhotons E² photons cm⁻² s⁻¹ sr⁻¹ keV⁻¹ with E in keV.
	planckPhotons = 2 * ErgPerKeV * ErgPerKeV * ErgPerKeV / (planckErgS * planckErgS * planckErgS * speedOfLight * speedOfLight)
)

// ThermalDisk is the resolved thermal continuum of a scene (Resolved.Thermal);
// the zero value is off.
type ThermalDisk struct {
	On         bool
	Spin       float64
	MdotGS     float64 // Ṁ, g/s
	Efficiency float64 // 1 − E_isco
	FCol       float64 // colour correction
	// GravRadiusCm is GM/c² in cm; Inner and Outer the emitting edges in M.
	GravRadiusCm float64
	Inner, Outer float64
	// MinKeV, MaxKeV and Bins are the energies of the continuum (Energies).
	MinKeV, MaxKeV float64
	Bins           int
	// LimbNorm is 1/(2 ∫₀¹ f μ dμ) of the scene's limb law f: I = F f(μ) LimbNorm / π
	// has the flux F from one face.
	LimbNorm float64
	// fluxScale is Ṁ c² / (GM/c²)², erg cm⁻² s⁻¹ per unit of the
	// geometric Page–Thorne flux.
	fluxScale float64
}

// Efficiency returns 1 − E_isco, the fraction of the rest-mass energy
// accreted that a Novikov–Thorne disk radiates, E_isco the specific
// energy of the ISCO circular orbit (Bardeen, Press & Teukolsky 1972, ApJ
// 178, 347, eq. 2.12). Domain −1 < a < 1.
func Efficiency(a float64) float64 {
	o, ok := raytrace.CircularOrbit(a, raytrace.ISCO(a))
	if !ok {
		return 0
	}
	return 1 - o.E
}

// EddingtonLuminosity returns L_Edd = 4π G M m_p c / σ_T in erg/s for a
// hole whose GM/c² is gravRadiusCm (Frank, King & Raine 2002, Accretion
// Power in Astrophysics, 3rd ed., sec. 1.2; ionised hydrogen, Thomson
// opacity):
// 4π (GM/c²) c³ m_p / σ_T, about 1.26e38 erg/s per solar mass.
func EddingtonLuminosity(gravRadiusCm float64) float64 {
	return 4 * math.Pi * gravRadiusCm * speedOfLight * speedOfLight * speedOfLight * protonMassG / thomsonCm2
}

// Flux returns F(r), the flux radiated by one face of the disk in its rest
// frame, in erg cm⁻² s⁻¹: the Page & Thorne (1974, ApJ 191, 499) flux per
// unit accretion rate (Emissivity.At, NovikovThorne) in units of M, times
// Ṁ c² / (GM/c²)², which gives 3 G M Ṁ / (8π R³) far out (Newtonian,
// R = r GM/c²). 0 inside the ISCO and off the emitting disk.
func (t ThermalDisk) Flux(r float64) float64 {
	if !t.On || !(r >= t.Inner && r <= t.Outer) {
		return 0
	}
	return novikovThorne(t.Spin, r) * t.fluxScale
}

// TemperatureK returns the effective temperature T(r) = (F/σ)^{1/4} in K
// (Stefan–Boltzmann), 0 where the disk does not shine.
func (t ThermalDisk) TemperatureK(r float64) float64 {
	f := t.Flux(r)
	if !(f > 0) {
		return 0
	}
	return math.Sqrt(math.Sqrt(f / stefanBoltzmann))
}

// ColorKeV returns k f_col T(r) in keV, the temperature of the
// colour-corrected blackbody at r in its rest frame.
func (t ThermalDisk) ColorKeV(r float64) float64 {
	return t.FCol * t.TemperatureK(r) * KeVPerKelvin
}

// PhotonIntensity returns the photon number intensity of a colour-corrected
// blackbody, n_E = B_E(E; f T) / (E f⁴), in photons cm⁻² s⁻¹ sr⁻¹ keV⁻¹ at
// energy e keV, for kT = ktColKeV / fcol (ktColKeV = k f T): with
// B_E = 2E³/(h³c²) / (e^{E/kT} − 1) (Planck; Rybicki & Lightman 1979,
// Radiative Processes in Astrophysics, eq. 1.51, number from memory), n_E = 2E² / (h³c²) / (e^{E/(f kT)} − 1) / f⁴. Its energy
// integral ∫ E n_E dE is σT⁴/π whatever f (the colour correction moves
// the spectrum, not its bolometric intensity; Shimura & Takahara 1995,
// ApJ 445, 780). Domain e > 0, ktColKeV > 0, fcol ≥ 1; 0 otherwise and
// where the Wien tail underflows.
func PhotonIntensity(e, ktColKeV, fcol float64) float64 {
	if !(e > 0 && ktColKeV > 0 && fcol > 0) {
		return 0
	}
	x := e / ktColKeV
	if x > 700 {
		return 0
	}
	f2 := fcol * fcol
	return planckPhotons * e * e / math.Expm1(x) / (f2 * f2)
}

// Energies returns the continuum's energies in keV: Bins values equally
// spaced in log E from MinKeV to MaxKeV (both included; one value, the
// geometric mean, when Bins is 1).
func (t ThermalDisk) Energies() []float64 {
	out := make([]float64, t.Bins)
	if t.Bins == 1 {
		out[0] = math.Sqrt(t.MinKeV * t.MaxKeV)
		return out
	}
	l0, l1 := math.Log(t.MinKeV), math.Log(t.MaxKeV)
	for k := range out {
		out[k] = math.Exp(l0 + (l1-l0)*float64(k)/float64(t.Bins-1))
	}
	out[t.Bins-1] = t.MaxKeV
	return out
}

// EmittedLuminosity returns the power the disk radiates, both faces,
// counted as energy at infinity per unit time at infinity, in erg/s:
//
//	L = 4π ∫ F(r) E(r) r dr   (r in M; × (GM/c²)² for cm²),
//
// from Inner to Outer. A comoving element of the disk's worldsheet has
// dτ dA = r dt dr dφ (see resolvePhotonRate), it radiates 2F per unit
// proper time and area, and light radiated symmetrically about the gas's
// rest frame carries on average the energy at infinity E(r) = −u_t per
// unit rest-frame energy (Page & Thorne 1974, ApJ 191, 499, whose energy
// conservation law makes the integral from the ISCO to infinity
// (1 − E_isco) Ṁ c²). Quadrature as in Emissivity.AreaIntegral: 16-point
// Gauss–Legendre on 64 panels in ln r.
func (t ThermalDisk) EmittedLuminosity() float64 {
	if !t.On {
		return 0
	}
	lo := math.Max(t.Inner, raytrace.ISCO(t.Spin))
	if !(t.Outer > lo) {
		return 0
	}
	f := func(u float64) float64 {
		r := math.Exp(u)
		o, ok := raytrace.CircularOrbit(t.Spin, r)
		if !ok {
			return 0
		}
		return novikovThorne(t.Spin, r) * o.E * r * r
	}
	const panels, points = 64, 16
	u0, u1 := math.Log(lo), math.Log(t.Outer)
	h := (u1 - u0) / panels
	sum := 0.0
	for p := range panels {
		sum += quad.Fixed(f, u0+float64(p)*h, u0+float64(p+1)*h, points, quad.Legendre{}, 0)
	}
	return 4 * math.Pi * sum * t.fluxScale * t.GravRadiusCm * t.GravRadiusCm
}

// maxColorKeV returns the largest k f T over the emitting disk, sampled
// at 400 radii equally spaced in ln r (the peak, near 1.4 r_isco, is
// broad), and k f T at the outer edge.
func (t ThermalDisk) maxColorKeV() (peak, outer float64) {
	lo := math.Max(t.Inner, raytrace.ISCO(t.Spin))
	l0, l1 := math.Log(lo), math.Log(t.Outer)
	for k := 0; k <= 400; k++ {
		peak = math.Max(peak, t.ColorKeV(math.Exp(l0+(l1-l0)*float64(k)/400)))
	}
	return peak, t.ColorKeV(t.Outer)
}

// resolveThermal validates the [thermal] keys and sets r.Thermal. It
// needs the disk edges, the limb law, the mass and the distance.
func (r *Resolved) resolveThermal() error {
	th := r.Scene.Thermal
	if th.EddingtonRatio == nil && th.AccretionRateGS == nil {
		return nil
	}
	key := "thermal.eddington_ratio"
	var v float64
	if th.EddingtonRatio != nil {
		v = *th.EddingtonRatio
	} else {
		key, v = "thermal.accretion_rate_g_s", *th.AccretionRateGS
	}
	if th.EddingtonRatio != nil && th.AccretionRateGS != nil {
		return fieldErr("thermal.accretion_rate_g_s", *th.AccretionRateGS, "give thermal.eddington_ratio or thermal.accretion_rate_g_s, not both")
	}
	if !(r.GravRadiusCm > 0 && r.DistanceCm > 0) {
		return fieldErr(key, v, "needs black_hole.mass_msun and a distance (distance_kpc or distance_mpc): the disk's temperature depends on the mass, its flux on the distance")
	}
	a := r.Hole.Spin
	t := ThermalDisk{On: true, Spin: a, Efficiency: Efficiency(a), GravRadiusCm: r.GravRadiusCm,
		Inner: r.Inner, Outer: r.Disk.OuterRadius, FCol: th.ColorCorrection}
	if th.EddingtonRatio != nil {
		if !(v >= MinEddingtonRatio && v <= MaxEddingtonRatio) {
			return fieldErr(key, v, "must be from %g to %g", MinEddingtonRatio, MaxEddingtonRatio)
		}
		t.MdotGS = v * EddingtonLuminosity(r.GravRadiusCm) / (t.Efficiency * speedOfLight * speedOfLight)
	} else {
		if !(v >= MinAccretionRate && v <= MaxAccretionRate) {
			return fieldErr(key, v, "must be from %g to %g g/s", MinAccretionRate, MaxAccretionRate)
		}
		t.MdotGS = v
	}
	if f := th.ColorCorrection; !(f >= MinColorCorrection && f <= MaxColorCorrection) {
		return fieldErr("thermal.color_correction", f, "must be from %g (no correction) to %g", MinColorCorrection, MaxColorCorrection)
	}
	if th.Bins < 1 || th.Bins > MaxThermalBins {
		return fieldErr("thermal.bins", th.Bins, "must be between 1 and %d", MaxThermalBins)
	}
	t.Bins = th.Bins
	t.LimbNorm = 1 / (2 * r.Limb.FluxMoment())
	t.fluxScale = t.MdotGS * speedOfLight * speedOfLight / (r.GravRadiusCm * r.GravRadiusCm)
	if !(t.Outer > raytrace.ISCO(a)) {
		return fieldErr(key, v, "the disk (%.6g–%.6g M) lies inside the ISCO, %.6g M, where a Novikov–Thorne disk does not shine", t.Inner, t.Outer, raytrace.ISCO(a))
	}
	peak, outer := t.maxColorKeV()
	if !(peak > 0) || math.IsInf(peak, 0) {
		return fieldErr(key, v, "gives no finite disk temperature (peak k f T = %g keV)", peak)
	}
	// Default range: from a twentieth of the outer edge's colour
	// temperature (the Rayleigh–Jeans side of the coolest ring) to 30
	// times the hottest (its Wien tail, even blueshifted by g ≈ 2).
	t.MinKeV, t.MaxKeV = outer/20, 30*peak
	if th.MinKeV != nil {
		t.MinKeV = *th.MinKeV
	}
	if th.MaxKeV != nil {
		t.MaxKeV = *th.MaxKeV
	}
	if !(t.MinKeV >= MinThermalKeV && t.MinKeV <= MaxThermalKeV) {
		return fieldErr("thermal.energy_min_kev", t.MinKeV, "must be from %g to %g keV", MinThermalKeV, MaxThermalKeV)
	}
	if !(t.MaxKeV >= MinThermalKeV && t.MaxKeV <= MaxThermalKeV) {
		return fieldErr("thermal.energy_max_kev", t.MaxKeV, "must be from %g to %g keV", MinThermalKeV, MaxThermalKeV)
	}
	if !(t.MaxKeV > t.MinKeV*(1+MinEnergySpan)) {
		return fieldErr("thermal.energy_max_kev", t.MaxKeV, "must be above thermal.energy_min_kev = %g keV", t.MinKeV)
	}
	r.Thermal = t
	return nil
}
