package scene

import (
	"fmt"
	"math"
)

// Scales fixes the colour scales of the figures. A nil field is left to
// the program: chosen from the rendered image (render, demo, locate) or
// from a low-resolution pre-pass over the frames (sweep).
type Scales struct {
	GMin *float64 `toml:"g_min,omitempty"` // redshift colours from g_min (0 < g_min < 1) …
	GMax *float64 `toml:"g_max,omitempty"` // … to g_max (> 1)
	// IntensityMax is the top of the intensity colours (relative units,
	// as the figures' ticks are without mass, distance and luminosity).
	IntensityMax     *float64 `toml:"intensity_max,omitempty"`
	IntensityDecades *float64 `toml:"intensity_decades,omitempty"` // decades on the log intensity scale
	RadiusMin        *float64 `toml:"radius_min,omitempty"`        // radius colours, M
	RadiusMax        *float64 `toml:"radius_max,omitempty"`
	FluxMax          *float64 `toml:"flux_max,omitempty"` // top of the spectrum plot, per keV in the units it shows
	// Percentile p makes the ranges left to the program span the p-th to
	// (100 − p)-th percentile of the values, weighted by the screen area
	// they cover, instead of their whole range: a few extreme pixels
	// (light from just outside the horizon) no longer stretch the scale.
	// 0 ≤ p < 50; nil: 0 for a render, DefaultSweepPercentile for a sweep.
	Percentile *float64 `toml:"percentile,omitempty"`
}

// DefaultSweepPercentile is the percentile of a sweep's pre-pass when
// scales.percentile is not given: the colour ranges span the 0.5th to
// 99.5th percentile of the pooled values.
const DefaultSweepPercentile = 0.5

// MaxIntensityDecades bounds scales.intensity_decades.
const MaxIntensityDecades = 30

// check validates the fixed scales: every one finite and in its range.
func (s Scales) check() error {
	type limit struct {
		key  string
		v    *float64
		ok   func(float64) bool
		want string
	}
	checks := []limit{
		{"scales.g_min", s.GMin, func(v float64) bool { return v > 0 && v < 1 }, "must be between 0 and 1, exclusive"},
		{"scales.g_max", s.GMax, func(v float64) bool { return v > 1 }, "must be above 1"},
		{"scales.intensity_max", s.IntensityMax, func(v float64) bool { return v > 0 }, "must be positive"},
		{"scales.intensity_decades", s.IntensityDecades, func(v float64) bool { return v > 0 && v <= MaxIntensityDecades }, fmt.Sprintf("must be above 0 and at most %d", MaxIntensityDecades)},
		{"scales.radius_min", s.RadiusMin, func(v float64) bool { return v > 0 && v <= MaxLength }, fmt.Sprintf("must be positive, at most %g M", MaxLength)},
		{"scales.radius_max", s.RadiusMax, func(v float64) bool { return v > 0 && v <= MaxLength }, fmt.Sprintf("must be positive, at most %g M", MaxLength)},
		{"scales.flux_max", s.FluxMax, func(v float64) bool { return v > 0 }, "must be positive"},
		{"scales.percentile", s.Percentile, func(v float64) bool { return v >= 0 && v < 50 }, "must be at least 0 and below 50 (percent at each end)"},
	}
	for _, c := range checks {
		if c.v == nil {
			continue
		}
		v := *c.v
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fieldErr(c.key, v, "must be a finite number")
		}
		if !c.ok(v) {
			return fieldErr(c.key, v, "%s", c.want)
		}
	}
	if s.RadiusMin != nil && s.RadiusMax != nil && !(*s.RadiusMax > *s.RadiusMin) {
		return fieldErr("scales.radius_max", *s.RadiusMax, "must be above scales.radius_min = %v M", *s.RadiusMin)
	}
	return nil
}

// Check validates the fixed scales as Resolve does: a *FieldError names
// the first key out of range.
func (s Scales) Check() error { return s.check() }
