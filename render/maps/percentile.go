package maps

import (
	"context"
	"math"
	"sort"

	"kerrscope/render/internal/workers"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Sample is one value of a map with the screen area it covers (M²).
type Sample struct {
	V, W float64
}

// Percentiles returns the p-th and (100 − p)-th percentile of the
// samples weighted by their area: lo is the smallest value below which
// (inclusive) at least p % of the total area lies, hi the largest value
// above which (inclusive) at least p % lies. With p = 0 they are the
// smallest and largest value. NaN values and samples of zero or
// non-finite weight are ignored; ok is false when none is left. The
// samples are sorted in place. This is the weighted nearest-rank
// percentile (common practice); 0 ≤ p < 50.
func Percentiles(s []Sample, p float64) (lo, hi float64, ok bool) {
	n := 0
	total := 0.0
	for _, x := range s {
		if !math.IsNaN(x.V) && x.W > 0 && !math.IsInf(x.W, 0) {
			s[n] = x
			n++
			total += x.W
		}
	}
	s = s[:n]
	if n == 0 {
		return 0, 0, false
	}
	sort.Slice(s, func(i, j int) bool { return s[i].V < s[j].V })
	if !(p > 0) {
		return s[0].V, s[n-1].V, true
	}
	cut := total * p / 100
	lo, hi = s[0].V, s[n-1].V
	acc := 0.0
	for _, x := range s {
		if acc += x.W; acc >= cut {
			lo = x.V
			break
		}
	}
	acc = 0
	for i := n - 1; i >= 0; i-- {
		if acc += s[i].W; acc >= cut {
			hi = s[i].V
			break
		}
	}
	return lo, hi, true
}

// GSamples appends the redshift factor of the first image seen in every
// pixel of the frame that sees the disk, each with the pixel's area.
func GSamples(dst []Sample, f *pixels.Frame) []Sample {
	if f.G == nil {
		return dst
	}
	w := f.Res.PixelSize * f.Res.PixelSize
	for k := 0; k < f.W*f.H; k++ {
		if v := float64(f.FirstSeenAt(f.G, k)); !math.IsNaN(v) {
			dst = append(dst, Sample{v, w})
		}
	}
	return dst
}

// IntensitySamples appends the line intensity (all orders seen) of every
// pixel of the frame that sees the disk, each with the pixel's area.
func IntensitySamples(dst []Sample, f *pixels.Frame) []Sample {
	if f.Line == nil {
		return dst
	}
	w := f.Res.PixelSize * f.Res.PixelSize
	for k := 0; k < f.W*f.H; k++ {
		if v := float64(f.TotalAt(f.Line, k)); !math.IsNaN(v) && v > 0 {
			dst = append(dst, Sample{v, w})
		}
	}
	return dst
}

// gExtremes returns the smallest and largest g of the first image seen
// over the frame's pixels: Percentiles(GSamples(nil, f), 0) without
// gathering the samples.
func gExtremes(f *pixels.Frame) (lo, hi float64, ok bool) {
	if f.G == nil {
		return 0, 0, false
	}
	return extremes(f.W*f.H, func(k int) float64 { return float64(f.FirstSeenAt(f.G, k)) })
}

// intensityExtremes is Percentiles(IntensitySamples(nil, f), 0) without
// gathering the samples.
func intensityExtremes(f *pixels.Frame) (lo, hi float64, ok bool) {
	if f.Line == nil {
		return 0, 0, false
	}
	return extremes(f.W*f.H, func(k int) float64 {
		if v := float64(f.TotalAt(f.Line, k)); v > 0 {
			return v
		}
		return math.NaN()
	})
}

// extremes returns the smallest and largest of value(k), k < n, NaN left
// out; ok is false when every value is NaN. Pieces of extremesPiece
// values are scanned on all cores; the extremes do not depend on the
// order of the scan.
func extremes(n int, value func(k int) float64) (lo, hi float64, ok bool) {
	pieces := (n + extremesPiece - 1) / extremesPiece
	type span struct {
		lo, hi float64
		ok     bool
	}
	part := make([]span, pieces)
	workers.Each(context.Background(), pieces, func() struct{} { return struct{}{} }, func(p int, _ struct{}) {
		s := span{lo: math.Inf(1), hi: math.Inf(-1)}
		for k := p * extremesPiece; k < min(n, (p+1)*extremesPiece); k++ {
			if v := value(k); !math.IsNaN(v) {
				s.lo, s.hi, s.ok = math.Min(s.lo, v), math.Max(s.hi, v), true
			}
		}
		part[p] = s
	})
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, s := range part {
		if s.ok {
			lo, hi, ok = math.Min(lo, s.lo), math.Max(hi, s.hi), true
		}
	}
	if !ok {
		return 0, 0, false
	}
	return lo, hi, true
}

// extremesPiece is the number of values of one piece of extremes' work.
const extremesPiece = 1 << 16

// percentileOf is the scene's scales.percentile, 0 when not given.
func percentileOf(s scene.Scales) float64 {
	if s.Percentile == nil {
		return 0
	}
	return *s.Percentile
}

// FromScene returns the scales the scene fixes (scene.Scales; zero where
// it leaves them to the program).
func FromScene(s scene.Scales) Scales {
	get := func(p *float64) float64 {
		if p == nil {
			return 0
		}
		return *p
	}
	return Scales{GMin: get(s.GMin), GMax: get(s.GMax), IMax: get(s.IntensityMax), IDecades: get(s.IntensityDecades),
		RMin: get(s.RadiusMin), RMax: get(s.RadiusMax), FluxMax: get(s.FluxMax)}
}
