package figure

import (
	"math"
)

// Sides of a frame.
const (
	sideBottom = iota
	sideLeft
	sideTop
	sideRight
)

// horizontal reports whether side runs along the x direction.
func horizontal(side int) bool { return side == sideBottom || side == sideTop }

// axes is a rectangular data area with a frame and up to four tick
// scales drawn outward from it. x0, y0, w and h are whole pixels; the
// frame is drawn just outside the rectangle so that the area itself is
// left untouched.
type axes struct {
	st           *styles
	x0, y0, w, h float64
	sides        [4]*scale
}

// labelGap is the space between tick labels and the axis label.
func (a *axes) labelGap() float64 { return math.Round(0.45 * a.st.em) }

// tickDepth is how far the ticks and their labels reach out from the
// inner edge of the frame on side.
func (a *axes) tickDepth(side int) float64 {
	sc := a.sides[side]
	if sc == nil {
		return a.st.frame
	}
	d := a.st.frame + a.st.tickLen + a.st.gap
	if horizontal(side) {
		return d + a.st.text.height()
	}
	maxW := 0.0
	for _, t := range sc.ticks {
		maxW = math.Max(maxW, width(a.st.text, t.label))
	}
	return d + maxW
}

// depth is how far everything drawn for side reaches out from the frame.
func (a *axes) depth(side int) float64 {
	d := a.tickDepth(side)
	if sc := a.sides[side]; sc != nil && sc.label != "" {
		d += a.labelGap() + a.st.text.height()
	}
	return d
}

// overhang returns how far tick and axis labels stick out beyond the ends
// of the frame, along each direction: left, right, top and bottom.
func (a *axes) overhang() (l, r, t, b float64) {
	for side, sc := range a.sides {
		if sc == nil {
			continue
		}
		if horizontal(side) {
			for _, tk := range sc.ticks {
				hw := width(a.st.text, tk.label) / 2
				l = math.Max(l, hw-tk.f*a.w)
				r = math.Max(r, hw-(1-tk.f)*a.w)
			}
			if lw := width(a.st.text, sc.label); lw > a.w {
				l = math.Max(l, (lw-a.w)/2)
				r = math.Max(r, (lw-a.w)/2)
			}
			continue
		}
		if len(sc.ticks) > 0 {
			hh := a.st.text.height() / 2
			t, b = math.Max(t, hh), math.Max(b, hh)
		}
		if lw := width(a.st.text, sc.label); lw > a.h {
			t = math.Max(t, (lw-a.h)/2)
			b = math.Max(b, (lw-a.h)/2)
		}
	}
	return l, r, t, b
}

// labelsFit reports whether the tick labels of sc, laid along an axis of
// the given length, keep clear of each other.
func labelsFit(st *styles, sc scale, length float64, isHorizontal bool) bool {
	for i := 1; i < len(sc.ticks); i++ {
		p, q := sc.ticks[i-1], sc.ticks[i]
		dist := math.Abs(q.f-p.f) * length
		need := st.text.capH + 0.6*st.em
		if isHorizontal {
			need = (width(st.text, p.label)+width(st.text, q.label))/2 + 0.8*st.em
		}
		if dist < need {
			return false
		}
	}
	return true
}

// fitScale builds a scale with at most ten ticks, and fewer when their
// labels would collide on an axis of the given length.
func fitScale(st *styles, length float64, isHorizontal bool, build func(maxTicks int) scale) scale {
	var sc scale
	for n := 10; n >= 2; n-- {
		sc = build(n)
		if labelsFit(st, sc, length, isHorizontal) {
			return sc
		}
	}
	return sc
}

// snap moves a line centre c so that a line of width lw covers whole
// pixels.
func snap(c, lw float64) float64 {
	return math.Round(c-lw/2) + lw/2
}

// drawFrame draws the frame just outside the data rectangle.
func (a *axes) drawFrame(dc canvas) {
	lw := a.st.frame
	dc.SetColor(black)
	dc.SetLineWidth(lw)
	dc.SetDash()
	dc.DrawRectangle(a.x0-lw/2, a.y0-lw/2, a.w+lw, a.h+lw)
	dc.Stroke()
}

// drawSides draws ticks, tick labels and axis labels on every side that
// has a scale.
func (a *axes) drawSides(dc canvas) {
	st := a.st
	lw := st.frame
	dc.SetColor(black)
	dc.SetLineWidth(lw)
	dc.SetDash()
	dc.SetLineCapButt()
	for side, sc := range a.sides {
		if sc == nil {
			continue
		}
		out := lw // outer edge of the frame, measured from the rectangle
		tick := func(f, length float64) {
			switch side {
			case sideBottom:
				x := snap(a.x0+f*a.w, lw)
				dc.DrawLine(x, a.y0+a.h+out, x, a.y0+a.h+out+length)
			case sideTop:
				x := snap(a.x0+f*a.w, lw)
				dc.DrawLine(x, a.y0-out, x, a.y0-out-length)
			case sideLeft:
				y := snap(a.y0+(1-f)*a.h, lw)
				dc.DrawLine(a.x0-out, y, a.x0-out-length, y)
			case sideRight:
				y := snap(a.y0+(1-f)*a.h, lw)
				dc.DrawLine(a.x0+a.w+out, y, a.x0+a.w+out+length, y)
			}
			dc.Stroke()
		}
		for _, f := range sc.minor {
			tick(f, math.Round(0.55*st.tickLen))
		}
		for _, t := range sc.ticks {
			tick(t.f, st.tickLen)
		}
		td := out + st.tickLen + st.gap
		for _, t := range sc.ticks {
			switch side {
			case sideBottom:
				drawText(dc, st.text, t.label, a.x0+t.f*a.w, a.y0+a.h+td, 0.5, 0)
			case sideTop:
				drawText(dc, st.text, t.label, a.x0+t.f*a.w, a.y0-td, 0.5, 1)
			case sideLeft:
				drawNumber(dc, st.text, t.label, a.x0-td, a.y0+(1-t.f)*a.h, 1, 0.5)
			case sideRight:
				drawNumber(dc, st.text, t.label, a.x0+a.w+td, a.y0+(1-t.f)*a.h, 0, 0.5)
			}
		}
		if sc.label == "" {
			continue
		}
		ld := a.tickDepth(side) + a.labelGap()
		switch side {
		case sideBottom:
			drawText(dc, st.text, sc.label, a.x0+a.w/2, a.y0+a.h+ld, 0.5, 0)
		case sideTop:
			drawText(dc, st.text, sc.label, a.x0+a.w/2, a.y0-ld, 0.5, 1)
		case sideLeft:
			drawTextUp(dc, st.text, sc.label, a.x0-ld-st.text.height()/2, a.y0+a.h/2)
		case sideRight:
			drawTextUp(dc, st.text, sc.label, a.x0+a.w+ld+st.text.height()/2, a.y0+a.h/2)
		}
	}
}
