package figure

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// tickSet is a run of equally spaced tick values k·step with step =
// mant·10^exp and mant one of 1, 2 or 5.
type tickSet struct {
	mant, exp int
	step      float64
	values    []float64
}

// decade returns the integer n with 10ⁿ ≤ x < 10ⁿ⁺¹ for finite x > 0
// (−324 to 308). For other x it returns 0. The logarithm is taken of the
// binary mantissa and exponent (math.Log10 of a subnormal number can be
// decades off), so the rounding corrections need at most two steps.
func decade(x float64) int {
	if !(x > 0) || math.IsInf(x, 0) {
		return 0
	}
	frac, exp := math.Frexp(x)
	n := int(math.Floor(math.Log10(frac) + float64(exp)*math.Log10(2)))
	for i := 0; i < 2 && math.Pow10(n+1) <= x; i++ {
		n++
	}
	for i := 0; i < 2 && math.Pow10(n) > x; i++ {
		n--
	}
	return n
}

// ticksWithStep returns the multiples of step that lie in [lo, hi], with a
// tolerance of a millionth of a step at either end. The multiples are
// counted relative to one near the middle so that windows far from zero
// keep their precision.
func ticksWithStep(lo, hi, step float64) []float64 {
	if !(step > 0) || math.IsInf(step, 0) {
		return nil
	}
	kc := math.Round((lo + (hi-lo)/2) / step)
	base := kc * step
	k0 := math.Ceil((lo-base)/step - 1e-6)
	k1 := math.Floor((hi-base)/step + 1e-6)
	if !(k1 >= k0 && k1-k0 <= 1000) || math.IsInf(base, 0) {
		return nil
	}
	out := make([]float64, 0, int(k1-k0)+1)
	for k := k0; k <= k1; k++ {
		out = append(out, (kc+k)*step)
	}
	return out
}

// niceTicks chooses a 1-2-5 step for [lo, hi] (lo < hi, both finite) that
// gives between 4 and maxTicks ticks, as close to six as possible and the
// larger step on a tie. When maxTicks is below 4, or no step qualifies, it
// settles for the step with the most ticks not above maxTicks (at least
// one tick, if any step has one).
func niceTicks(lo, hi float64, maxTicks int) tickSet {
	span := hi - lo
	e0 := decade(span)
	var best, fallback tickSet
	bestScore := math.Inf(1)
	for e := e0 + 1; e >= e0-2; e-- {
		for _, mant := range []int{5, 2, 1} {
			step := float64(mant) * math.Pow10(e)
			vals := ticksWithStep(lo, hi, step)
			n := len(vals)
			if n == 0 || n > maxTicks {
				continue
			}
			ts := tickSet{mant: mant, exp: e, step: step, values: vals}
			if n > len(fallback.values) {
				fallback = ts
			}
			if n < 4 {
				continue
			}
			if score := math.Abs(float64(n) - 6); score < bestScore {
				best, bestScore = ts, score
			}
		}
	}
	if best.values == nil {
		return fallback
	}
	return best
}

// tickFormat turns tick values into short labels: the label of v is
// (v − offset)/10^exp written with decimals digits after the point.
type tickFormat struct {
	offset   float64
	exp      int
	decimals int
	// offsetExp is the decade of the last digit of offset.
	offsetExp int
}

// maxPlainDigits is the number of significant digits tick labels may need
// before the axis switches to offset notation.
const maxPlainDigits = 5

// chooseFormat picks the notation for ticks ts on [lo, hi]: plain
// decimals for ordinary ranges; a power-of-ten multiplier when the values
// are very large or very small; and an offset plus a multiplier when the
// window is so narrow for its distance from zero that plain labels would
// need more than maxPlainDigits significant digits.
func chooseFormat(lo, hi float64, ts tickSet) tickFormat {
	m := math.Max(math.Abs(lo), math.Abs(hi))
	dm := decade(m)
	switch {
	case dm-ts.exp+1 > maxPlainDigits:
		k := ts.exp + 1
		unit := math.Pow10(k)
		off := math.Round((lo+(hi-lo)/2)/unit) * unit
		return tickFormat{offset: off, exp: ts.exp, offsetExp: k}
	case dm >= 5 || dm <= -3:
		return tickFormat{exp: dm, decimals: max(0, dm-ts.exp)}
	default:
		return tickFormat{decimals: max(0, -ts.exp)}
	}
}

// label returns the tick label of v.
func (f tickFormat) label(v float64) string {
	r := (v - f.offset) / math.Pow10(f.exp)
	if math.Abs(r) < 0.5*math.Pow10(-f.decimals) {
		r = 0
	}
	return minus(strconv.FormatFloat(r, 'f', f.decimals, 64))
}

// minus replaces ASCII hyphens by the typographic minus sign.
func minus(s string) string {
	return strings.ReplaceAll(s, "-", "−")
}

// trimZeros removes trailing zeros after a decimal point, and the point
// itself if nothing follows it.
func trimZeros(s string) string {
	if !strings.Contains(s, ".") {
		return s
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

// formatMagnitude writes |v| with its last significant digit in decade
// last, switching to a power-of-ten form for very large or small values.
func formatMagnitude(v float64, last int) string {
	a := math.Abs(v)
	if a == 0 {
		return "0"
	}
	d := decade(a)
	if d >= 6 || d <= -4 {
		digits := max(0, d-last)
		mant := trimZeros(strconv.FormatFloat(a/math.Pow10(d), 'f', digits, 64))
		return mant + "×" + powerOfTen(d)
	}
	return trimZeros(strconv.FormatFloat(a, 'f', max(0, -last), 64))
}

// axisLabel rewrites label to say how the tick labels relate to the
// values. A label of the form "name [unit]" becomes "name [10ⁿ unit]"
// with a multiplier and "name + c [10ⁿ unit]" with an offset c (the
// quantity minus the offset, in units of 10ⁿ unit); a label without a
// unit gets "[10ⁿ]".
func (f tickFormat) axisLabel(label string) string {
	if f.offset == 0 && f.exp == 0 {
		return label
	}
	name, unit := label, ""
	if strings.HasSuffix(label, "]") {
		if i := strings.LastIndex(label, "["); i >= 0 {
			name = strings.TrimSpace(label[:i])
			unit = strings.TrimSpace(label[i+1 : len(label)-1])
		}
	}
	if f.offset != 0 {
		if strings.ContainsAny(name, " +−-/*·") {
			name = "(" + name + ")"
		}
		sign := " − "
		if f.offset < 0 {
			sign = " + "
		}
		name += sign + formatMagnitude(f.offset, f.offsetExp)
	}
	var parts []string
	if f.exp != 0 {
		parts = append(parts, powerOfTen(f.exp))
	}
	if unit != "" {
		parts = append(parts, unit)
	}
	if len(parts) == 0 {
		return name
	}
	return fmt.Sprintf("%s [%s]", name, strings.Join(parts, " "))
}

// tickMark is a labelled tick at fraction f along an axis (0 at the
// start, 1 at the end).
type tickMark struct {
	f     float64
	label string
}

// scale is what an axis side draws: major ticks with labels, unlabelled
// minor ticks and the axis label.
type scale struct {
	ticks []tickMark
	minor []float64
	label string
}

// linearScale lays out ticks for [lo, hi] with at most maxTicks labels.
// When reversed, fractions run from hi to lo (for a secondary scale with a
// negative factor).
func linearScale(lo, hi float64, maxTicks int, label string, reversed bool) scale {
	ts := niceTicks(lo, hi, maxTicks)
	f := chooseFormat(lo, hi, ts)
	s := scale{label: f.axisLabel(label)}
	for _, v := range ts.values {
		frac := (v - lo) / (hi - lo)
		if reversed {
			frac = 1 - frac
		}
		s.ticks = append(s.ticks, tickMark{f: frac, label: f.label(v)})
	}
	return s
}

// logScale lays out ticks for lo < hi (both positive) on a logarithmic
// axis: powers of ten when the range spans two or more of them (every
// second, fifth, ... when there are many), otherwise 1-2-5 values, and
// linear ticks for very narrow ranges.
//
// It gives no ticks unless 0 < lo < hi < ∞; its loops then visit at most
// the 634 decades of float64.
func logScale(lo, hi float64, maxTicks int, label string) scale {
	if !(lo > 0 && hi > lo) || math.IsInf(hi, 0) {
		return scale{label: label}
	}
	llo, lhi := math.Log10(lo), math.Log10(hi)
	frac := func(v float64) float64 { return (math.Log10(v) - llo) / (lhi - llo) }
	inside := func(v float64) bool { return v >= lo*(1-1e-9) && v <= hi*(1+1e-9) }
	s := scale{label: label}
	n0, n1 := int(math.Ceil(llo-1e-9)), int(math.Floor(lhi+1e-9))
	if n1-n0+1 >= 2 {
		stride := 1
		for _, st := range []int{1, 2, 5, 10, 20, 50, 100} {
			stride = st
			if (n1-n0)/st+1 <= max(2, maxTicks) {
				break
			}
		}
		for n := n0; n <= n1; n++ {
			if n%stride == 0 {
				s.ticks = append(s.ticks, tickMark{f: frac(math.Pow10(n)), label: powerOfTen(n)})
			}
		}
		if stride == 1 && n1-n0 <= 8 {
			for n := n0 - 1; n <= n1; n++ {
				for m := 2; m <= 9; m++ {
					if v := float64(m) * math.Pow10(n); inside(v) {
						s.minor = append(s.minor, frac(v))
					}
				}
			}
		}
		return s
	}
	var vals []float64
	for n := n0 - 1; n <= n1; n++ {
		for _, m := range []float64{1, 2, 5} {
			if v := m * math.Pow10(n); inside(v) {
				vals = append(vals, v)
			}
		}
	}
	if len(vals) >= 3 && len(vals) <= max(3, maxTicks) {
		for _, v := range vals {
			s.ticks = append(s.ticks, tickMark{f: frac(v), label: formatMagnitude(v, decade(v))})
		}
		return s
	}
	ts := niceTicks(lo, hi, maxTicks)
	f := chooseFormat(lo, hi, ts)
	s.label = f.axisLabel(label)
	for _, v := range ts.values {
		if v > 0 {
			s.ticks = append(s.ticks, tickMark{f: frac(v), label: f.label(v)})
		}
	}
	return s
}
