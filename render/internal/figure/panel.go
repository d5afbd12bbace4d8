// Package figure draws publication-style figures with gg: pixel maps with
// axes, colour bars, overlays and contours (DrawPanel), line plots
// (DrawPlot), and deterministic PNG encoding (EncodePNG).
//
// The package knows nothing of what the pixels mean: the caller supplies
// the map, the colours and every label. Text uses the Go fonts, which
// cover Greek, the micro and degree signs and superscript digits;
// characters outside them (such as ⊙) are drawn as an empty box.
// Drawing is deterministic: the same input gives the same pixels.
package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"

	"github.com/fogleman/gg"
)

// Panel is a screen map with decorations.
type Panel struct {
	// Image is the map, drawn pixel for pixel (nearest neighbour); its
	// row 0 is at the top, the largest y.
	Image image.Image
	// X and Y are the data ranges of the outer pixel edges (not the
	// pixel centres) of Image, with labels.
	X, Y Axis
	// Title is the first, bold title line; Subtitle the second.
	Title, Subtitle string
	// Bar, if not nil, is drawn to the right of the map.
	Bar *ColorBar
	// Lines are drawn over the map in data coordinates, clipped to it.
	Lines []Polyline
	// Contours are drawn over the map, each labelled once.
	Contours []Contour
	// Legend, if not empty, is a small box in the top right corner of
	// the map.
	Legend []LegendEntry
	// Arrows are drawn over the map, after the lines and contours.
	Arrows []Arrow
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

// autoScale picks the map magnification when none is given: a whole
// number that makes the map 600–800 pixels across when there is one,
// otherwise the factor that makes it 700 pixels across.
func autoScale(w, h int) float64 {
	m := float64(max(w, h))
	if m <= 800 {
		if s := math.Floor(800 / m); s*m >= 600 {
			return s
		}
	}
	return 700 / m
}

// DrawPanel draws p with the map magnified by scale (map pixels to figure
// pixels, nearest neighbour, so that map pixels stay crisp); scale ≤ 0
// chooses a magnification that makes the map 600–800 pixels across. The
// figure grows around the map to fit every label.
func DrawPanel(p Panel, scale float64) (*image.RGBA, error) {
	img, _, err := drawPanel(p, scale)
	return img, err
}

// drawPanel is DrawPanel that also returns where the map was drawn.
func drawPanel(p Panel, zoom float64) (*image.RGBA, image.Rectangle, error) {
	if err := p.validate(zoom); err != nil {
		return nil, image.Rectangle{}, err
	}
	src := p.Image.Bounds()
	if zoom <= 0 {
		zoom = autoScale(src.Dx(), src.Dy())
	}
	mw := math.Max(1, math.Round(float64(src.Dx())*zoom))
	mh := math.Max(1, math.Round(float64(src.Dy())*zoom))
	if mw > maxSide || mh > maxSide {
		return nil, image.Rectangle{}, fmt.Errorf("figure: map of %v×%v pixels is too large", mw, mh)
	}
	em := 0.022 * math.Max(mw, mh)
	st, err := getStyles(em)
	if err != nil {
		return nil, image.Rectangle{}, err
	}
	defer putStyles(em, st)

	ax := &axes{st: st, w: mw, h: mh}
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

	var box barBox
	barGap := math.Round(1.2 * st.em)
	if p.Bar != nil {
		box = measureBar(st, p.Bar, mh)
	}
	ol, or, ot, ob := ax.overhang()
	left0 := st.pad + math.Max(ax.depth(sideLeft), ol)
	right0 := ax.depth(sideRight)
	if p.Bar != nil {
		right0 += barGap + box.w
	}
	right0 = st.pad + math.Max(right0, or)
	titleH := titleHeight(st, p.Title, p.Subtitle)
	top0 := st.pad + titleH + math.Max(ax.depth(sideTop), math.Max(ot, box.above))
	bottom0 := st.pad + math.Max(ax.depth(sideBottom), math.Max(ob, box.below))

	left0, right0 = fitTitle(st, p.Title, p.Subtitle, left0, right0, mw)
	left0, right0 = math.Ceil(left0), math.Ceil(right0)
	top0, bottom0 = math.Ceil(top0), math.Ceil(bottom0)
	fw, fh := int(left0+mw+right0), int(top0+mh+bottom0)
	if fw > maxSide || fh > maxSide {
		return nil, image.Rectangle{}, fmt.Errorf("figure: figure of %d×%d pixels is too large", fw, fh)
	}
	ax.x0, ax.y0 = left0, top0

	out := image.NewRGBA(image.Rect(0, 0, fw, fh))
	dc := gg.NewContextForRGBA(out)
	dc.SetColor(white)
	dc.Clear()

	mapRect := image.Rect(int(ax.x0), int(ax.y0), int(ax.x0+mw), int(ax.y0+mh))
	blitNearest(out, mapRect, p.Image)

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
	for i, c := range p.Contours {
		drawContourLabel(dc, st, c, paths[i])
	}
	for _, a := range p.Arrows {
		drawArrow(dc, st, a, win, toFig)
	}
	dc.ResetClip()
	if len(p.Legend) > 0 {
		items := make([]legendItem, len(p.Legend))
		for i, e := range p.Legend {
			items[i] = legendItem{color: orBlack(e.Color), label: e.Label, dashed: e.Dashed, width: lineWidth(st, 0)}
		}
		lw, _, _, _, _ := legendLayout(st, items)
		inset := math.Round(0.6 * st.em)
		drawLegend(dc, st, items, ax.x0+mw-inset-lw, ax.y0+inset)
	}
	ax.drawFrame(dc)
	ax.drawSides(dc)
	if p.Bar != nil {
		drawBar(dc, out, st, p.Bar, box, ax.x0+mw+ax.depth(sideRight)+barGap, ax.y0, mh)
	}
	drawTitle(dc, st, p.Title, p.Subtitle, ax.x0+mw/2, st.pad)
	return out, mapRect, nil
}

// blitNearest copies src into the rectangle r of dst, magnified by
// nearest neighbour; translucent pixels are composited over white.
func blitNearest(dst *image.RGBA, r image.Rectangle, src image.Image) {
	sb := src.Bounds()
	sw, sh := sb.Dx(), sb.Dy()
	rw, rh := r.Dx(), r.Dy()
	cols := make([]int, rw)
	for x := range cols {
		cols[x] = sb.Min.X + min(sw-1, (2*x+1)*sw/(2*rw))
	}
	rgba, isRGBA := src.(*image.RGBA)
	for y := 0; y < rh; y++ {
		sy := sb.Min.Y + min(sh-1, (2*y+1)*sh/(2*rh))
		for x := 0; x < rw; x++ {
			var c color.RGBA
			if isRGBA {
				c = rgba.RGBAAt(cols[x], sy)
			} else {
				c = color.RGBAModel.Convert(src.At(cols[x], sy)).(color.RGBA)
			}
			dst.SetRGBA(r.Min.X+x, r.Min.Y+y, overWhite(c))
		}
	}
}

// titleHeight is the height of the title block including its gap to the
// axes below, or 0 when there is no title.
func titleHeight(st *styles, title, subtitle string) float64 {
	h := 0.0
	if title != "" {
		h += st.title.height()
	}
	if subtitle != "" {
		if h > 0 {
			h += 0.25 * st.em
		}
		h += st.subtitle.height()
	}
	if h > 0 {
		h += 0.7 * st.em
	}
	return h
}

// fitTitle widens the left and right margins around a data area of width
// w so that the title lines, centred on the area, fit in the figure.
func fitTitle(st *styles, title, subtitle string, left, right, w float64) (float64, float64) {
	tw := math.Max(width(st.title, title), width(st.subtitle, subtitle))
	half := tw/2 - w/2
	left = math.Max(left, st.pad+half)
	right = math.Max(right, st.pad+half)
	return left, right
}

// drawTitle draws the title lines centred on x with the top at y.
func drawTitle(dc *gg.Context, st *styles, title, subtitle string, x, y float64) {
	if title != "" {
		drawText(dc, st.title, title, x, y, 0.5, 0)
		y += st.title.height() + 0.25*st.em
	}
	if subtitle != "" {
		drawText(dc, st.subtitle, subtitle, x, y, 0.5, 0)
	}
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
func drawPolyline(dc *gg.Context, st *styles, l Polyline, win [4]float64, toFig func(x, y float64) (float64, float64)) {
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
func drawContourLines(dc *gg.Context, st *styles, c Contour, paths [][]point) {
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

// drawContourLabel writes c.Label at the middle (by length) of the longest
// piece of c (of its contourPaths), on a small background that contrasts
// with the label colour.
func drawContourLabel(dc *gg.Context, st *styles, c Contour, paths [][]point) {
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
	m := pointAlong(best, bestLen/2)
	col := orBlack(c.Color)
	ts := st.small
	ts.color = col
	bg := color.RGBA{R: 255, G: 255, B: 255, A: 255}
	if luma(col) > 0.55 {
		bg = color.RGBA{R: 20, G: 20, B: 20, A: 255}
	}
	w, h := width(ts, c.Label), ts.height()
	padX, padY := math.Round(0.25*st.em), math.Round(0.1*st.em)
	bx := math.Round(m.x - w/2 - padX)
	by := math.Round(m.y - h/2 - padY)
	dc.SetRGBA255(int(bg.R), int(bg.G), int(bg.B), 215)
	dc.DrawRoundedRectangle(bx, by, math.Ceil(w+2*padX), math.Ceil(h+2*padY), 0.2*st.em)
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
