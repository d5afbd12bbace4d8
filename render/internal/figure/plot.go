package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
)

// Series is one line of a plot. Points with a NaN or infinite coordinate
// (or, on a logarithmic axis, y ≤ 0) break the line. A zero Color is
// black and a Width ≤ 0 selects a width that suits the figure size. Label
// names the series in the legend; series without one are left out of it.
type Series struct {
	X, Y   []float64
	Color  color.RGBA
	Width  float64
	Label  string
	Dashed bool
}

// VLine is a vertical marker across the plot at X, with an optional label
// written along it near the top. A zero Color is black.
type VLine struct {
	X      float64
	Label  string
	Color  color.RGBA
	Dashed bool
}

// Plot is a line plot such as a spectrum.
type Plot struct {
	Title, Subtitle string
	// XLabel and YLabel name the axes with their units, e.g. "E [keV]".
	XLabel, YLabel string
	// XMin, XMax, YMin and YMax give the axis ranges. A pair that is
	// zero in both ends is taken from the data with a small margin (and
	// from 0 for y when no y is negative on a linear axis); otherwise
	// the pair is used as given.
	XMin, XMax, YMin, YMax float64
	// LogY makes the y axis logarithmic.
	LogY   bool
	Series []Series
	VLines []VLine
	// Legend sets the series labels, with line samples, in the
	// caption's key.
	Legend bool
	// Bar, if not nil, is a colour bar under the plot, for series
	// coloured by a parameter.
	Bar *ColorBar
	// Size is the printed size: the figure is Size.Pixels() wide and the
	// axes with their labels 0.7 times as tall, then the colour bar and the caption, with the caption below.
	Size Size
	// Width and Height, when not zero, override Size: the width of the
	// figure and the height of the axes with their labels (the colour
	// bar and the caption are added below), in pixels.
	Width, Height int
}

// plotAspect is the height of a plot above its caption over its width.
const plotAspect = 0.7

// minPlotSide is the smallest accepted figure width or height.
const minPlotSide = 120

// plotRanges returns the axis ranges of p, filling in automatic ones.
func plotRanges(p *Plot) (x0, x1, y0, y1 float64, err error) {
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	usable := func(y float64) bool { return finite(y) && (!p.LogY || y > 0) }
	xlo, xhi := math.Inf(1), math.Inf(-1)
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for _, s := range p.Series {
		for i := range s.X {
			if !finite(s.X[i]) || !usable(s.Y[i]) {
				continue
			}
			xlo, xhi = math.Min(xlo, s.X[i]), math.Max(xhi, s.X[i])
			ylo, yhi = math.Min(ylo, s.Y[i]), math.Max(yhi, s.Y[i])
		}
	}
	for _, v := range p.VLines {
		xlo, xhi = math.Min(xlo, v.X), math.Max(xhi, v.X)
	}

	x0, x1 = p.XMin, p.XMax
	if x0 == 0 && x1 == 0 {
		if xlo > xhi {
			return 0, 0, 0, 0, errors.New("figure: plot has no finite data to set the x range")
		}
		x0, x1 = padRange(xlo, xhi, 0.02)
	}
	y0, y1 = p.YMin, p.YMax
	if y0 == 0 && y1 == 0 {
		if ylo > yhi {
			return 0, 0, 0, 0, errors.New("figure: plot has no usable data to set the y range")
		}
		switch {
		case p.LogY:
			if ylo == yhi {
				y0, y1 = ylo/2, yhi*2
			} else {
				f := math.Pow(yhi/ylo, 0.05)
				y0, y1 = ylo/f, yhi*f
			}
		case ylo >= 0:
			_, y1 = padRange(0, yhi, 0.05)
			y0 = 0
		default:
			y0, y1 = padRange(ylo, yhi, 0.05)
		}
	}
	if err := checkRange("x", x0, x1); err != nil {
		return 0, 0, 0, 0, err
	}
	if err := checkRange("y", y0, y1); err != nil {
		return 0, 0, 0, 0, err
	}
	if p.LogY && y0 <= 0 {
		return 0, 0, 0, 0, fmt.Errorf("figure: logarithmic y range [%v, %v] must be positive", y0, y1)
	}
	return x0, x1, y0, y1, nil
}

// padRange widens [lo, hi] by frac of its width on each side; a single
// value gets a unit-sized range around it.
func padRange(lo, hi, frac float64) (float64, float64) {
	if lo == hi {
		d := math.Max(1e-300, math.Abs(lo)*0.1)
		if lo == 0 {
			d = 1
		}
		return lo - d, hi + d
	}
	d := frac * (hi - lo)
	return lo - d, hi + d
}

// validate checks p and returns the figure size.
func (p *Plot) validate() (int, int, error) {
	if err := p.Size.Validate(); err != nil {
		return 0, 0, err
	}
	w, h := p.Width, p.Height
	if w == 0 {
		w = p.Size.Pixels()
	}
	if h == 0 {
		h = int(math.Round(plotAspect * float64(w)))
	}
	if w < minPlotSide || h < minPlotSide || w > maxSide || h > maxSide {
		return 0, 0, fmt.Errorf("figure: plot size %d×%d outside %d…%d pixels", w, h, minPlotSide, maxSide)
	}
	for i, s := range p.Series {
		if len(s.X) != len(s.Y) {
			return 0, 0, fmt.Errorf("figure: series %d has %d x and %d y values", i, len(s.X), len(s.Y))
		}
	}
	for i, v := range p.VLines {
		if math.IsNaN(v.X) || math.IsInf(v.X, 0) {
			return 0, 0, fmt.Errorf("figure: vertical line %d at x = %v", i, v.X)
		}
	}
	if p.Bar != nil {
		if err := p.Bar.validate(); err != nil {
			return 0, 0, err
		}
	}
	return w, h, nil
}

// DrawPlot draws p.
func DrawPlot(p Plot) (*image.RGBA, error) {
	d, err := layoutPlot(p)
	if err != nil {
		return nil, err
	}
	return d.raster(), nil
}

// PlotSVG writes p, laid out as by DrawPlot, as an SVG document.
func PlotSVG(w io.Writer, p Plot) error {
	d, err := layoutPlot(p)
	if err != nil {
		return err
	}
	return d.svg(w)
}

// plotCaption is the caption of p: title, subtitle and the series key.
func plotCaption(p *Plot, st *styles) caption {
	c := caption{lead: p.Title, text: p.Subtitle, keys: p.Bar.keys()}
	if p.Legend {
		for _, s := range p.Series {
			if s.Label != "" {
				c.keys = append(c.keys, keyEntry{sample: &keySample{line: true, color: orBlack(s.Color), dashed: s.Dashed, width: seriesWidth(st, s.Width)}, label: s.Label})
			}
		}
	}
	return c
}

// maxMarkerRows bounds the rows of marker labels above a plot; a label
// that finds no room in them is left out.
const maxMarkerRows = 3

// markerPlace is where a marker label goes: its left edge and its row
// above the frame (0 nearest).
type markerPlace struct {
	x   float64
	row int
}

// markerLayout places the marker labels of p over a plot area at x0 of
// width w, each centred on its line where it fits, kept over the area,
// in the lowest row where it clears the labels already placed. It
// returns the places (ok false: not drawn) and the rows used.
func markerLayout(st *styles, p *Plot, x0, w, xlo, xhi float64) ([]markerPlace, []bool, int) {
	places := make([]markerPlace, len(p.VLines))
	shown := make([]bool, len(p.VLines))
	var taken [maxMarkerRows][][2]float64
	rows := 0
	for i, v := range p.VLines {
		if v.Label == "" {
			continue
		}
		x := x0 + (v.X-xlo)/(xhi-xlo)*w
		if x < x0 || x > x0+w {
			continue
		}
		tw := width(st.text, v.Label)
		lx := math.Max(x0, math.Min(x-tw/2, x0+w-tw))
		for row := range maxMarkerRows {
			clash := false
			for _, o := range taken[row] {
				if lx < o[1]+st.em && o[0] < lx+tw+st.em {
					clash = true
				}
			}
			if !clash {
				taken[row] = append(taken[row], [2]float64{lx, lx + tw})
				places[i], shown[i] = markerPlace{lx, row}, true
				rows = max(rows, row+1)
				break
			}
		}
	}
	return places, shown, rows
}

// markerPitch is the height of one row of marker labels.
func markerPitch(st *styles) float64 { return st.text.height() + st.gap }

// layoutPlot lays p out: the axes fill the width and the plot height,
// the marker labels sit above the frame, the colour bar and the caption
// below it, so that no label crosses a curve.
func layoutPlot(p Plot) (drawing, error) {
	fw, fh, err := p.validate()
	if err != nil {
		return drawing{}, err
	}
	xlo, xhi, ylo, yhi, err := plotRanges(&p)
	if err != nil {
		return drawing{}, err
	}
	em := p.Size.em()
	if p.Width > 0 {
		em = math.Max(9, 0.024*float64(min(fw, fh)))
	}
	st, err := getStyles(em)
	if err != nil {
		return drawing{}, err
	}
	fail := func(err error) (drawing, error) {
		putStyles(em, st)
		return drawing{}, err
	}
	ax := &axes{st: st}
	below := 0.0
	if p.Bar.continuous() {
		below = barTop(st) + barHeight(st, p.Bar, float64(fw)-8*st.em)
	}
	capn := plotCaption(&p, st)

	// Margins depend on the tick labels, which depend on the size of the
	// plot area; rounds settle both.
	w, h := float64(fw)-8*st.em, float64(fh)-6*st.em
	var l, t float64
	for range 3 {
		if w < 3*st.em || h < 3*st.em {
			return fail(errors.New("figure: plot too small for its labels"))
		}
		bottom := fitScale(st, w, true, func(n int) scale {
			return linearScale(xlo, xhi, n, p.XLabel, false)
		})
		left := fitScale(st, h, false, func(n int) scale {
			if p.LogY {
				return logScale(ylo, yhi, n, p.YLabel)
			}
			return linearScale(ylo, yhi, n, p.YLabel, false)
		})
		ax.sides[sideBottom], ax.sides[sideLeft] = &bottom, &left
		ax.w, ax.h = w, h
		ol, or, ot, ob := ax.overhang()
		if p.Bar.continuous() {
			bl, br := barOverhang(st, p.Bar, w)
			ol, or = math.Max(ol, bl), math.Max(or, br)
		}
		l = math.Ceil(st.pad + math.Max(ax.depth(sideLeft), ol))
		r := math.Ceil(st.pad + math.Max(st.frame, or))
		_, _, rows := markerLayout(st, &p, l, w, xlo, xhi)
		t = math.Ceil(st.pad + math.Max(st.frame, math.Max(ot, float64(rows)*markerPitch(st))))
		b := math.Ceil(math.Max(ax.depth(sideBottom), ob))
		w, h = float64(fw)-l-r, float64(fh)-t-b
	}
	if w < 3*st.em || h < 3*st.em {
		return fail(errors.New("figure: plot too small for its labels"))
	}
	ax.w, ax.h = w, h
	ax.x0, ax.y0 = l, t
	capX, capW := l, float64(fw)-l-st.pad
	capH := 0.0
	if !capn.empty() {
		capH = math.Round(1.1*st.em) + captionHeight(st, capn, capW)
	}
	total := fh + int(math.Ceil(below))
	if capH > 0 {
		total += int(math.Ceil(capH + st.pad))
	}
	if total > maxSide {
		return fail(fmt.Errorf("figure: plot of %d×%d pixels is too large", fw, total))
	}
	draw := func(dc canvas) {
		drawPlotArea(dc, st, &p, ax, xlo, xhi, ylo, yhi)
		y := ax.y0 + h + math.Max(ax.depth(sideBottom), 0)
		if _, _, _, ob := ax.overhang(); ob > ax.depth(sideBottom) {
			y = ax.y0 + h + ob
		}
		if p.Bar.continuous() {
			drawBar(dc, st, p.Bar, ax.x0, y+barTop(st), w, float64(fw)-st.pad)
			y += barTop(st) + barHeight(st, p.Bar, float64(fw)-8*st.em)
		}
		if !capn.empty() {
			drawCaption(dc, st, capn, capX, y+math.Round(1.1*st.em), capW)
		}
	}
	return drawing{w: fw, h: total, dpi: p.Size.resolved().DPI, draw: draw, done: func() { putStyles(em, st) }}, nil
}

// drawPlotArea draws the markers, the series, the frame with its scales
// and the marker labels of p.
func drawPlotArea(dc canvas, st *styles, p *Plot, ax *axes, xlo, xhi, ylo, yhi float64) {
	w, h := ax.w, ax.h
	fx := func(x float64) float64 { return ax.x0 + (x-xlo)/(xhi-xlo)*w }
	fy := func(y float64) float64 {
		if p.LogY {
			return ax.y0 + (math.Log10(yhi)-math.Log10(y))/(math.Log10(yhi)-math.Log10(ylo))*h
		}
		return ax.y0 + (yhi-y)/(yhi-ylo)*h
	}
	usable := func(x, y float64) bool {
		ok := !math.IsNaN(x) && !math.IsNaN(y) && !math.IsInf(x, 0) && !math.IsInf(y, 0)
		return ok && (!p.LogY || y > 0)
	}
	dc.DrawRectangle(ax.x0, ax.y0, w, h)
	dc.Clip()
	for _, v := range p.VLines {
		setStroke(dc, orBlack(v.Color), math.Max(1, math.Round(0.09*st.em*2)/2), v.Dashed)
		dc.SetLineCapButt()
		x := snap(fx(v.X), 1)
		dc.DrawLine(x, ax.y0, x, ax.y0+h)
		dc.Stroke()
		dc.SetDash()
	}
	for _, s := range p.Series {
		var paths [][]point
		var cur []point
		for k := range s.X {
			if !usable(s.X[k], s.Y[k]) {
				if len(cur) > 0 {
					paths = append(paths, cur)
					cur = nil
				}
				continue
			}
			cur = append(cur, point{fx(s.X[k]), fy(s.Y[k])})
		}
		if len(cur) > 0 {
			paths = append(paths, cur)
		}
		setStroke(dc, orBlack(s.Color), seriesWidth(st, s.Width), s.Dashed)
		dc.SetLineCapRound()
		dc.SetLineJoinRound()
		for _, pts := range paths {
			for k, q := range pts {
				if k == 0 {
					dc.MoveTo(q.x, q.y)
				} else {
					dc.LineTo(q.x, q.y)
				}
			}
			if len(pts) == 1 {
				dc.LineTo(pts[0].x, pts[0].y)
			}
			dc.Stroke()
		}
		dc.SetDash()
	}
	dc.ResetClip()
	ax.drawFrame(dc)
	ax.drawSides(dc)
	// Marker labels: in rows above the frame, never on the data.
	places, shown, _ := markerLayout(st, p, ax.x0, w, xlo, xhi)
	for i, v := range p.VLines {
		if !shown[i] {
			continue
		}
		ts := st.text
		ts.color = orBlack(v.Color)
		y := ax.y0 - st.frame - st.gap - float64(places[i].row)*markerPitch(st)
		drawText(dc, ts, v.Label, places[i].x, y, 0, 1)
	}
}

// seriesWidth returns w, or the default series width.
func seriesWidth(st *styles, w float64) float64 {
	if !(w > 0) || math.IsInf(w, 0) {
		return math.Max(1.5, math.Round(0.13*st.em*2)/2)
	}
	return math.Min(w, 4*st.em)
}
