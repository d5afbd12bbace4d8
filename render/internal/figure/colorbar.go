package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"sort"
)

// ColorBar is the key to the colours of a map or of plotted series. It is
// either continuous (Colors, with Ticks and Label) or categorical
// (Swatches, with Label as a heading); setting both is an error.
//
// In the house style a continuous bar is a strip under the data area, as
// wide as it, with its title (Label) above the strip and its tick labels
// below; a categorical key is set inline in the caption.
type ColorBar struct {
	// Colors are the colours of a continuous bar sampled evenly from the
	// left (t = 0) to the right (t = 1) end.
	Colors []color.RGBA
	// Ticks are labelled positions along the bar, t in [0, 1]. The
	// caller decides what values they stand for (linear, logarithmic,
	// diverging, ...) and should label both ends; labels that would
	// collide are dropped, except those nearest the two ends.
	Ticks []Tick
	// Label is the bar's title: the quantity with its unit in brackets,
	// in the label markup (e.g. "g = E_{obs}/E_{emit}").
	Label string
	// Note, if not empty, is written after the title in the muted
	// colour, e.g. how the scale is stretched.
	Note string
	// Swatches make the bar a categorical key: one coloured square and
	// label per entry, in order.
	Swatches []Swatch
}

// Tick is a labelled position on a colour bar, T in [0, 1] from the left.
type Tick struct {
	T     float64
	Label string
}

// Swatch is one entry of a categorical key: a square of flat colour.
type Swatch struct {
	Color color.RGBA
	Label string
}

// validate checks that b describes exactly one kind of bar with ticks on
// the bar.
func (b *ColorBar) validate() error {
	if len(b.Swatches) > 0 {
		if len(b.Colors) > 0 || len(b.Ticks) > 0 {
			return errors.New("figure: colour bar has both Swatches and Colors/Ticks")
		}
		return nil
	}
	if len(b.Colors) == 0 {
		return errors.New("figure: colour bar has neither Colors nor Swatches")
	}
	for i, t := range b.Ticks {
		if !(t.T >= 0 && t.T <= 1) {
			return fmt.Errorf("figure: colour bar tick %d at t = %v, outside [0, 1]", i, t.T)
		}
	}
	return nil
}

// continuous reports whether b is drawn as a strip (not in the caption).
func (b *ColorBar) continuous() bool { return b != nil && len(b.Swatches) == 0 }

// keys returns the caption entries of a categorical key.
func (b *ColorBar) keys() []keyEntry {
	if b == nil || len(b.Swatches) == 0 {
		return nil
	}
	var out []keyEntry
	if b.Label != "" {
		out = append(out, keyEntry{label: b.Label + ":"})
	}
	for _, s := range b.Swatches {
		out = append(out, keyEntry{sample: &keySample{color: s.Color}, label: s.Label})
	}
	return out
}

// stripHeight is the height of a continuous bar's coloured strip.
func stripHeight(st *styles) float64 { return math.Round(0.75 * st.em) }

// barTop is the space between the data area's decorations and the bar.
func barTop(st *styles) float64 { return math.Round(0.9 * st.em) }

// barHeight is the height of a continuous bar block of width w: title
// (and note, on a line of its own when both do not fit in w), strip,
// ticks and tick labels.
func barHeight(st *styles, b *ColorBar, w float64) float64 {
	h := stripHeight(st) + st.frame + st.tickLen + st.gap + st.text.height()
	if b.Label != "" || b.Note != "" {
		h += st.text.height() + math.Round(0.35*st.em)
	}
	if noteBelow(st, b, w) {
		h += st.text.height()
	}
	return h
}

// noteBelow reports whether the bar's note goes on a second title line.
func noteBelow(st *styles, b *ColorBar, w float64) bool {
	return b.Label != "" && b.Note != "" && width(st.text, b.Label)+math.Round(0.6*st.em)+width(st.muted, b.Note) > w
}

// shownTicks returns the ticks of b whose labels fit along a bar of width
// w: the two nearest the ends first, then the others in order where they
// keep clear of those already kept.
func shownTicks(st *styles, b *ColorBar, w float64) []Tick {
	ts := append([]Tick(nil), b.Ticks...)
	sort.SliceStable(ts, func(i, j int) bool { return ts[i].T < ts[j].T })
	if len(ts) <= 1 {
		return ts
	}
	type span struct{ a, b float64 }
	box := func(t Tick) span {
		c, hw := t.T*w, width(st.text, t.Label)/2+0.4*st.em
		return span{c - hw, c + hw}
	}
	kept := []Tick{ts[0], ts[len(ts)-1]}
	if box(ts[0]).b > box(ts[len(ts)-1]).a {
		kept = kept[1:]
	}
	for _, t := range ts[1 : len(ts)-1] {
		bt, ok := box(t), true
		for _, k := range kept {
			if bk := box(k); bt.a < bk.b && bk.a < bt.b {
				ok = false
				break
			}
		}
		if ok {
			kept = append(kept, t)
		}
	}
	sort.SliceStable(kept, func(i, j int) bool { return kept[i].T < kept[j].T })
	return kept
}

// barOverhang is how far the tick labels of a bar of width w reach beyond
// its left and right ends.
func barOverhang(st *styles, b *ColorBar, w float64) (l, r float64) {
	for _, t := range shownTicks(st, b, w) {
		hw := width(st.text, t.Label) / 2
		l = math.Max(l, hw-t.T*w)
		r = math.Max(r, hw-(1-t.T)*w)
	}
	return l, r
}

// drawBar draws the continuous bar b across width w with the top of its
// block at y and its left end at x. A title line longer than the bar may
// reach right up to the figure's text edge right, and is moved left
// when it would pass it.
func drawBar(dc canvas, st *styles, b *ColorBar, x, y, w, right float64) {
	if b.Label != "" || b.Note != "" {
		below := noteBelow(st, b, w)
		line := func(ts textStyle, s string, at, y float64) {
			lw := width(ts, s)
			drawText(dc, ts, s, math.Max(0, math.Min(at, right-lw)), y, 0, 0)
		}
		line(st.text, b.Label, x, y)
		if b.Note != "" {
			nx, ny := x, y
			if below {
				ny += st.text.height()
			} else if b.Label != "" {
				nx += width(st.text, b.Label) + math.Round(0.6*st.em)
			}
			line(st.muted, b.Note, nx, ny)
		}
		y += st.text.height() + math.Round(0.35*st.em)
		if below {
			y += st.text.height()
		}
	}
	x, y = math.Round(x), math.Round(y)
	sh := stripHeight(st)
	n := len(b.Colors)
	strip := image.NewRGBA(image.Rect(0, 0, n, 1))
	for i, c := range b.Colors {
		strip.SetRGBA(i, 0, overWhite(c))
	}
	dc.image(image.Rect(int(x), int(y), int(x+math.Round(w)), int(y+sh)), strip)
	lw := st.frame
	dc.SetColor(black)
	dc.SetLineWidth(lw)
	dc.SetDash()
	dc.DrawRectangle(x-lw/2, y-lw/2, math.Round(w)+lw, sh+lw)
	dc.Stroke()
	dc.SetLineCapButt()
	for _, t := range shownTicks(st, b, w) {
		tx := snap(x+t.T*w, lw)
		dc.DrawLine(tx, y+sh+lw, tx, y+sh+lw+st.tickLen)
		dc.Stroke()
		drawText(dc, st.text, t.Label, x+t.T*w, y+sh+lw+st.tickLen+st.gap, 0.5, 0)
	}
}

// setStroke sets the colour, width and dash pattern for a line.
func setStroke(dc canvas, c color.RGBA, w float64, dashed bool) {
	dc.SetColor(c)
	dc.SetLineWidth(w)
	if dashed {
		dc.SetDash(math.Max(4, 3.5*w), math.Max(3, 2.2*w))
	} else {
		dc.SetDash()
	}
}

// overWhite composites c over an opaque white background.
func overWhite(c color.RGBA) color.RGBA {
	if c.A == 255 {
		return c
	}
	k := 255 - uint32(c.A)
	return color.RGBA{
		R: uint8(min(255, uint32(c.R)+k)),
		G: uint8(min(255, uint32(c.G)+k)),
		B: uint8(min(255, uint32(c.B)+k)),
		A: 255,
	}
}
