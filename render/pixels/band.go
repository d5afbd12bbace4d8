package pixels

import (
	"errors"
	"math"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// BandSide is the light of a band of source radii in one image order on
// one side of the critical curve: from photons that escape to infinity
// (outside the shadow edge) or that end at the horizon (inside it), by
// the fate of each sample (Sample.Fate). Flux is Σ g³ ε L ΔΩ over the
// samples in the band, in the units of the spectrum (M² of screen for an
// observer at D = 1 M); FluxFraction is of the window's line flux. The
// box is that of the sample cells in the band and the g range that of
// their samples; all are null when the side holds no band light.
type BandSide struct {
	Area         float64 `json:"area_m2"`
	Flux         float64 `json:"flux"`
	FluxFraction float64 `json:"flux_fraction"`
	BandBox
}

// BandBox is a screen box (α, β in M) and a range of g; in JSON its
// fields sit inline in the object that holds it, null when empty.
type BandBox struct {
	AlphaMin *float64 `json:"alpha_min"`
	AlphaMax *float64 `json:"alpha_max"`
	BetaMin  *float64 `json:"beta_min"`
	BetaMax  *float64 `json:"beta_max"`
	GMin     *float64 `json:"g_min"`
	GMax     *float64 `json:"g_max"`
}

// box returns the sum's box and g range.
func (s *bandSum) box() BandBox {
	ptr := func(v float64) *float64 { return &v }
	return BandBox{ptr(s.amin), ptr(s.amax), ptr(s.bmin), ptr(s.bmax), ptr(s.gmin), ptr(s.gmax)}
}

// BandOrder is one image order's share of a band: the pixels with any of
// their area in it and its two sides.
type BandOrder struct {
	Order    int      `json:"order"`
	Pixels   int      `json:"pixels"`
	Escaping BandSide `json:"escaping"`
	Captured BandSide `json:"captured"`
}

// BandReport says where emission from source radii [RMin, RMax] lands on
// the screen, measured by area: every sample of the render stands for its
// cell, and a cell counts when its sample's seen crossing of that order
// lies in the band. Fractions are of the line flux of the whole window
// (WindowFlux, in the spectrum's units); areas are in M².
type BandReport struct {
	Spin           float64 `json:"spin"`
	InclinationDeg float64 `json:"inclination_deg"`
	RMin           float64 `json:"r_min"`
	RMax           float64 `json:"r_max"`
	WindowFlux     float64 `json:"window_line_flux"`
	Flux           float64 `json:"flux"`
	// FluxFractionAll is Flux / WindowFlux.
	FluxFractionAll float64 `json:"flux_fraction"`
	Area            float64 `json:"area_m2"`
	// Per image order: pixels with any area in the band, their flux
	// fraction, and the order's sides.
	Pixels       []int       `json:"pixels_per_order"`
	FluxFraction []float64   `json:"flux_fraction_per_order"`
	Orders       []BandOrder `json:"orders"`
	// Box of the sample cells in the band and g range of their samples,
	// over all orders and sides (null when none).
	BandBox
	// For spin > 0.99: distance from the critical curve at this spin of
	// the centres of the pixels with band area (mean weighted by that
	// area), and the α of its vertical piece in the a → 1 limit,
	// -2/sin θo (Bardeen 1973).
	CriticalDistanceMax  *float64 `json:"critical_distance_max"`
	CriticalDistanceMean *float64 `json:"critical_distance_mean"`
	ExtremalAlpha        *float64 `json:"extremal_alpha"`
	Photons              int64    `json:"photons"`
}

// ErrNoBand is returned by LocateBand for a frame rendered without KeepBand.
var ErrNoBand = errors.New("pixels: the frame was rendered without the band records (KeepBand)")

// bandSum gathers the samples of one order and side that lie in the
// band, in pixel units (area in pixels, flux as intensity × pixels).
type bandSum struct {
	area, flux             float64
	amin, amax, bmin, bmax float64
	gmin, gmax             float64
}

// bandTally gathers a band's samples over a run of pixels.
type bandTally struct {
	total float64                     // line flux of every seen sample
	sum   [scene.MaxOrders][2]bandSum // [order][side]: 0 escaping, 1 captured
}

// add puts a sample of order o and fate fate standing for the cell
// α ∈ [a0, a1], β ∈ [b0, b1] (area w pixels) into the tally.
func (t *bandTally) add(o int, fate raytrace.Fate, w, line, g, a0, a1, b0, b1 float64) {
	side := 0
	if fate == raytrace.Captured {
		side = 1
	}
	s := &t.sum[o][side]
	if s.area == 0 {
		s.amin, s.amax, s.bmin, s.bmax, s.gmin, s.gmax = a0, a1, b0, b1, g, g
	} else {
		s.amin, s.amax = math.Min(s.amin, a0), math.Max(s.amax, a1)
		s.bmin, s.bmax = math.Min(s.bmin, b0), math.Max(s.bmax, b1)
		s.gmin, s.gmax = math.Min(s.gmin, g), math.Max(s.gmax, g)
	}
	s.area += w
	s.flux += w * line
}

// merge adds u to t (call in a fixed order: sums depend on it).
func (t *bandTally) merge(u *bandTally) {
	t.total += u.total
	for o := range t.sum {
		for side := range t.sum[o] {
			t.sum[o][side].merge(&u.sum[o][side])
		}
	}
}

// merge adds v to s.
func (s *bandSum) merge(v *bandSum) {
	switch {
	case v.area == 0:
	case s.area == 0:
		*s = *v
	default:
		s.area, s.flux = s.area+v.area, s.flux+v.flux
		s.amin, s.amax = math.Min(s.amin, v.amin), math.Max(s.amax, v.amax)
		s.bmin, s.bmax = math.Min(s.bmin, v.bmin), math.Max(s.bmax, v.bmax)
		s.gmin, s.gmax = math.Min(s.gmin, v.gmin), math.Max(s.gmax, v.gmax)
	}
}

// bandRange is a band of source radii to tally while rendering.
type bandRange struct{ rmin, rmax float64 }

func (b bandRange) holds(r float32) bool {
	return float64(r) >= b.rmin && float64(r) <= b.rmax
}

// splits reports whether a cell whose corners see radii rmin … rmax may
// hold a boundary of the band: some corners in it and some not, or the
// band between them.
func (b bandRange) splits(rmin, rmax float64) bool {
	in := rmax >= b.rmin && rmin <= b.rmax // the corner range meets the band
	all := rmin >= b.rmin && rmax <= b.rmax
	return in && !all
}

// tallyCentre adds the one-photon-per-pixel sample s of pixel (i, j) to
// the tally and stores its band fractions (0 or 1).
func (f *Frame) tallyCentre(i, j int, s *Sample, t *bandTally) {
	k := j*f.W + i
	h := f.Res.PixelSize
	a0, _, _, b1 := f.Window()
	x0, y1 := a0+float64(i)*h, b1-float64(j)*h
	for o := 0; o < f.Orders; o++ {
		hh := &s.Hits[o]
		f.Band[o][k] = 0
		if !hh.Seen {
			continue
		}
		t.total += hh.Line
		if f.band.holds(float32(hh.R)) {
			f.Band[o][k] = 1
			t.add(o, s.Fate, 1, hh.Line, hh.G, x0, x0+h, y1-h, y1)
		}
	}
}

// LocateBand reports, per image order and side of the critical curve,
// where the light of the scene's band [BandMin, BandMax] lands; the mask
// is Frame.Band. The frame must have been rendered keeping KeepBand
// (else ErrNoBand).
func (f *Frame) LocateBand() (BandReport, error) {
	if f.Band == nil || f.bandSums == nil {
		return BandReport{}, ErrNoBand
	}
	r := f.Res
	t := f.bandSums
	px := r.PixelSize * r.PixelSize
	rep := BandReport{Spin: r.Hole.Spin, InclinationDeg: r.Observer.InclinationDeg, RMin: f.band.rmin, RMax: f.band.rmax,
		WindowFlux: t.total * px, Pixels: make([]int, f.Orders), FluxFraction: make([]float64, f.Orders),
		Orders: make([]BandOrder, f.Orders), Photons: f.Photons}
	frac := func(v float64) float64 {
		if t.total > 0 {
			return v / t.total
		}
		return 0
	}
	ptr := func(v float64) *float64 { return &v }
	var all bandSum
	for o := 0; o < f.Orders; o++ {
		for _, v := range f.Band[o] {
			if v > 0 {
				rep.Pixels[o]++
			}
		}
		rep.Orders[o] = BandOrder{Order: o, Pixels: rep.Pixels[o]}
		for side, out := range [2]*BandSide{&rep.Orders[o].Escaping, &rep.Orders[o].Captured} {
			s := t.sum[o][side]
			if s.area == 0 {
				continue
			}
			*out = BandSide{Area: s.area * px, Flux: s.flux * px, FluxFraction: frac(s.flux), BandBox: s.box()}
			rep.FluxFraction[o] += frac(s.flux)
			all.merge(&s)
		}
	}
	rep.Flux, rep.FluxFractionAll, rep.Area = all.flux*px, frac(all.flux), all.area*px
	if all.area > 0 {
		rep.BandBox = all.box()
	}
	if r.Hole.Spin > 0.99 {
		rep.ExtremalAlpha = ptr(-2 / f.Model.Obs.SinInclination())
		loc := f.Model.Obs.NewCriticalLocator()
		dsum, dmax, wsum := 0.0, 0.0, 0.0
		for k := 0; k < f.W*f.H; k++ {
			w := 0.0
			for o := 0; o < f.Orders; o++ {
				w += float64(f.Band[o][k])
			}
			if w == 0 {
				continue
			}
			d, _ := loc.Distance(PixelAlpha(r, k%f.W), PixelBeta(r, k/f.W))
			dsum += w * d
			wsum += w
			dmax = math.Max(dmax, d)
		}
		if wsum > 0 {
			rep.CriticalDistanceMax, rep.CriticalDistanceMean = ptr(dmax), ptr(dsum/wsum)
		}
	}
	return rep, nil
}
