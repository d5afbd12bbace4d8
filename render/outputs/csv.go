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
// flux density and one column per image order, all per keV. The flux is
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
	fmt.Fprintf(bw, "# %s\n", title)
	fmt.Fprintf(bw, "# line rest energy %.10g keV; %d bins of %.10g keV from %.10g to %.10g keV", s.LineKeV, s.Bins(), s.Width(), s.MinKeV, s.MaxKeV)
	if s.FWHMeV > 0 {
		fmt.Fprintf(bw, "; Gaussian instrument response FWHM %g eV", s.FWHMeV)
	}
	fmt.Fprintln(bw)
	unit := 1.0
	if u := r.SpectrumPerUnit(); u > 0 {
		unit = u
		fmt.Fprintln(bw, "# flux columns: "+PhysicalSpectrumUnits)
		fmt.Fprintf(bw, "#   line luminosity %g erg/s, both faces, = %.10g photons/s; distance %.10g cm\n", *r.Emission.LineLuminosityErgS, r.PhotonRate, r.DistanceCm)
	} else {
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
