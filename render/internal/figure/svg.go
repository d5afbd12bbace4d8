package figure

import (
	"bufio"
	"bytes"
	"encoding/base64"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"

	"golang.org/x/image/font"
)

// svgCanvas writes the drawing as SVG 1.1 elements. Text is SVG text in
// the embedded Go fonts (so that it is searchable and its layout matches
// the raster figure), images are embedded PNGs drawn pixelated.
type svgCanvas struct {
	body bytes.Buffer
	used [faceCount]bool

	fill, stroke color.NRGBA
	lineWidth    float64
	dash         []float64
	cap, join    string
	path         strings.Builder

	clips int      // clip paths defined so far (for unique ids)
	stack [][]bool // per Push: the groups open before it
	open  []bool   // groups opened since the last Push, true for a clip
}

func newSVG() *svgCanvas {
	return &svgCanvas{fill: color.NRGBA{A: 255}, stroke: color.NRGBA{A: 255}, lineWidth: 1, cap: "butt", join: "miter"}
}

// num writes a coordinate with at most two decimals, without trailing
// zeros, so that the output is short and deterministic.
func num(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		v = 0
	}
	s := strconv.FormatFloat(math.Round(v*100)/100, 'f', -1, 64)
	if s == "-0" {
		s = "0"
	}
	return s
}

func hexColor(c color.NRGBA) string {
	return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B)
}

func (c *svgCanvas) SetColor(col color.Color) {
	n := color.NRGBAModel.Convert(col).(color.NRGBA)
	c.fill, c.stroke = n, n
}

func (c *svgCanvas) SetRGBA255(r, g, b, a int) {
	c.SetColor(color.NRGBA{R: uint8(r), G: uint8(g), B: uint8(b), A: uint8(a)})
}

func (c *svgCanvas) SetLineWidth(w float64)    { c.lineWidth = w }
func (c *svgCanvas) SetDash(dashes ...float64) { c.dash = append([]float64(nil), dashes...) }
func (c *svgCanvas) SetLineCapButt()           { c.cap = "butt" }
func (c *svgCanvas) SetLineCapRound()          { c.cap = "round" }
func (c *svgCanvas) SetLineJoinRound()         { c.join = "round" }

func (c *svgCanvas) MoveTo(x, y float64) { fmt.Fprintf(&c.path, "M%s %s", num(x), num(y)) }
func (c *svgCanvas) LineTo(x, y float64) {
	if c.path.Len() == 0 {
		c.MoveTo(x, y)
		return
	}
	fmt.Fprintf(&c.path, "L%s %s", num(x), num(y))
}
func (c *svgCanvas) ClosePath() { c.path.WriteString("Z") }

func (c *svgCanvas) DrawLine(x1, y1, x2, y2 float64) {
	c.MoveTo(x1, y1)
	c.LineTo(x2, y2)
}

func (c *svgCanvas) DrawRectangle(x, y, w, h float64) {
	c.MoveTo(x, y)
	c.LineTo(x+w, y)
	c.LineTo(x+w, y+h)
	c.LineTo(x, y+h)
	c.ClosePath()
}

func (c *svgCanvas) DrawRoundedRectangle(x, y, w, h, r float64) {
	r = math.Max(0, math.Min(r, math.Min(w, h)/2))
	arc := func(ex, ey float64) { fmt.Fprintf(&c.path, "A%s %s 0 0 1 %s %s", num(r), num(r), num(ex), num(ey)) }
	c.MoveTo(x+r, y)
	c.LineTo(x+w-r, y)
	arc(x+w, y+r)
	c.LineTo(x+w, y+h-r)
	arc(x+w-r, y+h)
	c.LineTo(x+r, y+h)
	arc(x, y+h-r)
	c.LineTo(x, y+r)
	arc(x+r, y)
	c.ClosePath()
}

// paint writes the current path with the given fill and stroke
// attributes and clears it.
func (c *svgCanvas) paint(attrs string) {
	if c.path.Len() == 0 {
		return
	}
	fmt.Fprintf(&c.body, "<path d=\"%s\" %s/>\n", c.path.String(), attrs)
	c.path.Reset()
}

func opacity(name string, a uint8) string {
	if a == 255 {
		return ""
	}
	return fmt.Sprintf(" %s=\"%s\"", name, num(float64(a)/255))
}

func (c *svgCanvas) Stroke() {
	a := fmt.Sprintf("fill=\"none\" stroke=\"%s\"%s stroke-width=\"%s\"", hexColor(c.stroke), opacity("stroke-opacity", c.stroke.A), num(c.lineWidth))
	if c.cap != "butt" {
		a += " stroke-linecap=\"" + c.cap + "\""
	}
	if c.join != "miter" {
		a += " stroke-linejoin=\"" + c.join + "\""
	}
	if len(c.dash) > 0 {
		parts := make([]string, len(c.dash))
		for i, d := range c.dash {
			parts[i] = num(d)
		}
		a += " stroke-dasharray=\"" + strings.Join(parts, " ") + "\""
	}
	c.paint(a)
}

func (c *svgCanvas) Fill() {
	c.paint(fmt.Sprintf("fill=\"%s\"%s", hexColor(c.fill), opacity("fill-opacity", c.fill.A)))
}

func (c *svgCanvas) Clip() {
	id := fmt.Sprintf("clip%d", c.clips)
	c.clips++
	fmt.Fprintf(&c.body, "<clipPath id=\"%s\"><path d=\"%s\"/></clipPath>\n<g clip-path=\"url(#%s)\">\n", id, c.path.String(), id)
	c.path.Reset()
	c.open = append(c.open, true)
}

// ResetClip closes the clip groups opened since the last Push (the
// figure code opens them innermost, after any translation).
func (c *svgCanvas) ResetClip() {
	for n := len(c.open); n > 0 && c.open[n-1]; n = len(c.open) {
		c.body.WriteString("</g>\n")
		c.open = c.open[:n-1]
	}
}

func (c *svgCanvas) Push() {
	c.stack = append(c.stack, c.open)
	c.open = nil
}

func (c *svgCanvas) Pop() {
	for range c.open {
		c.body.WriteString("</g>\n")
	}
	c.open = nil
	if n := len(c.stack); n > 0 {
		c.open = c.stack[n-1]
		c.stack = c.stack[:n-1]
	}
}

func (c *svgCanvas) Translate(x, y float64) {
	fmt.Fprintf(&c.body, "<g transform=\"translate(%s %s)\">\n", num(x), num(y))
	c.open = append(c.open, false)
}

func (c *svgCanvas) text(t textStyle, runs []run, x, y, angle float64) {
	col := color.NRGBAModel.Convert(t.color).(color.NRGBA)
	fmt.Fprintf(&c.body, "<text fill=\"%s\"", hexColor(col))
	if angle != 0 {
		fmt.Fprintf(&c.body, " transform=\"rotate(%s %s %s)\"", num(angle*180/math.Pi), num(x), num(y))
	}
	c.body.WriteString(">")
	for _, r := range runs {
		f := t.runFace(r)
		size := t.fs.size
		if r.shift != 0 {
			size *= scriptScale
		}
		c.used[r.face] = true
		fmt.Fprintf(&c.body, "<tspan x=\"%s\" y=\"%s\" font-family=\"%s\" font-size=\"%s\">", num(x), num(y-shiftPx(t, r)), faceNames[r.face], num(size))
		_ = xml.EscapeText(&c.body, []byte(r.s))
		c.body.WriteString("</tspan>")
		x += float64(font.MeasureString(f, r.s)) / 64
	}
	c.body.WriteString("</text>\n")
}

func (c *svgCanvas) image(r image.Rectangle, src image.Image) {
	var png bytes.Buffer
	if err := EncodePNG(&png, src); err != nil {
		return
	}
	fmt.Fprintf(&c.body, "<image x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\" preserveAspectRatio=\"none\" style=\"image-rendering:pixelated;image-rendering:crisp-edges\" xlink:href=\"data:image/png;base64,%s\"/>\n",
		r.Min.X, r.Min.Y, r.Dx(), r.Dy(), base64.StdEncoding.EncodeToString(png.Bytes()))
}

// finish writes the SVG document of a figure of w×h pixels printed at dpi
// dots per inch (its physical size in millimetres; dpi ≤ 0 gives pixels).
func (c *svgCanvas) finish(out io.Writer, w, h int, dpi float64) error {
	for len(c.stack) > 0 {
		c.Pop()
	}
	c.Pop()
	bw := bufio.NewWriter(out)
	size := fmt.Sprintf("width=\"%d\" height=\"%d\"", w, h)
	if dpi > 0 {
		size = fmt.Sprintf("width=\"%smm\" height=\"%smm\"", num(float64(w)/dpi*25.4), num(float64(h)/dpi*25.4))
	}
	fmt.Fprintf(bw, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<svg xmlns=\"http://www.w3.org/2000/svg\" xmlns:xlink=\"http://www.w3.org/1999/xlink\" version=\"1.1\" %s viewBox=\"0 0 %d %d\">\n", size, w, h)
	bw.WriteString("<style>\n")
	for i, used := range c.used {
		if used {
			fmt.Fprintf(bw, "@font-face { font-family: %q; src: url(data:font/ttf;base64,%s) format(\"truetype\"); }\n", faceNames[i], base64.StdEncoding.EncodeToString(faceTTF[i]))
		}
	}
	bw.WriteString("text { white-space: pre; }\n</style>\n")
	fmt.Fprintf(bw, "<rect width=\"%d\" height=\"%d\" fill=\"#ffffff\"/>\n", w, h)
	if _, err := bw.Write(c.body.Bytes()); err != nil {
		return err
	}
	bw.WriteString("</svg>\n")
	return bw.Flush()
}
