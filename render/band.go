package render

import (
	"image"
	"image/color"

	"encoding/json"
	"fmt"
	"io"
	"kerrscope/colormap"
	"kerrscope/render/figure"
	"kerrscope/render/fits"
	"math"
	"strconv"
	"text/tabwriter"

	"kerrscope/raytrace"
)

// BandReport says where emission from source radii [RMin, RMax] lands on
// the screen. Fractions are of the line flux of the whole rendered window.
type BandReport struct {
	Spin            float64   `json:"spin"`
	InclinationDeg  float64   `json:"inclination_deg"`
	RMin            float64   `json:"r_min"`
	RMax            float64   `json:"r_max"`
	Pixels          []int     `json:"pixels_per_order"`
	FluxFraction    []float64 `json:"flux_fraction_per_order"`
	FluxFractionAll float64   `json:"flux_fraction"`
	// Bounding box of the located pixel centres (null when none).
	AlphaMin *float64 `json:"alpha_min"`
	AlphaMax *float64 `json:"alpha_max"`
	BetaMin  *float64 `json:"beta_min"`
	BetaMax  *float64 `json:"beta_max"`
	GMin     *float64 `json:"g_min"`
	GMax     *float64 `json:"g_max"`
	// For spin > 0.99: distance of the located pixels from the critical
	// curve at this spin (near its vertical piece), and the α of that piece
	// in the a → 1 limit, -2/sin θo (Bardeen 1973).
	CriticalDistanceMax  *float64 `json:"critical_distance_max"`
	CriticalDistanceMean *float64 `json:"critical_distance_mean"`
	ExtremalAlpha        *float64 `json:"extremal_alpha"`
	Photons              int64    `json:"photons"`
}

// LocateBand marks, per image order, the pixels whose seen crossing comes
// from r in [rmin, rmax] and summarises them. mask[o][k] is true for pixel
// k of order o.
func (f *Frame) LocateBand(rmin, rmax float64) (BandReport, [][]bool) {
	r := f.Res
	rep := BandReport{Spin: r.Hole.Spin, InclinationDeg: r.Observer.InclinationDeg, RMin: rmin, RMax: rmax,
		Pixels: make([]int, f.Orders), FluxFraction: make([]float64, f.Orders), Photons: f.Photons}
	mask := make([][]bool, f.Orders)
	total := 0.0
	amin, amax, bmin, bmax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	gmin, gmax := math.Inf(1), math.Inf(-1)
	var loc raytrace.CriticalLocator
	near := r.Hole.Spin > 0.99
	if near {
		loc = f.Model.Obs.NewCriticalLocator()
	}
	dsum, dmax, dn := 0.0, 0.0, 0
	for o := 0; o < f.Orders; o++ {
		mask[o] = make([]bool, f.W*f.H)
		for k, l := range f.Line[o] {
			if math.IsNaN(float64(l)) {
				continue
			}
			total += float64(l)
			rr := float64(f.R[o][k])
			if rr < rmin || rr > rmax {
				continue
			}
			mask[o][k] = true
			rep.Pixels[o]++
			rep.FluxFraction[o] += float64(l)
			al, be := PixelAlpha(r, k%f.W), PixelBeta(r, k/f.W)
			amin, amax = math.Min(amin, al), math.Max(amax, al)
			bmin, bmax = math.Min(bmin, be), math.Max(bmax, be)
			g := float64(f.G[o][k])
			gmin, gmax = math.Min(gmin, g), math.Max(gmax, g)
			if near {
				d, _ := loc.Distance(al, be)
				dsum += d
				dmax = math.Max(dmax, d)
				dn++
			}
		}
	}
	if total > 0 {
		for o := range rep.FluxFraction {
			rep.FluxFraction[o] /= total
			rep.FluxFractionAll += rep.FluxFraction[o]
		}
	}
	ptr := func(v float64) *float64 { return &v }
	if !math.IsInf(amin, 1) {
		rep.AlphaMin, rep.AlphaMax, rep.BetaMin, rep.BetaMax = ptr(amin), ptr(amax), ptr(bmin), ptr(bmax)
		rep.GMin, rep.GMax = ptr(gmin), ptr(gmax)
	}
	if near {
		rep.ExtremalAlpha = ptr(-2 / f.Model.Obs.SinInclination())
		if dn > 0 {
			rep.CriticalDistanceMax, rep.CriticalDistanceMean = ptr(dmax), ptr(dsum/float64(dn))
		}
	}
	return rep, mask
}

// WriteJSON writes the report as one indented JSON object.
func (b BandReport) WriteJSON(w io.Writer) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(b)
}

// WriteText writes the report for people.
func (b BandReport) WriteText(w io.Writer) error {
	num := func(p *float64) string {
		if p == nil {
			return "—"
		}
		return strconv.FormatFloat(*p, 'g', 10, 64)
	}
	fmt.Fprintf(w, "source radii %.10g … %.10g M   (spin a = %g, inclination %g°)\n", b.RMin, b.RMax, b.Spin, b.InclinationDeg)
	fmt.Fprintf(w, "fraction of the window's line flux from the band: %.6g\n", b.FluxFractionAll)
	tw := tabwriter.NewWriter(w, 0, 0, 3, ' ', 0)
	fmt.Fprintln(tw, "  order\tpixels\tflux fraction")
	for o := range b.Pixels {
		fmt.Fprintf(tw, "  %d\t%d\t%.6g\n", o, b.Pixels[o], b.FluxFraction[o])
	}
	tw.Flush()
	fmt.Fprintf(w, "screen box: α %s … %s M, β %s … %s M\n", num(b.AlphaMin), num(b.AlphaMax), num(b.BetaMin), num(b.BetaMax))
	fmt.Fprintf(w, "redshift factor g: %s … %s\n", num(b.GMin), num(b.GMax))
	if b.ExtremalAlpha != nil {
		fmt.Fprintf(w, "distance from the critical curve: mean %s M, max %s M (its vertical piece tends to α = %s M as a → 1)\n",
			num(b.CriticalDistanceMean), num(b.CriticalDistanceMax), num(b.ExtremalAlpha))
	}
	if b.Photons > 0 {
		fmt.Fprintf(w, "photons traced: %d\n", b.Photons)
	}
	return nil
}

// writeBand stages the band report (text and JSON), its masks as FITS
// images (1 = in the band) and its figure.
func (f *Frame) writeBand(out *Outputs, rep BandReport, mask [][]bool, version string) error {
	if err := out.Write("band.json", rep.WriteJSON); err != nil {
		return err
	}
	if err := out.Write("band.txt", rep.WriteText); err != nil {
		return err
	}
	o := f.Res.Output
	if o.Has("fits") {
		axes := f.fitsAxes()
		var ims []fits.Image
		for ord, m := range mask {
			v := make([]float32, len(m))
			for k, in := range m {
				if in {
					v[k] = 1
				}
			}
			ims = append(ims, fits.Image{Name: fmt.Sprintf("BAND_ORD%d", ord), Width: f.W, Height: f.H, Data: flipRows(v, f.W, f.H), Axes: axes,
				Cards: []fits.Card{{Key: "RBANDMIN", Value: rep.RMin, Comment: "band inner radius [M]"}, {Key: "RBANDMAX", Value: rep.RMax, Comment: "band outer radius [M]"},
					{Key: "COMMENT", Value: fmt.Sprintf("1 = image order %d of this pixel comes from the band", ord)}}})
		}
		if err := out.Write("band.fits", func(w io.Writer) error { return fits.Encode(w, f.FITSHeader(version), ims) }); err != nil {
			return err
		}
	}
	if o.Has("png") || o.Has("bare") {
		img := f.bandImage(mask)
		if o.Has("bare") {
			if err := out.Write("band-bare.png", func(w io.Writer) error { return figure.EncodePNG(w, img) }); err != nil {
				return err
			}
		}
		if o.Has("png") {
			p := f.Panel("shadow", Scales{})
			p.Image = img
			p.Title = fmt.Sprintf("where source radii %.6g–%.6g M land", rep.RMin, rep.RMax)
			_, key := f.criticalOverlay()
			p.Legend = []figure.LegendEntry{key}
			bar := &figure.ColorBar{Label: "image order"}
			for ord := 0; ord < f.Orders; ord++ {
				bar.Swatches = append(bar.Swatches, figure.Swatch{Color: colormap.Order(ord), Label: fmt.Sprintf("band, n = %d", ord)})
			}
			bar.Swatches = append(bar.Swatches, figure.Swatch{Color: bandOther, Label: "other light"}, figure.Swatch{Color: colormap.Shadow, Label: "horizon"})
			p.Bar = bar
			fig, err := figure.DrawPanel(p, 0)
			if err != nil {
				return err
			}
			if err := out.Write("band.png", func(w io.Writer) error { return figure.EncodePNG(w, fig) }); err != nil {
				return err
			}
			if rep.GMin != nil {
				sc := Scales{GMin: math.Min(0.95, *rep.GMin), GMax: math.Max(1.05, *rep.GMax)}
				p := f.Panel("redshift", sc)
				p.Image = f.bandRedshiftImage(mask, sc)
				p.Title = fmt.Sprintf("redshift factor g of the light from r = %.6g–%.6g M", rep.RMin, rep.RMax)
				line, key := f.criticalOverlay()
				p.Lines, p.Legend = []figure.Polyline{line}, []figure.LegendEntry{key}
				fig, err := figure.DrawPanel(p, 0)
				if err != nil {
					return err
				}
				if err := out.Write("band-redshift.png", func(w io.Writer) error { return figure.EncodePNG(w, fig) }); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

// bandRedshiftImage colours the pixels whose light comes from the band by
// the g of the lowest such image order; the rest is light grey.
func (f *Frame) bandRedshiftImage(mask [][]bool, sc Scales) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, f.W, f.H))
	for k := range f.Fate {
		c := bandOther
		for ord := range mask {
			if mask[ord][k] {
				c = colormap.Redshift.At(sc.gPosition(float64(f.G[ord][k])))
				break
			}
		}
		img.SetRGBA(k%f.W, k/f.W, c)
	}
	return img
}

var bandOther = color.RGBA{0xe4, 0xe4, 0xe0, 0xff}

// bandImage colours each pixel by the lowest image order that comes from
// the band; other pixels are light, captured ones dark.
func (f *Frame) bandImage(mask [][]bool) *image.RGBA {
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
