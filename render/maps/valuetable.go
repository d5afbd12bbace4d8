package maps

import (
	"image/color"
	"math"

	"kerrscope/colormap"
)

// A map's colour is a function of one float32 value per pixel, At(pos(v))
// (onScaleMap), and pos costs a logarithm on most scales. valueTable
// reads the colour from a table instead, indexed by the value's bits: the
// positive finite float32 values in order are the bit patterns 1 …
// 0x7f7fffff in order, so the values whose position lies strictly inside
// (0, 1) are one run of patterns [lo, hi], cut here into at most
// tableCells cells of 2^shift patterns each. As pos is non-decreasing, a
// cell whose first value and the next cell's first value fall on the
// same slot of the colour scale (colormap.Map.At reads one of scaleSlots
// samples) has that slot's colour for every value in it; the few cells
// where a slot changes are marked and their pixels take the direct
// evaluation. The image is therefore the direct evaluation's, pixel for
// pixel.

const (
	// scaleSlots is the number of samples colormap.Map.At reads from
	// (its documented table of 4096): At(t) is the sample
	// int(t·(scaleSlots−1) + 0.5) of Table(scaleSlots).
	scaleSlots = 4096
	// tableCells bounds the cells of a table; 2^16 cells put a few
	// thousand slot changes among tens of thousands of whole cells.
	tableCells = 1 << 16
	// tableMinPixels: smaller images are drawn directly, as the table
	// would cost more than it saves.
	tableMinPixels = 4 * tableCells
	maxFinite32    = 0x7f7fffff // bit pattern of math.MaxFloat32
)

// valueTable is the colour of a map's positive finite values (see above).
// A cell is filled when a value first falls in it, so that a table costs
// what the image's values reach, not what the scale spans.
type valueTable struct {
	lo, hi uint32 // the run of bit patterns with 0 < pos < 1
	shift  uint
	n      int // cells
	// cells holds each cell's colour, RGBA: alpha 0 marks a cell not
	// filled yet, alpha 1 one where the slot changes (colours are
	// opaque).
	cells []color.RGBA
	// below and above are the colours of the positive finite values
	// under lo (pos ≤ 0) and over hi (pos ≥ 1).
	below, above color.RGBA
	colours      []color.RGBA // the scale's samples, Table(scaleSlots)
	pos          func(float64) float64
}

// slot is the sample of a scale of scaleSlots samples that At reads for
// position t (t not NaN).
func slot(t float64) int {
	return int(math.Max(0, math.Min(1, t))*(scaleSlots-1) + 0.5)
}

// newValueTable makes the table of the colours of scale at pos(v), for a
// pos that is non-decreasing over the positive values; ok is false when
// pos gives NaN at the ends of the range or has no values strictly
// inside (0, 1), and the image is then drawn directly.
func newValueTable(scale colormap.Map, pos func(float64) float64) (vt valueTable, ok bool) {
	vt.pos = pos
	// lo: the first pattern with pos > 0; hi: the last with pos < 1.
	first := func(pred func(uint32) bool) uint32 { // the first of 1 … maxFinite32 where pred holds, or maxFinite32+1
		a, b := uint32(1), uint32(maxFinite32+1)
		for a < b {
			m := a + (b-a)/2
			if pred(m) {
				b = m
			} else {
				a = m + 1
			}
		}
		return a
	}
	vt.lo = first(func(b uint32) bool { return vt.at(b) > 0 })
	vt.hi = first(func(b uint32) bool { return vt.at(b) >= 1 }) - 1
	if vt.lo > vt.hi || vt.lo > maxFinite32 || math.IsNaN(vt.at(1)) || math.IsNaN(vt.at(maxFinite32)) {
		return valueTable{}, false
	}
	span := uint64(vt.hi-vt.lo) + 1
	for span > uint64(tableCells)<<vt.shift {
		vt.shift++
	}
	vt.n = int((span + 1<<vt.shift - 1) >> vt.shift)
	vt.colours = scale.Table(scaleSlots)
	vt.below, vt.above = vt.colours[0], vt.colours[scaleSlots-1]
	vt.cells = make([]color.RGBA, vt.n)
	return vt, true
}

// at is pos of the float32 value of bit pattern b.
func (vt *valueTable) at(b uint32) float64 { return vt.pos(float64(math.Float32frombits(b))) }

// fill sets cell i: its colour when pos at its first value and at the
// next cell's first value (at hi for the last cell) fall on the same
// slot, which then holds for every value of the cell, pos being
// non-decreasing; else the mark of a cell where the slot changes.
func (vt *valueTable) fill(i int) color.RGBA {
	end := vt.hi
	if i+1 < vt.n {
		end = vt.lo + uint32(i+1)<<vt.shift
	}
	t0, t1 := vt.at(vt.lo+uint32(i)<<vt.shift), vt.at(end)
	c := color.RGBA{A: 1}
	if !math.IsNaN(t0) && !math.IsNaN(t1) {
		if s := slot(t0); s == slot(t1) {
			c = vt.colours[s]
		}
	}
	vt.cells[i] = c
	return c
}

// colour returns the colour of value v, ok false when v is not in the
// table's reach (NaN, zero, negative, infinite) or falls in a cell where
// the slot changes. It is small enough to be inlined in the pixel loop.
func (vt *valueTable) colour(v float32) (c color.RGBA, ok bool) {
	d := math.Float32bits(v) - vt.lo
	if d > vt.hi-vt.lo {
		return vt.outside(v)
	}
	if c = vt.cells[d>>vt.shift]; c.A == 0 {
		c = vt.fill(int(d >> vt.shift))
	}
	return c, c.A == 0xff
}

// outside is colour for the values outside [lo, hi].
func (vt *valueTable) outside(v float32) (color.RGBA, bool) {
	switch b := math.Float32bits(v); {
	case b >= 1 && b < vt.lo:
		return vt.below, true
	case b > vt.hi && b <= maxFinite32:
		return vt.above, true
	}
	return color.RGBA{}, false
}
