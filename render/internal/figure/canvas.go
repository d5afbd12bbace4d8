package figure

import (
	"image"
	"image/color"
	"math"

	"github.com/fogleman/gg"
	"golang.org/x/image/font"
	"golang.org/x/image/math/fixed"
)

// canvas is what the figure code draws on: the raster canvas (gg, for
// PNG) and the SVG writer implement it, so that both outputs come from
// the same drawing code. Coordinates are figure pixels with y down.
//
// Paths follow gg: MoveTo, LineTo, DrawLine and DrawRectangle add to the
// current path, Stroke and Fill draw and clear it, Clip makes it the clip
// region until ResetClip. Push saves the state and Pop restores it;
// Translate, between them, shifts what follows.
type canvas interface {
	SetColor(c color.Color)
	SetRGBA255(r, g, b, a int)
	SetLineWidth(w float64)
	SetDash(dashes ...float64)
	SetLineCapButt()
	SetLineCapRound()
	SetLineJoinRound()
	MoveTo(x, y float64)
	LineTo(x, y float64)
	ClosePath()
	DrawLine(x1, y1, x2, y2 float64)
	DrawRectangle(x, y, w, h float64)
	DrawRoundedRectangle(x, y, w, h, r float64)
	Stroke()
	Fill()
	Clip()
	ResetClip()
	Push()
	Pop()
	Translate(x, y float64)

	// text draws runs in style t with the left end of the baseline at
	// (x, y), the baseline turned by angle (radians, y down: −π/2 reads
	// upward) about that point.
	text(t textStyle, runs []run, x, y, angle float64)
	// image draws src into the rectangle r, magnified by nearest
	// neighbour, composited over white; it ignores the clip region.
	image(r image.Rectangle, src image.Image)
}

// rasterCanvas draws with gg into an RGBA image. It follows whether a
// clip region is set (gg keeps it private), for its fast text path.
type rasterCanvas struct {
	*gg.Context
	img     *image.RGBA
	clipped bool
	saved   []bool // clipped at each Push
}

func (c *rasterCanvas) Clip()      { c.Context.Clip(); c.clipped = true }
func (c *rasterCanvas) ResetClip() { c.Context.ResetClip(); c.clipped = false }
func (c *rasterCanvas) Push()      { c.Context.Push(); c.saved = append(c.saved, c.clipped) }

func (c *rasterCanvas) Pop() {
	c.Context.Pop()
	if n := len(c.saved); n > 0 {
		c.clipped, c.saved = c.saved[n-1], c.saved[:n-1]
	}
}

// shift returns the canvas transform's offset when the transform is a
// shift by whole pixels, the only kind under which a glyph's mask can be
// copied instead of resampled.
func (c *rasterCanvas) shift() (dx, dy int, ok bool) {
	x0, y0 := c.TransformPoint(0, 0)
	x1, y1 := c.TransformPoint(1, 0)
	x2, y2 := c.TransformPoint(0, 1)
	if x1-x0 != 1 || y1 != y0 || x2 != x0 || y2-y0 != 1 || x0 != math.Trunc(x0) || y0 != math.Trunc(y0) {
		return 0, 0, false
	}
	return int(x0), int(y0), true
}

// newRaster returns a white raster canvas of w×h pixels.
func newRaster(w, h int) *rasterCanvas {
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	dc := gg.NewContextForRGBA(img)
	dc.SetColor(white)
	dc.Clear()
	return &rasterCanvas{Context: dc, img: img}
}

func (c *rasterCanvas) text(t textStyle, runs []run, x, y, angle float64) {
	if dx, dy, ok := c.shift(); ok && angle == 0 && !c.clipped && x >= 0 && y >= 0 {
		// Upright text, no clip: the glyph masks drawn straight in
		// (font.Drawer, as gg does, but without gg's bilinear resampling
		// of every glyph, which costs a tenth of a figure).
		src := image.NewUniform(t.color)
		for _, r := range runs {
			f := t.runFace(r)
			d := font.Drawer{Dst: c.img, Src: src, Face: f,
				Dot: fixed.Point26_6{X: fixed.Int26_6((x + float64(dx)) * 64), Y: fixed.Int26_6((y - shiftPx(t, r) + float64(dy)) * 64)}}
			d.DrawString(r.s)
			x += float64(font.MeasureString(f, r.s)) / 64
		}
		return
	}
	c.Push()
	if angle != 0 {
		c.RotateAbout(angle, x, y)
	}
	c.SetColor(t.color)
	for _, r := range runs {
		f := t.runFace(r)
		c.SetFontFace(f)
		c.DrawString(r.s, x, y-shiftPx(t, r))
		x += float64(font.MeasureString(f, r.s)) / 64
	}
	c.Pop()
}

func (c *rasterCanvas) image(r image.Rectangle, src image.Image) {
	x, y := c.TransformPoint(float64(r.Min.X), float64(r.Min.Y))
	blitNearest(c.img, r.Add(image.Pt(int(math.Round(x))-r.Min.X, int(math.Round(y))-r.Min.Y)), src)
}

// shiftPx is how far a run's baseline is raised above the line's.
func shiftPx(t textStyle, r run) float64 {
	switch r.shift {
	case 1:
		return math.Round(supShift * t.fs.size)
	case -1:
		return -math.Round(subShift * t.fs.size)
	}
	return 0
}

// blitNearest copies src into the rectangle r of dst, magnified by
// nearest neighbour; translucent pixels are composited over white.
func blitNearest(dst *image.RGBA, r image.Rectangle, src image.Image) {
	sb := src.Bounds()
	sw, sh := sb.Dx(), sb.Dy()
	rw, rh := r.Dx(), r.Dy()
	if sw <= 0 || sh <= 0 || rw <= 0 || rh <= 0 {
		return
	}
	cols := make([]int, rw)
	for x := range cols {
		cols[x] = sb.Min.X + min(sw-1, (2*x+1)*sw/(2*rw))
	}
	rgba, isRGBA := src.(*image.RGBA)
	clip := dst.Bounds()
	for y := 0; y < rh; y++ {
		dy := r.Min.Y + y
		if dy < clip.Min.Y || dy >= clip.Max.Y {
			continue
		}
		sy := sb.Min.Y + min(sh-1, (2*y+1)*sh/(2*rh))
		for x := 0; x < rw; x++ {
			var c color.RGBA
			if isRGBA {
				c = rgba.RGBAAt(cols[x], sy)
			} else {
				c = color.RGBAModel.Convert(src.At(cols[x], sy)).(color.RGBA)
			}
			dst.SetRGBA(r.Min.X+x, dy, overWhite(c))
		}
	}
}
