// Package sweep renders one scene over a range of one or two numeric scene
// values (spin, inclination, emissivity index, ...) into numbered frame
// files that share one set of colour scales, one field of view and one
// figure layout. A sweep is resumable (a manifest records every finished
// frame with the SHA-256 of its files), can be split across processes
// (each shard renders the frames with index ≡ K−1 mod N and keeps its own
// manifest), and is merged into animated GIFs, a plot of all spectra and
// a table of the frames.
package sweep

import (
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"

	"kerrscope/scene"
)

// Spacing is how an axis spreads its values between its two ends.
type Spacing string

// The spacings of an axis.
const (
	// Linear spaces the values evenly.
	Linear Spacing = "linear"
	// Log spaces the logarithms of the values evenly; both ends must be
	// positive.
	Log Spacing = "log"
	// Log1m spaces the logarithms of 1 − v evenly, so that values crowd
	// towards 1 (spins approaching the extremal a = 1); both ends must be
	// below 1.
	Log1m Spacing = "log1m"
)

// Limits on the size of a sweep.
const (
	// MaxAxes is the number of values one sweep may vary together.
	MaxAxes = 2
	// MaxFrames bounds the frames of a sweep (the product of the counts).
	MaxFrames = 10000
)

// Axis is one swept scene value: Count values from From to To (both
// included) with the given spacing. Key is the scene key, as listed by
// scene.Fields (e.g. "black_hole.spin").
type Axis struct {
	Key     string  `json:"key"`
	From    float64 `json:"from"`
	To      float64 `json:"to"`
	Count   int     `json:"count"`
	Spacing Spacing `json:"spacing"`
}

// fixedKeys are numeric scene values a sweep may not vary: the screen
// (every frame shares one window and layout) and the energy ranges of
// the spectrum and of the continuum (every spectrum shares one energy
// axis).
var fixedKeys = map[string]string{
	"screen.field_of_view":    "every frame of a sweep shares one field of view",
	"screen.center_alpha":     "every frame of a sweep shares one window",
	"screen.center_beta":      "every frame of a sweep shares one window",
	"spectrum.energy_min_kev": "every spectrum of a sweep shares one energy range",
	"spectrum.energy_max_kev": "every spectrum of a sweep shares one energy range",
	"thermal.energy_min_kev":  "every continuum of a sweep shares one energy range",
	"thermal.energy_max_kev":  "every continuum of a sweep shares one energy range",
}

// numericField returns the scene field named by a flag name ("spin") or
// a scene key ("black_hole.spin") if a sweep can vary it: it must take a
// real number and must not be one of the values all frames share. The
// weight and energy of line N of a line list are named
// "lines.N.weight" and "lines.N.energy_kev" (scene.LineField).
func numericField(name string) (scene.Field, error) {
	if f, ok := scene.LineField(name); ok {
		return f, nil
	}
	for _, f := range scene.Fields() {
		if f.Flag != name && f.Key != name {
			continue
		}
		probe := scene.Default()
		if f.Bool || f.Set(&probe, "0.5") != nil || f.Set(&probe, "not-a-number") == nil {
			return f, fmt.Errorf("%s does not take a real number, so it cannot be swept", f.Key)
		}
		if why, ok := fixedKeys[f.Key]; ok {
			return f, fmt.Errorf("%s cannot be swept: %s", f.Key, why)
		}
		return f, nil
	}
	var names []string
	for _, f := range scene.Fields() {
		probe := scene.Default()
		if _, fixed := fixedKeys[f.Key]; !fixed && !f.Bool && f.Set(&probe, "0.5") == nil && f.Set(&probe, "not-a-number") != nil {
			names = append(names, f.Flag)
		}
	}
	names = append(names, "lines.N.weight", "lines.N.energy_kev")
	return scene.Field{}, fmt.Errorf("unknown scene value %q (sweepable: %s)", name, strings.Join(names, ", "))
}

// ParseAxis reads an axis written KEY=FROM:TO:COUNT[:SPACING], e.g.
// "spin=0.5:0.999999:60:log1m" or "observer.inclination_deg=20:80:4".
// KEY is a flag name or a scene key; SPACING is linear (the default),
// log or log1m. The axis is validated (see Validate).
func ParseAxis(spec string) (Axis, error) {
	key, rest, ok := strings.Cut(spec, "=")
	if !ok {
		return Axis{}, fmt.Errorf("want KEY=FROM:TO:COUNT[:SPACING], e.g. spin=0.5:0.999999:60:log1m")
	}
	f, err := numericField(strings.TrimSpace(key))
	if err != nil {
		return Axis{}, err
	}
	parts := strings.Split(rest, ":")
	if len(parts) < 3 || len(parts) > 4 {
		return Axis{}, fmt.Errorf("%s: want FROM:TO:COUNT[:SPACING] after the =, got %q", f.Key, rest)
	}
	a := Axis{Key: f.Key, Spacing: Linear}
	for i, p := range []*float64{&a.From, &a.To} {
		v, err := strconv.ParseFloat(strings.TrimSpace(parts[i]), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return Axis{}, fmt.Errorf("%s: %q is not a finite number", f.Key, parts[i])
		}
		*p = v
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil {
		return Axis{}, fmt.Errorf("%s: count %q is not a whole number", f.Key, parts[2])
	}
	a.Count = n
	if len(parts) == 4 {
		a.Spacing = Spacing(strings.TrimSpace(parts[3]))
	}
	return a, a.Validate()
}

// String returns the axis in the form ParseAxis reads.
func (a Axis) String() string {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	return fmt.Sprintf("%s=%s:%s:%d:%s", a.Key, g(a.From), g(a.To), a.Count, a.Spacing)
}

// Validate checks that the axis names a sweepable value, has a count from
// 1 to MaxFrames, finite distinct ends (equal ends exactly when the count
// is 1) and ends that its spacing allows.
func (a Axis) Validate() error {
	if a.Key != SpotTime { // observer time, made by NewSpotPlan
		if _, err := numericField(a.Key); err != nil {
			return err
		}
	}
	if a.Count < 1 || a.Count > MaxFrames {
		return fmt.Errorf("%s: count %d must be between 1 and %d", a.Key, a.Count, MaxFrames)
	}
	for _, v := range []float64{a.From, a.To} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%s: ends %v, %v must be finite", a.Key, a.From, a.To)
		}
	}
	switch {
	case a.Count == 1 && a.From != a.To:
		return fmt.Errorf("%s: a count of 1 needs FROM = TO (got %v and %v)", a.Key, a.From, a.To)
	case a.Count > 1 && a.From == a.To:
		return fmt.Errorf("%s: FROM and TO are both %v; give a count of 1 for a single value", a.Key, a.From)
	}
	switch a.Spacing {
	case Linear:
	case Log:
		if !(a.From > 0 && a.To > 0) {
			return fmt.Errorf("%s: log spacing needs positive ends (got %v and %v)", a.Key, a.From, a.To)
		}
	case Log1m:
		if !(a.From < 1 && a.To < 1) {
			return fmt.Errorf("%s: log1m spacing (1 − v log-spaced) needs both ends below 1 (got %v and %v)", a.Key, a.From, a.To)
		}
	default:
		return fmt.Errorf("%s: unknown spacing %q (want linear, log or log1m)", a.Key, a.Spacing)
	}
	return nil
}

// Values returns the Count values of the axis, From first and To last
// exactly, strictly monotonic, spaced by Spacing. A log1m axis keeps
// every value below 1.
func (a Axis) Values() ([]float64, error) {
	if err := a.Validate(); err != nil {
		return nil, err
	}
	n := a.Count
	out := make([]float64, n)
	if n == 1 {
		out[0] = a.From
		return out, nil
	}
	// The position of value k is t = k/(n−1); a spacing maps the ends to
	// u0, u1 and back by inv.
	var u0, u1 float64
	inv := func(u float64) float64 { return u }
	switch a.Spacing {
	case Linear:
		u0, u1 = a.From, a.To
	case Log: // in log10, so that ends on decades give round values between
		u0, u1 = math.Log10(a.From), math.Log10(a.To)
		inv = func(u float64) float64 { return math.Pow(10, u) }
	case Log1m:
		u0, u1 = math.Log10(oneMinus(a.From)), math.Log10(oneMinus(a.To))
		inv = func(u float64) float64 { return 1 - math.Pow(10, u) }
	}
	for k := range out {
		t := float64(k) / float64(n-1)
		out[k] = inv(u0 + (u1-u0)*t)
	}
	out[0], out[n-1] = a.From, a.To
	for k := 1; k < n; k++ {
		if (a.To > a.From && !(out[k] > out[k-1])) || (a.To < a.From && !(out[k] < out[k-1])) {
			return nil, fmt.Errorf("%s: %d values from %v to %v are too close to tell apart in floating point", a.Key, n, a.From, a.To)
		}
	}
	return out, nil
}

// Position returns where v lies along the axis in its own spacing: 0 at
// From, 1 at To, linear in v, log v or log(1 − v). It is what colour-codes
// the frames of the axis.
func (a Axis) Position(v float64) float64 {
	if a.Count == 1 || a.From == a.To {
		return 0.5
	}
	switch a.Spacing {
	case Log:
		return (math.Log(v) - math.Log(a.From)) / (math.Log(a.To) - math.Log(a.From))
	case Log1m:
		return (math.Log(oneMinus(v)) - math.Log(oneMinus(a.From))) / (math.Log(oneMinus(a.To)) - math.Log(oneMinus(a.From)))
	}
	return (v - a.From) / (a.To - a.From)
}

// ticks returns round values within the axis range for a colour bar: the
// two ends plus 1-2-5 steps (linear), powers of ten (log) or 1 − 10⁻ᵏ
// (log1m) that lie clear of the ends and of each other.
func (a Axis) ticks() []float64 {
	lo, hi := math.Min(a.From, a.To), math.Max(a.From, a.To)
	var cands []float64
	switch a.Spacing {
	case Linear:
		step := niceStep((hi - lo) / 5)
		for k := math.Ceil(lo / step); k*step <= hi; k++ {
			cands = append(cands, roundTo(k*step, step))
		}
	case Log:
		for d := math.Ceil(math.Log10(lo)); d <= math.Floor(math.Log10(hi)); d++ {
			cands = append(cands, math.Pow(10, d))
		}
	case Log1m:
		for d := math.Ceil(-math.Log10(1 - lo)); d <= math.Floor(-math.Log10(1-hi)); d++ {
			cands = append(cands, 1-math.Pow(10, -d))
		}
	}
	out := []float64{a.From, a.To}
	for _, v := range cands {
		ok := v >= lo && v <= hi
		for _, w := range out {
			ok = ok && math.Abs(a.Position(v)-a.Position(w)) >= 0.08
		}
		if ok && len(out) < 8 {
			out = append(out, v)
		}
	}
	return out
}

// niceStep returns a 1, 2 or 5 times a power of ten near x > 0.
func niceStep(x float64) float64 {
	if !(x > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 5} {
		if m*p >= x {
			return m * p
		}
	}
	return 10 * p
}

// roundTo removes the floating-point noise of k·step.
func roundTo(v, step float64) float64 {
	digits := max(0, int(-math.Floor(math.Log10(step)))+1)
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'f', digits, 64), 64)
	return r
}

// oneMinus returns 1 − v computed from v's shortest decimal form, so that
// an end written 0.999999 gives 1 − v = 1e-6 rather than the 1.0000000000287557e-06
// of float64 subtraction, and values between ends on decades come out
// round (0.99, 0.999, ...).
func oneMinus(v float64) float64 {
	r, ok := new(big.Rat).SetString(formatValue(v))
	if !ok {
		return 1 - v
	}
	f, _ := r.Sub(big.NewRat(1, 1), r).Float64()
	return f
}

// formatValue writes a swept value exactly (shortest round-trip form).
func formatValue(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
