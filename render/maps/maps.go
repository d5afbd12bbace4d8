// Package maps is the table of the renderer's maps: for each map (redshift,
// intensity, radius, order, shadow, delay, rings, polarisation, temperature,
// color-temperature) the quantity it shows, how a pixel is
// placed on its colour scale, its colours, its 8-bit palette, and its
// decorated figure (title, colour bar, contours, overlays). Adding a map is
// adding one entry to the table in this file (and its name to
// scene.MapNames, which a test checks against the table).
package maps

import (
	"fmt"
	"image"
	"image/color"
	"math"

	"kerrscope/colormap"
	"kerrscope/raytrace"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Class is what a map pixel shows.
type Class uint8

const (
	NoDisk   Class = iota // no disk seen, photon from infinity
	Horizon               // no disk seen, photon from the horizon
	OnScale               // a value on the map's colour scale (position in t)
	Category              // an image order (the order in t)
	Escaped               // shadow map: photon from infinity
	Edge                  // shadow map: captured pixel on the ray-traced edge
)

// Colours of the shadow map's classes.
var (
	EscapedColor = color.RGBA{0xd8, 0xd8, 0xd4, 0xff}
	EdgeColor    = color.RGBA{0xd0, 0x2f, 0x6a, 0xff}
)

// Map is one entry of the table of maps.
type Map struct {
	Name  string       // as in the scene's output.maps and in file names
	Title string       // figure title
	Scale colormap.Map // continuous colour scale; the zero Map for categorical maps

	// needs is the set of per-order records the map reads.
	needs pixels.Keep
	// pixel returns the function that places pixel k of the frame on the
	// map (its class and, for OnScale and Category, t), with the scales
	// already completed from the frame.
	pixel func(f *pixels.Frame, sc Scales) func(k int) (Class, float64)
	// scale, for a map of one quantity on a continuous scale, gives that
	// quantity row by row and its position on the scale (Draw's fast
	// path; pixel is made from it).
	scale *onScaleMap
	// palette is the colour table of the map's 8-bit images, laid out
	// for indexOf.
	palette func() color.Palette
	// decorate adds the colour bar and any contours, overlays and legend
	// to the map's figure.
	decorate func(f *pixels.Frame, sc Scales, p *figure.Panel)
	// grid, if not nil, draws the map's figure instead of one decorated
	// panel (Figure).
	grid func(m Map, f *pixels.Frame, sc Scales) (image.Image, error)
}

// table lists every map, in the order of scene.MapNames.
var table = []Map{
	{
		Name: "redshift", Title: "redshift factor *{g}", Scale: colormap.Redshift, needs: pixels.KeepG,
		scale: &onScaleMap{value: firstSeenRow(func(f *pixels.Frame) [][]float32 { return f.G }),
			position: func(f *pixels.Frame, sc Scales) func(float64) float64 { return sc.gPositioner() }},
		palette:  scalePalette(colormap.Redshift),
		decorate: redshiftBar,
	},
	{
		Name: "intensity", Title: "observed line intensity", Scale: colormap.Sequential, needs: pixels.KeepLine,
		scale:    &onScaleMap{value: totalRow(func(f *pixels.Frame) [][]float32 { return f.Line }), position: intensityPosition},
		palette:  scalePalette(colormap.Sequential),
		decorate: intensityBar,
	},
	{
		Name: "radius", Title: "source radius", Scale: colormap.Sequential, needs: pixels.KeepR,
		scale: &onScaleMap{value: firstSeenRow(func(f *pixels.Frame) [][]float32 { return f.R }),
			position: func(f *pixels.Frame, sc Scales) func(float64) float64 { return colormap.LogScale(sc.RMin, sc.RMax) }},
		palette:  scalePalette(colormap.Sequential),
		decorate: radiusDecoration,
	},
	{
		Name: "order", Title: "image order seen first",
		pixel:    orderPixel,
		palette:  orderPalette,
		decorate: orderBar,
	},
	{
		Name: "shadow", Title: "shadow: captured photons and the critical curve",
		pixel:    shadowPixel,
		palette:  func() color.Palette { return color.Palette{colormap.NoHit, colormap.Shadow, EscapedColor, EdgeColor} },
		decorate: shadowDecoration,
	},
	{
		Name: "delay", Title: "arrival-time delay of the first image seen", Scale: colormap.Sequential,
		scale:    &onScaleMap{value: delayRow, position: delayPosition},
		palette:  scalePalette(colormap.Sequential),
		decorate: delayBar,
	},
	{
		Name: "rings", Title: "every image order on its own (transparent-disk view)", needs: pixels.KeepLine | pixels.KeepBehind,
		pixel:    ringsPixel,
		palette:  orderPalette,
		decorate: ringsBar,
		grid:     ringsGrid,
	},
	{
		Name: "temperature", Title: "disk effective temperature at the first image seen", Scale: colormap.Sequential, needs: pixels.KeepR,
		scale:    &onScaleMap{value: pixelRow(temperatureAt), position: logPosition(temperatureAt)},
		palette:  scalePalette(colormap.Sequential),
		decorate: logBar(temperatureAt, "T_eff [K] (Page–Thorne flux)"),
	},
	{
		Name: "color-temperature", Title: "observed colour temperature g f_col kT", Scale: colormap.Sequential, needs: pixels.KeepR | pixels.KeepG,
		scale:    &onScaleMap{value: pixelRow(colorTemperatureAt), position: logPosition(colorTemperatureAt)},
		palette:  scalePalette(colormap.Sequential),
		decorate: logBar(colorTemperatureAt, "g f_col kT [keV]"),
	},
	{
		Name: scene.PolarisationMap, Title: "linear polarisation over the line intensity", Scale: colormap.Sequential,
		needs:    pixels.KeepLine | pixels.KeepStokes,
		scale:    &onScaleMap{value: totalRow(func(f *pixels.Frame) [][]float32 { return f.Line }), position: intensityPosition},
		palette:  scalePalette(colormap.Sequential),
		decorate: polarisationDecoration,
	},
}

func init() {
	for i := range table {
		if o := table[i].scale; o != nil {
			table[i].pixel = o.pixel
		}
	}
}

// Names returns the names of every map, in table order.
func Names() []string {
	out := make([]string, len(table))
	for i, m := range table {
		out[i] = m.Name
	}
	return out
}

// Lookup returns the map of a name.
func Lookup(name string) (Map, error) {
	for _, m := range table {
		if m.Name == name {
			return m, nil
		}
	}
	return Map{}, fmt.Errorf("no map named %q (maps: %v)", name, Names())
}

// Needs returns the per-order records of a frame that the map reads
// (pixels.Keep); its images and figure need a frame that has them.
func (m Map) Needs() pixels.Keep { return m.needs }

// Classify places every pixel of the frame on the map with the scales sc
// (completed from the frame where zero): for OnScale pixels t is the
// position on the colour scale in [0, 1], for Category pixels the image
// order.
func (m Map) Classify(f *pixels.Frame, sc Scales) (class []Class, t []float64) {
	class = make([]Class, f.W*f.H)
	t = make([]float64, f.W*f.H)
	at := m.pixel(f, sc.Fill(f))
	for k := range class {
		class[k], t[k] = at(k)
	}
	return class, t
}

// colour is the RGB colour of a classified pixel.
func (m Map) colour(c Class, t float64) color.RGBA {
	switch c {
	case Horizon:
		return colormap.Shadow
	case OnScale:
		return m.Scale.At(t)
	case Category:
		return colormap.Order(int(t))
	case Escaped:
		return EscapedColor
	case Edge:
		return EdgeColor
	}
	return colormap.NoHit
}

// indexOf is the palette index of a classified pixel in Palette's layout:
// 0 no disk, 1 horizon, then the scale (colormap.PaletteIndex), the order
// colours from 2, or, for the shadow map, 2 from infinity and 3 the edge.
func indexOf(c Class, t float64) uint8 {
	switch c {
	case Horizon:
		return colormap.ShadowIndex
	case OnScale:
		return colormap.PaletteIndex(t)
	case Category:
		return uint8(2 + int(t)%colormap.OrderCount)
	case Escaped:
		return 2
	case Edge:
		return 3
	}
	return colormap.NoHitIndex
}

// Palette returns the colour table of the map's 8-bit images: for maps
// with a colour scale, colormap.Palette of it (index 0 no disk, 1 horizon,
// 2–255 the scale); for order, no disk, horizon, then the
// colormap.OrderCount order colours; for shadow, no disk, horizon, from
// infinity, edge.
func (m Map) Palette() color.Palette { return m.palette() }

// Image returns the pixel-exact colour image of the map (row 0 at the top).
func (m Map) Image(f *pixels.Frame, sc Scales) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	m.Draw(img, f, sc)
	return img
}

// Draw draws the map's Image into img, which must be f.W × f.H pixels
// with its origin at (0, 0) (a buffer reused from frame to frame).
func (m Map) Draw(img *image.RGBA, f *pixels.Frame, sc Scales) {
	if img.Rect != image.Rect(0, 0, f.W, f.H) {
		panic(fmt.Sprintf("maps: Draw into a %v image for a %d×%d frame", img.Rect, f.W, f.H))
	}
	sc = sc.Fill(f)
	set := func(k int, c color.RGBA) {
		p := img.Pix[4*k : 4*k+4 : 4*k+4] // row stride = 4 f.W
		p[0], p[1], p[2], p[3] = c.R, c.G, c.B, c.A
	}
	if o := m.scale; o != nil {
		// The colours of pixel and colour, a row at a time; with a
		// valueTable for large images, the same colours read by the
		// value's bits.
		pos := o.position(f, sc)
		var vt *valueTable
		if f.W*f.H >= tableMinPixels {
			if t, ok := newValueTable(m.Scale, pos); ok {
				vt = &t
			}
		}
		row := make([]float32, f.W)
		for j := 0; j < f.H; j++ {
			o.value(f, j, row)
			pix, fate := img.Pix[4*j*f.W:4*(j+1)*f.W], f.Fate[j*f.W:(j+1)*f.W]
			for i, v := range row {
				var c color.RGBA
				ok := false
				if vt != nil {
					c, ok = vt.colour(v)
				}
				if !ok {
					switch x := float64(v); {
					case !math.IsNaN(x):
						c = m.Scale.At(pos(x))
					case fate[i] == raytrace.Captured:
						c = colormap.Shadow
					default:
						c = colormap.NoHit
					}
				}
				p := pix[4*i : 4*i+4 : 4*i+4]
				p[0], p[1], p[2], p[3] = c.R, c.G, c.B, c.A
			}
		}
		return
	}
	at := m.pixel(f, sc)
	for k := 0; k < f.W*f.H; k++ {
		set(k, m.colour(at(k)))
	}
}

// Indexed returns the map as an 8-bit palette image (Palette): every
// pixel's index is chosen from its class and scale position, so no colour
// is ever quantised from RGB. It is the source of the sweep's GIFs.
func (m Map) Indexed(f *pixels.Frame, sc Scales) *image.Paletted {
	img := image.NewPaletted(image.Rect(0, 0, f.W, f.H), m.Palette())
	at := m.pixel(f, sc.Fill(f))
	for k := range img.Pix {
		img.Pix[k] = indexOf(at(k)) // row stride = f.W
	}
	return img
}

// onScaleMap is a map that shows one quantity on a continuous scale:
// pixels with a value are OnScale at position(value); others are NoDisk
// or Horizon by the photon's fate.
type onScaleMap struct {
	value    func(f *pixels.Frame, j int, row []float32) // the quantity along row j (NaN: no value)
	position func(*pixels.Frame, Scales) func(float64) float64
}

func (o *onScaleMap) pixel(f *pixels.Frame, sc Scales) func(int) (Class, float64) {
	pos := o.position(f, sc)
	row, j := make([]float32, f.W), -1
	return func(k int) (Class, float64) {
		if k/f.W != j {
			j = k / f.W
			o.value(f, j, row)
		}
		if x := float64(row[k%f.W]); !math.IsNaN(x) {
			return OnScale, pos(x)
		}
		return fateClass(f, k), 0
	}
}

// firstSeenRow gives the record q (f.R or f.G) of the first order seen.
func firstSeenRow(q func(*pixels.Frame) [][]float32) func(*pixels.Frame, int, []float32) {
	return func(f *pixels.Frame, j int, row []float32) {
		v, k0 := q(f), j*f.W
		nan := float32(math.NaN())
		for i, o := range f.First[k0 : k0+len(row)] {
			row[i] = nan // as f.FirstSeenAt(v, k0+i)
			if o >= 0 {
				row[i] = v[o][k0+i]
			}
		}
	}
}

// totalRow gives the record q (f.Line) summed over the orders seen.
func totalRow(q func(*pixels.Frame) [][]float32) func(*pixels.Frame, int, []float32) {
	return func(f *pixels.Frame, j int, row []float32) {
		v, k0 := q(f), j*f.W
		for i := range row {
			row[i] = f.TotalAt(v, k0+i)
		}
	}
}

// intensityPosition is the intensity map's scale: linear from 0 or IDecades
// decades below IMax, as the scene's output.intensity_scale says.
func intensityPosition(f *pixels.Frame, sc Scales) func(float64) float64 {
	if f.Res.Output.IntensityScale == "linear" {
		return func(x float64) float64 { return colormap.Linear(x, 0, sc.IMax) }
	}
	return colormap.LogScale(sc.IMax*math.Pow(10, -sc.IDecades), sc.IMax)
}

func fateClass(f *pixels.Frame, k int) Class {
	if f.Fate[k] == raytrace.Captured {
		return Horizon
	}
	return NoDisk
}

func orderPixel(f *pixels.Frame, _ Scales) func(int) (Class, float64) {
	return func(k int) (Class, float64) {
		if o := f.First[k]; o >= 0 {
			return Category, float64(o)
		}
		return fateClass(f, k), 0
	}
}

func shadowPixel(f *pixels.Frame, _ Scales) func(int) (Class, float64) {
	return func(k int) (Class, float64) {
		if f.Fate[k] != raytrace.Captured {
			return Escaped, 0
		}
		if onEdge(f, k) {
			return Edge, 0
		}
		return Horizon, 0
	}
}

// onEdge reports whether pixel k is captured with an escaping 4-neighbour.
func onEdge(f *pixels.Frame, k int) bool {
	if f.Fate[k] != raytrace.Captured {
		return false
	}
	i, j := k%f.W, k/f.W
	for _, d := range [][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}} {
		ii, jj := i+d[0], j+d[1]
		if ii >= 0 && ii < f.W && jj >= 0 && jj < f.H && f.Fate[jj*f.W+ii] != raytrace.Captured {
			return true
		}
	}
	return false
}

func scalePalette(m colormap.Map) func() color.Palette {
	return func() color.Palette { return colormap.Palette(m) }
}

func orderPalette() color.Palette {
	p := color.Palette{colormap.NoHit, colormap.Shadow}
	for o := 0; o < colormap.OrderCount; o++ {
		p = append(p, colormap.Order(o))
	}
	return p
}
