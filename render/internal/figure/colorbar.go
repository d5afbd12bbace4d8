package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"

	"github.com/fogleman/gg"
)

// ColorBar is the key to the colours of a map or of plotted series. It is
// either continuous (Colors, with Ticks and Label) or categorical
// (Swatches, with Label as a heading); setting both is an error.
type ColorBar struct {
	// Colors are the colours of a continuous bar sampled evenly from the
	// bottom (t = 0) to the top (t = 1); each row of the bar shows the
	// nearest sample.
	Colors []color.RGBA
	// Ticks are labelled positions along the bar, t in [0, 1]. The
	// caller decides what values they stand for (linear, logarithmic,
	// diverging, ...).
	Ticks []Tick
	// Label names the quantity, e.g. "g = E_obs/E_emit". It is written
	// along the bar, or above it when it is longer than the bar.
	Label string
	// Swatches make the bar a categorical key: one coloured square and
	// label per entry, from the top down.
	Swatches []Swatch
}

// Tick is a labelled position on a colour bar, T in [0, 1] from the bottom.
type Tick struct {
	T     float64
	Label string
}

// Swatch is one entry of a categorical key.
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

// barBox is the space a colour bar or key needs: its width to the right of
// its left edge, and how far it reaches above the top and below the bottom
// of the data area it sits beside.
type barBox struct {
	w, above, below float64
	labelOnTop      bool
}

// barWidth is the width of the coloured strip of a continuous bar.
func barWidth(st *styles) float64 { return math.Round(1.1 * st.em) }

// swatchSize is the side of a key's colour square and the row pitch.
func swatchSize(st *styles) (q, pitch float64) {
	q = math.Round(st.em)
	pitch = math.Round(math.Max(q, st.tick.height()) + 0.45*st.em)
	return q, pitch
}

// measureBar returns the space bar needs next to a data area of height h.
func measureBar(st *styles, b *ColorBar, h float64) barBox {
	if len(b.Swatches) > 0 {
		q, pitch := swatchSize(st)
		w := width(st.label, b.Label)
		for _, s := range b.Swatches {
			// 0.5 em of slack: hinted glyphs can draw wider than measured.
			w = math.Max(w, q+0.5*st.em+width(st.tick, s.Label)+0.5*st.em)
		}
		ht := float64(len(b.Swatches)-1)*pitch + q
		if b.Label != "" {
			ht += st.label.height() + 0.5*st.em
		}
		return barBox{w: w, below: math.Max(0, ht-h)}
	}
	maxW := 0.0
	for _, t := range b.Ticks {
		maxW = math.Max(maxW, width(st.tick, t.Label))
	}
	w := barWidth(st) + st.frame
	if len(b.Ticks) > 0 {
		w += st.tickLen + st.gap + maxW
	}
	box := barBox{w: w}
	if len(b.Ticks) > 0 {
		hh := st.tick.height() / 2
		box.above, box.below = hh, hh
	}
	if b.Label == "" {
		return box
	}
	lw := width(st.label, b.Label)
	switch {
	case lw <= 2*barWidth(st):
		// A symbol such as "g" reads best upright, centred over the bar.
		box.labelOnTop = true
		box.w = math.Max(box.w, barWidth(st)/2+lw/2)
	case lw <= 0.95*h:
		box.w += 0.45*st.em + st.label.height()
		return box
	default:
		box.labelOnTop = true
		box.w = math.Max(box.w, lw)
	}
	box.above = math.Max(box.above, st.label.height()+0.6*st.em)
	return box
}

// drawBar draws bar with its left edge at x beside a data area whose top
// is y and height h.
func drawBar(dc *gg.Context, img *image.RGBA, st *styles, b *ColorBar, box barBox, x, y, h float64) {
	if len(b.Swatches) > 0 {
		drawKey(dc, st, b, x, y)
		return
	}
	bw := barWidth(st)
	x0, y0, ih := int(x), int(y), int(h)
	n := len(b.Colors)
	for r := 0; r < ih; r++ {
		t := (float64(ih-r) - 0.5) / float64(ih)
		k := 0
		if n > 1 {
			k = int(math.Round(t * float64(n-1)))
		}
		c := b.Colors[min(max(k, 0), n-1)]
		c = overWhite(c)
		for col := 0; col < int(bw); col++ {
			img.SetRGBA(x0+col, y0+r, c)
		}
	}
	lw := st.frame
	dc.SetColor(black)
	dc.SetLineWidth(lw)
	dc.SetDash()
	dc.DrawRectangle(x-lw/2, y-lw/2, bw+lw, h+lw)
	dc.Stroke()
	dc.SetLineCapButt()
	maxW := 0.0
	for _, t := range b.Ticks {
		ty := snap(y+(1-t.T)*h, lw)
		dc.DrawLine(x+bw+lw, ty, x+bw+lw+st.tickLen, ty)
		dc.Stroke()
		drawNumber(dc, st.tick, t.Label, x+bw+lw+st.tickLen+st.gap, y+(1-t.T)*h, 0, 0.5)
		maxW = math.Max(maxW, width(st.tick, t.Label))
	}
	if b.Label == "" {
		return
	}
	if box.labelOnTop {
		if lw := width(st.label, b.Label); lw <= 2*bw {
			drawText(dc, st.label, b.Label, x+bw/2, y-0.6*st.em, 0.5, 1)
		} else {
			drawText(dc, st.label, b.Label, x, y-0.6*st.em, 0, 1)
		}
		return
	}
	lx := x + bw + lw
	if len(b.Ticks) > 0 {
		lx += st.tickLen + st.gap + maxW
	}
	drawTextUp(dc, st.label, b.Label, lx+0.45*st.em+st.label.height()/2, y+h/2)
}

// drawKey draws the categorical key of b with its top left corner at
// (x, y).
func drawKey(dc *gg.Context, st *styles, b *ColorBar, x, y float64) {
	q, pitch := swatchSize(st)
	if b.Label != "" {
		drawText(dc, st.label, b.Label, x, y, 0, 0)
		y += st.label.height() + 0.5*st.em
	}
	for i, s := range b.Swatches {
		ry := math.Round(y + float64(i)*pitch)
		dc.SetColor(overWhite(s.Color))
		dc.DrawRectangle(x, ry, q, q)
		dc.Fill()
		dc.SetColor(frameGrey)
		dc.SetLineWidth(1)
		dc.SetDash()
		dc.DrawRectangle(x+0.5, ry+0.5, q-1, q-1)
		dc.Stroke()
		drawText(dc, st.tick, s.Label, x+q+0.5*st.em, ry+q/2, 0, 0.5)
	}
}

// legendItem is one row of a legend box.
type legendItem struct {
	color  color.RGBA
	label  string
	dashed bool
	width  float64
}

// legendLayout gives the size of a legend box and its row metrics.
func legendLayout(st *styles, items []legendItem) (w, h, sample, pitch, inset float64) {
	sample = math.Round(2.2 * st.em)
	pitch = math.Round(st.tick.height() + 0.3*st.em)
	inset = math.Round(0.5 * st.em)
	maxW := 0.0
	for _, it := range items {
		maxW = math.Max(maxW, width(st.tick, it.label))
	}
	w = 2*inset + sample + 0.5*st.em + maxW
	h = 2*inset + float64(len(items))*pitch - (pitch - st.tick.height())
	return math.Ceil(w), math.Ceil(h), sample, pitch, inset
}

// drawLegend draws a legend box with its top left corner at (x, y).
func drawLegend(dc *gg.Context, st *styles, items []legendItem, x, y float64) {
	w, h, sample, pitch, inset := legendLayout(st, items)
	x, y = math.Round(x), math.Round(y)
	dc.SetRGBA255(255, 255, 255, 230)
	dc.DrawRectangle(x, y, w, h)
	dc.Fill()
	dc.SetColor(frameGrey)
	dc.SetLineWidth(1)
	dc.SetDash()
	dc.DrawRectangle(x+0.5, y+0.5, w-1, h-1)
	dc.Stroke()
	for i, it := range items {
		cy := y + inset + float64(i)*pitch + st.tick.height()/2
		if luma(it.color) > 0.75 {
			// A light line would vanish on the white box: give it a
			// grey casing.
			setStroke(dc, darkGrey, it.width+2, false)
			dc.SetLineCapButt()
			dc.DrawLine(x+inset, cy, x+inset+sample, cy)
			dc.Stroke()
		}
		setStroke(dc, it.color, it.width, it.dashed)
		dc.SetLineCapButt()
		dc.DrawLine(x+inset, cy, x+inset+sample, cy)
		dc.Stroke()
		dc.SetDash()
		drawText(dc, st.tick, it.label, x+inset+sample+0.5*st.em, cy, 0, 0.5)
	}
}

// setStroke sets the colour, width and dash pattern for a line.
func setStroke(dc *gg.Context, c color.RGBA, w float64, dashed bool) {
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
