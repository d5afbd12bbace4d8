package outputs

import (
	"fmt"
	"image/color"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
)

// SpectrumPlot returns the figure of the spectrum: total and per order,
// per keV, with the rest energy marked; for a line list, total and per
// line, with every rest energy marked. perUnit > 0 (scene.Resolved.
// SpectrumPerUnit) scales the flux to photons cm⁻² s⁻¹ keV⁻¹; 0 keeps it
// relative. fluxMax, the top of the axis (0: from the data), is in the
// units shown.
func SpectrumPlot(s *pixels.Spectrum, title, subtitle string, fluxMax, perUnit float64) figure.Plot {
	ylabel, unit := "photon flux density F_E [keV⁻¹, relative]", 1.0
	if perUnit > 0 {
		ylabel, unit = "photon flux density F_E [photons cm⁻² s⁻¹ keV⁻¹]", perUnit
	}
	w := s.Width()
	x := make([]float64, s.Bins())
	for k := range x {
		x[k] = s.MinKeV + (float64(k)+0.5)*w
	}
	perKeV := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for k := range v {
			out[k] = v[k] * unit / w
		}
		return out
	}
	p := figure.Plot{
		Title: title, Subtitle: subtitle,
		XLabel: "observed energy E [keV]",
		YLabel: ylabel,
		XMin:   s.MinKeV, XMax: s.MaxKeV, YMax: fluxMax,
		Legend: true,
		VLines: []figure.VLine{{X: s.LineKeV, Label: fmt.Sprintf("%g keV rest", s.LineKeV), Color: color.RGBA{0x60, 0x60, 0x60, 0xff}, Dashed: true}},
	}
	if s.Line != nil {
		// A line list: the sum and each line (all orders), each rest
		// energy marked; the orders are in the table.
		p.VLines = nil
		p.Series = append(p.Series, figure.Series{X: x, Y: perKeV(s.Total()), Color: color.RGBA{0x10, 0x10, 0x10, 0xff}, Width: 2.5, Label: "all lines"})
		for l, e0 := range s.LinesKeV {
			c := colormap.Order(l)
			p.Series = append(p.Series, figure.Series{X: x, Y: perKeV(s.Line[l]), Color: c, Width: 1.5, Label: fmt.Sprintf("%g keV line", e0), Dashed: l%2 == 1})
			p.VLines = append(p.VLines, figure.VLine{X: e0, Color: c, Dashed: true})
		}
		return p
	}
	p.Series = append(p.Series, figure.Series{X: x, Y: perKeV(s.Total()), Color: color.RGBA{0x10, 0x10, 0x10, 0xff}, Width: 2.5, Label: "all orders"})
	if len(s.Order) > 1 {
		for o, ord := range s.Order {
			p.Series = append(p.Series, figure.Series{X: x, Y: perKeV(ord), Color: colormap.Order(o), Width: 1.5, Label: fmt.Sprintf("order n = %d", o), Dashed: o > 0})
		}
	}
	return p
}
