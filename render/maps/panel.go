package maps

import (
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
	"kerrscope/scene"
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

// FigureSVG writes the map's decorated figure, as Figure draws it, as an
// SVG document: the decorations as vector graphics and text, the map
// itself (img) embedded as a PNG image.
func (m Map) FigureSVG(w io.Writer, f *pixels.Frame, sc Scales, img image.Image) error {
	if m.grid != nil {
		title, sub, panels, cols := ringsPanels(m, f, sc.Fill(f))
		return figure.GridSVG(w, title, sub, panels, cols)
	}
	return figure.PanelSVG(w, m.Decorate(f, sc, img))
}

// FigureSize is the printed size of every decorated figure of a run: the
// width of output.column or output.width_mm at output.dpi.
func FigureSize(o scene.Output) figure.Size {
	mm, dpi := o.FigureSize()
	return figure.Size{WidthMM: mm, DPI: dpi}
}

// Flat colours that every map shares, for the caption's key.
var (
	noDiskFill  = figure.Swatch{Color: colormap.NoHit, Label: "no disk on the ray"}
	horizonFill = figure.Swatch{Color: colormap.Shadow, Label: "captured by the horizon"}
)

// frame is the undecorated figure of img: axes in M (and µas when the
// scene gives mass and distance), the map's title, the scene's caption
// and, when the scene asks for them, the orientation marks.
func (m Map) frame(f *pixels.Frame, img image.Image) figure.Panel {
	a0, a1, b0, b1 := f.Window()
	p := figure.Panel{
		Image:    img,
		X:        figure.Axis{Min: a0, Max: a1, Label: "*{α} [M]"},
		Y:        figure.Axis{Min: b0, Max: b1, Label: "*{β} [M]"},
		Title:    m.Title,
		Subtitle: f.Res.Caption(),
		Fills:    []figure.Swatch{noDiskFill, horizonFill},
		Size:     FigureSize(f.Res.Output),
	}
	if u := f.Res.MicroArcsecPerM; u > 0 {
		p.X.Secondary = &figure.SecondaryScale{Factor: u, Label: "*{α} [µas]"}
		p.Y.Secondary = &figure.SecondaryScale{Factor: u, Label: "*{β} [µas]"}
	}
	if f.Res.Output.OrientationMarks {
		p.Arrows = OrientationMarks(f)
	}
	return p
}

// redshiftBar is the key of the redshift factor: its title, how the
// scale is stretched, round values of g and both ends.
func redshiftBar(_ *pixels.Frame, sc Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Colors: colormap.Redshift.Table(256), Label: "*{g} = *{E}_{obs}/*{E}_{emit}",
		Note: "log *{g}, each side of 1 on its own half"}
	lo, hi := sc.GMin, sc.GMax
	if sc.GLinear {
		d := sc.gLinearSpan()
		lo, hi = math.Max(0, 1-d), 1+d
		bar.Note = "linear in *{g}"
	}
	bar.Ticks = endTicks(lo, hi)
	for _, g := range niceRatios(sc) {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: sc.GPosition(g), Label: strconv.FormatFloat(g, 'g', 3, 64)})
	}
	p.Bar = bar
}

// endTicks labels the two ends of a colour bar with lo and hi.
func endTicks(lo, hi float64) []figure.Tick {
	return []figure.Tick{{T: 0, Label: barNumber(lo)}, {T: 1, Label: barNumber(hi)}}
}

// decadeLabel writes a power of ten v as 10 with a superscript exponent
// (1 and 10 as they are).
func decadeLabel(v float64) string {
	n := int(math.Round(math.Log10(v)))
	switch n {
	case 0:
		return "1"
	case 1:
		return "10"
	}
	return "10^{" + strings.ReplaceAll(strconv.Itoa(n), "-", "−") + "}"
}

// barNumber writes a colour-bar end value (figure.BarNumber).
func barNumber(v float64) string { return figure.BarNumber(v) }

func intensityBar(f *pixels.Frame, sc Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: "*{I} [relative]", Note: "*{g}^{3} *{ε}(*{r}) × limb law"}
	// With mass, distance and luminosity the ticks are in photons
	// cm⁻² s⁻¹ sr⁻¹ (scene.Resolved.IntensityPerUnit); the scale is the
	// same, as positions are relative to IMax.
	unit := 1.0
	if u := f.Res.IntensityPerUnit(); u > 0 {
		unit, bar.Label, bar.Note = u, "*{I} [photons cm⁻² s⁻¹ sr⁻¹]", ""
	}
	hi := sc.IMax * unit
	if f.Res.Output.IntensityScale == "linear" {
		bar.Ticks = endTicks(0, hi)
		for _, v := range linearTicks(hi) {
			if !(hi > 0) || math.IsInf(hi, 0) {
				break
			}
			bar.Ticks = append(bar.Ticks, figure.Tick{T: math.Min(1, v/hi), Label: barNumber(v)})
		}
	} else {
		lo := hi * math.Pow(10, -sc.IDecades)
		bar.Ticks = endTicks(lo, hi)
		for _, v := range decadeTicks(lo, hi) {
			bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(v, lo, hi), Label: decadeLabel(v)})
		}
	}
	p.Bar = bar
}

// radiusDecoration adds the radius colour bar and labelled isoradial
// contours: the ISCO when gas shines inside it (else it is the inner edge,
// labelled on the colour bar) and round radii clear of it.
func radiusDecoration(f *pixels.Frame, sc Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: "source radius *{r} [M]", Note: "log scale"}
	for _, v := range logTicks(sc.RMin, sc.RMax) {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(v, sc.RMin, sc.RMax), Label: strconv.FormatFloat(v, 'g', 3, 64)})
	}
	p.Bar = bar
	field := f.FirstSeen(f.R)
	levels := []struct {
		r     float64
		label string
	}{{f.Res.ISCO, fmt.Sprintf("ISCO %.3g M", f.Res.ISCO)}, {2, "*{r} = 2 M"}, {5, "*{r} = 5 M"}, {10, "*{r} = 10 M"}, {20, "*{r} = 20 M"}}
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
		bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.Order(o), Label: fmt.Sprintf("*{n} = %d", o)})
	}
	p.Bar = bar
}

func shadowDecoration(f *pixels.Frame, _ Scales, p *figure.Panel) {
	line, key := CriticalOverlay(f)
	p.Lines = []figure.Polyline{line}
	p.Legend = []figure.LegendEntry{{Color: EdgeColor, Label: "ray-traced edge"}, key}
	p.Fills = nil
	p.Bar = &figure.ColorBar{Label: "traced back, the photon", Swatches: []figure.Swatch{
		{Color: colormap.Shadow, Label: "ends on the horizon"},
		{Color: EscapedColor, Label: "escapes to infinity"}}}
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
