package outputs

import (
	"bufio"
	"fmt"
	"image/color"
	"io"
	"math"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/internal/fits"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// ContinuumUnits is the header text of the continuum table's flux columns.
const ContinuumUnits = "photons cm^-2 s^-1 keV^-1 at the observer"

// WriteContinuumCSV writes the thermal continuum: a commented header with
// the disk's parameters and units, then one row per energy: the energy
// in keV, the photon flux density N_E in total and per image order
// (photons cm⁻² s⁻¹ keV⁻¹), and E² N_E in total (keV cm⁻² s⁻¹, the
// energy per logarithmic energy interval).
func WriteContinuumCSV(w io.Writer, c *pixels.Continuum, title string, r scene.Resolved) error {
	th := r.Thermal
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "# %s\n", title)
	fmt.Fprintf(bw, "# thermal continuum of the Novikov-Thorne disk (Page-Thorne flux), colour-corrected blackbody, f_col = %g, limb law %s\n", th.FCol, r.Emission.Limb)
	fmt.Fprintf(bw, "# accretion rate %.10g g/s; efficiency 1 - E_isco = %.10g; luminosity emitted %.10g erg/s = %.6g L_Edd (both faces, %.6g to %.6g M)\n",
		th.MdotGS, th.Efficiency, th.EmittedLuminosity(), th.EmittedLuminosity()/scene.EddingtonLuminosity(th.GravRadiusCm), th.Inner, th.Outer)
	fmt.Fprintf(bw, "# distance %.10g cm; pixel solid angle %.10g sr\n", r.DistanceCm, r.PixelSolidAngle())
	fmt.Fprintf(bw, "# bolometric flux in the image %.10g erg cm^-2 s^-1 (all energies)\n", c.BolometricTotal())
	fmt.Fprintf(bw, "# %d energies equally spaced in log E from %g to %g keV; flux columns: %s; e2n_total in keV cm^-2 s^-1\n", len(c.EnergyKeV), th.MinKeV, th.MaxKeV, ContinuumUnits)
	fmt.Fprint(bw, "energy_kev,flux_total")
	for o := range c.Order {
		fmt.Fprintf(bw, ",flux_order_%d", o)
	}
	fmt.Fprintln(bw, ",e2n_total")
	tot := c.Total()
	for k, e := range c.EnergyKeV {
		fmt.Fprintf(bw, "%.8g,%.10g", e, tot[k])
		for o := range c.Order {
			fmt.Fprintf(bw, ",%.10g", c.Order[o][k])
		}
		fmt.Fprintf(bw, ",%.10g\n", e*e*tot[k])
	}
	return bw.Flush()
}

// ContinuumPlot is the figure of the continuum: E² N_E on a log axis
// against log₁₀ E, in total and per image order, down to 10⁻⁴ of the
// peak.
func ContinuumPlot(c *pixels.Continuum, title, subtitle string) figure.Plot {
	x := make([]float64, len(c.EnergyKeV))
	for k, e := range c.EnergyKeV {
		x[k] = math.Log10(e)
	}
	e2 := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for k := range v {
			e := c.EnergyKeV[k]
			out[k] = e * e * v[k]
		}
		return out
	}
	tot := e2(c.Total())
	peak := 0.0
	for _, v := range tot {
		peak = math.Max(peak, v)
	}
	p := figure.Plot{
		Title: title, Subtitle: subtitle,
		XLabel: "log₁₀ (observed energy E / keV)",
		YLabel: "E² N_E [keV cm⁻² s⁻¹]",
		LogY:   true, Legend: true,
	}
	if peak > 0 {
		p.YMin, p.YMax = peak*1e-4, peak*2
	}
	p.Series = append(p.Series, figure.Series{X: x, Y: tot, Color: color.RGBA{0x10, 0x10, 0x10, 0xff}, Width: 2.5, Label: "all orders"})
	if len(c.Order) > 1 {
		for o, ord := range c.Order {
			p.Series = append(p.Series, figure.Series{X: x, Y: e2(ord), Color: colormap.Order(o), Width: 1.5, Label: fmt.Sprintf("order n = %d", o), Dashed: o > 0})
		}
	}
	return p
}

// thermalImages are the FITS maps of a thermal disk (none without one):
// the effective temperature at the source of the first image order seen
// (pixels.Frame.TemperatureAt) and the colour temperature the observer
// sees there (ColorTemperatureAt).
func thermalImages(f *pixels.Frame, mk func(name, unit, comment string, rows func(int, []float32)) fits.Image) []fits.Image {
	if !f.Res.Thermal.On {
		return nil
	}
	return []fits.Image{
		mk("TEMPEFF", "K", "disk effective temperature (Page-Thorne flux), first image order seen", fitsRows(f, f.TemperatureAt)),
		mk("TEMPCOL", "keV", "observed colour temperature g f_col kT, first image order seen", fitsRows(f, f.ColorTemperatureAt)),
	}
}

// thermalCards are the primary header cards of a thermal disk.
func thermalCards(r scene.Resolved) []fits.Card {
	th := r.Thermal
	if !th.On {
		return nil
	}
	return []fits.Card{
		{Key: "MDOT", Value: th.MdotGS, Comment: "[g/s] accretion rate"},
		{Key: "EFFIC", Value: th.Efficiency, Comment: "radiative efficiency 1 - E_isco"},
		{Key: "LDISK", Value: th.EmittedLuminosity(), Comment: "[erg/s] luminosity emitted, both faces"},
		{Key: "EDDRATIO", Value: th.EmittedLuminosity() / scene.EddingtonLuminosity(th.GravRadiusCm), Comment: "emitted luminosity over L_Edd"},
		{Key: "FCOL", Value: th.FCol, Comment: "colour correction T_col / T_eff"},
	}
}
