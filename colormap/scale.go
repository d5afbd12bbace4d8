package colormap

import "math"

// Linear maps v to t in [0, 1] linearly, lo to 0 and hi to 1 (hi may be
// below lo to reverse the direction), clamping values outside the range.
// It returns NaN, which At shows as NoHit, when v, lo or hi is NaN or when
// a bound is infinite; when lo equals hi any other v maps to 0.5.
func Linear(v, lo, hi float64) float64 {
	if math.IsNaN(v) || !finite(lo) || !finite(hi) {
		return math.NaN()
	}
	if lo == hi {
		return 0.5
	}
	return clamp01((v - lo) / (hi - lo))
}

// Log maps v to t in [0, 1] linearly in log v, lo to 0 and hi to 1,
// clamping values outside the range; v <= 0 counts as below any positive
// bound. It returns NaN when v is NaN or when a bound is not finite and
// positive; when lo equals hi any other v maps to 0.5.
func Log(v, lo, hi float64) float64 {
	if math.IsNaN(v) || !finite(lo) || !finite(hi) || lo <= 0 || hi <= 0 {
		return math.NaN()
	}
	if lo == hi {
		return 0.5
	}
	if v <= 0 {
		v = 0
	}
	return clamp01((math.Log(v) - math.Log(lo)) / (math.Log(hi) - math.Log(lo)))
}

// LogScale returns Log with fixed bounds: LogScale(lo, hi)(v) equals
// Log(v, lo, hi) for every v, bit for bit, with the logarithms of the
// bounds taken once (for per-pixel use).
func LogScale(lo, hi float64) func(v float64) float64 {
	if !finite(lo) || !finite(hi) || lo <= 0 || hi <= 0 {
		return func(float64) float64 { return math.NaN() }
	}
	if lo == hi {
		return func(v float64) float64 {
			if math.IsNaN(v) {
				return math.NaN()
			}
			return 0.5
		}
	}
	llo, lhi := math.Log(lo), math.Log(hi)
	return func(v float64) float64 {
		if math.IsNaN(v) {
			return math.NaN()
		}
		if v <= 0 {
			v = 0
		}
		return clamp01((math.Log(v) - llo) / (lhi - llo))
	}
}

// LogRatio maps a positive ratio g centred on 1, such as a redshift factor,
// to t = 0.5 + 0.5·ln g / ln gmax clamped to [0, 1]: g = 1 maps to 0.5,
// g = gmax to 1 and g = 1/gmax to 0, so that a ratio and its reciprocal lie
// symmetrically about the centre of a diverging scale. A gmax below 1 is
// replaced by 1/gmax, and g = 0 maps to 0. It returns NaN when g is NaN or
// negative, or when gmax is not finite, not positive or equal to 1.
func LogRatio(g, gmax float64) float64 {
	if math.IsNaN(g) || g < 0 || !finite(gmax) || gmax <= 0 || gmax == 1 {
		return math.NaN()
	}
	span := math.Abs(math.Log(gmax))
	if span == 0 {
		return math.NaN()
	}
	return clamp01(0.5 + 0.5*math.Log(g)/span)
}

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool {
	return !math.IsNaN(v) && !math.IsInf(v, 0)
}
