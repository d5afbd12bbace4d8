package render

import (
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"sort"
	"strconv"

	"kerrscope/colormap"
	"kerrscope/raytrace"
	"kerrscope/render/figure"
)

// Scales fixes the colour scales of the maps; zero fields are chosen from
// the frame. Sweeps fix them up front so that animation frames share one
// scale.
type Scales struct {
	GMin     float64 // redshift colours: g from GMin (< 1) to GMax (> 1), log scale on each side of g = 1
	GMax     float64
	IMax     float64 // intensity colour maximum
	IDecades float64 // decades shown on a log intensity scale (default 4)
	RMin     float64 // radius colour range (default: disk edges)
	RMax     float64
	FluxMax  float64 // spectrum plot upper limit (per keV)
}

// AutoScales returns the scales the frame would choose for itself.
func (f *Frame) AutoScales() Scales {
	r := f.Res
	sc := Scales{IDecades: 4, RMin: r.Inner, RMax: r.Disk.OuterRadius}
	gmin, gmax := math.Inf(1), math.Inf(-1)
	for _, g := range f.FirstSeen(f.G) {
		if v := float64(g); !math.IsNaN(v) {
			gmin, gmax = math.Min(gmin, v), math.Max(gmax, v)
		}
	}
	sc.GMin, sc.GMax = 1/1.5, 1.5
	if gmax > 0 {
		sc.GMin, sc.GMax = math.Min(0.95, gmin), math.Max(1.05, gmax)
	}
	for _, v := range f.Total(f.Line) {
		if x := float64(v); x > sc.IMax {
			sc.IMax = x
		}
	}
	if sc.IMax == 0 {
		sc.IMax = 1
	}
	return sc
}

// fill completes s with the frame's own choices where s is zero.
func (s Scales) fill(f *Frame) Scales {
	auto := f.AutoScales()
	if !(s.GMax > 1) || !(s.GMin > 0 && s.GMin < 1) {
		s.GMin, s.GMax = auto.GMin, auto.GMax
	}
	if s.IMax <= 0 {
		s.IMax = auto.IMax
	}
	if s.IDecades <= 0 {
		s.IDecades = auto.IDecades
	}
	if !(s.RMin > 0) || !(s.RMax > s.RMin) {
		s.RMin, s.RMax = auto.RMin, auto.RMax
	}
	return s
}

// PixelClass is what a map pixel shows.
type PixelClass uint8

const (
	NoDisk   PixelClass = iota // no disk seen, photon from infinity
	Horizon                    // no disk seen, photon from the horizon
	OnScale                    // a value on the map's colour scale (position in t)
	Category                   // an image order (the order in t)
	Escaped                    // shadow map: photon from infinity
	Edge                       // shadow map: captured pixel on the ray-traced edge
)

// Colours of the shadow map's classes.
var (
	EscapedColor = color.RGBA{0xd8, 0xd8, 0xd4, 0xff}
	EdgeColor    = color.RGBA{0xf0, 0x8c, 0x00, 0xff}
)

// MapScale returns the continuous colour scale of a map (the zero Map for
// the categorical order and shadow maps).
func MapScale(name string) colormap.Map {
	switch name {
	case "redshift":
		return colormap.Redshift
	case "intensity", "radius":
		return colormap.Sequential
	}
	return colormap.Map{}
}

// MapPixels classifies every pixel of a map with the scales sc (completed
// from the frame where zero): for OnScale pixels t is the position on the
// colour scale in [0, 1], for Category pixels the image order.
func (f *Frame) MapPixels(name string, sc Scales) (class []PixelClass, t []float64) {
	sc = sc.fill(f)
	class = make([]PixelClass, f.W*f.H)
	t = make([]float64, f.W*f.H)
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
	for k := range class {
		captured := f.Fate[k] == raytrace.Captured
		c := NoDisk
		if captured {
			c = Horizon
		}
		switch name {
		case "redshift", "intensity", "radius":
			x := float64(v[k])
			if math.IsNaN(x) {
				break
			}
			c = OnScale
			switch {
			case name == "redshift":
				t[k] = sc.gPosition(x)
			case name == "intensity" && linear:
				t[k] = colormap.Linear(x, 0, sc.IMax)
			case name == "intensity":
				t[k] = colormap.Log(x, ilo, sc.IMax)
			default:
				t[k] = colormap.Log(x, sc.RMin, sc.RMax)
			}
		case "order":
			if o := f.First[k]; o >= 0 {
				c, t[k] = Category, float64(o)
			}
		case "shadow":
			c = Escaped
			if captured {
				c = Horizon
				if f.onEdge(k) {
					c = Edge
				}
			}
		}
		class[k] = c
	}
	return class, t
}

// MapImage returns the pixel-exact colour image of a map (row 0 at the top).
func (f *Frame) MapImage(name string, sc Scales) *image.RGBA {
	class, t := f.MapPixels(name, sc)
	cm := MapScale(name)
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k, c := range class {
		var col color.RGBA
		switch c {
		case NoDisk:
			col = colormap.NoHit
		case Horizon:
			col = colormap.Shadow
		case OnScale:
			col = cm.At(t[k])
		case Category:
			col = colormap.Order(int(t[k]))
		case Escaped:
			col = EscapedColor
		case Edge:
			col = EdgeColor
		}
		img.SetRGBA(k%f.W, k/f.W, col)
	}
	return img
}

// onEdge reports whether pixel k is captured with an escaping 4-neighbour.
func (f *Frame) onEdge(k int) bool {
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

// Window returns the screen window's pixel-edge ranges in M.
func (f *Frame) Window() (a0, a1, b0, b1 float64) {
	r := f.Res
	hw, hh := float64(f.W)*r.PixelSize/2, float64(f.H)*r.PixelSize/2
	return r.Screen.CenterAlpha - hw, r.Screen.CenterAlpha + hw, r.Screen.CenterBeta - hh, r.Screen.CenterBeta + hh
}

var mapTitles = map[string]string{
	"redshift":  "redshift factor g",
	"intensity": "observed line intensity",
	"radius":    "source radius",
	"order":     "image order seen first",
	"shadow":    "shadow: captured photons and the critical curve",
}

// Panel returns the decorated figure of a map.
func (f *Frame) Panel(name string, sc Scales) figure.Panel {
	sc = sc.fill(f)
	a0, a1, b0, b1 := f.Window()
	p := figure.Panel{
		Image:    f.MapImage(name, sc),
		X:        figure.Axis{Min: a0, Max: a1, Label: "α [M]"},
		Y:        figure.Axis{Min: b0, Max: b1, Label: "β [M]"},
		Title:    mapTitles[name],
		Subtitle: f.Res.Caption(),
	}
	if u := f.Res.MicroArcsecPerM; u > 0 {
		p.X.Secondary = &figure.SecondaryScale{Factor: u, Label: "α [µas]"}
		p.Y.Secondary = &figure.SecondaryScale{Factor: u, Label: "β [µas]"}
	}
	table := func(m colormap.Map) []color.RGBA { return m.Table(256) }
	switch name {
	case "redshift":
		bar := &figure.ColorBar{Colors: table(colormap.Redshift), Label: "g = E_obs / E_emit"}
		for _, g := range niceRatios(sc) {
			bar.Ticks = append(bar.Ticks, figure.Tick{T: sc.gPosition(g), Label: strconv.FormatFloat(g, 'g', 3, 64)})
		}
		p.Bar = bar
	case "intensity":
		bar := &figure.ColorBar{Colors: table(colormap.Sequential), Label: "g³ ε(r) × limb  (relative)"}
		if f.Res.Output.IntensityScale == "linear" {
			for i := 0; i <= 4; i++ {
				bar.Ticks = append(bar.Ticks, figure.Tick{T: float64(i) / 4, Label: strconv.FormatFloat(sc.IMax*float64(i)/4, 'g', 3, 64)})
			}
		} else {
			lo := sc.IMax * math.Pow(10, -sc.IDecades)
			for _, v := range decadeTicks(lo, sc.IMax) {
				bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(v, lo, sc.IMax), Label: strconv.FormatFloat(v, 'g', 2, 64)})
			}
		}
		p.Bar = bar
	case "radius":
		bar := &figure.ColorBar{Colors: table(colormap.Sequential), Label: "r [M]"}
		for _, v := range logTicks(sc.RMin, sc.RMax) {
			bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(v, sc.RMin, sc.RMax), Label: strconv.FormatFloat(v, 'g', 3, 64)})
		}
		p.Bar = bar
		field := make([]float64, f.W*f.H)
		for k, v := range f.FirstSeen(f.R) {
			field[k] = float64(v)
		}
		levels := []struct {
			r     float64
			label string
		}{{f.Res.ISCO, fmt.Sprintf("ISCO %.3g M", f.Res.ISCO)}, {2, "r = 2"}, {5, "r = 5"}, {10, "r = 10"}, {20, "r = 20"}}
		// The ISCO is drawn when gas shines inside it (else it is the inner
		// edge, labelled on the colour bar); round radii clear of it.
		for i, l := range levels {
			clear := i == 0 || math.Abs(l.r-f.Res.ISCO) > 0.05*l.r
			if clear && l.r > f.Res.Inner*1.0001 && l.r < f.Res.Disk.OuterRadius {
				p.Contours = append(p.Contours, figure.Contour{Field: field, W: f.W, H: f.H, Level: l.r, Label: l.label, Color: color.RGBA{0x10, 0x10, 0x10, 0xff}})
			}
		}
	case "order":
		bar := &figure.ColorBar{Label: "image order"}
		for o := 0; o < f.Orders; o++ {
			bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.Order(o), Label: fmt.Sprintf("n = %d", o)})
		}
		bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.NoHit, Label: "no disk"}, figure.Swatch{Color: colormap.Shadow, Label: "horizon"})
		p.Bar = bar
	case "shadow":
		line, key := f.criticalOverlay()
		p.Lines = []figure.Polyline{line}
		p.Legend = []figure.LegendEntry{{Color: EdgeColor, Label: "ray-traced edge"}, key}
		p.Bar = &figure.ColorBar{Label: "photon fate", Swatches: []figure.Swatch{
			{Color: colormap.Shadow, Label: "from the horizon"},
			{Color: EscapedColor, Label: "from infinity"}}}
	}
	return p
}

// gPosition places g on the diverging colour scale: g = 1 at the centre,
// log g scaled separately on each side so that GMin and GMax reach the
// ends (NaN stays NaN).
func (s Scales) gPosition(g float64) float64 {
	if g < 1 {
		return math.Max(0, 0.5*(1-math.Log(g)/math.Log(s.GMin)))
	}
	return math.Min(1, 0.5*(1+math.Log(g)/math.Log(s.GMax)))
}

// criticalOverlay returns the analytic critical curve (Bardeen 1973) as
// a dashed overlay and its legend entry.
func (f *Frame) criticalOverlay() (figure.Polyline, figure.LegendEntry) {
	var pts [][2]float64
	for _, q := range f.Model.Obs.CriticalCurve(1000) {
		pts = append(pts, [2]float64{q.Alpha, q.Beta})
	}
	blue := color.RGBA{0x12, 0x4e, 0xd8, 0xff}
	return figure.Polyline{Points: pts, Color: blue, Width: 2, Dashed: true, Closed: true},
		figure.LegendEntry{Color: blue, Label: "critical curve (Bardeen 1973)", Dashed: true}
}

// niceRatios returns tick values of g between GMin and GMax, at least
// 0.07 apart on the colour bar, always including g = 1; none unless
// 0 < GMin < 1 < GMax, both finite. It tries a fixed list of candidates.
func niceRatios(sc Scales) []float64 {
	if !(sc.GMin > 0 && sc.GMin < 1 && sc.GMax > 1 && !math.IsInf(sc.GMax, 0)) {
		return nil
	}
	cands := []float64{1, 0.5, 2, 0.2, 5, 0.1, 10, 0.05, 0.02, 0.01, 0.005, 0.3, 3, 0.7, 1.5, 0.4, 0.6, 0.8, 1.2, 1.1, 1.3, 4, 0.9, 1.4, 1.05, 0.95}
	var out []float64
	for _, g := range cands {
		if g < sc.GMin*0.999 || g > sc.GMax*1.001 {
			continue
		}
		t := sc.gPosition(g)
		ok := true
		for _, h := range out {
			ok = ok && math.Abs(sc.gPosition(h)-t) >= 0.07
		}
		if ok {
			out = append(out, g)
		}
	}
	sort.Float64s(out)
	return out
}

// maxTickDecades bounds the decades a colour-bar tick loop visits: every
// positive finite float64 lies within 10^-324 … 10^309.
const maxTickDecades = 640

// decadeRange returns the decades of lo and hi, ok only for
// 0 < lo ≤ hi < ∞.
func decadeRange(lo, hi float64) (dlo, dhi float64, ok bool) {
	if !(lo > 0 && hi >= lo) || math.IsInf(hi, 0) {
		return 0, 0, false
	}
	return math.Log10(lo), math.Log10(hi), true
}

// decadeTicks returns the powers of ten within [lo, hi]; none unless
// 0 < lo ≤ hi < ∞.
func decadeTicks(lo, hi float64) []float64 {
	llo, lhi, ok := decadeRange(lo, hi)
	if !ok {
		return nil
	}
	var out []float64
	d := math.Ceil(llo)
	for i := 0; i < maxTickDecades && d <= math.Floor(lhi); i++ {
		out = append(out, math.Pow(10, d))
		d++
	}
	return out
}

// logTicks returns lo, the 1-2-5 values within [lo, hi] and hi; none
// unless 0 < lo ≤ hi < ∞.
func logTicks(lo, hi float64) []float64 {
	llo, lhi, ok := decadeRange(lo, hi)
	if !ok {
		return nil
	}
	var out []float64
	d := math.Floor(llo)
	for i := 0; i < maxTickDecades && d <= math.Ceil(lhi); i++ {
		for _, m := range []float64{1, 2, 5} {
			if v := m * math.Pow(10, d); v >= lo && v <= hi {
				out = append(out, v)
			}
		}
		d++
	}
	return append([]float64{lo}, append(out, hi)...)
}

// SpectrumPlot returns the figure of the spectrum: total and per order,
// per keV, with the rest energy marked.
func SpectrumPlot(s *Spectrum, title, subtitle string, fluxMax float64) figure.Plot {
	w := s.Width()
	x := make([]float64, s.Bins())
	for k := range x {
		x[k] = s.MinKeV + (float64(k)+0.5)*w
	}
	perKeV := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for k := range v {
			out[k] = v[k] / w
		}
		return out
	}
	p := figure.Plot{
		Title: title, Subtitle: subtitle,
		XLabel: "observed energy E [keV]",
		YLabel: "photon flux density F_E [keV⁻¹, relative]",
		XMin:   s.MinKeV, XMax: s.MaxKeV, YMax: fluxMax,
		Legend: true,
		VLines: []figure.VLine{{X: s.LineKeV, Label: fmt.Sprintf("%g keV rest", s.LineKeV), Color: color.RGBA{0x60, 0x60, 0x60, 0xff}, Dashed: true}},
	}
	p.Series = append(p.Series, figure.Series{X: x, Y: perKeV(s.Total()), Color: color.RGBA{0x10, 0x10, 0x10, 0xff}, Width: 2.5, Label: "all orders"})
	if len(s.Order) > 1 {
		for o, ord := range s.Order {
			p.Series = append(p.Series, figure.Series{X: x, Y: perKeV(ord), Color: colormap.Order(o), Width: 1.5, Label: fmt.Sprintf("order n = %d", o), Dashed: o > 0})
		}
	}
	return p
}

// writeFigures stages the PNG outputs.
func (f *Frame) writeFigures(out *Outputs, spec *Spectrum, sc Scales) error {
	o := f.Res.Output
	for _, m := range o.Maps {
		if o.Has("png") {
			img, err := figure.DrawPanel(f.Panel(m, sc), 0)
			if err != nil {
				return fmt.Errorf("%s figure: %w", m, err)
			}
			if err := out.Write(m+".png", func(w io.Writer) error { return figure.EncodePNG(w, img) }); err != nil {
				return err
			}
		}
		if o.Has("bare") {
			img := f.MapImage(m, sc)
			if err := out.Write(m+"-bare.png", func(w io.Writer) error { return figure.EncodePNG(w, img) }); err != nil {
				return err
			}
		}
	}
	if o.Has("png") && o.Has("csv") {
		img, err := figure.DrawPlot(SpectrumPlot(spec, "line profile collapsed from the image", f.Res.Caption(), sc.FluxMax))
		if err != nil {
			return fmt.Errorf("spectrum figure: %w", err)
		}
		return out.Write("spectrum.png", func(w io.Writer) error { return figure.EncodePNG(w, img) })
	}
	return nil
}
