// Package maps is the table of the renderer's maps: for each map (redshift,
// intensity, radius, order, shadow, delay) the quantity it shows, how a pixel is
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
	EdgeColor    = color.RGBA{0xf0, 0x8c, 0x00, 0xff}
)

// Map is one entry of the table of maps.
type Map struct {
	Name  string       // as in the scene's output.maps and in file names
	Title string       // figure title
	Scale colormap.Map // continuous colour scale; the zero Map for categorical maps

	// classify sets class[k] and t[k] for every pixel of the frame, with
	// the scales already completed from the frame.
	classify func(f *pixels.Frame, sc Scales, class []Class, t []float64)
	// palette is the colour table of the map's 8-bit images, laid out
	// for indexOf.
	palette func() color.Palette
	// decorate adds the colour bar and any contours, overlays and legend
	// to the map's figure.
	decorate func(f *pixels.Frame, sc Scales, p *figure.Panel)
}

// table lists every map, in the order of scene.MapNames.
var table = []Map{
	{
		Name: "redshift", Title: "redshift factor g", Scale: colormap.Redshift,
		classify: onScale(func(f *pixels.Frame) []float32 { return f.FirstSeen(f.G) },
			func(f *pixels.Frame, sc Scales) func(float64) float64 { return sc.GPosition }),
		palette:  scalePalette(colormap.Redshift),
		decorate: redshiftBar,
	},
	{
		Name: "intensity", Title: "observed line intensity", Scale: colormap.Sequential,
		classify: onScale(func(f *pixels.Frame) []float32 { return f.Total(f.Line) }, intensityPosition),
		palette:  scalePalette(colormap.Sequential),
		decorate: intensityBar,
	},
	{
		Name: "radius", Title: "source radius", Scale: colormap.Sequential,
		classify: onScale(func(f *pixels.Frame) []float32 { return f.FirstSeen(f.R) },
			func(f *pixels.Frame, sc Scales) func(float64) float64 {
				return func(x float64) float64 { return colormap.Log(x, sc.RMin, sc.RMax) }
			}),
		palette:  scalePalette(colormap.Sequential),
		decorate: radiusDecoration,
	},
	{
		Name: "order", Title: "image order seen first",
		classify: classifyOrder,
		palette:  orderPalette,
		decorate: orderBar,
	},
	{
		Name: "shadow", Title: "shadow: captured photons and the critical curve",
		classify: classifyShadow,
		palette:  func() color.Palette { return color.Palette{colormap.NoHit, colormap.Shadow, EscapedColor, EdgeColor} },
		decorate: shadowDecoration,
	},
	{
		Name: "delay", Title: "arrival-time delay of the first image seen", Scale: colormap.Sequential,
		classify: onScale(delayValues, delayPosition),
		palette:  scalePalette(colormap.Sequential),
		decorate: delayBar,
	},
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

// Classify places every pixel of the frame on the map with the scales sc
// (completed from the frame where zero): for OnScale pixels t is the
// position on the colour scale in [0, 1], for Category pixels the image
// order.
func (m Map) Classify(f *pixels.Frame, sc Scales) (class []Class, t []float64) {
	class = make([]Class, f.W*f.H)
	t = make([]float64, f.W*f.H)
	m.classify(f, sc.Fill(f), class, t)
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
	class, t := m.Classify(f, sc)
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k, c := range class {
		img.SetRGBA(k%f.W, k/f.W, m.colour(c, t[k]))
	}
	return img
}

// Indexed returns the map as an 8-bit palette image (Palette): every
// pixel's index is chosen from its class and scale position, so no colour
// is ever quantised from RGB. It is the source of the sweep's GIFs.
func (m Map) Indexed(f *pixels.Frame, sc Scales) *image.Paletted {
	img := image.NewPaletted(image.Rect(0, 0, f.W, f.H), m.Palette())
	class, t := m.Classify(f, sc)
	for k, c := range class {
		img.Pix[k] = indexOf(c, t[k]) // row stride = f.W
	}
	return img
}

// onScale classifies a map that shows one quantity on a continuous scale:
// pixels with a value are OnScale at position(value); others are NoDisk
// or Horizon by the photon's fate.
func onScale(value func(*pixels.Frame) []float32, position func(*pixels.Frame, Scales) func(float64) float64) func(*pixels.Frame, Scales, []Class, []float64) {
	return func(f *pixels.Frame, sc Scales, class []Class, t []float64) {
		v := value(f)
		pos := position(f, sc)
		for k := range class {
			class[k] = fateClass(f, k)
			if x := float64(v[k]); !math.IsNaN(x) {
				class[k], t[k] = OnScale, pos(x)
			}
		}
	}
}

// intensityPosition is the intensity map's scale: linear from 0 or IDecades
// decades below IMax, as the scene's output.intensity_scale says.
func intensityPosition(f *pixels.Frame, sc Scales) func(float64) float64 {
	if f.Res.Output.IntensityScale == "linear" {
		return func(x float64) float64 { return colormap.Linear(x, 0, sc.IMax) }
	}
	lo := sc.IMax * math.Pow(10, -sc.IDecades)
	return func(x float64) float64 { return colormap.Log(x, lo, sc.IMax) }
}

func fateClass(f *pixels.Frame, k int) Class {
	if f.Fate[k] == raytrace.Captured {
		return Horizon
	}
	return NoDisk
}

func classifyOrder(f *pixels.Frame, _ Scales, class []Class, t []float64) {
	for k := range class {
		class[k] = fateClass(f, k)
		if o := f.First[k]; o >= 0 {
			class[k], t[k] = Category, float64(o)
		}
	}
}

func classifyShadow(f *pixels.Frame, _ Scales, class []Class, _ []float64) {
	for k := range class {
		class[k] = Escaped
		if f.Fate[k] == raytrace.Captured {
			class[k] = Horizon
			if onEdge(f, k) {
				class[k] = Edge
			}
		}
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
