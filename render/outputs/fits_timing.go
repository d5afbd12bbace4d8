package outputs

import (
	"strconv"

	"kerrscope/render/internal/fits"
	"kerrscope/render/pixels"
)

// timingImages returns the FITS extensions of the time delays, when the
// frame has them (the scene asked for the delay map): DELAY, the delay of
// the first order seen; per order n, T_ORDn (delay) and PHI_ORDn
// (azimuth); and per pair of successive orders, DT_ORDn, the delay of the
// order-n image behind the order-(n−1) image of the same disk point
// (pixels.Frame.SubimageDelay).
func timingImages(f *pixels.Frame, mk func(name, unit, comment string, rows func(int, []float32)) fits.Image) []fits.Image {
	if f.T == nil {
		return nil
	}
	// The header says how the delays are regularised (cards of at most 72
	// characters).
	note := func(im fits.Image) fits.Image {
		im.Cards = append(im.Cards,
			fits.Card{Key: "COMMENT", Value: "delay = t_obs - t_emit less r_o + 2 ln r_o, observer at r_o -> inf;"},
			fits.Card{Key: "COMMENT", Value: "only differences of delays are physical"})
		return inMNote(f, im)
	}
	ims := []fits.Image{note(mk("DELAY", "", "time delay t_obs - t_emit [M] of the first order seen", fitsRows(f, func(k int) float32 { return f.FirstSeenAt(f.T, k) })))}
	for o := 0; o < f.Orders; o++ {
		n := strconv.Itoa(o)
		ims = append(ims,
			note(mk("T_ORD"+n, "", "time delay t_obs - t_emit [M] of image order "+n, fitsCopyRows(f, f.T[o]))),
			mk("PHI_ORD"+n, "rad", "azimuth phi_emit - phi_obs [rad] of image order "+n+" (not mod 2pi)", fitsCopyRows(f, f.Phi[o])))
		if o > 0 {
			ims = append(ims, inMNote(f, mk("DT_ORD"+n, "", "delay of order "+n+" behind order "+strconv.Itoa(o-1)+", same disk point", fitsCopyRows(f, f.SubimageDelay(o)))))
		}
	}
	return ims
}
