package maps

import (
	"math"
	"sort"

	"kerrscope/render/pixels"
)

// Scales fixes the colour scales of the maps; zero fields are chosen from
// the frame. Sweeps fix them up front so that animation frames share one
// scale.
type Scales struct {
	GMin     float64 // redshift colours: g from GMin (< 1) to GMax (> 1), log scale on each side of g = 1
	GMax     float64
	IMax     float64 // intensity colour maximum
	IDecades float64 // decades shown on a log intensity scale (default 4)
	RMin     float64 // radius colour range (default: disk edges)
	RMax     float64
	FluxMax  float64 // spectrum plot upper limit (per keV)
	// TMin, TMax: delay colours, in M of t_o − t (raytrace.Timing); the
	// delay map shows t_o − t − TMin. Default: the frame's range.
	TMin, TMax float64
	// GLinear places g linearly on the redshift scale (output.
	// redshift_scale = "linear") instead of the split log scale.
	GLinear bool
}

// AutoScales returns the scales the frame would choose for itself: the
// redshift range and the intensity maximum span the values of the
// pixels that see the disk, or with the scene's scales.percentile p the
// p-th to (100 − p)-th percentile of them by screen area (Percentiles);
// the redshift range always reaches 0.95 and 1.05. A frame without
// redshift (or line) records gets the defaults for g (or intensity).
func AutoScales(f *pixels.Frame) Scales {
	r := f.Res
	sc := Scales{IDecades: 4, RMin: r.Inner, RMax: r.Disk.OuterRadius}
	p := percentileOf(r.Scales)
	sc.GMin, sc.GMax = 1/1.5, 1.5
	gRange, iRange := func() (float64, float64, bool) { return Percentiles(GSamples(nil, f), p) },
		func() (float64, float64, bool) { return Percentiles(IntensitySamples(nil, f), p) }
	if !(p > 0) { // the full ranges: no samples to gather and sort
		gRange, iRange = func() (float64, float64, bool) { return gExtremes(f) }, func() (float64, float64, bool) { return intensityExtremes(f) }
	}
	if lo, hi, ok := gRange(); ok && hi > 0 {
		sc.GMin, sc.GMax = math.Min(0.95, lo), math.Max(1.05, hi)
	}
	if _, hi, ok := iRange(); ok && hi > 0 {
		sc.IMax = hi
	}
	if sc.IMax == 0 {
		sc.IMax = 1
	}
	sc.TMin, sc.TMax = delayRange(f)
	if !(sc.TMax > sc.TMin) {
		sc.TMax = sc.TMin + 1
	}
	return sc
}

// complete reports whether Fill would keep every field of s.
func (s Scales) complete() bool {
	return s.GMax > 1 && s.GMin > 0 && s.GMin < 1 && s.IMax > 0 && s.IDecades > 0 && s.RMin > 0 && s.RMax > s.RMin
}

// Fill completes s where it is zero: first with the scales the frame's
// scene fixes (scene.Scales), then with the frame's own choices
// (AutoScales), each end of a range on its own.
func (s Scales) Fill(f *pixels.Frame) Scales {
	fixed := FromScene(f.Res.Scales)
	for _, q := range []struct{ v, by *float64 }{{&s.GMin, &fixed.GMin}, {&s.GMax, &fixed.GMax}, {&s.IMax, &fixed.IMax},
		{&s.IDecades, &fixed.IDecades}, {&s.RMin, &fixed.RMin}, {&s.RMax, &fixed.RMax}, {&s.FluxMax, &fixed.FluxMax}} {
		if *q.v == 0 {
			*q.v = *q.by
		}
	}
	s.GLinear = s.GLinear || f.Res.Output.RedshiftScale == "linear"
	if s.complete() {
		return s
	}
	auto := AutoScales(f)
	if !(s.GMin > 0 && s.GMin < 1) {
		s.GMin = auto.GMin
	}
	if !(s.GMax > 1) {
		s.GMax = auto.GMax
	}
	if s.IMax <= 0 {
		s.IMax = auto.IMax
	}
	if s.IDecades <= 0 {
		s.IDecades = auto.IDecades
	}
	if !(s.RMin > 0) {
		s.RMin = auto.RMin
	}
	if !(s.RMax > 0) {
		s.RMax = auto.RMax
	}
	if !(s.RMax > s.RMin) {
		s.RMin, s.RMax = auto.RMin, auto.RMax
	}
	if !(s.TMax > s.TMin) {
		s.TMin, s.TMax = auto.TMin, auto.TMax
	}
	return s
}

// GPosition places g on the diverging colour scale, g = 1 at the centre
// (NaN stays NaN). The split scale (the default) takes log g separately
// on each side, so that GMin and GMax reach the two ends: equal steps of
// the colours are equal ratios of g, but the two halves have different
// stretches (for g from 0.17 to 1.24 the redshift side covers a factor
// 6 and the blueshift side a factor 1.24 on the same length). The linear
// scale (GLinear) is linear in g with the same stretch on both sides, the
// ends at 1 ∓ D for the larger distance D of GMin and GMax from 1: the
// side nearer 1 does not reach its end of the colours.
func (s Scales) GPosition(g float64) float64 {
	return s.gPositioner()(g)
}

// gLinearSpan is D of the linear scale.
func (s Scales) gLinearSpan() float64 {
	return math.Max(1-s.GMin, s.GMax-1)
}

// gPositioner returns GPosition with the logarithms of GMin and GMax
// taken once: the same values, for per-pixel use.
func (s Scales) gPositioner() func(g float64) float64 {
	if s.GLinear {
		d := s.gLinearSpan()
		return func(g float64) float64 {
			if math.IsNaN(g) {
				return g
			}
			return math.Max(0, math.Min(1, 0.5+0.5*(g-1)/d))
		}
	}
	lmin, lmax := math.Log(s.GMin), math.Log(s.GMax)
	return func(g float64) float64 {
		if g < 1 {
			return math.Max(0, 0.5*(1-math.Log(g)/lmin))
		}
		return math.Min(1, 0.5*(1+math.Log(g)/lmax))
	}
}

// niceRatios returns tick values of g between GMin and GMax, at least
// 0.07 apart on the colour bar, always including g = 1; none unless
// 0 < GMin < 1 < GMax, both finite. It tries a fixed list of candidates.
func niceRatios(sc Scales) []float64 {
	if !(sc.GMin > 0 && sc.GMin < 1 && sc.GMax > 1 && !math.IsInf(sc.GMax, 0)) {
		return nil
	}
	cands := []float64{1, 0.5, 2, 0.2, 5, 0.1, 10, 0.05, 0.02, 0.01, 0.005, 0.3, 3, 0.7, 1.5, 0.4, 0.6, 0.8, 1.2, 1.1, 1.3, 4, 0.9, 1.4, 1.05, 0.95}
	var out []float64
	for _, g := range cands {
		if g < sc.GMin*0.999 || g > sc.GMax*1.001 {
			continue
		}
		t := sc.GPosition(g)
		ok := true
		for _, h := range out {
			ok = ok && math.Abs(sc.GPosition(h)-t) >= 0.07
		}
		if ok {
			out = append(out, g)
		}
	}
	sort.Float64s(out)
	return out
}

// maxTickDecades bounds the decades a colour-bar tick loop visits: every
// positive finite float64 lies within 10^-324 … 10^309.
const maxTickDecades = 640

// decadeRange returns the decades of lo and hi, ok only for
// 0 < lo ≤ hi < ∞.
func decadeRange(lo, hi float64) (dlo, dhi float64, ok bool) {
	if !(lo > 0 && hi >= lo) || math.IsInf(hi, 0) {
		return 0, 0, false
	}
	return math.Log10(lo), math.Log10(hi), true
}

// decadeTicks returns the powers of ten within [lo, hi]; none unless
// 0 < lo ≤ hi < ∞.
func decadeTicks(lo, hi float64) []float64 {
	llo, lhi, ok := decadeRange(lo, hi)
	if !ok {
		return nil
	}
	var out []float64
	d := math.Ceil(llo)
	for i := 0; i < maxTickDecades && d <= math.Floor(lhi); i++ {
		out = append(out, math.Pow(10, d))
		d++
	}
	return out
}

// logTicks returns lo, the 1-2-5 values within [lo, hi] and hi; none
// unless 0 < lo ≤ hi < ∞.
func logTicks(lo, hi float64) []float64 {
	llo, lhi, ok := decadeRange(lo, hi)
	if !ok {
		return nil
	}
	var out []float64
	d := math.Floor(llo)
	for i := 0; i < maxTickDecades && d <= math.Ceil(lhi); i++ {
		for _, m := range []float64{1, 2, 5} {
			if v := m * math.Pow(10, d); v >= lo && v <= hi {
				out = append(out, v)
			}
		}
		d++
	}
	return append([]float64{lo}, append(out, hi)...)
}
