package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"

	"github.com/fogleman/gg"
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
	// Legend draws a box with the series labels in the corner of the
	// plot where it covers the least of the lines.
	Legend bool
	// Bar, if not nil, is a colour bar to the right of the plot, for
	// series coloured by a parameter.
	Bar *ColorBar
	// Width and Height are the figure size in pixels; zero means
	// 900×600.
	Width, Height int
}

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
	w, h := p.Width, p.Height
	if w == 0 && h == 0 {
		w, h = 900, 600
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
	fw, fh, err := p.validate()
	if err != nil {
		return nil, err
	}
	xlo, xhi, ylo, yhi, err := plotRanges(&p)
	if err != nil {
		return nil, err
	}
	em := 0.028 * float64(min(fw, fh))
	st, err := getStyles(em)
	if err != nil {
		return nil, err
	}
	defer putStyles(em, st)
	ax := &axes{st: st}
	var box barBox
	barGap := math.Round(1.2 * st.em)
	titleH := titleHeight(st, p.Title, p.Subtitle)

	// Margins depend on the tick labels, which depend on the size of the
	// plot area; two rounds settle both.
	w, h := float64(fw)-10*st.em, float64(fh)-8*st.em
	for range 2 {
		if w < 3*st.em || h < 3*st.em {
			return nil, errors.New("figure: plot too small for its labels")
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
		if p.Bar != nil {
			box = measureBar(st, p.Bar, h)
		}
		ol, or, ot, ob := ax.overhang()
		l := math.Ceil(st.pad + math.Max(ax.depth(sideLeft), ol))
		r := st.frame
		if p.Bar != nil {
			r += barGap + box.w
		}
		r = math.Ceil(st.pad + math.Max(r, or))
		t := math.Ceil(st.pad + titleH + math.Max(st.frame, math.Max(ot, box.above)))
		b := math.Ceil(st.pad + math.Max(ax.depth(sideBottom), math.Max(ob, box.below)))
		ax.x0, ax.y0 = l, t
		w, h = float64(fw)-l-r, float64(fh)-t-b
	}
	if w < 3*st.em || h < 3*st.em {
		return nil, errors.New("figure: plot too small for its labels")
	}
	ax.w, ax.h = w, h

	out := image.NewRGBA(image.Rect(0, 0, fw, fh))
	dc := gg.NewContextForRGBA(out)
	dc.SetColor(white)
	dc.Clear()

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
	paths := make([][][]point, len(p.Series))
	for i, s := range p.Series {
		var cur []point
		for k := range s.X {
			if !usable(s.X[k], s.Y[k]) {
				if len(cur) > 0 {
					paths[i] = append(paths[i], cur)
					cur = nil
				}
				continue
			}
			cur = append(cur, point{fx(s.X[k]), fy(s.Y[k])})
		}
		if len(cur) > 0 {
			paths[i] = append(paths[i], cur)
		}
		setStroke(dc, orBlack(s.Color), seriesWidth(st, s.Width), s.Dashed)
		dc.SetLineCapRound()
		dc.SetLineJoinRound()
		for _, pts := range paths[i] {
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
	var obstacles []rect
	for _, v := range p.VLines {
		if v.Label == "" {
			continue
		}
		x := fx(v.X)
		if x < ax.x0 || x > ax.x0+w {
			continue
		}
		obstacles = append(obstacles, drawVLineLabel(dc, st, v, x, ax))
	}
	dc.ResetClip()

	if p.Legend {
		var items []legendItem
		for _, s := range p.Series {
			if s.Label != "" {
				items = append(items, legendItem{color: orBlack(s.Color), label: s.Label, dashed: s.Dashed, width: seriesWidth(st, s.Width)})
			}
		}
		if len(items) > 0 {
			lw, lh, _, _, _ := legendLayout(st, items)
			x, y := legendCorner(st, ax, lw, lh, paths, p.VLines, fx, obstacles)
			drawLegend(dc, st, items, x, y)
		}
	}
	ax.drawFrame(dc)
	ax.drawSides(dc)
	if p.Bar != nil {
		drawBar(dc, out, st, p.Bar, box, ax.x0+w+st.frame+barGap, ax.y0, h)
	}
	tw := math.Max(width(st.title, p.Title), width(st.subtitle, p.Subtitle))
	cx := ax.x0 + w/2
	cx = math.Min(cx, float64(fw)-st.pad-tw/2)
	cx = math.Max(cx, st.pad+tw/2)
	drawTitle(dc, st, p.Title, p.Subtitle, cx, st.pad)
	return out, nil
}

// seriesWidth returns w, or the default series width.
func seriesWidth(st *styles, w float64) float64 {
	if !(w > 0) || math.IsInf(w, 0) {
		return math.Max(1.5, math.Round(0.13*st.em*2)/2)
	}
	return math.Min(w, 4*st.em)
}

// rect is an axis-aligned box in figure pixels.
type rect struct{ x0, y0, x1, y1 float64 }

// contains reports whether q lies in r.
func (r rect) contains(q point) bool {
	return q.x >= r.x0 && q.x <= r.x1 && q.y >= r.y0 && q.y <= r.y1
}

// overlaps reports whether r and o intersect.
func (r rect) overlaps(o rect) bool {
	return r.x0 < o.x1 && o.x0 < r.x1 && r.y0 < o.y1 && o.y0 < r.y1
}

// drawVLineLabel writes the label of v along the line at figure x, near
// the top of the plot, on the right of the line unless there is no room.
// It returns the box the label occupies.
func drawVLineLabel(dc *gg.Context, st *styles, v VLine, x float64, ax *axes) rect {
	ts := st.small
	tw, th := width(ts, v.Label), ts.height()
	inset := math.Round(0.5 * st.em)
	cx := x + 0.3*st.em + th/2
	if cx+th/2 > ax.x0+ax.w-0.2*st.em {
		cx = x - 0.3*st.em - th/2
	}
	cy := ax.y0 + inset + tw/2
	r := rect{cx - th/2 - 1, cy - tw/2 - 2, cx + th/2 + 1, cy + tw/2 + 2}
	dc.SetRGBA255(255, 255, 255, 215)
	dc.DrawRectangle(math.Round(r.x0), math.Round(r.y0), math.Round(r.x1-r.x0), math.Round(r.y1-r.y0))
	dc.Fill()
	ts.color = orBlack(v.Color)
	drawTextUp(dc, ts, v.Label, cx, cy)
	return r
}

// legendCorner chooses the corner of the plot area for a legend of size
// lw×lh that covers the fewest line samples and no marker label,
// preferring top right, top left, bottom right, bottom left on a tie.
func legendCorner(st *styles, ax *axes, lw, lh float64, paths [][][]point, vlines []VLine, fx func(float64) float64, obstacles []rect) (float64, float64) {
	inset := math.Round(0.6 * st.em)
	corners := [][2]float64{
		{ax.x0 + ax.w - inset - lw, ax.y0 + inset},
		{ax.x0 + inset, ax.y0 + inset},
		{ax.x0 + ax.w - inset - lw, ax.y0 + ax.h - inset - lh},
		{ax.x0 + inset, ax.y0 + ax.h - inset - lh},
	}
	best, bestScore := 0, math.Inf(1)
	for i, c := range corners {
		r := rect{c[0] - 0.3*st.em, c[1] - 0.3*st.em, c[0] + lw + 0.3*st.em, c[1] + lh + 0.3*st.em}
		score := 0.0
		for _, series := range paths {
			for _, pts := range series {
				score += samplesInside(r, pts)
			}
		}
		for _, v := range vlines {
			if x := fx(v.X); x >= r.x0 && x <= r.x1 {
				score += (r.y1 - r.y0) / 2
			}
		}
		for _, o := range obstacles {
			if r.overlaps(o) {
				score += 1e6
			}
		}
		if score < bestScore {
			best, bestScore = i, score
		}
	}
	return corners[best][0], corners[best][1]
}

// samplesInside counts points spaced about two pixels apart along pts
// that fall in r.
func samplesInside(r rect, pts []point) float64 {
	n := 0.0
	for i, q := range pts {
		if i == 0 {
			if r.contains(q) {
				n++
			}
			continue
		}
		p := pts[i-1]
		d := math.Hypot(q.x-p.x, q.y-p.y)
		steps := int(math.Min(1e5, math.Ceil(d/2)))
		for k := 1; k <= steps; k++ {
			t := float64(k) / float64(steps)
			if r.contains(point{p.x + t*(q.x-p.x), p.y + t*(q.y-p.y)}) {
				n++
			}
		}
	}
	return n
}
