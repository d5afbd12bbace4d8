package outputs

import (
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

// WriteBandText writes the band report for people.
func WriteBandText(w io.Writer, b pixels.BandReport) error {
	ew := &errWriter{w: w}
	num := func(p *float64) string {
		if p == nil {
			return "—"
		}
		return strconv.FormatFloat(*p, 'g', 10, 64)
	}
	fmt.Fprintf(ew, "source radii %.10g … %.10g M   (spin a = %g, inclination %g°)\n", b.RMin, b.RMax, b.Spin, b.InclinationDeg)
	fmt.Fprintf(ew, "fraction of the window's line flux from the band: %.6g\n", b.FluxFractionAll)
	tw := tabwriter.NewWriter(ew, 0, 0, 3, ' ', 0)
	fmt.Fprintln(tw, "  order\tpixels\tflux fraction")
	for o := range b.Pixels {
		fmt.Fprintf(tw, "  %d\t%d\t%.6g\n", o, b.Pixels[o], b.FluxFraction[o])
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(ew, "screen box: α %s … %s M, β %s … %s M\n", num(b.AlphaMin), num(b.AlphaMax), num(b.BetaMin), num(b.BetaMax))
	fmt.Fprintf(ew, "redshift factor g: %s … %s\n", num(b.GMin), num(b.GMax))
	if b.ExtremalAlpha != nil {
		fmt.Fprintf(ew, "distance from the critical curve: mean %s M, max %s M (its vertical piece tends to α = %s M as a → 1)\n",
			num(b.CriticalDistanceMean), num(b.CriticalDistanceMax), num(b.ExtremalAlpha))
	}
	if b.Photons > 0 {
		fmt.Fprintf(ew, "photons traced: %d\n", b.Photons)
	}
	return ew.err
}

// writeBandFITS writes the band masks as FITS images (1 = in the band).
func writeBandFITS(w io.Writer, f *pixels.Frame, b *Band, version string) error {
	axes, more := fitsWCS(f)
	var ims []fits.Image
	for ord, m := range b.Mask {
		rows := fitsRows(f, func(k int) float32 {
			if m[k] {
				return 1
			}
			return 0
		})
		ims = append(ims, fits.Image{Name: fmt.Sprintf("BAND_ORD%d", ord), Width: f.W, Height: f.H, Rows: rows, Axes: axes, WCS: more,
			Cards: []fits.Card{{Key: "RBANDMIN", Value: b.Report.RMin, Comment: "band inner radius [M]"}, {Key: "RBANDMAX", Value: b.Report.RMax, Comment: "band outer radius [M]"},
				{Key: "COMMENT", Value: fmt.Sprintf("1 = image order %d of this pixel comes from the band", ord)}}})
	}
	return fits.Encode(w, fitsHeader(f, version), ims)
}

// bandOther is the colour of light that does not come from the band.
var bandOther = color.RGBA{0xe4, 0xe4, 0xe0, 0xff}

// bandImage draws the band's pixel-exact image, its figure or the figure
// of its light's redshift factor.
func bandImage(k Kind, f *pixels.Frame, b *Band) (image.Image, error) {
	rep := b.Report
	switch k {
	case BandBare:
		return bandOrders(f, b.Mask), nil
	case BandFigure:
		shadow, err := maps.Lookup("shadow")
		if err != nil {
			return nil, err
		}
		p := shadow.Decorate(f, maps.Scales{}, bandOrders(f, b.Mask))
		p.Title = fmt.Sprintf("where source radii %.6g–%.6g M land", rep.RMin, rep.RMax)
		_, key := maps.CriticalOverlay(f)
		p.Legend = []figure.LegendEntry{key}
		bar := &figure.ColorBar{Label: "image order"}
		for ord := 0; ord < f.Orders; ord++ {
			bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.Order(ord), Label: fmt.Sprintf("band, n = %d", ord)})
		}
		bar.Swatches = append(bar.Swatches, figure.Swatch{Color: bandOther, Label: "other light"}, figure.Swatch{Color: colormap.Shadow, Label: "horizon"})
		p.Bar = bar
		return figure.DrawPanel(p, 0)
	}
	redshift, err := maps.Lookup("redshift")
	if err != nil {
		return nil, err
	}
	var sc maps.Scales // no band light: the frame's own g range
	if rep.GMin != nil {
		sc = maps.Scales{GMin: math.Min(0.95, *rep.GMin), GMax: math.Max(1.05, *rep.GMax)}
	}
	sc = sc.Fill(f)
	p := redshift.Decorate(f, sc, bandRedshift(f, b.Mask, sc))
	p.Title = fmt.Sprintf("redshift factor g of the light from r = %.6g–%.6g M", rep.RMin, rep.RMax)
	line, key := maps.CriticalOverlay(f)
	p.Lines, p.Legend = []figure.Polyline{line}, []figure.LegendEntry{key}
	return figure.DrawPanel(p, 0)
}

// bandRedshift colours the pixels whose light comes from the band by the
// g of the lowest such image order; the rest is light grey.
func bandRedshift(f *pixels.Frame, mask [][]bool, sc maps.Scales) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k := range f.Fate {
		c := bandOther
		for ord := range mask {
			if mask[ord][k] {
				c = colormap.Redshift.At(sc.GPosition(float64(f.G[ord][k])))
				break
			}
		}
		img.SetRGBA(k%f.W, k/f.W, c)
	}
	return img
}

// bandOrders colours each pixel by the lowest image order that comes from
// the band; other pixels are light, captured ones dark.
func bandOrders(f *pixels.Frame, mask [][]bool) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k := range f.Fate {
		c := bandOther
		if f.Fate[k] == raytrace.Captured && f.First[k] < 0 {
			c = colormap.Shadow
		}
		for ord := range mask {
			if mask[ord][k] {
				c = colormap.Order(ord)
				break
			}
		}
		img.SetRGBA(k%f.W, k/f.W, c)
	}
	return img
}
