package sweep

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/color"
	"io"
	"runtime"
	"slices"
	"strings"
	"sync"
	"sync/atomic"

	"kerrscope/colormap"
	"kerrscope/render"
	"kerrscope/render/figure"
)

// hookStaged, if set (by tests), is called after each file of a frame is
// staged.
var hookStaged func(index int, name string)

// writeFrame renders point pt and commits its files (fileNames) into the
// output directory through render.Outputs, so that an error or a
// cancelled ctx leaves none of them behind. It returns their records,
// sorted by name.
func (p *Plan) writeFrame(ctx context.Context, pt Point, sc render.Scales, version string) ([]fileRecord, error) {
	f, err := render.RenderScene(ctx, pt.Scene, nil)
	if err == nil {
		err = render.CheckFinite(f)
	}
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
	if err := p.stageFrame(ctx, f, pt, sc, version, put); err != nil {
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

// staged is one encoded file of a frame.
type staged struct {
	name string
	data []byte
}

// stageFrame writes every file of the frame through put, in a fixed
// order. The images of the maps (figures, pixel-exact and palette PNGs,
// the spectrum plot) are drawn and encoded on all cores at once, one map
// per goroutine; the CSV and FITS tables are streamed.
func (p *Plan) stageFrame(ctx context.Context, f *render.Frame, pt Point, sc render.Scales, version string, put func(string, func(io.Writer) error) error) error {
	o := pt.Scene.Output
	pre := p.framePrefix(pt.Index)
	encode := func(name string, img image.Image) (staged, error) {
		var b bytes.Buffer
		err := figure.EncodePNG(&b, img)
		return staged{name, b.Bytes()}, err
	}
	var jobs []func() ([]staged, error)
	for _, m := range o.Maps {
		jobs = append(jobs, func() ([]staged, error) {
			var out []staged
			var bare image.Image
			if o.Has("png") {
				panel := f.Panel(m, sc)
				bare = panel.Image // the same image as MapImage(m, sc)
				img, err := figure.DrawPanel(panel, 0)
				if err != nil {
					return nil, fmt.Errorf("%s figure: %w", m, err)
				}
				s, err := encode(pre+"-"+m+".png", img)
				if err != nil {
					return nil, err
				}
				out = append(out, s)
			}
			if o.Has("bare") {
				if bare == nil {
					bare = f.MapImage(m, sc)
				}
				s, err := encode(pre+"-"+m+"-bare.png", bare)
				if err != nil {
					return nil, err
				}
				out = append(out, s)
			}
			s, err := encode(pre+"-"+m+"-indexed.png", IndexedImage(f, m, sc))
			return append(out, s), err
		})
	}
	var spec render.Spectrum
	if o.Has("csv") {
		spec = f.Spectrum()
		if o.Has("png") {
			jobs = append(jobs, func() ([]staged, error) {
				title := fmt.Sprintf("line profile collapsed from the image, frame %d of %d", pt.Index, len(p.Points))
				img, err := figure.DrawPlot(render.SpectrumPlot(&spec, title, f.Res.Caption(), sc.FluxMax))
				if err != nil {
					return nil, fmt.Errorf("spectrum figure: %w", err)
				}
				s, err := encode(pre+"-spectrum.png", img)
				return []staged{s}, err
			})
		}
	}
	results := make([][]staged, len(jobs))
	errs := make([]error, len(jobs))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(jobs)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1) - 1)
				if i >= len(jobs) || ctx.Err() != nil {
					return
				}
				results[i], errs[i] = jobs[i]()
			}
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return err
	}
	for i := range jobs {
		if errs[i] != nil {
			return errs[i]
		}
		for _, s := range results[i] {
			if err := put(s.name, func(w io.Writer) error { _, err := w.Write(s.data); return err }); err != nil {
				return err
			}
		}
	}
	if o.Has("csv") {
		caption := f.Res.Caption()
		if err := put(pre+"-spectrum.csv", func(w io.Writer) error { return spec.WriteCSV(w, caption) }); err != nil {
			return err
		}
	}
	if o.Has("fits") {
		if err := put(pre+"-maps.fits", func(w io.Writer) error { return f.WriteFITS(w, version) }); err != nil {
			return err
		}
	}
	return nil
}

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
	return color.Palette{colormap.NoHit, colormap.Shadow, render.EscapedColor, render.EdgeColor}
}

// IndexedImage returns the map as an 8-bit palette image (MapPalette)
// with the frame's scales sc: render's MapPixels classifies each pixel and
// places its value on the colour scale, which is indexed with
// colormap.PaletteIndex, so that no colour is ever quantised from RGB. It
// is the source of the sweep's GIFs.
func IndexedImage(f *render.Frame, name string, sc render.Scales) *image.Paletted {
	img := image.NewPaletted(image.Rect(0, 0, f.W, f.H), MapPalette(name))
	class, t := f.MapPixels(name, sc)
	for k, c := range class {
		idx := uint8(colormap.NoHitIndex)
		switch c {
		case render.Horizon:
			idx = colormap.ShadowIndex
		case render.OnScale:
			idx = colormap.PaletteIndex(t[k])
		case render.Category:
			idx = uint8(2 + int(t[k])%colormap.OrderCount)
		case render.Escaped:
			idx = 2
		case render.Edge:
			idx = 3
		}
		img.Pix[k] = idx // row stride = f.W
	}
	return img
}
