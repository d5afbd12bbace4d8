package maps

import (
	"fmt"
	"image"
	"math"
	"slices"
	"strconv"

	"kerrscope/colormap"
	"kerrscope/raytrace"
	"kerrscope/raytrace/survey"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
)

// The rings map shows every image order on its own, as a transparent
// disk would: order n's light wherever its own crossing lands on the
// emitting disk, whatever lies in front (Frame.OrderLine). Its figure is
// a grid of one panel per order, each on its own intensity scale and
// captioned with the measured width of the order's ring (RingWidths); its
// pixel-exact image shows, per pixel, the highest order that lands there.

// RingDirections is the number of screen directions, evenly spaced from
// the +α axis, along which RingWidths measures each ring.
const RingDirections = 180

// RingWidth is the measured width of the ring of one image order n ≥ 1:
// along each screen direction from the centre of the shadow, the radial
// extent of the pixels that hold order n's light.
type RingWidth struct {
	Order int
	// Directions is the number of directions measured: those along
	// which the order has light that ends inside the window.
	Directions int
	// Median, Min and Max of the widths over the directions measured,
	// in M (zero when Directions is 0).
	Median, Min, Max float64
	// PixelSize is the frame's pixel size in M, the resolution of the
	// measurement.
	PixelSize float64
	// Pixels is the number of pixels that hold the order's light.
	Pixels int
}

// RingWidths measures the ring of every image order n = 1 … Orders−1 of
// the frame, along RingDirections directions from the middle of the
// bounding box of the critical curve (survey.ShadowCenter). The frame must
// hold the line intensity and, on an opaque disk, the crossings it hides
// (pixels.KeepLine | pixels.KeepBehind). Each width is the distance
// between the first and the last point, sampled every quarter pixel
// along the direction, whose nearest pixel holds the order's light, plus
// one sampling step; its error is about a pixel.
func RingWidths(f *pixels.Frame) []RingWidth {
	ca, cb := survey.ShadowCenter(f.Model.Obs)
	var out []RingWidth
	for o := 1; o < f.Orders; o++ {
		rw := RingWidth{Order: o, PixelSize: f.Res.PixelSize}
		for k := 0; k < f.W*f.H; k++ {
			if !math.IsNaN(float64(f.OrderLine(o, k))) {
				rw.Pixels++
			}
		}
		var w []float64
		for d := 0; d < RingDirections; d++ {
			if x, ok := ringExtent(f, o, ca, cb, 360*float64(d)/RingDirections); ok {
				w = append(w, x)
			}
		}
		if len(w) > 0 {
			slices.Sort(w)
			rw.Directions, rw.Min, rw.Max = len(w), w[0], w[len(w)-1]
			rw.Median = w[len(w)/2]
			if len(w)%2 == 0 {
				rw.Median = (w[len(w)/2-1] + w[len(w)/2]) / 2
			}
		}
		out = append(out, rw)
	}
	return out
}

// ringExtent is the radial extent of order o's light along the direction
// dirDeg (degrees counter-clockwise from +α) from (ca, cb); ok is false
// when the order has no light along it or its light reaches the window's
// edge (or the centre), where the ring's extent is not seen.
func ringExtent(f *pixels.Frame, o int, ca, cb, dirDeg float64) (float64, bool) {
	a0, a1, b0, b1 := f.Window()
	h := f.Res.PixelSize
	step := h / 4
	s, c := math.Sincos(dirDeg * math.Pi / 180)
	first, last := -1.0, -1.0
	lit := false
	for n := 0; ; n++ {
		rho := float64(n) * step
		al, be := ca+rho*c, cb+rho*s
		if !(al >= a0 && al < a1 && be > b0 && be <= b1) {
			break
		}
		i := min(f.W-1, int((al-a0)/h))
		j := min(f.H-1, int((b1-be)/h))
		lit = !math.IsNaN(float64(f.OrderLine(o, j*f.W+i)))
		if lit {
			if first < 0 {
				first = rho
			}
			last = rho
		}
	}
	if first <= 0 || lit {
		return 0, false
	}
	return last - first + step, true
}

// Caption describes the ring: its median width and range in M over the
// directions measured, in µas too when microArcsecPerM > 0 (the scene's
// angular scale), and a warning when the ring is narrower than two
// pixels.
func (w RingWidth) Caption(microArcsecPerM float64) string { return w.label(microArcsecPerM, true) }

// label is Caption, with or without the number of directions (the
// panels leave it out).
func (w RingWidth) label(microArcsecPerM float64, directions bool) string {
	switch {
	case w.Pixels == 0:
		return "no pixel holds this order's light: the ring is narrower than the pixels"
	case w.Directions == 0 && directions:
		return "ring width not measured: no direction shows the whole ring (cut by the window, or broken between the pixels)"
	case w.Directions == 0:
		return "ring width not measured (cut by the window, or broken)"
	}
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 3, 64) }
	s := fmt.Sprintf("ring width %s M (%s–%s)", g(w.Median), g(w.Min), g(w.Max))
	if directions {
		s += fmt.Sprintf(" over %d directions", w.Directions)
	}
	if microArcsecPerM > 0 {
		s += fmt.Sprintf(", %s µas", g(w.Median*microArcsecPerM))
	}
	if w.Median < 2*w.PixelSize {
		s += ": under 2 pixels, not resolved"
	}
	return s
}

// ringsPixel places each pixel in the category of the highest image order
// whose own crossing lands there.
func ringsPixel(f *pixels.Frame, _ Scales) func(int) (Class, float64) {
	return func(k int) (Class, float64) {
		for o := f.Orders - 1; o >= 0; o-- {
			if !math.IsNaN(float64(f.OrderLine(o, k))) {
				return Category, float64(o)
			}
		}
		return fateClass(f, k), 0
	}
}

// ringsBar is the key of the rings map's single image.
func ringsBar(f *pixels.Frame, sc Scales, p *figure.Panel) {
	orderBar(f, sc, p)
	p.Bar.Label = "highest image order"
}

// ringsGrid draws the rings figure: one panel per image order, each the
// order's own line intensity on its own scale (linear or log as the
// scene's output.intensity_scale), captioned with its ring width.
func ringsGrid(m Map, f *pixels.Frame, sc Scales) (image.Image, error) {
	title, sub, panels, cols := ringsPanels(m, f, sc)
	return figure.DrawGrid(title, sub, panels, cols, 0)
}

// ringsPanels are the caption, the panels and the columns of the rings
// figure.
func ringsPanels(m Map, f *pixels.Frame, sc Scales) (title, subtitle string, panels []figure.Panel, cols int) {
	widths := RingWidths(f)
	panels = make([]figure.Panel, f.Orders)
	for o := range panels {
		img, imax := orderImage(f, o, sc)
		osc := sc
		osc.IMax = imax
		p := m.frame(f, img)
		p.Title = fmt.Sprintf("*{n} = %d", o)
		p.Subtitle = "the direct image"
		if o > 0 {
			p.Subtitle = widths[o-1].label(f.Res.MicroArcsecPerM, false)
		}
		if imax > 0 {
			intensityBar(f, osc, &p)
		}
		panels[o] = p
	}
	return m.Title, f.Res.Caption(), panels, min(f.Orders, 4)
}

// orderImage is the image of order o's own line intensity (OrderLine) on a
// scale up to its own maximum, which it returns (0: the order has no
// light in the window).
func orderImage(f *pixels.Frame, o int, sc Scales) (*image.RGBA, float64) {
	imax := 0.0
	for k := 0; k < f.W*f.H; k++ {
		if x := float64(f.OrderLine(o, k)); x > imax {
			imax = x
		}
	}
	osc := sc
	osc.IMax = imax
	if !(imax > 0) {
		osc.IMax = 1 // no pixel is on the scale
	}
	pos := intensityPosition(f, osc)
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k := 0; k < f.W*f.H; k++ {
		c := colormap.NoHit
		switch x := float64(f.OrderLine(o, k)); {
		case !math.IsNaN(x):
			c = colormap.Sequential.At(pos(x))
		case f.Fate[k] == raytrace.Captured:
			c = colormap.Shadow
		}
		img.Pix[4*k], img.Pix[4*k+1], img.Pix[4*k+2], img.Pix[4*k+3] = c.R, c.G, c.B, c.A
	}
	return img, imax
}
