package sweep

import (
	"context"
	"fmt"
	"image"
	"image/color"
	"math"
	"sync"

	"github.com/fogleman/gg"
	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font/gofont/goregular"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
)

// The GIF frames of a sweep carry, below the map, a strip with the
// frame's swept values and the map's colour bar, drawn in the map's own
// palette (so no colour is quantised): the background in its lightest
// entry, text and outlines in its darkest, the bar in the scale's own
// entries.

var (
	gifFontOnce sync.Once
	gifFont     *truetype.Font
	gifFontErr  error
)

// stripEm is the text size of a frame's strip, in pixels, for a frame w
// pixels wide: about 1/36 of the width, at least 10.
func stripEm(w int) float64 { return math.Max(10, math.Round(float64(w)/36)) }

// stripHeight is the height of the strip under a frame w pixels wide:
// a line of text, the bar, its tick labels and its title.
func stripHeight(w int) int {
	em := stripEm(w)
	return int(math.Ceil(5.6 * em))
}

// barFor returns the colour bar of map m for frame pt with the sweep's
// scales, from a 4 × 4 pixel render of the frame's scene (the bar
// depends on the scene only through its units and image orders). The
// delay map's range is each frame's own, so its bar has no ticks.
func (p *Plan) barFor(ctx context.Context, m maps.Map, pt Point, sc maps.Scales) (*figure.ColorBar, error) {
	s := pt.Scene.Scene
	s.Screen.Width, s.Screen.Height = 4, 4
	s.Refine.Depth = 0
	r, err := s.Resolve()
	if err != nil {
		return nil, err
	}
	f, err := pixels.RenderScene(ctx, r, nil, m.Needs())
	if err != nil {
		return nil, err
	}
	bar := m.Bar(f, sc)
	if bar != nil && m.Name == "delay" {
		b := *bar
		b.Ticks = nil
		b.Label += " (each frame its own range)"
		bar = &b
	}
	return bar, nil
}

// stripPalette returns the palette of labelled frames of a map with
// palette pal: pal itself when it is full (a colour scale's 256 entries),
// else pal with white and black added for the strip.
func stripPalette(pal color.Palette) color.Palette {
	if len(pal) > 254 {
		return pal
	}
	return append(append(color.Palette(nil), pal...), color.RGBA{0xff, 0xff, 0xff, 0xff}, color.RGBA{0, 0, 0, 0xff})
}

// labelledFrame returns the palette image pi (a frame of a map) with the
// strip below it: label on the first line, then bar. pal is the frame's
// palette (stripPalette of the map's).
func labelledFrame(pi *image.Paletted, pal color.Palette, label string, bar *figure.ColorBar) (*image.Paletted, error) {
	gifFontOnce.Do(func() { gifFont, gifFontErr = truetype.Parse(goregular.TTF) })
	if gifFontErr != nil {
		return nil, fmt.Errorf("GIF labels: %w", gifFontErr)
	}
	w, h := pi.Rect.Dx(), pi.Rect.Dy()
	sh := stripHeight(w)
	em := stripEm(w)
	bg, ink := lightest(pal), darkest(pal)

	// Text and outlines are drawn in black on white and then set in the
	// two palette entries by a threshold, so that every pixel is one of
	// the palette's colours.
	dc := gg.NewContext(w, sh)
	dc.SetRGB(1, 1, 1)
	dc.Clear()
	dc.SetFontFace(truetype.NewFace(gifFont, &truetype.Options{Size: em}))
	dc.SetRGB(0, 0, 0)
	pad := math.Round(0.5 * em)
	dc.DrawString(figure.Plain(label), pad, pad+0.9*em)
	x0, x1 := pad, float64(w)-pad
	y0 := math.Round(pad + 1.5*em)
	y1 := y0 + math.Round(0.9*em)
	type span struct {
		x0, x1, y0, y1 int
		t              func(x int) uint8 // palette index at column x
	}
	var fills []span
	switch {
	case bar == nil:
	case len(bar.Colors) > 0 && len(pal) == 256:
		fills = append(fills, span{int(x0), int(x1), int(y0), int(y1), func(x int) uint8 {
			return colormap.PaletteIndex((float64(x) + 0.5 - x0) / (x1 - x0))
		}})
		dc.SetLineWidth(1)
		dc.DrawRectangle(x0-0.5, y0-0.5, x1-x0+1, y1-y0+1)
		dc.Stroke()
		right := math.Inf(-1)
		for _, tk := range bar.Ticks {
			x := math.Round(x0+tk.T*(x1-x0)) + 0.5
			dc.DrawLine(x, y1, x, y1+0.3*em)
			dc.Stroke()
			lb := figure.Plain(tk.Label)
			tw, _ := dc.MeasureString(lb)
			lx := math.Min(math.Max(x-tw/2, 0), float64(w)-tw)
			if lx < right+0.5*em {
				continue // the label would touch the one before
			}
			dc.DrawString(lb, lx, y1+0.3*em+em)
			right = lx + tw
		}
	default:
		// Categories: a swatch and its label each, in a row.
		x := x0
		for _, s := range bar.Swatches {
			q := math.Round(0.9 * em)
			c := nearest(pal, s.Color)
			fills = append(fills, span{int(x), int(x + q), int(y0), int(y0 + q), func(int) uint8 { return c }})
			dc.DrawRectangle(x-0.5, y0-0.5, q+1, q+1)
			dc.Stroke()
			lb := figure.Plain(s.Label)
			dc.DrawString(lb, x+q+0.3*em, y0+0.8*em)
			tw, _ := dc.MeasureString(lb)
			x += q + 0.3*em + tw + 0.8*em
		}
	}
	if bar != nil {
		dc.DrawString(figure.Plain(bar.Label), pad, y1+0.3*em+2.2*em)
	}

	out := image.NewPaletted(image.Rect(0, 0, w, h+sh), pal)
	for j := 0; j < h; j++ {
		copy(out.Pix[j*out.Stride:j*out.Stride+w], pi.Pix[j*pi.Stride:j*pi.Stride+w])
	}
	strip := dc.Image().(*image.RGBA)
	for j := 0; j < sh; j++ {
		for i := 0; i < w; i++ {
			idx := bg
			if strip.Pix[j*strip.Stride+4*i] < 192 { // thin strokes stay whole

				idx = ink
			}
			out.Pix[(h+j)*out.Stride+i] = idx
		}
	}
	for _, s := range fills {
		for j := max(s.y0, 0); j < min(s.y1, sh); j++ {
			for i := max(s.x0, 0); i < min(s.x1, w); i++ {
				out.Pix[(h+j)*out.Stride+i] = s.t(i)
			}
		}
	}
	return out, nil
}

// luminance is the relative luminance of c (sRGB, ITU-R BT.709
// coefficients on the gamma-encoded values: enough to rank colours).
func luminance(c color.Color) float64 {
	r, g, b, _ := c.RGBA()
	return 0.2126*float64(r) + 0.7152*float64(g) + 0.0722*float64(b)
}

// lightest and darkest return the index of the palette's lightest and
// darkest entry (the first of equals).
func lightest(pal color.Palette) uint8 { return extreme(pal, 1) }
func darkest(pal color.Palette) uint8  { return extreme(pal, -1) }

func extreme(pal color.Palette, sign float64) uint8 {
	best := 0
	for i := range pal {
		if sign*luminance(pal[i]) > sign*luminance(pal[best]) {
			best = i
		}
	}
	return uint8(best)
}

// nearest returns the index of the palette entry of c, or the nearest.
func nearest(pal color.Palette, c color.Color) uint8 { return uint8(pal.Index(c)) }
