package outputs

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"strconv"
	"text/tabwriter"

	"kerrscope/colormap"
	"kerrscope/raytrace"
	"kerrscope/render/internal/figure"
	"kerrscope/render/internal/fits"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
)

// WriteBandJSON writes the band report as one indented JSON object.
func WriteBandJSON(w io.Writer, b pixels.BandReport) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(b)
}

// errWriter remembers the first write error of a run of prints.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return 0, e.err
	}
	n, err := e.w.Write(p)
	e.err = err
	return n, err
}

// WriteBandText writes the band report for people: the window's line
// flux, the band's share, and a table of each image order's escaping and
// captured sides (area, flux, screen box, g range).
func WriteBandText(w io.Writer, b pixels.BandReport) error {
	ew := &errWriter{w: w}
	num := func(p *float64) string {
		if p == nil {
			return "—"
		}
		return strconv.FormatFloat(*p, 'g', 7, 64)
	}
	rng := func(lo, hi *float64) string {
		if lo == nil {
			return "—"
		}
		return num(lo) + " … " + num(hi)
	}
	fmt.Fprintf(ew, "source radii %.10g … %.10g M   (spin a = %g, inclination %g°)\n", b.RMin, b.RMax, b.Spin, b.InclinationDeg)
	fmt.Fprintf(ew, "window line flux %.6g (Σ g³ε L ΔΩ, M² of screen at D = 1 M, as the spectrum)\n", b.WindowFlux)
	fmt.Fprintf(ew, "fraction of the window's line flux from the band: %.6g  (flux %.6g, area %.6g M²)\n", b.FluxFractionAll, b.Flux, b.Area)
	tw := tabwriter.NewWriter(ew, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  order\tside\tpixels\tarea M²\tflux\tflux fraction\tα M\tβ M\tg")
	for _, o := range b.Orders {
		for _, sd := range []struct {
			name string
			s    pixels.BandSide
		}{{"escaping", o.Escaping}, {"captured", o.Captured}} {
			px := ""
			if sd.name == "escaping" {
				px = strconv.Itoa(o.Pixels)
			}
			if sd.s.AlphaMin == nil {
				fmt.Fprintf(tw, "  %d\t%s\t%s\t0\t0\t0\t—\t—\t—\n", o.Order, sd.name, px)
				continue
			}
			fmt.Fprintf(tw, "  %d\t%s\t%s\t%.4g\t%.4g\t%.4g\t%s\t%s\t%s\n", o.Order, sd.name, px, sd.s.Area, sd.s.Flux, sd.s.FluxFraction,
				rng(sd.s.AlphaMin, sd.s.AlphaMax), rng(sd.s.BetaMin, sd.s.BetaMax), rng(sd.s.GMin, sd.s.GMax))
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(ew, "  (escaping: photons from infinity, outside the shadow edge; captured: from the horizon, inside it;")
	fmt.Fprintln(ew, "   pixels: pixels of the order with any area in the band)")
	fmt.Fprintf(ew, "screen box: α %s M, β %s M\n", rng(b.AlphaMin, b.AlphaMax), rng(b.BetaMin, b.BetaMax))
	fmt.Fprintf(ew, "redshift factor g: %s\n", rng(b.GMin, b.GMax))
	if b.ExtremalAlpha != nil {
		fmt.Fprintf(ew, "distance of the band's pixels from the critical curve: mean %s M, max %s M (its vertical piece tends to α = %s M as a → 1)\n",
			num(b.CriticalDistanceMean), num(b.CriticalDistanceMax), num(b.ExtremalAlpha))
	}
	if b.Photons > 0 {
		fmt.Fprintf(ew, "photons traced: %d\n", b.Photons)
	}
	return ew.err
}

// writeBandFITS writes the band masks as FITS images: per image order, the
// fraction of each pixel's area whose crossing lies in the band.
func writeBandFITS(w io.Writer, f *pixels.Frame, b *Band, version string) error {
	axes, more := fitsWCS(f)
	var ims []fits.Image
	for ord, m := range b.Mask {
		rows := fitsRows(f, func(k int) float32 { return m[k] })
		ims = append(ims, fits.Image{Name: fmt.Sprintf("BAND_ORD%d", ord), Width: f.W, Height: f.H, Rows: rows, Axes: axes, WCS: more,
			Cards: []fits.Card{{Key: "RBANDMIN", Value: b.Report.RMin, Comment: "band inner radius [M]"}, {Key: "RBANDMAX", Value: b.Report.RMax, Comment: "band outer radius [M]"},
				{Key: "COMMENT", Value: fmt.Sprintf("fraction 0-1 of the pixel area whose image order %d comes from the band", ord)}}})
	}
	return fits.Encode(w, fitsHeader(f, version), ims)
}

// bandOther is the colour of light that does not come from the band.
var bandOther = color.RGBA{0xe4, 0xe4, 0xe0, 0xff}

// bandImage draws the band's pixel-exact image, its figure or the figure
// of its light's redshift factor.
func bandImage(k Kind, f *pixels.Frame, b *Band) (image.Image, error) {
	if k == BandBare {
		return bandOrders(f, b.Mask), nil
	}
	p, err := bandPanel(k == BandFigure || k == BandSVG, f, b)
	if err != nil {
		return nil, err
	}
	return figure.DrawPanel(p, 0)
}

// bandSVG writes the band figure (k BandSVG) or the band's redshift
// figure (BandRedshiftSVG) as SVG.
func bandSVG(k Kind, f *pixels.Frame, b *Band) ([]byte, error) {
	p, err := bandPanel(k == BandSVG, f, b)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if err := figure.PanelSVG(&buf, p); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// bandPanel is the decorated figure of where the band's light lands
// (orders true) or of its redshift factor.
func bandPanel(orders bool, f *pixels.Frame, b *Band) (figure.Panel, error) {
	rep := b.Report
	if orders {
		shadow, err := maps.Lookup("shadow")
		if err != nil {
			return figure.Panel{}, err
		}
		p := shadow.Decorate(f, maps.Scales{}, bandOrders(f, b.Mask))
		p.Title = fmt.Sprintf("where source radii %.6g–%.6g M land", rep.RMin, rep.RMax)
		p.Fills = nil
		_, key := maps.CriticalOverlay(f)
		p.Legend = []figure.LegendEntry{key}
		bar := &figure.ColorBar{Label: "image order"}
		for ord := 0; ord < f.Orders; ord++ {
			bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.Order(ord), Label: fmt.Sprintf("band, *{n} = %d", ord)})
		}
		bar.Swatches = append(bar.Swatches, figure.Swatch{Color: bandOther, Label: "other light or no disk"}, figure.Swatch{Color: colormap.Shadow, Label: "captured by the horizon"})
		p.Bar = bar
		return p, nil
	}
	redshift, err := maps.Lookup("redshift")
	if err != nil {
		return figure.Panel{}, err
	}
	var sc maps.Scales // no band light: the frame's own g range
	if rep.GMin != nil {
		sc = maps.Scales{GMin: math.Min(0.95, *rep.GMin), GMax: math.Max(1.05, *rep.GMax)}
	}
	sc = sc.Fill(f)
	p := redshift.Decorate(f, sc, bandRedshift(f, b.Mask, sc))
	p.Title = fmt.Sprintf("redshift factor *{g} of the light from *{r} = %.6g–%.6g M", rep.RMin, rep.RMax)
	p.Fills = []figure.Swatch{{Color: bandOther, Label: "other light or no disk"}, {Color: colormap.Shadow, Label: "captured by the horizon"}}
	line, key := maps.CriticalOverlay(f)
	p.Lines, p.Legend = []figure.Polyline{line}, []figure.LegendEntry{key}
	return p, nil
}

// bandShade mixes c into the light grey of other light by the pixel's
// area fraction in the band; any area at all shows at least faintly.
func bandShade(c color.RGBA, frac float32) color.RGBA {
	t := 0.3 + 0.7*math.Min(1, float64(frac))
	mix := func(a, b uint8) uint8 { return uint8(math.Round(float64(a)*(1-t) + float64(b)*t)) }
	return color.RGBA{mix(bandOther.R, c.R), mix(bandOther.G, c.G), mix(bandOther.B, c.B), 0xff}
}

// bandRedshift colours the pixels with area in the band by the g of the
// lowest such image order (the pixel's mean g of that order), shaded by
// the area fraction; the rest is light grey.
func bandRedshift(f *pixels.Frame, mask [][]float32, sc maps.Scales) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k := range f.Fate {
		c := bandOther
		for ord := range mask {
			if v := mask[ord][k]; v > 0 {
				c = bandShade(colormap.Redshift.At(sc.GPosition(float64(f.G[ord][k]))), v)
				break
			}
		}
		img.SetRGBA(k%f.W, k/f.W, c)
	}
	return img
}

// bandOrders colours each pixel by the lowest image order with area in
// the band, shaded by that area fraction; other pixels are light,
// captured ones dark.
func bandOrders(f *pixels.Frame, mask [][]float32) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k := range f.Fate {
		c := bandOther
		if f.Fate[k] == raytrace.Captured && f.First[k] < 0 {
			c = colormap.Shadow
		}
		for ord := range mask {
			if v := mask[ord][k]; v > 0 {
				c = bandShade(colormap.Order(ord), v)
				break
			}
		}
		img.SetRGBA(k%f.W, k/f.W, c)
	}
	return img
}
