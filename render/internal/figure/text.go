package figure

import (
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"
	"sync"
	"unicode/utf8"

	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/math/fixed"
)

// The house style sets every piece of text in one family, the Go fonts
// (regular, italic for markup, bold for a caption's lead), at one size:
// the body size em of the figure. Sub- and superscripts are the same
// faces at scriptScale of it, lowered or raised from the baseline.
const (
	scriptScale = 0.7
	subShift    = 0.22 // subscript baseline drop, in em
	supShift    = 0.38 // superscript baseline rise, in em
)

// Faces of the family.
const (
	faceRegular = iota
	faceItalic
	faceBold
	faceCount
)

// faceNames are the font names the SVG writer declares.
var faceNames = [faceCount]string{"ks-regular", "ks-italic", "ks-bold"}

// faceTTF are the embedded TrueType files of the faces.
var faceTTF = [faceCount][]byte{goregular.TTF, goitalic.TTF, gobold.TTF}

// The Go fonts are parsed once; faces are made per figure because a
// truetype face caches glyphs and must not be shared between goroutines.
var (
	fontOnce sync.Once
	fonts    [faceCount]*truetype.Font
	fontErr  error
)

// loadFonts parses the embedded Go fonts.
func loadFonts() error {
	fontOnce.Do(func() {
		for i, ttf := range faceTTF {
			f, err := truetype.Parse(ttf)
			if err != nil {
				fontErr = fmt.Errorf("figure: parse font %s: %w", faceNames[i], err)
				return
			}
			fonts[i] = f
		}
	})
	return fontErr
}

// fontSet is the family at one body size: each face at full size and at
// script size.
type fontSet struct {
	size         float64
	body, script [faceCount]font.Face
	ascent       float64 // ink above the baseline of ordinary text
	descent      float64 // ink below it
	capH         float64 // height of a digit
}

// newFontSet makes the faces of the family at size pixels.
func newFontSet(size float64) *fontSet {
	fs := &fontSet{size: size}
	for i, f := range fonts {
		fs.body[i] = newFace(f, size)
		fs.script[i] = newFace(f, scriptScale*size)
	}
	ink, _ := font.BoundString(fs.body[faceRegular], "([|bdfghjklpqy0189µ°αβθ")
	digit, _ := font.BoundString(fs.body[faceRegular], "0")
	fs.ascent = float64(-ink.Min.Y) / 64
	fs.descent = float64(ink.Max.Y) / 64
	fs.capH = float64(-digit.Min.Y) / 64
	return fs
}

func newFace(f *truetype.Font, size float64) font.Face {
	return &metricCache{Face: truetype.NewFace(f, &truetype.Options{Size: size, DPI: 72, Hinting: font.HintingFull}),
		advance: map[rune]advance{}, bounds: map[rune]glyphBounds{}}
}

// textStyle is the family at one size in one colour; bold makes the
// plain runs bold (a caption's lead).
type textStyle struct {
	fs    *fontSet
	color color.RGBA
	bold  bool
	// ascent and descent bound the ink of ordinary text including
	// scripts; capH is the height of a digit.
	ascent, descent, capH float64
}

// height is the line height used for layout.
func (t textStyle) height() float64 { return t.ascent + t.descent }

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
// run's figures (all of one size) reuse faces whose glyphs are already
// loaded: getStyles hands each set to one figure at a time.
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

// styles holds the text styles of one figure, all of one family and size
// em (in pixels), and the line widths and lengths that scale with it.
type styles struct {
	em    float64
	text  textStyle // every label, tick label, key entry and caption
	lead  textStyle // the bold first sentence of a caption
	muted textStyle // notes under marker labels

	frame   float64 // frame and tick line width (whole pixels)
	tickLen float64 // major tick length
	pad     float64 // outer figure padding
	gap     float64 // small gap between a tick and its label
}

// House colours for text and decorations: an ink that is not pure black
// and a warm grey for secondary lines.
var (
	black     = color.RGBA{R: 0x1c, G: 0x1b, B: 0x22, A: 255}
	white     = color.RGBA{R: 255, G: 255, B: 255, A: 255}
	darkGrey  = color.RGBA{R: 0x4a, G: 0x47, B: 0x50, A: 255}
	frameGrey = color.RGBA{R: 0x6e, G: 0x6a, B: 0x72, A: 255}
)

// newStyles returns the styles for body size em, clamped to a readable
// range.
func newStyles(em float64) (*styles, error) {
	if err := loadFonts(); err != nil {
		return nil, err
	}
	em = math.Max(9, math.Min(96, em))
	fs := newFontSet(em)
	base := textStyle{fs: fs, color: black}
	base.ascent = math.Max(fs.ascent, supShift*em+scriptScale*fs.capH)
	base.descent = math.Max(fs.descent, subShift*em+scriptScale*fs.descent)
	base.capH = fs.capH
	lead := base
	lead.bold = true
	muted := base
	muted.color = darkGrey
	s := &styles{
		em:      em,
		text:    base,
		lead:    lead,
		muted:   muted,
		frame:   math.Max(1, math.Round(0.07*em)),
		tickLen: math.Round(0.4 * em),
		pad:     math.Round(0.7 * em),
		gap:     math.Round(0.3 * em),
	}
	return s, nil
}

// run is a piece of a label in one face at one height.
type run struct {
	s     string
	face  int
	shift int // 0 on the baseline, -1 subscript, +1 superscript
}

// scriptDigits maps Unicode superscript and subscript characters to the
// plain characters they stand for, so that "keV⁻¹" is set as a real
// superscript of the body face.
var supChars = map[rune]rune{'⁰': '0', '¹': '1', '²': '2', '³': '3', '⁴': '4', '⁵': '5', '⁶': '6',
	'⁷': '7', '⁸': '8', '⁹': '9', '⁻': '−', '⁺': '+'}
var subChars = map[rune]rune{'₀': '0', '₁': '1', '₂': '2', '₃': '3', '₄': '4', '₅': '5', '₆': '6',
	'₇': '7', '₈': '8', '₉': '9'}

// parseMarkup splits a label written in the figure markup into runs:
// "_{…}" is a subscript, "^{…}" a superscript, "*{…}" italic, and the
// Unicode superscript and subscript digits and signs are scripts too. An
// underscore, caret or asterisk not followed by "{" is literal (so TOML
// keys such as black_hole.spin print as they are), as is an unmatched
// brace. Groups do not nest; plain runs use face base.
func parseMarkup(s string, base int) []run {
	var out []run
	add := func(text string, face, shift int) {
		if text == "" {
			return
		}
		if n := len(out); n > 0 && out[n-1].face == face && out[n-1].shift == shift {
			out[n-1].s += text
			return
		}
		out = append(out, run{s: text, face: face, shift: shift})
	}
	for len(s) > 0 {
		if len(s) >= 2 && s[1] == '{' && (s[0] == '_' || s[0] == '^' || s[0] == '*') {
			if end := strings.IndexByte(s, '}'); end > 0 {
				inner := s[2:end]
				switch s[0] {
				case '_':
					add(inner, base, -1)
				case '^':
					add(inner, base, +1)
				default:
					add(inner, faceItalic, 0)
				}
				s = s[end+1:]
				continue
			}
		}
		r, n := utf8.DecodeRuneInString(s)
		switch {
		case supChars[r] != 0:
			add(string(supChars[r]), base, +1)
		case subChars[r] != 0:
			add(string(subChars[r]), base, -1)
		default:
			add(s[:n], base, 0)
		}
		s = s[n:]
	}
	return out
}

// runFace returns the face that draws r in style t.
func (t textStyle) runFace(r run) font.Face {
	if r.shift != 0 {
		return t.fs.script[r.face]
	}
	return t.fs.body[r.face]
}

// runs parses s in style t.
func (t textStyle) runs(s string) []run {
	base := faceRegular
	if t.bold {
		base = faceBold
	}
	return parseMarkup(s, base)
}

// runsWidth is the advance width of runs in style t.
func runsWidth(t textStyle, runs []run) float64 {
	w := 0.0
	for _, r := range runs {
		w += float64(font.MeasureString(t.runFace(r), r.s)) / 64
	}
	return w
}

// width returns the advance width of the label s in style t.
func width(t textStyle, s string) float64 {
	return runsWidth(t, t.runs(s))
}

// plain returns the characters of a label without its markup, as a
// reader sees them (the text of an SVG label, for search and tests).
func plain(s string) string {
	var b strings.Builder
	for _, r := range parseMarkup(s, faceRegular) {
		b.WriteString(r.s)
	}
	return b.String()
}

// drawText draws the label s with its box anchored at (x, y): ax = 0,
// 0.5, 1 puts the left edge, centre or right edge at x; ay = 0, 0.5, 1
// puts the top, middle or bottom of the box (ascent above the baseline,
// descent below) at y.
func drawText(c canvas, t textStyle, s string, x, y, ax, ay float64) {
	runs := t.runs(s)
	w := runsWidth(t, runs)
	base := y - ay*t.height() + t.ascent
	c.text(t, runs, math.Round(x-ax*w), math.Round(base), 0)
}

// drawNumber draws a tick label whose digits are centred vertically on y
// when ay = 0.5; other ay values behave as in drawText.
func drawNumber(c canvas, t textStyle, s string, x, y, ax, ay float64) {
	if ay != 0.5 {
		drawText(c, t, s, x, y, ax, ay)
		return
	}
	runs := t.runs(s)
	w := runsWidth(t, runs)
	c.text(t, runs, math.Round(x-ax*w), math.Round(y+t.capH/2), 0)
}

// drawTextUp draws s rotated a quarter turn anticlockwise (reading from
// bottom to top) with the centre of its box at (x, y).
func drawTextUp(c canvas, t textStyle, s string, x, y float64) {
	runs := t.runs(s)
	w := runsWidth(t, runs)
	// In the rotated frame the baseline runs upward; its left end is
	// below the centre by w/2 and the baseline sits right of x by
	// ascent − height/2.
	bx := math.Round(x + t.ascent - t.height()/2)
	by := math.Round(y + w/2)
	c.text(t, runs, bx, by, -math.Pi/2)
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

// Plain returns a label without its markup (`_{}`, `^{}`, `*{}`), as a
// reader sees it, for text drawn outside this package (e.g. GIF strips).
func Plain(s string) string { return plain(s) }

// BarNumber writes a colour-bar or tick value with three significant
// digits, a typographic minus and a power of ten (in label markup) for
// very large or small values: 0.0656, 6.56×10^{−6}.
func BarNumber(v float64) string {
	s := strconv.FormatFloat(v, 'g', 3, 64)
	if m, e, ok := strings.Cut(s, "e"); ok {
		n, _ := strconv.Atoi(e)
		s = m + "×10^{" + strings.ReplaceAll(strconv.Itoa(n), "-", "−") + "}"
	}
	return strings.ReplaceAll(s, "-", "−")
}
