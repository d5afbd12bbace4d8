package outputs

import (
	"io"
	"math"

	"kerrscope/raytrace"
	"kerrscope/render/internal/fits"
	"kerrscope/render/pixels"
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

// fitsImages returns the maps as FITS image extensions, each computed
// row by row as it is written.
func fitsImages(f *pixels.Frame) []fits.Image {
	axes := fitsAxes(f)
	mk := func(name, unit, comment string, rows func(int, []float32)) fits.Image {
		return fits.Image{Name: name, Unit: unit, Width: f.W, Height: f.H, Rows: rows, Axes: axes,
			Cards: []fits.Card{{Key: "COMMENT", Value: comment}, {Key: "COMMENT", Value: "axis 1 is alpha, axis 2 is beta, both in M (GM/c^2); NaN = no disk seen"}}}
	}
	nan := float32(math.NaN())
	ims := []fits.Image{
		mk("REDSHIFT", "", "redshift factor g = E_obs/E_emit of the first image order seen", fitsRows(f, func(k int) float32 { return f.FirstSeenAt(f.G, k) })),
		mk("INTENSITY", "", "line intensity g^3 eps(r) limb, summed over the orders seen", fitsRows(f, func(k int) float32 { return f.TotalAt(f.Line, k) })),
		mk("BOLOMETRIC", "", "bolometric intensity g^4 eps(r) limb, summed over the orders seen", fitsRows(f, func(k int) float32 { return f.TotalAt(f.Bol, k) })),
		mk("RADIUS", "", "Boyer-Lindquist source radius in M of the first image order seen", fitsRows(f, func(k int) float32 { return f.FirstSeenAt(f.R, k) })),
		mk("ORDER", "", "first image order seen (0 = direct image)", fitsRows(f, func(k int) float32 {
			if f.First[k] < 0 {
				return nan
			}
			return float32(f.First[k])
		})),
		mk("CAPTURED", "", "1 = the photon comes from the horizon (shadow), 0 = from infinity", fitsRows(f, func(k int) float32 {
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
			mk("R_ORD"+suffix, "", "source radius in M of image order "+suffix, fitsCopyRows(f, f.R[o])),
			mk("I_ORD"+suffix, "", "line intensity g^3 eps limb of image order "+suffix, fitsCopyRows(f, f.Line[o])))
	}
	return append(ims, timingImages(f, mk)...)
}

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
	return cards
}

// writeFITS writes all maps to one FITS file.
func writeFITS(w io.Writer, f *pixels.Frame, version string) error {
	return fits.Encode(w, fitsHeader(f, version), fitsImages(f))
}
