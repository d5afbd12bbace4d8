package outputs

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"

	"kerrscope/raytrace"
	"kerrscope/render/internal/fits"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// fitsRows returns the Rows function of a FITS image of the frame whose
// pixel k (top row first) is value(k): FITS puts its first row at the
// bottom, so FITS row j is the frame's row H-1-j.
func fitsRows(f *pixels.Frame, value func(k int) float32) func(j int, row []float32) {
	return func(j int, row []float32) {
		base := (f.H - 1 - j) * f.W
		for i := range row {
			row[i] = value(base + i)
		}
	}
}

// fitsCopyRows is fitsRows for a map stored whole (one order's record).
func fitsCopyRows(f *pixels.Frame, v []float32) func(j int, row []float32) {
	return func(j int, row []float32) {
		base := (f.H - 1 - j) * f.W
		copy(row, v[base:base+f.W])
	}
}

// fitsAxes gives the linear WCS of the screen: world = α, β (in M) of
// pixel centres. The axis names avoid WCS's reserved spectral names.
func fitsAxes(f *pixels.Frame) [2]fits.Axis {
	r := f.Res
	return [2]fits.Axis{
		{Type: "ALPHA_M", RefPixel: 1, RefValue: pixels.PixelAlpha(r, 0), Delta: r.PixelSize},
		{Type: "BETA_M", RefPixel: 1, RefValue: pixels.PixelBeta(r, f.H-1), Delta: r.PixelSize},
	}
}

// fitsWCS returns the world coordinates of the screen's maps: the
// primary axes and the further descriptions of fits.Image. Without mass
// and distance the primary WCS is linear α, β in M (fitsAxes). With them
// it is celestial: gnomonic RA---TAN / DEC--TAN (Calabretta & Greisen
// 2002, A&A 395, 1077) about the hole (CRPIX the fractional pixel of
// α = β = 0, CRVAL the scene's RA, Dec or 0, 0), CDELT1 = −s, CDELT2 = +s
// (s the pixel side in degrees) and the rotation PC = [[cos PA, −sin PA],
// [sin PA, cos PA]]. The intermediate coordinates x = CDELT1 Σ PC1_j p_j,
// y = CDELT2 Σ PC2_j p_j (p_j pixel offsets from CRPIX) point east and
// north at the reference point, so x = s (−Δα cos PA + Δβ sin PA) and
// y = s (Δα sin PA + Δβ cos PA), Δα, Δβ in pixels: scene.SkyOffset. α, β
// in M stay as the alternate description A (Standard 4.0, sec. 8.2.1).
func fitsWCS(f *pixels.Frame) ([2]fits.Axis, []fits.WCS) {
	r := f.Res
	screen := fitsAxes(f)
	if !(r.MicroArcsecPerM > 0) {
		return screen, nil
	}
	s := r.PixelSize * r.MicroArcsecPerM / 3.6e9 // degrees
	ra, dec := 0.0, 0.0
	if r.Hole.RADeg != nil {
		ra, dec = *r.Hole.RADeg, *r.Hole.DecDeg
	}
	sin, cos := math.Sincos(r.Observer.PositionAngleDeg * math.Pi / 180)
	sky := fits.WCS{
		Name: "sky: ICRS RA, Dec, gnomonic about the hole",
		Axes: [2]fits.Axis{
			{Type: "RA---TAN", Unit: "deg", RefPixel: 1 - pixels.PixelAlpha(r, 0)/r.PixelSize, RefValue: ra, Delta: -s},
			{Type: "DEC--TAN", Unit: "deg", RefPixel: 1 - pixels.PixelBeta(r, f.H-1)/r.PixelSize, RefValue: dec, Delta: s},
		},
		PC:        &[2][2]float64{{cos, -sin}, {sin, cos}},
		RefSystem: "ICRS",
	}
	// CUNIT is omitted: M = GM/c² is no FITS unit ("M" would read as metres).
	alt := fits.WCS{Key: 'A', Name: "screen alpha, beta in M = GM/c^2", Axes: screen}
	return [2]fits.Axis{}, []fits.WCS{sky, alt}
}

// wcsNote is the COMMENT of the maps that says which axes they carry.
func wcsNote(f *pixels.Frame) []fits.Card {
	if !(f.Res.MicroArcsecPerM > 0) {
		return []fits.Card{{Key: "COMMENT", Value: "axis 1 is alpha, axis 2 is beta, both in M (GM/c^2); NaN = no disk seen"}}
	}
	c := []fits.Card{{Key: "COMMENT", Value: "WCS: RA, Dec (TAN); WCS A: alpha, beta in M (GM/c^2); NaN = no disk"}}
	if f.Res.Hole.RADeg == nil {
		c = append(c, fits.Card{Key: "COMMENT", Value: "CRVAL1, CRVAL2 = 0, 0: the source position was not given"})
	}
	return c
}

// fitsUnits returns the BUNIT and scale factor of the line and bolometric
// intensity maps: physical (scene.Resolved.IntensityPerUnit,
// BolometricPerUnit) when the scene gives mass, distance and luminosity,
// else relative (no BUNIT, factor 1).
func fitsUnits(r scene.Resolved) (lineUnit string, line float64, bolUnit string, bol float64) {
	if !r.Physical() {
		return "", 1, "", 1
	}
	return "photon cm-2 s-1 sr-1", r.IntensityPerUnit(), "erg cm-2 s-1 sr-1", r.BolometricPerUnit()
}

// checkFITSRange refuses physical intensities beyond the float32 range
// of the FITS images (a huge luminosity on a tiny hole), before anything
// is written.
func checkFITSRange(f *pixels.Frame) error {
	_, line, _, bol := fitsUnits(f.Res)
	if line == 1 && bol == 1 {
		return nil // relative units: the float32 sums are the values written
	}
	for _, q := range []struct {
		v      [][]float32
		factor float64
	}{{f.Line, line}, {f.Bol, bol}} {
		if q.v == nil {
			continue
		}
		for k := range f.Fate {
			if v := float64(f.TotalAt(q.v, k)) * q.factor; v > math.MaxFloat32 {
				return fmt.Errorf("emission.line_luminosity_erg_s = %g: intensity %.3g at a pixel exceeds the float32 range of the FITS maps (%.3g)", *f.Res.Emission.LineLuminosityErgS, v, math.MaxFloat32)
			}
		}
	}
	return nil
}

// scaled returns v × factor as float32 (NaN stays NaN).
func scaled(v float32, factor float64) float32 {
	if factor == 1 {
		return v
	}
	return float32(float64(v) * factor)
}

// fitsImages returns the maps as FITS image extensions, each computed
// row by row as it is written.
func fitsImages(f *pixels.Frame) []fits.Image {
	axes, more := fitsWCS(f)
	note := wcsNote(f)
	mk := func(name, unit, comment string, rows func(int, []float32)) fits.Image {
		return fits.Image{Name: name, Unit: unit, Width: f.W, Height: f.H, Rows: rows, Axes: axes, WCS: more,
			Cards: append([]fits.Card{{Key: "COMMENT", Value: comment}}, note...)}
	}
	lu, lf, bu, bf := fitsUnits(f.Res)
	// rel marks the intensities as relative when they are.
	rel := func(im fits.Image) fits.Image {
		if lu == "" {
			im.Cards = append(im.Cards, fits.Card{Key: "COMMENT", Value: "relative units: eps in the emissivity law's units, no BUNIT"})
		}
		return im
	}
	nan := float32(math.NaN())
	ims := []fits.Image{
		mk("REDSHIFT", "", "redshift factor g = E_obs/E_emit of the first image order seen", fitsRows(f, func(k int) float32 { return f.FirstSeenAt(f.G, k) })),
		rel(mk("INTENSITY", lu, "line intensity g^3 eps(r) limb, summed over the orders seen", fitsRows(f, func(k int) float32 { return scaled(f.TotalAt(f.Line, k), lf) }))),
		rel(mk("BOLOMETRIC", bu, "bolometric intensity g^4 eps(r) limb, summed over the orders seen", fitsRows(f, func(k int) float32 { return scaled(f.TotalAt(f.Bol, k), bf) }))),
		inMNote(f, mk("RADIUS", "", "Boyer-Lindquist source radius in M of the first image order seen", fitsRows(f, func(k int) float32 { return f.FirstSeenAt(f.R, k) }))),
		mk("ORDER", "", "first image order seen (0 = direct image)", fitsRows(f, func(k int) float32 {
			if f.First[k] < 0 {
				return nan
			}
			return float32(f.First[k])
		})),
		mk("CAPTURED", "", "1 = traced back, the ray falls into the horizon (shadow); 0 = escapes", fitsRows(f, func(k int) float32 {
			if f.Fate[k] == raytrace.Captured {
				return 1
			}
			return 0
		})),
	}
	for o := 0; o < f.Orders; o++ {
		suffix := string(rune('0' + o%10))
		if o >= 10 {
			suffix = string(rune('0'+o/10)) + suffix
		}
		ims = append(ims,
			mk("G_ORD"+suffix, "", "redshift factor g of image order "+suffix, fitsCopyRows(f, f.G[o])),
			inMNote(f, mk("R_ORD"+suffix, "", "source radius in M of image order "+suffix, fitsCopyRows(f, f.R[o]))),
			rel(mk("I_ORD"+suffix, lu, "line intensity g^3 eps limb of image order "+suffix, scaledRows(f, f.Line[o], lf))))
		if f.Q != nil {
			ims = append(ims,
				rel(stokesNote(mk("Q_ORD"+suffix, lu, "Stokes Q of the line intensity of image order "+suffix, scaledRows(f, f.Q[o], lf)))),
				rel(stokesNote(mk("U_ORD"+suffix, lu, "Stokes U of the line intensity of image order "+suffix, scaledRows(f, f.U[o], lf)))))
		}
	}
	if f.Q != nil {
		ims = append(ims,
			rel(stokesNote(mk("STOKES_Q", lu, "Stokes Q of the line intensity, sum over the orders seen (I: INTENSITY)", fitsRows(f, func(k int) float32 { return scaled(f.TotalAt(f.Q, k), lf) })))),
			rel(stokesNote(mk("STOKES_U", lu, "Stokes U of the line intensity, sum over the orders seen (I: INTENSITY)", fitsRows(f, func(k int) float32 { return scaled(f.TotalAt(f.U, k), lf) })))))
	}
	ims = append(ims, thermalImages(f, mk)...)
	return append(ims, timingImages(f, mk)...)
}

// stokesNote states the polarisation convention in a Stokes map's header.
func stokesNote(im fits.Image) fits.Image {
	im.Cards = append(im.Cards,
		fits.Card{Key: "POLCONV", Value: "IAU", Comment: "EVPA = atan2(U, Q)/2 from north through east"},
		fits.Card{Key: "COMMENT", Value: "IAU (Trans. IAU XVB, 1974): Q > 0 for an electric vector north-south,"},
		fits.Card{Key: "COMMENT", Value: "U > 0 for one at position angle 45 deg (north-east); the sky axes follow"},
		fits.Card{Key: "COMMENT", Value: "from POSANGLE, the spin axis position angle (north through east)"})
	return im
}

// polarisationCards are the primary cards of a frame with Stokes maps:
// the emission model, the convention and the net polarisation and β₂ of
// the whole image (pixels.Frame.Net).
func polarisationCards(f *pixels.Frame) []fits.Card {
	if f.Q == nil {
		return nil
	}
	m := f.Res.Polar
	n := f.Net()
	return []fits.Card{
		{Key: "POLCONV", Value: "IAU", Comment: "Stokes Q, U: EVPA from north through east"},
		{Key: "BFIELDR", Value: m.B[0], Comment: "field direction in the gas frame: radial"},
		{Key: "BFIELDP", Value: m.B[1], Comment: "field direction: azimuthal, + along the orbit"},
		{Key: "BFIELDZ", Value: m.B[2], Comment: "field direction: vertical, + along the spin axis"},
		{Key: "POLEMIT", Value: m.Fraction, Comment: "emitted linear polarisation fraction"},
		{Key: "SINPOWER", Value: m.SinPower, Comment: "emitted intensity ~ sin^p of photon-field angle"},
		{Key: "POLNET", Value: n.Fraction, Comment: "net linear polarisation fraction of the image"},
		{Key: "EVPANET", Value: n.Angle * 180 / math.Pi, Comment: "[deg] net EVPA, north through east"},
		{Key: "BETA2ABS", Value: cmplx.Abs(n.Beta2), Comment: "|beta_2|, Palumbo, Wong & Prather 2020"},
		{Key: "BETA2ARG", Value: cmplx.Phase(n.Beta2) * 180 / math.Pi, Comment: "[deg] arg beta_2 (0: radial EVPA pattern)"},
	}
}

// scaledRows is fitsCopyRows of v × factor.
func scaledRows(f *pixels.Frame, v []float32, factor float64) func(j int, row []float32) {
	copyRows := fitsCopyRows(f, v)
	if factor == 1 {
		return copyRows // scaled(x, 1) is x
	}
	return func(j int, row []float32) {
		copyRows(j, row)
		for i := range row {
			row[i] = scaled(row[i], factor)
		}
	}
}

// inMNote adds to a map in M (source radius, delay) that M = GM/c² is
// no FITS unit (so there is no BUNIT), and, with a mass, its size.
func inMNote(f *pixels.Frame, im fits.Image) fits.Image {
	im.Cards = append(im.Cards, fits.Card{Key: "COMMENT", Value: "unit M = GM/c^2 (length) or GM/c^3 (time), not a FITS unit: no BUNIT"})
	if r := f.Res; r.GravRadiusCm > 0 {
		im.Cards = append(im.Cards,
			fits.Card{Key: "MLENGTH", Value: r.GravRadiusCm, Comment: "[cm] length of 1 M, GM/c^2"},
			fits.Card{Key: "MTIME", Value: r.GravRadiusCm / speedOfLightCmS, Comment: "[s] time of 1 M, GM/c^3"})
	}
	return im
}

// speedOfLightCmS is c in cm/s (exact, SI definition of the metre).
const speedOfLightCmS = 2.99792458e10

// fitsHeader returns the primary header cards: what was rendered, with
// which program version.
func fitsHeader(f *pixels.Frame, version string) []fits.Card {
	r := f.Res
	cards := []fits.Card{
		{Key: "ORIGIN", Value: "kerrscope " + version},
		{Key: "SPIN", Value: r.Hole.Spin, Comment: "black-hole spin a (signed)"},
		{Key: "INCLIN", Value: r.Observer.InclinationDeg, Comment: "observer inclination [deg]"},
		{Key: "RHORIZON", Value: r.Horizon, Comment: "outer horizon radius [M]"},
		{Key: "RISCO", Value: r.ISCO, Comment: "ISCO radius [M]"},
		{Key: "RINNER", Value: r.Inner, Comment: "emitting disk inner edge [M]"},
		{Key: "ROUTER", Value: r.Disk.OuterRadius, Comment: "disk outer edge [M]"},
		{Key: "OPAQUE", Value: r.Disk.Opaque, Comment: "first landing stops the ray"},
		{Key: "ORDERS", Value: r.Disk.Orders, Comment: "image orders followed"},
		{Key: "PLUNGING", Value: r.Disk.Plunging, Comment: "gas inside the ISCO shines"},
		{Key: "LINEKEV", Value: r.Emission.LineKeV, Comment: "line rest energy [keV]"},
		{Key: "EMISLAW", Value: r.Emission.Emissivity, Comment: "emissivity law"},
		{Key: "EMISQ", Value: r.Emission.Index, Comment: "power-law index q"},
		{Key: "EMISQIN", Value: r.Emission.IndexInner, Comment: "broken law: inner index"},
		{Key: "EMISQOUT", Value: r.Emission.IndexOuter, Comment: "broken law: outer index"},
		{Key: "EMISRBRK", Value: r.Emission.BreakRad, Comment: "broken law: break radius [M]"},
		{Key: "LIMBLAW", Value: r.Emission.Limb, Comment: "limb law"},
		{Key: "PIXSIZE", Value: r.PixelSize, Comment: "pixel side [M]"},
		{Key: "FOV", Value: r.Screen.FieldOfView, Comment: "horizontal field of view [M]"},
	}
	if r.RestLines.List {
		for i := range cards {
			if cards[i].Key == "LINEKEV" {
				cards[i] = fits.Card{Key: "LINEKEV", Value: r.RestLines.Lines[0].EnergyKeV, Comment: "rest energy of line 1 [keV] (see NLINES)"}
			}
		}
		cards = append(cards, lineCards(r)...)
	}
	cards = append(cards,
		fits.Card{Key: "REFDEPTH", Value: r.Refine.Depth, Comment: "adaptive refinement levels (0: pixel centres)"},
		fits.Card{Key: "EMINKEV", Value: r.MinKeV, Comment: "spectrum lower energy [keV]"},
		fits.Card{Key: "EMAXKEV", Value: r.MaxKeV, Comment: "spectrum upper energy [keV]"},
		fits.Card{Key: "NBINS", Value: r.Spectrum.Bins, Comment: "spectrum bins"},
		fits.Card{Key: "FWHMEV", Value: r.Spectrum.FWHMeV, Comment: "instrument FWHM [eV], 0 = none"})
	if r.MicroArcsecPerM > 0 {
		cards = append(cards,
			fits.Card{Key: "MASSMSUN", Value: *r.Hole.MassSolar, Comment: "black-hole mass [solar masses]"},
			fits.Card{Key: "UASPERM", Value: r.MicroArcsecPerM, Comment: "angle of 1 M at the distance [uas]"})
	}
	cards = append(cards, clipCards(f)...)
	cards = append(cards, thermalCards(r)...)
	cards = append(cards, polarisationCards(f)...)
	return append(cards, skyCards(r)...)
}

// skyCards are the primary cards of the sky orientation and the physical
// units: position angle, source position, pixel solid angle, luminosity.
func skyCards(r scene.Resolved) []fits.Card {
	cards := []fits.Card{{Key: "POSANGLE", Value: r.Observer.PositionAngleDeg, Comment: "[deg] PA of the projected spin axis, N through E"}}
	if r.Hole.RADeg != nil {
		cards = append(cards,
			fits.Card{Key: "SRCRA", Value: *r.Hole.RADeg, Comment: "[deg] ICRS right ascension of the hole"},
			fits.Card{Key: "SRCDEC", Value: *r.Hole.DecDeg, Comment: "[deg] ICRS declination of the hole"})
	}
	if r.MicroArcsecPerM > 0 {
		cards = append(cards,
			fits.Card{Key: "PIXSR", Value: r.PixelSolidAngle(), Comment: "[sr] solid angle of one pixel"},
			fits.Card{Key: "DISTCM", Value: r.DistanceCm, Comment: "[cm] distance"})
	}
	if r.Physical() {
		cards = append(cards,
			fits.Card{Key: "LINELUM", Value: *r.Emission.LineLuminosityErgS, Comment: "[erg/s] line luminosity, both faces"},
			fits.Card{Key: "PHOTRATE", Value: r.PhotonRate, Comment: "[1/s] line photons emitted per distant-clock second"})
	} else {
		cards = append(cards, fits.Card{Key: "COMMENT", Value: "intensities in relative units (give mass, distance and line luminosity)"})
	}
	return cards
}

// writeFITS writes all maps to one FITS file.
func writeFITS(w io.Writer, f *pixels.Frame, version string) error {
	if err := checkFITSRange(f); err != nil {
		return err
	}
	return fits.Encode(w, fitsHeader(f, version), fitsImages(f))
}

// lineCards are the primary header cards of a line list (none for the one
// line emission.line_kev): the number of lines and each line's rest
// energy, fraction of the line photons and emissivity law, and the
// list's mean photon energy.
func lineCards(r scene.Resolved) []fits.Card {
	ls := r.RestLines
	if !ls.List {
		return nil
	}
	cards := []fits.Card{
		{Key: "NLINES", Value: len(ls.Lines), Comment: "rest lines of the line list"},
		{Key: "LMEANKEV", Value: ls.MeanKeV, Comment: "mean rest energy of a line photon [keV]"},
	}
	for i, l := range ls.Lines {
		n := i + 1
		cards = append(cards,
			fits.Card{Key: fmt.Sprintf("LKEV%d", n), Value: l.EnergyKeV, Comment: fmt.Sprintf("line %d rest energy [keV]", n)},
			fits.Card{Key: fmt.Sprintf("LFRAC%d", n), Value: l.Fraction, Comment: fmt.Sprintf("line %d fraction of the line photons", n)},
			fits.Card{Key: fmt.Sprintf("LLAW%d", n), Value: l.Emissivity.Describe(), Comment: fmt.Sprintf("line %d emissivity", n)})
	}
	return cards
}
