package pixels

import (
	"errors"
	"math"

	"kerrscope/scene"
)

// Continuum is the disk's thermal spectrum collapsed from an image: at
// each energy, the photon flux density at the observer summed over the
// pixels, per image order.
type Continuum struct {
	EnergyKeV []float64 // energies, keV, equally spaced in log E
	// Order is the photon flux density N_E per image order at each
	// energy, in photons cm⁻² s⁻¹ keV⁻¹ at the observer.
	Order [][]float64
	// Bolometric is the energy flux per image order, erg cm⁻² s⁻¹,
	// summed over the pixels directly (not from the energies, so it
	// holds the light outside their range too).
	Bolometric []float64
}

// Total returns N_E summed over the orders at each energy.
func (c *Continuum) Total() []float64 {
	out := make([]float64, len(c.EnergyKeV))
	for _, ord := range c.Order {
		for k, v := range ord {
			out[k] += v
		}
	}
	return out
}

// BolometricTotal returns the energy flux summed over the orders, erg cm⁻² s⁻¹.
func (c *Continuum) BolometricTotal() float64 {
	t := 0.0
	for _, v := range c.Bolometric {
		t += v
	}
	return t
}

// ErrNoThermal is returned by Frame.Continuum for a scene without a
// thermal disk (scene.Resolved.Thermal off).
var ErrNoThermal = errors.New("pixels: the scene has no thermal disk (give thermal.eddington_ratio or thermal.accretion_rate_g_s, with mass and distance)")

// Continuum collapses the frame's thermal spectrum. Each pixel's image of
// order n, seen at redshift g from radius r, has the intensity of a
// colour-corrected blackbody of the disk's temperature at r, shifted:
// I_E,obs(E) = g³ I_E(E/g) (Liouville, I_E/E³ conserved; Cunningham 1975,
// ApJ 202, 788), with I_E = f(μ) LimbNorm B_E(E; f_col T) / f_col⁴ and f
// the scene's limb law, whose flux from one face is σT⁴ = F(r), the
// Page–Thorne flux (scene.ThermalDisk). In photons:
//
//	N_E(E) = Σ_pixels ΔΩ f LimbNorm n_E(E; g f_col T),
//
// n_E = scene.PhotonIntensity (g² n_E(E/g; f_col T) = n_E(E; g f_col T)),
// and the bolometric flux is Σ ΔΩ f LimbNorm g⁴ F(r)/π. ΔΩ is the pixel's
// solid angle. The limb factor f(μ) of a crossing is the frame's line
// intensity over g³ ε(r) (Frame.Line holds g³ ε(r) f(μ), ε the lines'
// emissivity scene.RestLines.At); on a refined
// frame that ratio also carries the fraction of the pixel the crossing
// covers, and the continuum uses the pixels' area-averaged r and g. Where
// the line's emissivity is 0 the limb factor is taken as 1. The frame
// must hold R, G and Line (KeepR, KeepG, KeepLine).
func (f *Frame) Continuum() (Continuum, error) {
	if !f.Res.Thermal.On {
		return Continuum{}, ErrNoThermal
	}
	return f.ContinuumAt(f.Res.Thermal.Energies())
}

// ContinuumAt is Continuum at the given energies (keV, positive and
// rising) instead of the scene's, e.g. at the centres of the line
// spectrum's bins.
func (f *Frame) ContinuumAt(energies []float64) (Continuum, error) {
	r := f.Res
	th := r.Thermal
	if !th.On {
		return Continuum{}, ErrNoThermal
	}
	if f.R == nil || f.G == nil || f.Line == nil {
		return Continuum{}, errors.New("pixels: the continuum needs the frame's R, G and Line records")
	}
	c := Continuum{EnergyKeV: energies, Order: make([][]float64, f.Orders), Bolometric: make([]float64, f.Orders)}
	dOmega := r.PixelSolidAngle()
	em := f.Model.Lines
	for o := 0; o < f.Orders; o++ {
		ord := make([]float64, len(c.EnergyKeV))
		bol := 0.0
		for k, l := range f.Line[o] {
			if math.IsNaN(float64(l)) {
				continue
			}
			rad, g := float64(f.R[o][k]), float64(f.G[o][k])
			kt := th.ColorKeV(rad)
			if !(kt > 0) || !(g > 0) {
				continue
			}
			limb := 1.0
			if e := em.At(rad); e > 0 {
				limb = float64(l) / (g * g * g * e)
			}
			w := dOmega * limb * th.LimbNorm
			bol += w * g * g * g * g * th.Flux(rad) / math.Pi
			gkt := g * kt
			for b, e := range c.EnergyKeV {
				v := scene.PhotonIntensity(e, gkt, th.FCol)
				if v == 0 && e > gkt {
					break // the Wien tail has underflowed; energies rise
				}
				ord[b] += w * v
			}
		}
		c.Order[o], c.Bolometric[o] = ord, bol
	}
	return c, nil
}

// TemperatureAt returns the effective temperature T(r) in K of the disk
// at the source of the first image order seen at pixel k
// (scene.ThermalDisk.TemperatureK), NaN where no order is seen or the
// disk there does not shine (inside the ISCO, or no thermal disk). The
// frame must hold R.
func (f *Frame) TemperatureAt(k int) float32 {
	o := f.First[k]
	if o < 0 || f.R == nil {
		return float32(math.NaN())
	}
	if t := f.Res.Thermal.TemperatureK(float64(f.R[o][k])); t > 0 {
		return float32(t)
	}
	return float32(math.NaN())
}

// ColorTemperatureAt returns g k f_col T(r) in keV, the colour
// temperature of the blackbody the observer sees at pixel k from the
// first image order seen (its spectrum is n_E(E; g f_col T), Continuum),
// NaN where TemperatureAt is. The frame must hold R and G.
func (f *Frame) ColorTemperatureAt(k int) float32 {
	o := f.First[k]
	if o < 0 || f.R == nil || f.G == nil {
		return float32(math.NaN())
	}
	if kt := f.Res.Thermal.ColorKeV(float64(f.R[o][k])); kt > 0 {
		return float32(float64(f.G[o][k]) * kt)
	}
	return float32(math.NaN())
}
