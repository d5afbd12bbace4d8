package maps

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
)

// Panel returns the decorated figure of the map: the pixel-exact image on
// α, β axes in M (and µas when the scene gives mass and distance), its
// title, the scene's caption and the map's colour bar and overlays.
func (m Map) Panel(f *pixels.Frame, sc Scales) figure.Panel {
	sc = sc.Fill(f)
	return m.Decorate(f, sc, m.Image(f, sc))
}

// Decorate returns the map's figure (as Panel) around img, the map's own
// Image with the same scales or another image of the frame's window.
func (m Map) Decorate(f *pixels.Frame, sc Scales, img image.Image) figure.Panel {
	sc = sc.Fill(f)
	p := m.frame(f, img)
	m.decorate(f, sc, &p)
	return p
}

// Figure draws the map's decorated figure: its Decorate panel around img
// (the map's own Image with the same scales), or for a map of one panel
// per image order (rings) the grid of those panels.
func (m Map) Figure(f *pixels.Frame, sc Scales, img image.Image) (image.Image, error) {
	if m.grid != nil {
		return m.grid(m, f, sc.Fill(f))
	}
	return figure.DrawPanel(m.Decorate(f, sc, img), 0)
}

// frame is the undecorated figure of img: axes in M (and µas when the
// scene gives mass and distance), the map's title, the scene's caption
// and, when the scene asks for them, the orientation marks.
func (m Map) frame(f *pixels.Frame, img image.Image) figure.Panel {
	a0, a1, b0, b1 := f.Window()
	p := figure.Panel{
		Image:    img,
		X:        figure.Axis{Min: a0, Max: a1, Label: "α [M]"},
		Y:        figure.Axis{Min: b0, Max: b1, Label: "β [M]"},
		Title:    m.Title,
		Subtitle: f.Res.Caption(),
	}
	if u := f.Res.MicroArcsecPerM; u > 0 {
		p.X.Secondary = &figure.SecondaryScale{Factor: u, Label: "α [µas]"}
		p.Y.Secondary = &figure.SecondaryScale{Factor: u, Label: "β [µas]"}
	}
	if f.Res.Output.OrientationMarks {
		p.Arrows = OrientationMarks(f)
	}
	return p
}

func redshiftBar(_ *pixels.Frame, sc Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Colors: colormap.Redshift.Table(256), Label: "g = E_obs / E_emit"}
	for _, g := range niceRatios(sc) {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: sc.GPosition(g), Label: strconv.FormatFloat(g, 'g', 3, 64)})
	}
	p.Bar = bar
}

func intensityBar(f *pixels.Frame, sc Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: "g³ ε(r) × limb  (relative)"}
	// With mass, distance and luminosity the ticks are in photons
	// cm⁻² s⁻¹ sr⁻¹ (scene.Resolved.IntensityPerUnit); the scale is the
	// same, as positions are relative to IMax.
	unit := 1.0
	if u := f.Res.IntensityPerUnit(); u > 0 {
		unit, bar.Label = u, "I [photons cm⁻² s⁻¹ sr⁻¹]"
	}
	hi := sc.IMax * unit
	if f.Res.Output.IntensityScale == "linear" {
		for i := 0; i <= 4; i++ {
			bar.Ticks = append(bar.Ticks, figure.Tick{T: float64(i) / 4, Label: strconv.FormatFloat(hi*float64(i)/4, 'g', 3, 64)})
		}
	} else {
		lo := hi * math.Pow(10, -sc.IDecades)
		for _, v := range decadeTicks(lo, hi) {
			bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(v, lo, hi), Label: strconv.FormatFloat(v, 'g', 2, 64)})
		}
	}
	p.Bar = bar
}

// radiusDecoration adds the radius colour bar and labelled isoradial
// contours: the ISCO when gas shines inside it (else it is the inner edge,
// labelled on the colour bar) and round radii clear of it.
func radiusDecoration(f *pixels.Frame, sc Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: "r [M]"}
	for _, v := range logTicks(sc.RMin, sc.RMax) {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(v, sc.RMin, sc.RMax), Label: strconv.FormatFloat(v, 'g', 3, 64)})
	}
	p.Bar = bar
	field := f.FirstSeen(f.R)
	levels := []struct {
		r     float64
		label string
	}{{f.Res.ISCO, fmt.Sprintf("ISCO %.3g M", f.Res.ISCO)}, {2, "r = 2"}, {5, "r = 5"}, {10, "r = 10"}, {20, "r = 20"}}
	for i, l := range levels {
		clear := i == 0 || math.Abs(l.r-f.Res.ISCO) > 0.05*l.r
		if clear && l.r > f.Res.Inner*1.0001 && l.r < f.Res.Disk.OuterRadius {
			p.Contours = append(p.Contours, figure.Contour{Field: field, W: f.W, H: f.H, Level: l.r, Label: l.label, Color: color.RGBA{0x10, 0x10, 0x10, 0xff}})
		}
	}
}

func orderBar(f *pixels.Frame, _ Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Label: "image order"}
	for o := 0; o < f.Orders; o++ {
		bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.Order(o), Label: fmt.Sprintf("n = %d", o)})
	}
	bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.NoHit, Label: "no disk"}, figure.Swatch{Color: colormap.Shadow, Label: "horizon"})
	p.Bar = bar
}

func shadowDecoration(f *pixels.Frame, _ Scales, p *figure.Panel) {
	line, key := CriticalOverlay(f)
	p.Lines = []figure.Polyline{line}
	p.Legend = []figure.LegendEntry{{Color: EdgeColor, Label: "ray-traced edge"}, key}
	p.Bar = &figure.ColorBar{Label: "photon fate", Swatches: []figure.Swatch{
		{Color: colormap.Shadow, Label: "from the horizon"},
		{Color: EscapedColor, Label: "from infinity"}}}
}

// CriticalOverlay returns the analytic critical curve (Bardeen 1973) of
// the frame's observer as a dashed overlay and its legend entry.
func CriticalOverlay(f *pixels.Frame) (figure.Polyline, figure.LegendEntry) {
	var pts [][2]float64
	for _, q := range f.Model.Obs.CriticalCurve(1000) {
		pts = append(pts, [2]float64{q.Alpha, q.Beta})
	}
	blue := color.RGBA{0x12, 0x4e, 0xd8, 0xff}
	return figure.Polyline{Points: pts, Color: blue, Width: 2, Dashed: true, Closed: true},
		figure.LegendEntry{Color: blue, Label: "critical curve (Bardeen 1973)", Dashed: true}
}
