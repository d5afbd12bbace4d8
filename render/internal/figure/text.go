package figure

import (
	"fmt"
	"image/color"
	"math"
	"strings"
	"sync"

	"github.com/fogleman/gg"
	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/math/fixed"
)

// The Go fonts are parsed once; faces are made per figure because a
// truetype face caches glyphs and must not be shared between goroutines.
var (
	fontOnce    sync.Once
	regularFont *truetype.Font
	boldFont    *truetype.Font
	fontErr     error
)

// loadFonts parses the embedded Go Regular and Go Bold fonts.
func loadFonts() error {
	fontOnce.Do(func() {
		regularFont, fontErr = truetype.Parse(goregular.TTF)
		if fontErr != nil {
			fontErr = fmt.Errorf("figure: parse Go Regular: %w", fontErr)
			return
		}
		boldFont, fontErr = truetype.Parse(gobold.TTF)
		if fontErr != nil {
			fontErr = fmt.Errorf("figure: parse Go Bold: %w", fontErr)
		}
	})
	return fontErr
}

// textStyle is a font face at one size with the vertical extents used for
// layout: ascent and descent bound the ink of ordinary text (capitals,
// brackets, descenders), capH is the height of a digit.
type textStyle struct {
	face                  font.Face
	ascent, descent, capH float64
	color                 color.RGBA
}

// height is the line height used for layout.
func (t textStyle) height() float64 { return t.ascent + t.descent }

// newStyle makes a face of f at size pixels.
func newStyle(f *truetype.Font, size float64, c color.RGBA) textStyle {
	face := &metricCache{Face: truetype.NewFace(f, &truetype.Options{Size: size, DPI: 72, Hinting: font.HintingFull}),
		advance: map[rune]advance{}, bounds: map[rune]glyphBounds{}}
	ink, _ := font.BoundString(face, "([|bdfghjklpqy0189µ°⁹αβθ")
	digit, _ := font.BoundString(face, "0")
	return textStyle{
		face:    face,
		ascent:  float64(-ink.Min.Y) / 64,
		descent: float64(ink.Max.Y) / 64,
		capH:    float64(-digit.Min.Y) / 64,
		color:   c,
	}
}

// metricCache is a face that remembers the advance and bounds of every
// glyph it has measured: a truetype face loads and hints the glyph again
// for each measurement, and a figure measures the same few characters
// hundreds of times. Like the face, it is for one goroutine at a time.
type metricCache struct {
	font.Face
	advance map[rune]advance
	bounds  map[rune]glyphBounds
}

type advance struct {
	w  fixed.Int26_6
	ok bool
}

type glyphBounds struct {
	b  fixed.Rectangle26_6
	w  fixed.Int26_6
	ok bool
}

func (m *metricCache) GlyphAdvance(r rune) (fixed.Int26_6, bool) {
	a, hit := m.advance[r]
	if !hit {
		a.w, a.ok = m.Face.GlyphAdvance(r)
		m.advance[r] = a
	}
	return a.w, a.ok
}

func (m *metricCache) GlyphBounds(r rune) (fixed.Rectangle26_6, fixed.Int26_6, bool) {
	g, hit := m.bounds[r]
	if !hit {
		g.b, g.w, g.ok = m.Face.GlyphBounds(r)
		m.bounds[r] = g
	}
	return g.b, g.w, g.ok
}

// stylePool keeps the styles of finished figures by base size, so that a
// run's figures (all of one size in a sweep) reuse faces whose glyphs
// are already loaded: getStyles hands each set to one figure at a time.
var stylePool = struct {
	sync.Mutex
	free map[float64][]*styles
}{free: map[float64][]*styles{}}

// getStyles returns newStyles(em), reused when a figure has put it back.
func getStyles(em float64) (*styles, error) {
	stylePool.Lock()
	list := stylePool.free[em]
	if n := len(list); n > 0 {
		st := list[n-1]
		stylePool.free[em] = list[:n-1]
		stylePool.Unlock()
		return st, nil
	}
	stylePool.Unlock()
	return newStyles(em)
}

// putStyles gives st back for later figures of the same size.
func putStyles(em float64, st *styles) {
	stylePool.Lock()
	defer stylePool.Unlock()
	if len(stylePool.free[em]) < 8 {
		stylePool.free[em] = append(stylePool.free[em], st)
	}
}

// styles holds the faces of one figure, derived from its base size em (in
// pixels), and the line widths and lengths that scale with it.
type styles struct {
	em       float64
	title    textStyle
	subtitle textStyle
	label    textStyle // axis and colour-bar labels
	tick     textStyle // tick labels, legend and key entries
	small    textStyle // contour and marker labels

	frame   float64 // frame and tick line width (whole pixels)
	tickLen float64 // major tick length
	pad     float64 // outer figure padding
	gap     float64 // small gap between a tick and its label
}

// Colours used for text and decorations.
var (
	black     = color.RGBA{A: 255}
	white     = color.RGBA{R: 255, G: 255, B: 255, A: 255}
	darkGrey  = color.RGBA{R: 51, G: 51, B: 51, A: 255}
	frameGrey = color.RGBA{R: 90, G: 90, B: 90, A: 255}
)

// newStyles returns the styles for base size em, which is clamped to a
// readable range.
func newStyles(em float64) (*styles, error) {
	if err := loadFonts(); err != nil {
		return nil, err
	}
	em = math.Max(14, math.Min(48, em))
	s := &styles{
		em:       em,
		title:    newStyle(boldFont, 1.2*em, black),
		subtitle: newStyle(regularFont, 0.95*em, darkGrey),
		label:    newStyle(regularFont, 1.0*em, black),
		tick:     newStyle(regularFont, 0.9*em, black),
		small:    newStyle(regularFont, 0.85*em, black),
		frame:    math.Max(1, math.Round(0.085*em)),
		tickLen:  math.Round(0.45 * em),
		pad:      math.Round(0.8 * em),
		gap:      math.Round(0.3 * em),
	}
	return s, nil
}

// width returns the advance width of s in style t.
func width(t textStyle, s string) float64 {
	return float64(font.MeasureString(t.face, s)) / 64
}

// drawText draws s with its box anchored at (x, y): ax = 0, 0.5, 1 puts the
// left edge, centre or right edge at x; ay = 0, 0.5, 1 puts the top, middle
// or bottom of the box (ascent above the baseline, descent below) at y.
func drawText(dc *gg.Context, t textStyle, s string, x, y, ax, ay float64) {
	w := width(t, s)
	base := y - ay*t.height() + t.ascent
	dc.SetFontFace(t.face)
	dc.SetColor(t.color)
	dc.DrawString(s, math.Round(x-ax*w), math.Round(base))
}

// drawNumber draws a tick label whose digits are centred vertically on y
// when ay = 0.5; other ay values behave as in drawText.
func drawNumber(dc *gg.Context, t textStyle, s string, x, y, ax, ay float64) {
	if ay != 0.5 {
		drawText(dc, t, s, x, y, ax, ay)
		return
	}
	w := width(t, s)
	dc.SetFontFace(t.face)
	dc.SetColor(t.color)
	dc.DrawString(s, math.Round(x-ax*w), math.Round(y+t.capH/2))
}

// drawTextUp draws s rotated a quarter turn anticlockwise (reading from
// bottom to top) with the centre of its box at (x, y).
func drawTextUp(dc *gg.Context, t textStyle, s string, x, y float64) {
	x, y = math.Round(x), math.Round(y)
	dc.Push()
	dc.RotateAbout(-math.Pi/2, x, y)
	drawText(dc, t, s, x, y, 0.5, 0.5)
	dc.Pop()
}

// superscripts maps the characters of an integer to superscript forms.
var superscripts = strings.NewReplacer(
	"-", "⁻", "0", "⁰", "1", "¹", "2", "²", "3", "³", "4", "⁴",
	"5", "⁵", "6", "⁶", "7", "⁷", "8", "⁸", "9", "⁹",
)

// powerOfTen returns "10ⁿ" with a superscript exponent.
func powerOfTen(n int) string {
	return "10" + superscripts.Replace(fmt.Sprint(n))
}

// luma is the Rec. 709 luma of c in [0, 1], ignoring alpha.
func luma(c color.RGBA) float64 {
	return (0.2126*float64(c.R) + 0.7152*float64(c.G) + 0.0722*float64(c.B)) / 255
}
