package figure

import (
	"bytes"
	"encoding/xml"
	"image"
	"image/color"
	"io"
	"slices"
	"strings"
	"testing"

	"kerrscope/colormap"
)

// The label markup: scripts and italics become runs of their own, the
// Unicode superscripts are set as real superscripts, and an underscore
// without a brace (a TOML key) stays literal.
func TestParseMarkup(t *testing.T) {
	cases := []struct {
		in   string
		want []run
	}{
		{"*{E}_{obs} [keV⁻¹]", []run{{"E", faceItalic, 0}, {"obs", faceRegular, -1}, {" [keV", faceRegular, 0}, {"−1", faceRegular, 1}, {"]", faceRegular, 0}}},
		{"black_hole.spin", []run{{"black_hole.spin", faceRegular, 0}}},
		{"10^{−3} cm⁻²", []run{{"10", faceRegular, 0}, {"−3", faceRegular, 1}, {" cm", faceRegular, 0}, {"−2", faceRegular, 1}}},
		{"a_{unclosed", []run{{"a_{unclosed", faceRegular, 0}}},
		{"", nil},
	}
	for _, c := range cases {
		if got := parseMarkup(c.in, faceRegular); !slices.Equal(got, c.want) {
			t.Errorf("parseMarkup(%q) = %v, want %v", c.in, got, c.want)
		}
	}
	if got := plain("*{g} = *{E}_{obs}/*{E}_{emit}"); got != "g = Eobs/Eemit" {
		t.Errorf("plain = %q", got)
	}
	st, err := newStyles(20)
	if err != nil {
		t.Fatal(err)
	}
	// A script is set smaller: "E_{obs}" is narrower than "Eobs".
	if a, b := width(st.text, "E_{obs}"), width(st.text, "Eobs"); !(a < b) {
		t.Errorf("subscript width %.1f not below plain %.1f", a, b)
	}
}

// svgText parses an SVG document as XML and returns the text of every
// text element (its tspans joined) and the number of embedded images.
func svgText(t *testing.T, doc []byte) ([]string, int) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(doc))
	var texts []string
	images, depth := 0, 0
	var cur strings.Builder
	sawSVG := false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			switch e.Name.Local {
			case "svg":
				sawSVG = e.Name.Space == "http://www.w3.org/2000/svg"
			case "text":
				depth++
				cur.Reset()
			case "image":
				images++
			}
		case xml.EndElement:
			if e.Name.Local == "text" {
				depth--
				texts = append(texts, cur.String())
			}
		case xml.CharData:
			if depth > 0 {
				cur.Write(e)
			}
		}
	}
	if !sawSVG {
		t.Fatal("no svg root element in the SVG namespace")
	}
	return texts, images
}

// SVG output parses as XML (encoding/xml, an independent reader), holds
// the axis labels, the colour-bar title and the caption as text, embeds
// the map as an image, and is byte-identical from run to run.
func TestPanelSVG(t *testing.T) {
	p := fullPanel()
	var a, b bytes.Buffer
	if err := PanelSVG(&a, p); err != nil {
		t.Fatal(err)
	}
	if err := PanelSVG(&b, fullPanel()); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("two SVGs of the same panel differ")
	}
	texts, images := svgText(t, a.Bytes())
	for _, want := range []string{"α [M]", "β [M]", "α [µas]", "β [µas]", "g", "Redshift factor g."} {
		if !slices.Contains(texts, want) {
			t.Errorf("SVG has no text %q (has %q)", want, texts)
		}
	}
	if images < 2 { // the map and the colour strip
		t.Errorf("SVG embeds %d images, want the map and the colour bar", images)
	}
}

func TestPlotAndGridSVG(t *testing.T) {
	var buf bytes.Buffer
	if err := PlotSVG(&buf, testPlot()); err != nil {
		t.Fatal(err)
	}
	texts, _ := svgText(t, buf.Bytes())
	for _, want := range []string{"E [keV]", "F_E [arbitrary units]", "series 0"} {
		if !slices.Contains(texts, want) {
			t.Errorf("plot SVG has no text %q (has %q)", want, texts)
		}
	}
	buf.Reset()
	ps := []Panel{fullPanel(), fullPanel()}
	if err := GridSVG(&buf, "grid title", "", ps, 2); err != nil {
		t.Fatal(err)
	}
	texts, images := svgText(t, buf.Bytes())
	if !slices.Contains(texts, "Grid title.") || images < 2 {
		t.Errorf("grid SVG: texts %q, %d images", texts, images)
	}
}

// Every figure drawn with one Size is exactly as wide, whatever its map,
// labels or kind; the double column is wider than the single one.
func TestFixedWidth(t *testing.T) {
	for _, size := range []Size{{}, {WidthMM: DoubleColumnMM}, {WidthMM: 120, DPI: 150}} {
		want := size.Pixels()
		var widths []int
		for _, p := range []Panel{fullPanel(), {Image: testMap(90, 20), X: Axis{Min: 0, Max: 9, Label: "x"}, Y: Axis{Min: 0, Max: 2, Label: "y"}, Title: "a wide map"}} {
			p.Size = size
			img, err := DrawPanel(p, 0)
			if err != nil {
				t.Fatal(err)
			}
			widths = append(widths, img.Bounds().Dx())
		}
		pl := testPlot()
		pl.Size = size
		img, err := DrawPlot(pl)
		if err != nil {
			t.Fatal(err)
		}
		widths = append(widths, img.Bounds().Dx())
		g := fullPanel()
		g.Size = size
		grid, err := DrawGrid("t", "", []Panel{g, g, g}, 3, 0)
		if err != nil {
			t.Fatal(err)
		}
		widths = append(widths, grid.Bounds().Dx())
		for i, w := range widths {
			if w != want {
				t.Errorf("size %+v: figure %d is %d px wide, want %d", size, i, w, want)
			}
		}
	}
	if s, d := (Size{}).Pixels(), (Size{WidthMM: DoubleColumnMM}).Pixels(); s != 1016 || d != 2102 {
		// 86 mm and 178 mm at 300 dpi.
		t.Errorf("single %d px, double %d px; want 1016 and 2102", s, d)
	}
	for _, bad := range []Size{{WidthMM: 5}, {DPI: 10}, {WidthMM: 500, DPI: 1200}} {
		if err := bad.Validate(); err == nil {
			t.Errorf("size %+v accepted", bad)
		}
		p := fullPanel()
		p.Size = bad
		if img, err := DrawPanel(p, 0); err == nil || img != nil {
			t.Errorf("size %+v drew a panel", bad)
		}
	}
}

// A colour bar always labels its two ends, drops interior labels that
// would collide, and the caption wraps inside the figure.
func TestBarEndsAndCaption(t *testing.T) {
	st, err := newStyles(30)
	if err != nil {
		t.Fatal(err)
	}
	b := &ColorBar{Colors: colormap.Sequential.Table(8), Ticks: []Tick{{0.5, "1"}, {0.51, "1.01"}, {0, "0.17"}, {1, "1.24"}, {0.99, "1.23"}}}
	got := shownTicks(st, b, 600)
	if len(got) < 3 || got[0].Label != "0.17" || got[len(got)-1].Label != "1.24" {
		t.Errorf("shown ticks %v: want both ends kept", got)
	}
	for i := 1; i < len(got); i++ {
		if (got[i].T-got[i-1].T)*600 < (width(st.text, got[i].Label)+width(st.text, got[i-1].Label))/2 {
			t.Errorf("ticks %v and %v collide", got[i-1], got[i])
		}
	}
	c := caption{lead: "the title", text: "a = 0.94, i = 63°, a long sentence that has to wrap over several lines of the caption",
		keys: []keyEntry{{sample: &keySample{color: colormap.NoHit}, label: "no disk on the ray"}, {sample: &keySample{line: true, color: black, width: 2}, label: "critical curve"}}}
	lines := captionLines(st, c, 500)
	if len(lines) < 3 {
		t.Fatalf("caption in %d lines", len(lines))
	}
	for _, l := range lines {
		w := 0.0
		for k, it := range l {
			if k > 0 {
				w += it.space
			}
			w += itemWidth(st, it)
		}
		if w > 500 && len(l) > 1 {
			t.Errorf("caption line %.0f px wide, more than 500", w)
		}
		for _, it := range l {
			if it.text == "=" || strings.HasPrefix(it.text, "= ") {
				t.Errorf("caption line starts a piece with %q: a relation was broken", it.text)
			}
		}
	}
	if lines[0][0].text != "The" {
		t.Errorf("caption lead starts with %q, want the capitalised The", lines[0][0].text)
	}
}

// recorder is a canvas that keeps the clip rectangles and the boxes of
// the text drawn, for layout tests.
type recorder struct {
	rect  labelBox // the last rectangle added to the path
	clips []labelBox
	texts []labelBox
	words []string
}

func (r *recorder) SetColor(color.Color)                        {}
func (r *recorder) SetRGBA255(int, int, int, int)               {}
func (r *recorder) SetLineWidth(float64)                        {}
func (r *recorder) SetDash(...float64)                          {}
func (r *recorder) SetLineCapButt()                             {}
func (r *recorder) SetLineCapRound()                            {}
func (r *recorder) SetLineJoinRound()                           {}
func (r *recorder) MoveTo(float64, float64)                     {}
func (r *recorder) LineTo(float64, float64)                     {}
func (r *recorder) ClosePath()                                  {}
func (r *recorder) DrawLine(float64, float64, float64, float64) {}
func (r *recorder) DrawRectangle(x, y, w, h float64)            { r.rect = labelBox{x, y, x + w, y + h} }
func (r *recorder) DrawRoundedRectangle(x, y, w, h, _ float64) {
	r.DrawRectangle(x, y, w, h)
}
func (r *recorder) Stroke()                            {}
func (r *recorder) Fill()                              {}
func (r *recorder) Clip()                              { r.clips = append(r.clips, r.rect) }
func (r *recorder) ResetClip()                         {}
func (r *recorder) Push()                              {}
func (r *recorder) Pop()                               {}
func (r *recorder) Translate(float64, float64)         {}
func (r *recorder) image(image.Rectangle, image.Image) {}
func (r *recorder) text(t textStyle, runs []run, x, y, angle float64) {
	w := runsWidth(t, runs)
	b := labelBox{x, y - t.ascent, x + w, y + t.descent}
	if angle != 0 { // a quarter turn: the text runs upward from (x, y)
		b = labelBox{x - t.ascent, y - w, x + t.descent, y}
	}
	r.texts = append(r.texts, b)
	var s strings.Builder
	for _, ru := range runs {
		s.WriteString(ru.s)
	}
	r.words = append(r.words, s.String())
}

// No label of a plot lies on its data area, so none can cross a curve:
// the marker labels sit above the frame, the key is in the caption.
func TestPlotLabelsOffTheCurves(t *testing.T) {
	p := testPlot()
	p.VLines = append(p.VLines, VLine{X: 7.9, Label: "a second marker near the edge"}, VLine{X: 6.5, Label: "a clashing marker"})
	for _, logY := range []bool{false, true} {
		p.LogY = logY
		d, err := layoutPlot(p)
		if err != nil {
			t.Fatal(err)
		}
		rec := &recorder{}
		d.draw(rec)
		d.done()
		if len(rec.clips) != 1 {
			t.Fatalf("%d clip regions, want the data area", len(rec.clips))
		}
		area := rec.clips[0]
		for i, b := range rec.texts {
			if b.overlaps(area) {
				t.Errorf("log %v: label %q at %+v lies on the data area %+v", logY, rec.words[i], b, area)
			}
			if b.x0 < 0 || b.x1 > float64(d.w) || b.y0 < 0 || b.y1 > float64(d.h) {
				t.Errorf("log %v: label %q at %+v leaves the %d×%d figure", logY, rec.words[i], b, d.w, d.h)
			}
		}
		for _, want := range []string{"6.4 keV rest", "a second marker near the edge", "a clashing marker", "series 0"} {
			if !slices.Contains(rec.words, want) {
				t.Errorf("missing marker or key text %q: %q", want, rec.words)
			}
		}
	}
}
