package figure

import (
	"fmt"
	"image"
	"io"
	"math"
)

// Printed sizes of the house style: a figure is as wide as one or two
// columns of a journal page, its text is set at BodyPoints whatever the
// width, and its pixel size follows from the resolution.
const (
	// SingleColumnMM and DoubleColumnMM are the canvas widths of the
	// column presets (common practice: the text column of two-column
	// journal pages is about 85–88 mm, the full page width 175–180 mm).
	SingleColumnMM = 86.0
	DoubleColumnMM = 178.0
	// DefaultDPI is the resolution when none is given (common practice:
	// 300 dpi is what journals ask of colour figures).
	DefaultDPI = 300.0
	// BodyPoints is the size of all text, in points (1/72 inch).
	BodyPoints = 8.0

	minWidthMM, maxWidthMM = 30.0, 500.0
	minDPI, maxDPI         = 50.0, 1200.0
)

// Size is the printed size of a decorated figure. Every figure drawn
// with one Size has the same width in pixels; the height follows from the
// content. The zero Size is a single column at DefaultDPI.
type Size struct {
	// WidthMM is the canvas width in millimetres; 0 means
	// SingleColumnMM.
	WidthMM float64
	// DPI is the resolution in dots per inch; 0 means DefaultDPI.
	DPI float64

	px int // exact width in pixels, for the cells of a grid (0: from WidthMM)
}

// resolved fills in the defaults.
func (s Size) resolved() Size {
	if s.WidthMM == 0 {
		s.WidthMM = SingleColumnMM
	}
	if s.DPI == 0 {
		s.DPI = DefaultDPI
	}
	return s
}

// Validate reports an error unless s (after defaults) is within the
// supported range.
func (s Size) Validate() error {
	r := s.resolved()
	if !(r.WidthMM >= minWidthMM && r.WidthMM <= maxWidthMM) {
		return fmt.Errorf("figure: width %v mm outside %v…%v mm", s.WidthMM, minWidthMM, maxWidthMM)
	}
	if !(r.DPI >= minDPI && r.DPI <= maxDPI) {
		return fmt.Errorf("figure: resolution %v dpi outside %v…%v dpi", s.DPI, minDPI, maxDPI)
	}
	if r.Pixels() > maxSide {
		return fmt.Errorf("figure: %v mm at %v dpi is more than %d pixels", r.WidthMM, r.DPI, maxSide)
	}
	return nil
}

// Pixels is the canvas width in pixels.
func (s Size) Pixels() int {
	if s.px > 0 {
		return s.px
	}
	r := s.resolved()
	return int(math.Round(r.WidthMM / 25.4 * r.DPI))
}

// em is the body text size in pixels.
func (s Size) em() float64 {
	return BodyPoints / 72 * s.resolved().DPI
}

// drawing is a laid-out figure: its size and the code that draws it on
// any canvas.
type drawing struct {
	w, h int
	dpi  float64
	draw func(c canvas)
	done func() // releases the styles
}

// raster draws d into a new image.
func (d drawing) raster() *image.RGBA {
	defer d.done()
	c := newRaster(d.w, d.h)
	d.draw(c)
	return c.img
}

// svg writes d as an SVG document.
func (d drawing) svg(w io.Writer) error {
	defer d.done()
	c := newSVG()
	d.draw(c)
	return c.finish(w, d.w, d.h, d.dpi)
}
