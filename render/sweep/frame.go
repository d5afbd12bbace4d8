package sweep

import (
	"context"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"slices"
	"strings"

	"kerrscope/colormap"
	"kerrscope/raytrace"
	"kerrscope/render"
	"kerrscope/render/figure"
)

// hookStaged, if set (by tests), is called after each file of a frame is
// staged.
var hookStaged func(index int, name string)

// writeFrame renders point pt and commits its files (FileNames) into the
// output directory through render.Outputs, so that an error or a
// cancelled ctx leaves none of them behind. It returns their records,
// sorted by name.
func (p *Plan) writeFrame(ctx context.Context, pt Point, sc render.Scales, version string) ([]fileRecord, error) {
	f, err := render.Render(ctx, pt.Scene, nil)
	if err != nil {
		return nil, err
	}
	out, err := render.NewOutputs(p.Dir())
	if err != nil {
		return nil, err
	}
	var recs []fileRecord
	put := func(name string, write func(io.Writer) error) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		var hw *hashingWriter
		err := out.Write(name, func(w io.Writer) error {
			hw = newHashingWriter(w)
			return write(hw)
		})
		if err != nil {
			return err
		}
		recs = append(recs, hw.record(name))
		if hookStaged != nil {
			hookStaged(pt.Index, name)
		}
		return nil
	}
	if err := p.stageFrame(f, pt, sc, version, put); err != nil {
		out.Abort()
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		out.Abort()
		return nil, err
	}
	if _, err := out.Commit(); err != nil {
		return nil, err
	}
	slices.SortFunc(recs, func(a, b fileRecord) int { return strings.Compare(a.Name, b.Name) })
	return recs, nil
}

// stageFrame writes every file of the frame through put.
func (p *Plan) stageFrame(f *render.Frame, pt Point, sc render.Scales, version string, put func(string, func(io.Writer) error) error) error {
	o := pt.Scene.Output
	pre := p.framePrefix(pt.Index)
	png := func(img image.Image) func(io.Writer) error {
		return func(w io.Writer) error { return figure.EncodePNG(w, img) }
	}
	for _, m := range o.Maps {
		if o.Has("png") {
			img, err := figure.DrawPanel(f.Panel(m, sc), 0)
			if err != nil {
				return fmt.Errorf("%s figure: %w", m, err)
			}
			if err := put(pre+"-"+m+".png", png(img)); err != nil {
				return err
			}
		}
		if o.Has("bare") {
			if err := put(pre+"-"+m+"-bare.png", png(f.MapImage(m, sc))); err != nil {
				return err
			}
		}
		if err := put(pre+"-"+m+"-indexed.png", png(IndexedImage(f, m, sc))); err != nil {
			return err
		}
	}
	if o.Has("csv") {
		spec := f.Spectrum()
		caption := f.Res.Caption()
		if err := put(pre+"-spectrum.csv", func(w io.Writer) error { return spec.WriteCSV(w, caption) }); err != nil {
			return err
		}
		if o.Has("png") {
			title := fmt.Sprintf("line profile collapsed from the image, frame %d of %d", pt.Index, len(p.Points))
			img, err := figure.DrawPlot(render.SpectrumPlot(&spec, title, caption, sc.FluxMax))
			if err != nil {
				return fmt.Errorf("spectrum figure: %w", err)
			}
			if err := put(pre+"-spectrum.png", png(img)); err != nil {
				return err
			}
		}
	}
	if o.Has("fits") {
		if err := put(pre+"-maps.fits", func(w io.Writer) error { return f.WriteFITS(w, version) }); err != nil {
			return err
		}
	}
	return nil
}

// The two fixed colours of the shadow map (as render draws them).
var (
	shadowEscaped = color.RGBA{0xd8, 0xd8, 0xd4, 0xff} // photons from infinity
	shadowEdge    = color.RGBA{0xf0, 0x8c, 0x00, 0xff} // ray-traced edge of the shadow
)

// MapPalette returns the palette of a map's 8-bit images: for redshift,
// intensity and radius, colormap.Palette of the map's colour scale
// (index 0 no disk, 1 horizon, 2–255 the scale); for order, no disk,
// horizon, then the colormap.OrderCount order colours; for shadow, no
// disk, horizon, from infinity, edge.
func MapPalette(name string) color.Palette {
	switch name {
	case "redshift":
		return colormap.Palette(colormap.Redshift)
	case "intensity", "radius":
		return colormap.Palette(colormap.Sequential)
	case "order":
		p := color.Palette{colormap.NoHit, colormap.Shadow}
		for o := 0; o < colormap.OrderCount; o++ {
			p = append(p, colormap.Order(o))
		}
		return p
	}
	return color.Palette{colormap.NoHit, colormap.Shadow, shadowEscaped, shadowEdge}
}

// IndexedImage returns the map as an 8-bit palette image (MapPalette)
// with the frame's scales sc, which must be complete: each pixel's
// scalar (g of the first order seen, the summed line intensity, or the
// source radius) is placed on the colour scale exactly as render's
// MapImage places it and indexed with colormap.PaletteIndex, so that no
// colour is ever quantised from RGB. It is the source of the sweep's
// GIFs.
func IndexedImage(f *render.Frame, name string, sc render.Scales) *image.Paletted {
	img := image.NewPaletted(image.Rect(0, 0, f.W, f.H), MapPalette(name))
	var v []float32
	switch name {
	case "redshift":
		v = f.FirstSeen(f.G)
	case "intensity":
		v = f.Total(f.Line)
	case "radius":
		v = f.FirstSeen(f.R)
	}
	linear := f.Res.Output.IntensityScale == "linear"
	ilo := sc.IMax * math.Pow(10, -sc.IDecades)
	for k := range f.Fate {
		captured := f.Fate[k] == raytrace.Captured
		idx := uint8(colormap.NoHitIndex)
		switch name {
		case "redshift", "intensity", "radius":
			x := float64(v[k])
			switch {
			case math.IsNaN(x) && captured:
				idx = colormap.ShadowIndex
			case math.IsNaN(x):
			case name == "redshift":
				idx = colormap.PaletteIndex(gPosition(sc, x))
			case name == "intensity" && linear:
				idx = colormap.PaletteIndex(colormap.Linear(x, 0, sc.IMax))
			case name == "intensity":
				idx = colormap.PaletteIndex(colormap.Log(x, ilo, sc.IMax))
			default:
				idx = colormap.PaletteIndex(colormap.Log(x, sc.RMin, sc.RMax))
			}
		case "order":
			switch o := f.First[k]; {
			case o >= 0:
				idx = uint8(2 + int(o)%colormap.OrderCount)
			case captured:
				idx = colormap.ShadowIndex
			}
		default: // shadow
			switch {
			case captured && onEdge(f, k):
				idx = 3
			case captured:
				idx = colormap.ShadowIndex
			default:
				idx = 2
			}
		}
		img.Pix[k] = idx // row stride = f.W
	}
	return img
}

// gPosition places g on the diverging redshift scale as render does: g = 1
// at the centre, log g scaled on each side so that GMin and GMax reach
// the ends.
func gPosition(sc render.Scales, g float64) float64 {
	if g < 1 {
		return math.Max(0, 0.5*(1-math.Log(g)/math.Log(sc.GMin)))
	}
	return math.Min(1, 0.5*(1+math.Log(g)/math.Log(sc.GMax)))
}

// onEdge reports whether captured pixel k has a 4-neighbour from infinity.
func onEdge(f *render.Frame, k int) bool {
	i, j := k%f.W, k/f.W
	for _, d := range [][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}} {
		ii, jj := i+d[0], j+d[1]
		if ii >= 0 && ii < f.W && jj >= 0 && jj < f.H && f.Fate[jj*f.W+ii] != raytrace.Captured {
			return true
		}
	}
	return false
}
