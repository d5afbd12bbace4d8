package sweep

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"runtime"
	"slices"
	"strings"
	"sync"
	"sync/atomic"

	"kerrscope/colormap"
	"kerrscope/raytrace"
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
					bare = mapImage(f, m, sc)
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

// mapImage is f.MapImage(m, sc) drawn in horizontal strips on all cores
// for the maps whose pixels depend only on their own values (redshift,
// intensity, radius): each strip is MapImage of a frame holding just
// those rows. MapImage's colour lookup costs more than tracing the rays.
// Scales that are not complete (which MapImage would complete from the
// whole frame) draw the whole frame at once.
func mapImage(f *render.Frame, m string, sc render.Scales) *image.RGBA {
	n := min(runtime.GOMAXPROCS(0), f.H)
	complete := sc.GMin > 0 && sc.GMin < 1 && sc.GMax > 1 && sc.IMax > 0 && sc.IDecades > 0 && sc.RMin > 0 && sc.RMax > sc.RMin
	if n < 2 || !complete || !(m == "redshift" || m == "intensity" || m == "radius") {
		return f.MapImage(m, sc)
	}
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	var wg sync.WaitGroup
	for s := range n {
		j0, j1 := s*f.H/n, (s+1)*f.H/n
		wg.Add(1)
		go func() {
			defer wg.Done()
			part := rows(f, j0, j1).MapImage(m, sc)
			copy(img.Pix[j0*img.Stride:j1*img.Stride], part.Pix)
		}()
	}
	wg.Wait()
	return img
}

// rows returns a frame of rows j0 to j1 of f, sharing its records.
func rows(f *render.Frame, j0, j1 int) *render.Frame {
	a, b := j0*f.W, j1*f.W
	part := *f
	part.H = j1 - j0
	part.Fate, part.First = f.Fate[a:b], f.First[a:b]
	cut := func(q [][]float32) [][]float32 {
		out := make([][]float32, len(q))
		for o := range q {
			out[o] = q[o][a:b]
		}
		return out
	}
	part.R, part.G, part.Line, part.Bol = cut(f.R), cut(f.G), cut(f.Line), cut(f.Bol)
	return &part
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
