package figure

import (
	"image/color"
	"math"
	"strings"
)

// The caption is the house style's text block under every figure,
// aligned left with the figure's left margin: a bold lead (the title,
// closed by a full stop), the subtitle as its first sentence, and then
// the key, inline: each entry a small sample (a line, or a square of
// flat colour) followed by its label. It wraps at the figure's width.

// captionItem is one unbreakable piece of a caption: a word, or a key
// sample glued to the first word of its label.
type captionItem struct {
	style  textStyle
	text   string
	sample *keySample
	space  float64 // space before the item when it is not first on a line
}

// keySample is the picture of a key entry.
type keySample struct {
	line   bool // a line sample, else a filled square
	color  color.RGBA
	dashed bool
	width  float64
}

// caption is the content of a caption block.
type caption struct {
	lead, text string
	keys       []keyEntry
}

// keyEntry is one entry of the inline key.
type keyEntry struct {
	sample *keySample // nil: a heading word such as "image order:"
	label  string
}

// empty reports whether the caption has nothing to draw.
func (c caption) empty() bool { return c.lead == "" && c.text == "" && len(c.keys) == 0 }

// sentence closes s with a full stop unless it ends in punctuation.
func sentence(s string) string {
	s = strings.TrimSpace(s)
	if s == "" || strings.ContainsAny(s[len(s)-1:], ".!?:") {
		return s
	}
	return s + "."
}

// sampleWidth is the width of a key sample.
func sampleWidth(st *styles, k *keySample) float64 {
	if k.line {
		return math.Round(1.8 * st.em)
	}
	return math.Round(0.75 * st.em)
}

// items breaks the caption into unbreakable pieces.
func (c caption) items(st *styles) []captionItem {
	sp := width(st.text, " ")
	var out []captionItem
	words := func(style textStyle, s string, first *keySample, space float64) {
		for i, w := range captionWords(s) {
			it := captionItem{style: style, text: w, space: sp}
			if i == 0 {
				it.sample, it.space = first, space
			}
			out = append(out, it)
		}
	}
	words(st.lead, sentence(leadCase(c.lead)), nil, sp)
	words(st.text, sentence(leadCase(c.text)), nil, sp)
	for i, k := range c.keys {
		space := math.Round(1.1 * st.em)
		if i == 0 {
			space = math.Round(0.8 * st.em)
		}
		// A key entry is one piece: its sample and label stay on one
		// line.
		label := strings.Join(strings.Fields(k.label), " ")
		out = append(out, captionItem{style: st.text, text: label, sample: k.sample, space: space})
	}
	return out
}

// captionWords splits s at spaces, keeping a relation such as "i = 63°",
// a product such as "2 × 10⁸" and a number with its unit ("30 M") in one
// piece so that a line never breaks inside them.
func captionWords(s string) []string {
	var out []string
	glue := func(w string) bool { return w == "=" || w == "×" || w == "≈" || w == "±" || w == "−" }
	// unit reports whether w is a short unit word after a number, as in
	// "30 M." or "6.4 keV".
	unit := func(prev, w string) bool {
		last := prev[len(prev)-1]
		core := strings.TrimRight(w, ".,;:)")
		return last >= '0' && last <= '9' && core != "" && len(core) <= 3 && strings.ContainsAny(core[:1], "MkmµGcsº°")
	}
	for _, w := range strings.Fields(s) {
		if n := len(out); n > 0 && (glue(w) || glue(out[n-1]) || strings.HasSuffix(out[n-1], " =") || strings.HasSuffix(out[n-1], " ×") || unit(out[n-1], w)) {
			out[n-1] += " " + w
			continue
		}
		out = append(out, w)
	}
	return out
}

// leadCase starts a caption's sentence with a capital when it starts with a
// lowercase word (not a lone symbol such as "g").
func leadCase(s string) string {
	if len(s) >= 2 && s[0] >= 'a' && s[0] <= 'z' && s[1] >= 'a' && s[1] <= 'z' {
		return string(s[0]-'a'+'A') + s[1:]
	}
	return s
}

// itemWidth is the width of an item without the space before it.
func itemWidth(st *styles, it captionItem) float64 {
	w := width(it.style, it.text)
	if it.sample != nil {
		w += sampleWidth(st, it.sample) + math.Round(0.35*st.em)
	}
	return w
}

// captionLines wraps the caption to width w and returns the items of
// each line.
func captionLines(st *styles, c caption, w float64) [][]captionItem {
	var lines [][]captionItem
	var cur []captionItem
	x := 0.0
	for _, it := range c.items(st) {
		iw := itemWidth(st, it)
		if len(cur) > 0 && x+it.space+iw > w {
			lines = append(lines, cur)
			cur, x = nil, 0
		}
		if len(cur) > 0 {
			x += it.space
		}
		cur = append(cur, it)
		x += iw
	}
	if len(cur) > 0 {
		lines = append(lines, cur)
	}
	return lines
}

// linePitch is the distance between caption baselines.
func linePitch(st *styles) float64 { return math.Round(1.3 * st.em) }

// captionHeight is the height of the caption wrapped to width w.
func captionHeight(st *styles, c caption, w float64) float64 {
	n := len(captionLines(st, c, w))
	if n == 0 {
		return 0
	}
	return float64(n-1)*linePitch(st) + st.text.height()
}

// drawCaption draws the caption wrapped to width w with its top left
// corner at (x, y). Consecutive words of one style are drawn as one
// string, so that vector output keeps phrases together.
func drawCaption(dc canvas, st *styles, c caption, x, y, w float64) {
	sp := width(st.text, " ")
	for i, line := range captionLines(st, c, w) {
		cy := y + float64(i)*linePitch(st)
		mid := cy + st.text.ascent - 0.5*st.text.capH // middle of the digits
		cx := x
		var run []string
		var runStyle textStyle
		runX := cx
		flush := func() {
			if len(run) > 0 {
				drawText(dc, runStyle, strings.Join(run, " "), runX, cy, 0, 0)
				run = nil
			}
		}
		for k, it := range line {
			if k > 0 {
				cx += it.space
			}
			joins := len(run) > 0 && it.sample == nil && it.space == sp && it.style.bold == runStyle.bold && it.style.color == runStyle.color
			if !joins {
				flush()
			}
			if s := it.sample; s != nil {
				sw := sampleWidth(st, s)
				drawSample(dc, st, s, cx, mid, sw)
				cx += sw + math.Round(0.35*st.em)
			}
			if len(run) == 0 {
				runX, runStyle = cx, it.style
			}
			run = append(run, it.text)
			cx += width(it.style, it.text)
		}
		flush()
	}
}

// drawSample draws a key sample of width sw with its left end at x,
// centred on y.
func drawSample(dc canvas, st *styles, s *keySample, x, y, sw float64) {
	if !s.line {
		q := sw
		dc.SetColor(overWhite(s.color))
		dc.DrawRectangle(math.Round(x), math.Round(y-q/2), q, q)
		dc.Fill()
		dc.SetColor(frameGrey)
		dc.SetLineWidth(1)
		dc.SetDash()
		dc.DrawRectangle(math.Round(x)+0.5, math.Round(y-q/2)+0.5, q-1, q-1)
		dc.Stroke()
		return
	}
	y = snap(y, s.width)
	if luma(s.color) > 0.75 {
		// A light line would vanish on white: give it a grey casing.
		setStroke(dc, darkGrey, s.width+2, false)
		dc.SetLineCapButt()
		dc.DrawLine(x, y, x+sw, y)
		dc.Stroke()
	}
	setStroke(dc, s.color, s.width, s.dashed)
	dc.SetLineCapButt()
	dc.DrawLine(x, y, x+sw, y)
	dc.Stroke()
	dc.SetDash()
}
