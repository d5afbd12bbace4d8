// Package figure draws the project's figures in its house style: pixel
// maps with axes, colour bars, overlays and contours (DrawPanel, and
// DrawGrid for several), line plots (DrawPlot), each as a raster image or
// as SVG from the same drawing code (PanelSVG, GridSVG, PlotSVG), and
// deterministic PNG encoding (EncodePNG).
//
// The house style: a fixed canvas width (Size: one or two journal
// columns), all text in one family (the Go fonts) at one size, a
// continuous colour bar as a strip under the data area with its title
// above it, and a caption block under the figure, left-aligned, that
// starts with the title in bold and carries the key inline (line samples,
// squares of flat colour for the greys and blacks of a map).
//
// Labels use a small markup: "_{obs}" is a subscript, "^{−1}" a
// superscript, "*{g}" italic; Unicode superscript digits (as in "keV⁻¹")
// are set as real superscripts too. The package knows nothing of what the
// pixels mean: the caller supplies the map, the colours and every label.
// The Go fonts cover Greek, the micro and degree signs; characters
// outside them (such as ⊙) are drawn as an empty box. Drawing is
// deterministic: the same input gives the same pixels and bytes.
package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
)

// Panel is a screen map with decorations.
type Panel struct {
	// Image is the map, drawn pixel for pixel (nearest neighbour); its
	// row 0 is at the top, the largest y.
	Image image.Image
	// X and Y are the data ranges of the outer pixel edges (not the
	// pixel centres) of Image, with labels.
	X, Y Axis
	// Title is the bold lead of the caption, Subtitle its first
	// sentence.
	Title, Subtitle string
	// Bar, if not nil, is a strip under the map (continuous) or a key in
	// the caption (swatches).
	Bar *ColorBar
	// Lines are drawn over the map in data coordinates, clipped to it.
	Lines []Polyline
	// Contours are drawn over the map, each labelled once.
	Contours []Contour
	// Legend entries are line samples in the caption's key.
	Legend []LegendEntry
	// Fills explain the flat colours of the map (no disk, shadow) in the
	// caption's key, after the legend.
	Fills []Swatch
	// Arrows are drawn over the map, after the lines and contours.
	Arrows []Arrow
	// Size is the printed size; the figure is exactly Size.Pixels()
	// wide unless DrawPanel is given a magnification.
	Size Size
}

// Axis is the data range of one map direction and its label, which should
// carry the unit in brackets, e.g. "α [M]". The tick labels are kept
// short: for a window that is narrow for its distance from zero the label
// is rewritten to show an offset and a power-of-ten unit, e.g.
// "α + 2.0705 [10⁻¹⁰ M]".
type Axis struct {
	Min, Max float64
	Label    string
	// Secondary, if not nil, adds a second tick scale on the opposite
	// side (top or right) in other units.
	Secondary *SecondaryScale
}

// SecondaryScale is a second unit for an axis: a value v of the axis is
// Factor·v in the secondary unit, named by Label (e.g. "α [µas]").
type SecondaryScale struct {
	Factor float64
	Label  string
}

// Polyline is an overlay in data coordinates. A point with a NaN or
// infinite coordinate breaks the line. A zero Color is black, and a
// Width ≤ 0 selects a width that suits the figure size.
type Polyline struct {
	Points [][2]float64
	Color  color.RGBA
	Width  float64
	Dashed bool
	// Closed joins the last point to the first.
	Closed bool
}

// Contour is a labelled contour line of a scalar field over the map.
// Field is row-major with W×H values at pixel centres, row 0 at the top;
// it spans the same window as the map (usually W and H are the map's
// size). NaN values mark missing data. A zero Color is black.
type Contour struct {
	Field []float32
	W, H  int
	Level float64
	// Label is written once, on the longest piece of the contour.
	Label string
	Color color.RGBA
}

// LegendEntry is one row of a panel legend: a short line sample and a
// label.
type LegendEntry struct {
	Color  color.RGBA
	Label  string
	Dashed bool
}

// maxSide bounds the width and height of a figure in pixels.
const maxSide = 16384

// checkRange reports an error unless lo < hi are finite and far enough
// apart for float64 ticks.
func checkRange(what string, lo, hi float64) error {
	if math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return fmt.Errorf("figure: %s range [%v, %v] is not finite", what, lo, hi)
	}
	if lo >= hi {
		return fmt.Errorf("figure: %s range [%v, %v] is empty or inverted", what, lo, hi)
	}
	span := hi - lo
	if math.IsInf(span, 0) {
		return fmt.Errorf("figure: %s range [%v, %v] is too wide", what, lo, hi)
	}
	if span < 1e-300 || span <= 1e-12*math.Max(math.Abs(lo), math.Abs(hi)) {
		return fmt.Errorf("figure: %s range [%v, %v] is too narrow to label", what, lo, hi)
	}
	return nil
}

// validate checks everything in p that could make drawing fail.
func (p *Panel) validate(zoom float64) error {
	if p.Image == nil {
		return errors.New("figure: panel has no image")
	}
	if err := p.Size.Validate(); err != nil {
		return err
	}
	b := p.Image.Bounds()
	if b.Dx() <= 0 || b.Dy() <= 0 {
		return errors.New("figure: panel image is empty")
	}
	if math.IsNaN(zoom) || math.IsInf(zoom, 0) {
		return fmt.Errorf("figure: scale %v is not finite", zoom)
	}
	if err := checkRange("x", p.X.Min, p.X.Max); err != nil {
		return err
	}
	if err := checkRange("y", p.Y.Min, p.Y.Max); err != nil {
		return err
	}
	for _, ax := range []struct {
		name string
		a    Axis
	}{{"x", p.X}, {"y", p.Y}} {
		s := ax.a.Secondary
		if s == nil {
			continue
		}
		if s.Factor == 0 || math.IsNaN(s.Factor) || math.IsInf(s.Factor, 0) {
			return fmt.Errorf("figure: secondary %s factor %v is not a finite non-zero number", ax.name, s.Factor)
		}
		lo, hi := secondaryRange(ax.a)
		if err := checkRange("secondary "+ax.name, lo, hi); err != nil {
			return err
		}
	}
	if p.Bar != nil {
		if err := p.Bar.validate(); err != nil {
			return err
		}
	}
	for i, c := range p.Contours {
		if c.W <= 0 || c.H <= 0 || c.W > 1<<15 || c.H > 1<<15 || len(c.Field) != c.W*c.H {
			return fmt.Errorf("figure: contour %d has %d values for a %d×%d field", i, len(c.Field), c.W, c.H)
		}
		if math.IsNaN(c.Level) || math.IsInf(c.Level, 0) {
			return fmt.Errorf("figure: contour %d level %v is not finite", i, c.Level)
		}
	}
	for i, a := range p.Arrows {
		if err := a.validate(i); err != nil {
			return err
		}
	}
	return nil
}

// secondaryRange is the range of a's secondary scale, in increasing order.
func secondaryRange(a Axis) (lo, hi float64) {
	lo, hi = a.Secondary.Factor*a.Min, a.Secondary.Factor*a.Max
	if lo > hi {
		lo, hi = hi, lo
	}
	return lo, hi
}

// DrawPanel draws p. With scale ≤ 0 the figure is p.Size.Pixels() wide
// and the map fills what the labels leave; a scale > 0 instead magnifies
// the map by that factor (map pixels to figure pixels) and the figure
// grows around it. Map pixels are magnified by nearest neighbour.
func DrawPanel(p Panel, scale float64) (*image.RGBA, error) {
	d, _, err := layoutPanel(p, scale)
	if err != nil {
		return nil, err
	}
	return d.raster(), nil
}

// PanelSVG writes p, laid out as by DrawPanel with scale 0, as an SVG
// document with the map embedded as a PNG image.
func PanelSVG(w io.Writer, p Panel) error {
	d, _, err := layoutPanel(p, 0)
	if err != nil {
		return err
	}
	return d.svg(w)
}

// drawPanel is DrawPanel that also returns where the map was drawn.
func drawPanel(p Panel, zoom float64) (*image.RGBA, image.Rectangle, error) {
	d, r, err := layoutPanel(p, zoom)
	if err != nil {
		return nil, image.Rectangle{}, err
	}
	return d.raster(), r, nil
}

// panelCaption is the caption of p: title, subtitle and the key.
func panelCaption(p *Panel, st *styles) caption {
	c := caption{lead: p.Title, text: p.Subtitle, keys: p.Bar.keys()}
	for _, e := range p.Legend {
		c.keys = append(c.keys, keyEntry{sample: &keySample{line: true, color: orBlack(e.Color), dashed: e.Dashed, width: lineWidth(st, 0)}, label: e.Label})
	}
	for _, f := range p.Fills {
		c.keys = append(c.keys, keyEntry{sample: &keySample{color: f.Color}, label: f.Label})
	}
	return c
}

// layoutPanel lays p out and returns its drawing and where the map goes.
func layoutPanel(p Panel, zoom float64) (drawing, image.Rectangle, error) {
	if err := p.validate(zoom); err != nil {
		return drawing{}, image.Rectangle{}, err
	}
	src := p.Image.Bounds()
	aspect := float64(src.Dy()) / float64(src.Dx())
	em := p.Size.em()
	st, err := getStyles(em)
	if err != nil {
		return drawing{}, image.Rectangle{}, err
	}
	fail := func(err error) (drawing, image.Rectangle, error) {
		putStyles(em, st)
		return drawing{}, image.Rectangle{}, err
	}
	fw := float64(p.Size.Pixels())
	mw := fw - 9*st.em
	if zoom > 0 {
		mw = math.Max(1, math.Round(float64(src.Dx())*zoom))
	}
	ax := &axes{st: st}
	var left0, right0 float64
	for range 3 {
		if mw < 3*st.em && zoom <= 0 {
			return fail(fmt.Errorf("figure: a %.0f mm canvas is too narrow for the map and its labels", p.Size.resolved().WidthMM))
		}
		mh := math.Max(1, math.Round(mw*aspect))
		if zoom > 0 {
			mh = math.Max(1, math.Round(float64(src.Dy())*zoom))
		}
		if mw > maxSide || mh > maxSide {
			return fail(fmt.Errorf("figure: map of %v×%v pixels is too large", mw, mh))
		}
		ax.w, ax.h = mw, mh
		bottom := fitScale(st, mw, true, func(n int) scale {
			return linearScale(p.X.Min, p.X.Max, n, p.X.Label, false)
		})
		left := fitScale(st, mh, false, func(n int) scale {
			return linearScale(p.Y.Min, p.Y.Max, n, p.Y.Label, false)
		})
		ax.sides[sideBottom], ax.sides[sideLeft] = &bottom, &left
		if s := p.X.Secondary; s != nil {
			lo, hi := secondaryRange(p.X)
			top := fitScale(st, mw, true, func(n int) scale {
				return linearScale(lo, hi, n, s.Label, s.Factor < 0)
			})
			ax.sides[sideTop] = &top
		}
		if s := p.Y.Secondary; s != nil {
			lo, hi := secondaryRange(p.Y)
			right := fitScale(st, mh, false, func(n int) scale {
				return linearScale(lo, hi, n, s.Label, s.Factor < 0)
			})
			ax.sides[sideRight] = &right
		}
		ol, or, _, _ := ax.overhang()
		if p.Bar.continuous() {
			bl, br := barOverhang(st, p.Bar, mw)
			ol, or = math.Max(ol, bl), math.Max(or, br)
		}
		left0 = math.Ceil(st.pad + math.Max(ax.depth(sideLeft), ol))
		right0 = math.Ceil(st.pad + math.Max(ax.depth(sideRight), or))
		if zoom > 0 {
			fw = left0 + mw + right0
		} else {
			mw = math.Floor(fw - left0 - right0)
		}
	}
	_, _, ot, ob := ax.overhang()
	top0 := math.Ceil(st.pad + math.Max(ax.depth(sideTop), ot))
	below := math.Max(ax.depth(sideBottom), ob)
	if p.Bar.continuous() {
		below += barTop(st) + barHeight(st, p.Bar, ax.w)
	}
	capn := panelCaption(&p, st)
	capX := left0
	capW := fw - capX - st.pad
	capH := 0.0
	if !capn.empty() {
		capH = math.Round(1.1*st.em) + captionHeight(st, capn, capW)
	}
	fh := math.Ceil(top0 + ax.h + below + capH + st.pad)
	if fw > maxSide || fh > maxSide {
		return fail(fmt.Errorf("figure: figure of %v×%v pixels is too large", fw, fh))
	}
	ax.x0, ax.y0 = left0, top0
	mapRect := image.Rect(int(ax.x0), int(ax.y0), int(ax.x0+ax.w), int(ax.y0+ax.h))
	draw := func(dc canvas) {
		mw, mh := ax.w, ax.h
		dc.image(mapRect, p.Image)
		dc.DrawRectangle(ax.x0, ax.y0, mw, mh)
		dc.Clip()
		toFig := func(x, y float64) (float64, float64) {
			return ax.x0 + (x-p.X.Min)/(p.X.Max-p.X.Min)*mw, ax.y0 + (p.Y.Max-y)/(p.Y.Max-p.Y.Min)*mh
		}
		paths := make([][][]point, len(p.Contours))
		for i, c := range p.Contours {
			paths[i] = contourPaths(c, ax)
			drawContourLines(dc, st, c, paths[i])
		}
		win := [4]float64{p.X.Min, p.X.Max, p.Y.Min, p.Y.Max}
		for _, l := range p.Lines {
			drawPolyline(dc, st, l, win, toFig)
		}
		for _, a := range p.Arrows {
			drawArrow(dc, st, a, win, toFig)
		}
		// Labels after the clip: they are placed inside the map, and
		// text under a clip region is slow to rasterise.
		dc.ResetClip()
		area := labelBox{ax.x0, ax.y0, ax.x0 + mw, ax.y0 + mh}
		var placed []labelBox
		for i, c := range p.Contours {
			drawContourLabel(dc, st, c, paths[i], area, &placed)
		}
		for _, a := range p.Arrows {
			drawArrowLabel(dc, st, a, toFig)
		}
		ax.drawFrame(dc)
		ax.drawSides(dc)
		y := ax.y0 + mh + math.Max(ax.depth(sideBottom), ob)
		if p.Bar.continuous() {
			drawBar(dc, st, p.Bar, ax.x0, y+barTop(st), mw, fw-st.pad)
			y += barTop(st) + barHeight(st, p.Bar, mw)
		}
		if !capn.empty() {
			drawCaption(dc, st, capn, capX, y+math.Round(1.1*st.em), capW)
		}
	}
	return drawing{w: int(fw), h: int(fh), dpi: p.Size.resolved().DPI, draw: draw, done: func() { putStyles(em, st) }}, mapRect, nil
}

// orBlack returns c, or black for the zero colour.
func orBlack(c color.RGBA) color.RGBA {
	if c == (color.RGBA{}) {
		return black
	}
	return c
}

// lineWidth returns w, or the default overlay width when w is not a
// positive number.
func lineWidth(st *styles, w float64) float64 {
	if !(w > 0) || math.IsInf(w, 0) {
		return math.Max(1.5, math.Round(0.12*st.em*2)/2)
	}
	return math.Min(w, 4*st.em)
}

// drawPolyline strokes l, mapped to figure coordinates by toFig, breaking
// it at points that are not finite. Segments are clipped to the data
// window win (x0, x1, y0, y1) widened by 2% first, so that a line mostly
// far outside a zoomed window does not make the rasteriser walk millions
// of pixels (and dashes) off the figure.
func drawPolyline(dc canvas, st *styles, l Polyline, win [4]float64, toFig func(x, y float64) (float64, float64)) {
	setStroke(dc, orBlack(l.Color), lineWidth(st, l.Width), l.Dashed)
	dc.SetLineCapRound()
	dc.SetLineJoinRound()
	finite := func(p [2]float64) bool {
		return !math.IsNaN(p[0]) && !math.IsNaN(p[1]) && !math.IsInf(p[0], 0) && !math.IsInf(p[1], 0)
	}
	mx, my := 0.02*(win[1]-win[0]), 0.02*(win[3]-win[2])
	box := [4]float64{win[0] - mx, win[1] + mx, win[2] - my, win[3] + my}
	pts := l.Points
	n := len(pts)
	segs := n - 1
	if l.Closed && n > 2 {
		segs = n
	}
	var last [2]float64
	pen := false
	for i := 0; i < segs; i++ {
		p, q := pts[i], pts[(i+1)%n]
		if !finite(p) || !finite(q) {
			pen = false
			continue
		}
		a, b, ok := clipSegment(p, q, box)
		if !ok {
			pen = false
			continue
		}
		if !pen || a != last {
			x, y := toFig(a[0], a[1])
			dc.MoveTo(x, y)
		}
		x, y := toFig(b[0], b[1])
		dc.LineTo(x, y)
		last, pen = b, true
	}
	dc.Stroke()
	dc.SetDash()
}

// clipSegment clips the segment p–q to the box (x0, x1, y0, y1) by the
// Liang–Barsky method (Liang & Barsky 1984, ACM Trans. Graph. 3, 1).
func clipSegment(p, q [2]float64, box [4]float64) ([2]float64, [2]float64, bool) {
	t0, t1 := 0.0, 1.0
	dx, dy := q[0]-p[0], q[1]-p[1]
	for _, c := range [4][2]float64{{-dx, p[0] - box[0]}, {dx, box[1] - p[0]}, {-dy, p[1] - box[2]}, {dy, box[3] - p[1]}} {
		pp, qq := c[0], c[1]
		if pp == 0 {
			if qq < 0 {
				return p, q, false
			}
			continue
		}
		r := qq / pp
		if pp < 0 {
			t0 = math.Max(t0, r)
		} else {
			t1 = math.Min(t1, r)
		}
		if t0 > t1 {
			return p, q, false
		}
	}
	a := [2]float64{p[0] + t0*dx, p[1] + t0*dy}
	b := [2]float64{p[0] + t1*dx, p[1] + t1*dy}
	if t0 == 0 {
		a = p
	}
	if t1 == 1 {
		b = q
	}
	return a, b, true
}

// contourPaths returns the pieces of c in figure coordinates of the map
// area of ax.
func contourPaths(c Contour, ax *axes) [][]point {
	segs := contourSegments(c.Field, c.W, c.H, c.Level)
	sx, sy := ax.w/float64(c.W), ax.h/float64(c.H)
	var out [][]point
	for _, p := range chainSegments(segs) {
		pts := make([]point, 0, len(p.pts)+1)
		for _, q := range p.pts {
			pts = append(pts, point{ax.x0 + q.x*sx, ax.y0 + q.y*sy})
		}
		if p.closed && len(pts) > 0 {
			pts = append(pts, pts[0])
		}
		out = append(out, pts)
	}
	return out
}

// drawContourLines strokes the pieces of c (its contourPaths).
func drawContourLines(dc canvas, st *styles, c Contour, paths [][]point) {
	setStroke(dc, orBlack(c.Color), math.Max(1, math.Round(0.09*st.em*2)/2), false)
	dc.SetLineCapRound()
	dc.SetLineJoinRound()
	for _, pts := range paths {
		for i, q := range pts {
			if i == 0 {
				dc.MoveTo(q.x, q.y)
			} else {
				dc.LineTo(q.x, q.y)
			}
		}
		dc.Stroke()
	}
}

// labelBox is the box a label occupies, in figure pixels.
type labelBox struct{ x0, y0, x1, y1 float64 }

func (b labelBox) overlaps(o labelBox) bool {
	return b.x0 < o.x1 && o.x0 < b.x1 && b.y0 < o.y1 && o.y0 < b.y1
}

// drawContourLabel writes c.Label on the longest piece of c (of its
// contourPaths), on a small background that contrasts with the label
// colour: at the middle of the piece by length, or at the nearest point
// along it where the label stays inside the map area and clear of the
// labels already placed (which it joins).
func drawContourLabel(dc canvas, st *styles, c Contour, paths [][]point, area labelBox, placed *[]labelBox) {
	if c.Label == "" {
		return
	}
	var best []point
	bestLen := 0.0
	for _, pts := range paths {
		if l := pathLength(pts); l > bestLen {
			best, bestLen = pts, l
		}
	}
	if best == nil {
		return
	}
	col := orBlack(c.Color)
	ts := st.text
	ts.color = col
	bg := color.RGBA{R: 255, G: 255, B: 255, A: 255}
	if luma(col) > 0.55 {
		bg = color.RGBA{R: 20, G: 20, B: 20, A: 255}
	}
	w, h := width(ts, c.Label), ts.height()
	padX, padY := math.Round(0.25*st.em), math.Round(0.1*st.em)
	boxAt := func(m point) labelBox {
		bx, by := math.Round(m.x-w/2-padX), math.Round(m.y-h/2-padY)
		return labelBox{bx, by, bx + math.Ceil(w+2*padX), by + math.Ceil(h+2*padY)}
	}
	const steps = 32
	m := pointAlong(best, bestLen/2)
	for k := 0; k < steps; k++ {
		// 1/2, then alternately after and before it, outward.
		off := (k + 1) / 2
		if k%2 == 1 {
			off = -off
		}
		q := pointAlong(best, bestLen*(0.5+float64(off)/steps))
		b := boxAt(q)
		ok := b.x0 >= area.x0 && b.x1 <= area.x1 && b.y0 >= area.y0 && b.y1 <= area.y1
		for _, o := range *placed {
			ok = ok && !b.overlaps(o)
		}
		if ok {
			m = q
			break
		}
	}
	b := boxAt(m)
	*placed = append(*placed, b)
	dc.SetRGBA255(int(bg.R), int(bg.G), int(bg.B), 215)
	dc.DrawRoundedRectangle(b.x0, b.y0, b.x1-b.x0, b.y1-b.y0, 0.2*st.em)
	dc.Fill()
	drawText(dc, ts, c.Label, m.x, m.y, 0.5, 0.5)
}

// pathLength is the length of a polyline.
func pathLength(pts []point) float64 {
	l := 0.0
	for i := 1; i < len(pts); i++ {
		l += math.Hypot(pts[i].x-pts[i-1].x, pts[i].y-pts[i-1].y)
	}
	return l
}

// pointAlong returns the point at arc length s along pts.
func pointAlong(pts []point, s float64) point {
	for i := 1; i < len(pts); i++ {
		d := math.Hypot(pts[i].x-pts[i-1].x, pts[i].y-pts[i-1].y)
		if d >= s && d > 0 {
			t := s / d
			return point{pts[i-1].x + t*(pts[i].x-pts[i-1].x), pts[i-1].y + t*(pts[i].y-pts[i-1].y)}
		}
		s -= d
	}
	return pts[len(pts)-1]
}
