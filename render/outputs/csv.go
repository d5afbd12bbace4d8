package outputs

import (
	"bufio"
	"fmt"
	"io"
	"math"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// PhysicalSpectrumUnits is the header text of a spectrum table whose flux
// columns are physical (readers look for it).
const PhysicalSpectrumUnits = "photons cm^-2 s^-1 keV^-1 at the observer (physical units)"

// WriteCSV writes the spectrum: a commented header with units and
// normalisation, then one row per bin: bin centre and edges in keV, total
// flux density, one column per image order and, for a line list, one per
// line (flux_line_N for lines.N, summed over the orders), all per keV; the
// header lists the lines. The flux is
// in photons cm⁻² s⁻¹ keV⁻¹ when r gives mass, distance and line
// luminosity (scene.Resolved.SpectrumPerUnit), else relative.
func WriteCSV(w io.Writer, s *pixels.Spectrum, title string, r scene.Resolved) error {
	return writeCSV(w, s, nil, nil, title, r)
}

// writeCSV is WriteCSV with, if q and u are not nil (the frame's
// StokesSpectrum), the polarised spectrum: Stokes Q and U summed over the
// orders, per keV in the flux columns' units, and the fraction
// sqrt(Q² + U²)/I and electric-vector position angle ½ atan2(U, Q) in
// degrees from north through east (IAU) of each bin (empty where the bin
// has no light).
func writeCSV(w io.Writer, s, q, u *pixels.Spectrum, title string, r scene.Resolved) error {
	bw := bufio.NewWriter(w)
	unit := writeSpectrumHeader(bw, s, title, r)
	if unit == 0 {
		unit = 1
		fmt.Fprintln(bw, "# flux columns (relative units): photon-number flux density per keV, sum over pixels of g^3 eps(r) limb(cos delta) dOmega / dE,")
		fmt.Fprintln(bw, "#   dOmega = pixel area in M^2 for an observer at D = 1 M (scale by (M/D)^2); eps in the scene's emissivity units")
	}
	if sr := r.PixelSolidAngle(); sr > 0 {
		fmt.Fprintf(bw, "# pixel solid angle %.10g sr\n", sr)
	}
	fmt.Fprintf(bw, "# flux outside the energy range: below %.10g, above %.10g (same units times keV)\n", s.Below*unit, s.Above*unit)
	if q != nil {
		fmt.Fprintln(bw, "# stokes_q, stokes_u: polarised flux per keV, same units; IAU convention (angle from north through east,")
		fmt.Fprintln(bw, "#   Q > 0 for an electric vector north-south); pol_fraction = sqrt(Q^2 + U^2)/I, pol_angle_deg = atan2(U, Q)/2")
	}
	fmt.Fprint(bw, "energy_kev,energy_lo_kev,energy_hi_kev,flux_total")
	for o := range s.Order {
		fmt.Fprintf(bw, ",flux_order_%d", o)
	}
	for l := range s.Line {
		fmt.Fprintf(bw, ",flux_line_%d", l+1)
	}
	if q != nil {
		fmt.Fprint(bw, ",stokes_q,stokes_u,pol_fraction,pol_angle_deg")
	}
	fmt.Fprintln(bw)
	var qt, ut []float64
	if q != nil {
		qt, ut = q.Total(), u.Total()
	}
	tot := s.Total()
	wd := s.Width()
	for k := range tot {
		lo := s.MinKeV + float64(k)*wd
		fmt.Fprintf(bw, "%.8g,%.8g,%.8g,%.10g", lo+wd/2, lo, lo+wd, tot[k]*unit/wd)
		for o := range s.Order {
			fmt.Fprintf(bw, ",%.10g", s.Order[o][k]*unit/wd)
		}
		for l := range s.Line {
			fmt.Fprintf(bw, ",%.10g", s.Line[l][k]*unit/wd)
		}
		if q != nil {
			fmt.Fprintf(bw, ",%.10g,%.10g,", qt[k]*unit/wd, ut[k]*unit/wd)
			if tot[k] > 0 {
				fmt.Fprintf(bw, "%.6g,%.4f", math.Hypot(qt[k], ut[k])/tot[k], math.Atan2(ut[k], qt[k])*90/math.Pi)
			} else {
				fmt.Fprint(bw, ",")
			}
		}
		fmt.Fprintln(bw)
	}
	return bw.Flush()
}

// writeSpectrumHeader writes the title, the lines, the binning and, when
// the scene is physical, the luminosity and distance; it returns
// scene.Resolved.SpectrumPerUnit (0: relative units).
func writeSpectrumHeader(bw *bufio.Writer, s *pixels.Spectrum, title string, r scene.Resolved) float64 {
	fmt.Fprintf(bw, "# %s\n", title)
	if s.Line == nil {
		fmt.Fprintf(bw, "# line rest energy %.10g keV; %d bins of %.10g keV from %.10g to %.10g keV", s.LineKeV, s.Bins(), s.Width(), s.MinKeV, s.MaxKeV)
	} else {
		fmt.Fprintf(bw, "# %d rest lines; %d bins of %.10g keV from %.10g to %.10g keV", len(s.Line), s.Bins(), s.Width(), s.MinKeV, s.MaxKeV)
	}
	if s.FWHMeV > 0 {
		fmt.Fprintf(bw, "; Gaussian instrument response FWHM %g eV", s.FWHMeV)
	}
	fmt.Fprintln(bw)
	if s.Line != nil {
		for l, rl := range r.RestLines.Lines {
			law := "[emission]'s law"
			if rl.Own {
				law = "its own law"
			}
			fmt.Fprintf(bw, "#   line %d (column flux_line_%d): rest energy %.10g keV, weight %g = %.10g of the line photons emitted; emissivity %s, %s\n",
				l+1, l+1, rl.EnergyKeV, rl.Weight, rl.Fraction, rl.Emissivity.Describe(), law)
		}
	}
	u := r.SpectrumPerUnit()
	if u > 0 {
		fmt.Fprintln(bw, "# flux columns: "+PhysicalSpectrumUnits)
		if s.Line == nil {
			fmt.Fprintf(bw, "#   line luminosity %g erg/s, both faces, = %.10g photons/s; distance %.10g cm\n", *r.Emission.LineLuminosityErgS, r.PhotonRate, r.DistanceCm)
		} else {
			fmt.Fprintf(bw, "#   line luminosity %g erg/s, both faces, total over the lines, = %.10g photons/s of mean rest energy %.10g keV; distance %.10g cm\n", *r.Emission.LineLuminosityErgS, r.PhotonRate, r.RestLines.MeanKeV, r.DistanceCm)
		}
	}
	return u
}

// binCentres returns the centres of the scene's spectrum bins, keV.
func binCentres(r scene.Resolved) []float64 {
	out := make([]float64, r.Spectrum.Bins)
	w := (r.MaxKeV - r.MinKeV) / float64(len(out))
	for k := range out {
		out[k] = r.MinKeV + (float64(k)+0.5)*w
	}
	return out
}

// WriteCombinedCSV writes the lines and the thermal continuum on the line
// spectrum's bins, both in photons cm⁻² s⁻¹ keV⁻¹ at the observer (the
// scene must be physical, scene.Resolved.Physical): bin centre and
// edges, the sum, the continuum, the lines (all orders) and, for a line
// list, each line. The lines are per-bin means, as in WriteCSV (with its
// instrument response, if any); the continuum c is the thermal photon
// flux density at the bin centres (pixels.Frame.ContinuumAt), not
// broadened: it varies little over a bin or an instrument width.
func WriteCombinedCSV(w io.Writer, s *pixels.Spectrum, c *pixels.Continuum, title string, r scene.Resolved) error {
	if len(c.EnergyKeV) != s.Bins() {
		return fmt.Errorf("outputs: the continuum has %d energies for %d spectrum bins", len(c.EnergyKeV), s.Bins())
	}
	bw := bufio.NewWriter(w)
	unit := writeSpectrumHeader(bw, s, title, r)
	if unit == 0 {
		return fmt.Errorf("outputs: the lines and continuum table needs the lines in physical units (mass, distance and emission.line_luminosity_erg_s)")
	}
	th := r.Thermal
	fmt.Fprintf(bw, "# thermal continuum: accretion rate %.10g g/s, f_col = %g; flux_continuum at the bin centres, not broadened\n", th.MdotGS, th.FCol)
	fmt.Fprint(bw, "energy_kev,energy_lo_kev,energy_hi_kev,flux_total,flux_continuum,flux_lines")
	for l := range s.Line {
		fmt.Fprintf(bw, ",flux_line_%d", l+1)
	}
	fmt.Fprintln(bw)
	lines, cont := s.Total(), c.Total()
	wd := s.Width()
	for k := range lines {
		lo := s.MinKeV + float64(k)*wd
		fl := lines[k] * unit / wd
		fmt.Fprintf(bw, "%.8g,%.8g,%.8g,%.10g,%.10g,%.10g", lo+wd/2, lo, lo+wd, fl+cont[k], cont[k], fl)
		for l := range s.Line {
			fmt.Fprintf(bw, ",%.10g", s.Line[l][k]*unit/wd)
		}
		fmt.Fprintln(bw)
	}
	return bw.Flush()
}
