package figure

import (
	"fmt"
	"math"
)

// Arrow is an arrow over the map in data coordinates: a line through
// Points (a straight arrow has two, a curved one many) with a filled head
// at the last point, stroked in white on a dark halo so that it shows on
// every colour scale. Label, if not empty, is written in a small box
// centred on LabelAt; Note, if not empty, is a second line, in grey,
// under it.
type Arrow struct {
	Points      [][2]float64
	Label, Note string
	LabelAt     [2]float64
}

// validate checks that the arrow can be drawn.
func (a Arrow) validate(i int) error {
	if len(a.Points) < 2 {
		return fmt.Errorf("figure: arrow %d has %d points, needs at least 2", i, len(a.Points))
	}
	for k := 0; k <= len(a.Points); k++ {
		p := a.LabelAt
		if k < len(a.Points) {
			p = a.Points[k]
		}
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return fmt.Errorf("figure: arrow %d has a point (%v, %v) that is not finite", i, p[0], p[1])
		}
	}
	n := len(a.Points)
	if a.Points[n-1] == a.Points[n-2] {
		return fmt.Errorf("figure: arrow %d ends in a segment of zero length", i)
	}
	return nil
}

// drawArrow draws the line and head of a (clipped to the map by the
// caller); toFig maps data to figure coordinates and win is the data
// window. Its label is drawn by drawArrowLabel.
func drawArrow(dc canvas, st *styles, a Arrow, win [4]float64, toFig func(x, y float64) (float64, float64)) {
	w := lineWidth(st, 0)
	halo := Polyline{Points: a.Points, Color: darkGrey, Width: w + 2*math.Max(1, math.Round(0.5*w))}
	line := Polyline{Points: a.Points, Color: white, Width: w}
	n := len(a.Points)
	hx, hy := toFig(a.Points[n-1][0], a.Points[n-1][1])
	// The head's direction: from the last point at least a head length
	// back along the line (a curve's last segment may be very short).
	size := math.Max(5*w, 0.8*st.em)
	tx, ty := hx, hy
	for i := n - 2; i >= 0; i-- {
		tx, ty = toFig(a.Points[i][0], a.Points[i][1])
		if math.Hypot(hx-tx, hy-ty) >= size {
			break
		}
	}
	d := math.Hypot(hx-tx, hy-ty)
	ux, uy := (hx-tx)/d, (hy-ty)/d
	// Shorten the line so that its round cap hides under the head.
	head := func(grow float64) {
		s := size + grow
		bx, by := hx-ux*s, hy-uy*s
		dc.MoveTo(hx+ux*grow, hy+uy*grow)
		dc.LineTo(bx-uy*0.4*s, by+ux*0.4*s)
		dc.LineTo(bx+uy*0.4*s, by-ux*0.4*s)
		dc.ClosePath()
		dc.Fill()
	}
	drawPolyline(dc, st, halo, win, toFig)
	dc.SetColor(darkGrey)
	head(halo.Width / 2)
	drawPolyline(dc, st, line, win, toFig)
	dc.SetColor(white)
	head(0)
}

// drawArrowLabel writes the label (and note) of a, drawn after the clip
// region is reset: text under a clip region costs gg a canvas-sized
// image per string.
func drawArrowLabel(dc canvas, st *styles, a Arrow, toFig func(x, y float64) (float64, float64)) {
	if a.Label == "" {
		return
	}
	x, y := toFig(a.LabelAt[0], a.LabelAt[1])
	ts, ns := st.text, st.text
	ns.color = darkGrey
	bw, bh := width(ts, a.Label), ts.height()
	if a.Note != "" {
		bw = math.Max(bw, width(ns, a.Note))
		bh += ns.height()
	}
	padX, padY := math.Round(0.25*st.em), math.Round(0.1*st.em)
	bx, by := math.Round(x-bw/2-padX), math.Round(y-bh/2-padY)
	dc.SetRGBA255(255, 255, 255, 215)
	dc.DrawRoundedRectangle(bx, by, math.Ceil(bw+2*padX), math.Ceil(bh+2*padY), 0.2*st.em)
	dc.Fill()
	drawText(dc, ts, a.Label, x, y-bh/2, 0.5, 0)
	if a.Note != "" {
		drawText(dc, ns, a.Note, x, y-bh/2+ts.height(), 0.5, 0)
	}
}
