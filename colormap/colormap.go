// Package colormap maps numbers in [0, 1] to colours.
//
// The scales are designed in CIE L*C*h° (the cylindrical form of CIE
// L*a*b*, D65 white) with go-colorful: lightness varies linearly between
// stops, chroma and hue follow monotone cubic curves through the stops, and
// a colour that falls outside the sRGB gamut is brought back by lowering its
// chroma at constant lightness and hue, so the lightness of a scale is
// what its stops prescribe, up to 8-bit rounding.
//
// Two continuous scales are provided: [Redshift], a diverging scale centred
// on t = 0.5, and [Sequential], whose lightness rises strictly from dark to
// light. [Order] gives a categorical palette, [NoHit] and [Shadow] are the
// two reserved colours that appear in no scale, and [Palette] builds a
// 256-entry palette for image/gif.
//
// Every function accepts any input without panicking and is deterministic.
package colormap

import (
	"fmt"
	"image/color"
	"math"
	"strings"
	"sync"

	colorful "github.com/lucasb-eyer/go-colorful"
)

// stop is one control point of a scale in CIE L*C*h° with go-colorful's
// units: l and c are L*/100 and C*/100, h is in degrees and may leave
// [0, 360) so that the direction of the hue path is explicit.
type stop struct {
	t, l, c, h float64
}

// Map is a continuous colour scale over t in [0, 1]. The scales are the
// package variables Redshift and Sequential, also found by ByName.
//
// The zero Map has no stops; its At returns NoHit for every t.
type Map struct {
	// Name identifies the scale, as accepted by ByName.
	Name string

	stops []stop
	lut   *lookup // shared table for At; nil builds none
}

// lookup is a scale sampled at lutSize evenly spaced t, built once: the
// exact colour conversion (CIE LCh → sRGB with a gamut search) costs
// microseconds, far more than tracing a pixel's photon.
type lookup struct {
	once  sync.Once
	table [lutSize]color.RGBA
}

// lutSize makes neighbouring entries differ by far less than one just
// noticeable step (ΔE2000 well below 0.2).
const lutSize = 4096

// NoHit is the colour for pixels whose ray reaches no surface: a mid grey
// without chroma, which no scale passes close to.
var NoHit = color.RGBA{R: 119, G: 119, B: 119, A: 255}

// Shadow is the colour for photons captured by the horizon: near-black,
// darker than the dark end of every scale.
var Shadow = color.RGBA{R: 6, G: 6, B: 8, A: 255}

// Redshift is the diverging scale "doppler", meant for a ratio centred on 1
// such as the redshift factor g (see LogRatio). Its centre, t = 0.5, is a
// light neutral grey. Below it the scale warms through sand, copper and
// crimson to a deep plum; above it, it cools through glacier teal and
// steel blue to a deep indigo-violet. Lightness is symmetric about the centre,
// highest there and linear on each side.
var Redshift = Map{
	Name: "doppler",
	lut:  &lookup{},
	stops: []stop{
		{t: 0.00, l: 0.20, c: 0.40, h: -22},
		{t: 0.14, l: 0.41, c: 0.62, h: 14},
		{t: 0.30, l: 0.65, c: 0.60, h: 46},
		{t: 0.42, l: 0.83, c: 0.28, h: 72},
		{t: 0.46, l: 0.89, c: 0.12, h: 80},
		{t: 0.50, l: 0.95, c: 0, h: 86},
		{t: 0.50, l: 0.95, c: 0, h: 196},
		{t: 0.54, l: 0.89, c: 0.08, h: 196},
		{t: 0.58, l: 0.83, c: 0.17, h: 198},
		{t: 0.70, l: 0.65, c: 0.34, h: 214},
		{t: 0.86, l: 0.41, c: 0.46, h: 254},
		{t: 1.00, l: 0.20, c: 0.46, h: 292},
	},
}

// Sequential is the scale "frostrose", meant for intensities and radii. Its
// lightness rises linearly from a near-black oxblood through crimson rose
// and lilac to a pale ice blue, with the hue turning steadily the other way
// round the hue circle (red, magenta, violet, blue).
var Sequential = Map{
	Name: "frostrose",
	lut:  &lookup{},
	stops: []stop{
		{t: 0.00, l: 0.12, c: 0.20, h: 25},
		{t: 0.30, l: 0.375, c: 0.55, h: 5},
		{t: 0.65, l: 0.6725, c: 0.38, h: -45},
		{t: 1.00, l: 0.97, c: 0.10, h: -130},
	},
}

// maps lists the scales known to ByName, in the order Names reports them.
// They are copies, so that changes to the exported variables do not affect
// ByName.
var maps = []Map{Redshift, Sequential}

// Names returns the names of the available scales, in a fixed order.
func Names() []string {
	names := make([]string, len(maps))
	for i, m := range maps {
		names[i] = m.Name
	}
	return names
}

// ByName returns the scale with the given name. Case and surrounding space
// are ignored. For an unknown name the error lists the valid ones.
func ByName(name string) (Map, error) {
	key := strings.ToLower(strings.TrimSpace(name))
	for _, m := range maps {
		if m.Name == key {
			return m, nil
		}
	}
	return Map{}, fmt.Errorf("colormap: unknown colormap %q (valid: %s)",
		name, strings.Join(Names(), ", "))
}

// At returns the colour of the scale at t. Values of t outside [0, 1],
// including infinities, are clamped; NaN gives NoHit.
// The colour is read from a table of 4096 samples of the scale.
func (m Map) At(t float64) color.RGBA {
	if math.IsNaN(t) || len(m.stops) == 0 {
		return NoHit
	}
	t = clamp01(t)
	if m.lut == nil {
		return m.exact(t)
	}
	m.lut.once.Do(func() {
		for i := range m.lut.table {
			m.lut.table[i] = m.exact(float64(i) / (lutSize - 1))
		}
	})
	return m.lut.table[int(t*(lutSize-1)+0.5)]
}

// exact computes the colour at t in [0, 1] from the design.
func (m Map) exact(t float64) color.RGBA {
	if math.IsNaN(t) || len(m.stops) == 0 {
		return NoHit
	}
	l, c, h := m.lch(clamp01(t))
	return toRGBA(inGamut(l, c, h))
}

// maxTable bounds the length of a table so that no request can exhaust
// memory.
const maxTable = 1 << 16

// Table returns n colours of the scale sampled evenly from t = 0 to t = 1
// inclusive, for per-pixel lookup as table[int(t*float64(n-1)+0.5)]. A
// single sample is taken at t = 0.5; n < 1 gives an empty table, and n is
// limited to 65536.
func (m Map) Table(n int) []color.RGBA {
	if n < 1 {
		return []color.RGBA{}
	}
	if n > maxTable {
		n = maxTable
	}
	out := make([]color.RGBA, n)
	if n == 1 {
		out[0] = m.At(0.5)
		return out
	}
	for i := range out {
		out[i] = m.At(float64(i) / float64(n-1))
	}
	return out
}

// lch evaluates the scale's path at t in [0, 1]: lightness piecewise
// linearly, chroma and hue with monotone cubic Hermite curves, which pass
// through the stops without overshooting them. A stop repeated at the same
// t splits the path into independent pieces; at the split the first piece
// is used.
func (m Map) lch(t float64) (l, c, h float64) {
	s := m.piece(t)
	if len(s) == 1 || t <= s[0].t {
		return s[0].l, s[0].c, s[0].h
	}
	last := len(s) - 1
	if t >= s[last].t {
		return s[last].l, s[last].c, s[last].h
	}
	k := 0
	for k < last-1 && t >= s[k+1].t {
		k++
	}
	u := (t - s[k].t) / (s[k+1].t - s[k].t)
	l = s[k].l + u*(s[k+1].l-s[k].l)
	c = hermite(s, k, u, func(p stop) float64 { return p.c })
	h = hermite(s, k, u, func(p stop) float64 { return p.h })
	return l, math.Max(c, 0), h
}

// piece returns the run of stops, between repeated stops, that covers t.
func (m Map) piece(t float64) []stop {
	s := m.stops
	start := 0
	for i := 1; i < len(s); i++ {
		if s[i].t != s[i-1].t {
			continue
		}
		if t <= s[i].t {
			return s[start:i]
		}
		start = i
	}
	return s[start:]
}

// hermite evaluates, at fraction u of the interval between stops k and k+1,
// the monotone piecewise-cubic (PCHIP) interpolant of the stop values
// picked by v.
func hermite(s []stop, k int, u float64, v func(stop) float64) float64 {
	dx := s[k+1].t - s[k].t
	y0, y1 := v(s[k]), v(s[k+1])
	m0 := slope(s, k, v) * dx
	m1 := slope(s, k+1, v) * dx
	u2, u3 := u*u, u*u*u
	return (2*u3-3*u2+1)*y0 + (u3-2*u2+u)*m0 + (-2*u3+3*u2)*y1 + (u3-u2)*m1
}

// slope is the PCHIP tangent at stop k: the secant at either end, zero at
// a local extremum, and otherwise a weighted harmonic mean of the two
// neighbouring secants.
func slope(s []stop, k int, v func(stop) float64) float64 {
	secant := func(i int) float64 { return (v(s[i+1]) - v(s[i])) / (s[i+1].t - s[i].t) }
	last := len(s) - 1
	switch k {
	case 0:
		return secant(0)
	case last:
		return secant(last - 1)
	}
	d0, d1 := secant(k-1), secant(k)
	if d0*d1 <= 0 {
		return 0
	}
	h0, h1 := s[k].t-s[k-1].t, s[k+1].t-s[k].t
	w0, w1 := 2*h1+h0, h1+2*h0
	return (w0 + w1) / (w0/d0 + w1/d1)
}

// inGamut returns the sRGB colour with CIE lightness l and hue h whose
// chroma is c, or the largest chroma below c that sRGB can show.
func inGamut(l, c, h float64) colorful.Color {
	col := colorful.Hcl(h, c, l)
	if col.IsValid() {
		return col
	}
	lo, hi := 0.0, c
	for range 40 {
		mid := 0.5 * (lo + hi)
		if colorful.Hcl(h, mid, l).IsValid() {
			lo = mid
		} else {
			hi = mid
		}
	}
	return colorful.Hcl(h, lo, l).Clamped()
}

// toRGBA rounds a colour in the sRGB gamut to 8 bits per channel, opaque.
func toRGBA(col colorful.Color) color.RGBA {
	r, g, b := col.Clamped().RGB255()
	return color.RGBA{R: r, G: g, B: b, A: 255}
}

// clamp01 limits v to [0, 1]: v ≤ 0 (either zero, -Inf) gives +0, v ≥ 1
// gives 1, NaN stays NaN; the same as math.Max(0, math.Min(1, v)), in
// plain comparisons that the compiler inlines (it runs for every pixel).
func clamp01(v float64) float64 {
	switch {
	case v > 0:
		if v < 1 {
			return v
		}
		return 1
	case v <= 0:
		return 0
	}
	return v // NaN
}
