package sweep

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/gif"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/scene"
)

// MergeOptions control Merge.
type MergeOptions struct {
	// GIFs are the maps to animate, one GIF each; nil means the first
	// map of the sweep, and an empty non-nil slice none.
	GIFs []string
	// DelayMS is the time each GIF frame is shown, a multiple of 10 ms
	// from 10 to 655350; 0 means 100.
	DelayMS int
	// Bare keeps the GIF frames as the palette images are, without the
	// strip below each that shows its swept values and the colour bar.
	Bare bool
}

// Merge reads every shard manifest in dir, checks that they describe one
// sweep with one set of scales and that every frame is finished with
// intact files, and writes: sweep-MAP.gif for each map asked for (the
// frames' 8-bit palette images in frame order, looping), the line
// profiles of all frames in one plot colour-coded by the first axis
// (sweep-spectra.png; for a grid, sweep-spectra-NN.png for each value NN
// of the second axis), if the sweep wrote spectra, and likewise the
// thermal continua (sweep-continua.png) if it has a thermal disk, and sweep-frames.csv,
// the frame numbers with their swept values. It returns the paths
// written; on error, or when ctx is done, nothing is written. The files of
// the last merge that this one does not write again are removed. For a
// hot-spot movie (NewSpotPlan) it writes, in place of the GIFs and the
// plot of spectra, what spot.Run writes besides the frames (spot-movie.gif,
// the light curve, the centroid track, the line profile against time,
// spot.toml), from one trace of the screen, and the frame table.
func Merge(ctx context.Context, dir string, opt MergeOptions) ([]string, error) {
	delay := opt.DelayMS
	if delay == 0 {
		delay = 100
	}
	if delay < 10 || delay > 655350 || delay%10 != 0 {
		return nil, fmt.Errorf("frame delay %d ms: must be a multiple of 10 ms from 10 to 655350", opt.DelayMS)
	}
	lk, err := outputs.Lock(dir)
	if err != nil {
		return nil, err
	}
	defer lk.Unlock()
	ms, err := loadManifests(dir)
	if err != nil {
		return nil, err
	}
	if len(ms) == 0 {
		return nil, fmt.Errorf("%s holds no sweep manifest (sweep-shard-K-of-N.json); run kerrscope sweep first", dir)
	}
	for _, m := range ms[1:] {
		if ok, what := ms[0].Definition.same(m.Definition); !ok {
			return nil, fmt.Errorf("%s and %s describe different sweeps (%s differs)", ms[0].name, m.name, what)
		}
	}
	sc, err := agreedScales(ms)
	if err != nil {
		return nil, err
	}
	p, err := planOf(ms[0].Definition, dir)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", ms[0].name, err)
	}
	if err := p.checkComplete(ms); err != nil {
		return nil, err
	}
	if p.spot != nil {
		// The movie is traced again, in the window the frames used.
		if _, err := p.frameWindow(ctx, ms); err != nil {
			return nil, err
		}
		if opt.GIFs != nil {
			return nil, errors.New("a spot movie has one GIF, spot-movie.gif, of its palette frames; the maps to animate cannot be chosen")
		}
		out, err := outputs.NewOutputs(ctx, lk, "merge")
		if err != nil {
			return nil, err
		}
		if err := p.mergeSpot(ctx, out, sc, ms[0].Program); err != nil {
			out.Abort()
			return nil, err
		}
		return out.Commit()
	}
	maps := opt.GIFs
	if maps == nil {
		maps = p.Base.Output.Maps[:1]
	}
	for _, m := range maps {
		if !slices.Contains(p.Base.Output.Maps, m) {
			return nil, fmt.Errorf("map %q is not in the sweep (its maps: %s)", m, strings.Join(p.Base.Output.Maps, ", "))
		}
	}

	out, err := outputs.NewOutputs(ctx, lk, "merge")
	if err != nil {
		return nil, err
	}
	fail := func(err error) ([]string, error) {
		out.Abort()
		return nil, err
	}
	for _, m := range maps {
		if err := ctx.Err(); err != nil {
			return fail(err)
		}
		anim, err := p.animation(ctx, m, delay/10, sc, opt.Bare)
		if err != nil {
			return fail(err)
		}
		if err := out.Write("sweep-"+m+".gif", func(w io.Writer) error { return gif.EncodeAll(w, anim) }); err != nil {
			return fail(err)
		}
	}
	if p.Base.Output.Has("csv") {
		plots, err := p.spectraPlots(sc)
		if err != nil {
			return fail(err)
		}
		continua, err := p.continuaPlots()
		if err != nil {
			return fail(err)
		}
		for _, pl := range append(plots, continua...) {
			img, err := figure.DrawPlot(pl.plot)
			if err != nil {
				return fail(fmt.Errorf("%s: %w", pl.name, err))
			}
			if err := out.Write(pl.name, func(w io.Writer) error { return figure.EncodePNG(w, img) }); err != nil {
				return fail(err)
			}
			if p.Base.Output.Has("svg") { // the same plot as vector graphics
				if err := out.Write(strings.TrimSuffix(pl.name, ".png")+".svg", func(w io.Writer) error { return figure.PlotSVG(w, pl.plot) }); err != nil {
					return fail(fmt.Errorf("%s: %w", pl.name, err))
				}
			}
		}
	}
	if err := out.Write("sweep-frames.csv", p.writeTable); err != nil {
		return fail(err)
	}
	return out.Commit()
}

// planOf rebuilds the plan a manifest definition describes.
func planOf(d definition, dir string) (*Plan, error) {
	base, err := scene.Parse("scene_toml", []byte(d.Scene))
	if err != nil {
		return nil, err
	}
	base.Output.Directory = dir
	return NewPlan(base, d.Axes, d.Fixed.scales())
}

// checkComplete reports the frames that no manifest records with intact
// files.
func (p *Plan) checkComplete(ms []*manifest) error {
	known := map[int][]frameRecord{}
	for _, m := range ms {
		for _, fr := range m.Frames {
			known[fr.Index] = append(known[fr.Index], fr)
		}
	}
	var missing []string
	n := 0
	for _, pt := range p.Points {
		ok := false
		for _, fr := range known[pt.Index] {
			if ok = p.verify(fr, pt); ok {
				break
			}
		}
		if !ok {
			n++
			if len(missing) < 8 {
				missing = append(missing, strconv.Itoa(pt.Index))
			}
		}
	}
	if n > 0 {
		more := ""
		if n > len(missing) {
			more = ", …"
		}
		return fmt.Errorf("%d of %d frames are not finished or their files changed (frames %s%s); run the sweep again (every shard) to complete them",
			n, len(p.Points), strings.Join(missing, ", "), more)
	}
	return nil
}

// animation assembles the palette images of map m into a looping GIF
// with delay centiseconds per frame; unless bare, each frame gets a strip
// below it with its swept values and the map's colour bar for the
// sweep's scales sc (labelledFrame).
func (p *Plan) animation(ctx context.Context, m string, delay int, sc maps.Scales, bare bool) (*gif.GIF, error) {
	mp, err := maps.Lookup(m)
	if err != nil {
		return nil, err
	}
	pal := mp.Palette()
	r := p.Points[0].Scene
	w, h := r.Screen.Width, r.Screen.Height
	framePal := pal
	if !bare {
		h += stripHeight(w)
		framePal = stripPalette(pal)
	}
	anim := &gif.GIF{Config: image.Config{ColorModel: framePal, Width: w, Height: h}}
	for _, pt := range p.Points {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		name := p.framePrefix(pt.Index) + "-" + m + "-indexed.png"
		data, err := os.ReadFile(filepath.Join(p.Dir(), name))
		if err != nil {
			return nil, err
		}
		im, err := png.Decode(bytes.NewReader(data))
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		pi, ok := im.(*image.Paletted)
		if !ok || !samePalette(pi.Palette, pal) || pi.Rect.Dx() != r.Screen.Width || pi.Rect.Dy() != r.Screen.Height {
			return nil, fmt.Errorf("%s is not a %d×%d palette image of the %s map", name, r.Screen.Width, r.Screen.Height, m)
		}
		pi.Palette = pal
		if !bare {
			bar, err := p.barFor(ctx, mp, pt, sc)
			if err != nil {
				return nil, fmt.Errorf("frame %d colour bar: %w", pt.Index, err)
			}
			if pi, err = labelledFrame(pi, framePal, p.valueLabel(pt.Values), bar); err != nil {
				return nil, err
			}
		}
		anim.Image = append(anim.Image, pi)
		anim.Delay = append(anim.Delay, delay)
	}
	return anim, nil
}

// samePalette reports whether two palettes hold the same colours.
func samePalette(a, b color.Palette) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		r1, g1, b1, a1 := a[i].RGBA()
		r2, g2, b2, a2 := b[i].RGBA()
		if r1 != r2 || g1 != g2 || b1 != b2 || a1 != a2 {
			return false
		}
	}
	return true
}

// namedPlot is a plot and its file name.
type namedPlot struct {
	name string
	plot figure.Plot
}

// Where the spectra's colours lie on colormap.Sequential: its lightest
// end would vanish on the white plot.
const seqLo, seqHi = 0.0, 0.8

// spectraPlots returns one plot of all frames' total line profiles,
// coloured by the first axis; for a grid, one plot per value of the
// second axis.
func (p *Plan) spectraPlots(sc maps.Scales) ([]namedPlot, error) {
	a := p.Axes[0]
	base := p.Points[0].Scene
	fam := p.curveFamily()
	var out []namedPlot
	for j, g := range fam.groups {
		pl := figure.Plot{
			Title:    "line profiles over the sweep",
			Subtitle: p.familySubtitle(g),
			XLabel:   "observed energy *{E}_{obs} [keV]",
			YLabel:   "photon flux *{F}_{E} [keV⁻¹, relative]",
			Size:     maps.FigureSize(base.Output),
			YMax:     sc.FluxMax,
			Bar:      fam.bar,
		}
		if !slices.Contains([]string{a.Key, axisKey(p, 1)}, "emission.line_kev") && !base.RestLines.List {
			pl.VLines = []figure.VLine{{X: base.Emission.LineKeV, Label: fmt.Sprintf("%g keV rest", base.Emission.LineKeV), Color: color.RGBA{0x60, 0x60, 0x60, 0xff}, Dashed: true}}
		}
		if base.RestLines.List {
			for n, e := range base.RestLines.Energies() {
				if !slices.Contains([]string{a.Key, axisKey(p, 1)}, scene.LineKey(n+1, "energy_kev")) {
					pl.VLines = append(pl.VLines, figure.VLine{X: e, Label: fmt.Sprintf("%g", e), Color: color.RGBA{0x60, 0x60, 0x60, 0xff}, Dashed: true})
				}
			}
		}
		xlo, xhi := math.Inf(1), math.Inf(-1)
		for _, pt := range g {
			name := p.framePrefix(pt.Index) + "-spectrum.csv"
			e, lo, hi, flux, physical, err := readSpectrum(filepath.Join(p.Dir(), name))
			if err != nil {
				return nil, fmt.Errorf("%s: %w", name, err)
			}
			if physical {
				pl.YLabel = "photon flux *{F}_{E} [photons cm⁻² s⁻¹ keV⁻¹]"
			}
			xlo, xhi = math.Min(xlo, lo), math.Max(xhi, hi)
			pl.Series = append(pl.Series, figure.Series{X: e, Y: flux, Width: 1.5, Color: fam.color(pt.Values[0])})
		}
		pl.XMin, pl.XMax = xlo, xhi
		out = append(out, namedPlot{p.familyName("sweep-spectra", j), pl})
	}
	return out, nil
}

// curveFamily is what the sweep's plots of one curve per frame share:
// the frames grouped by the second axis (one group without one) and the
// colour bar of the first axis, whose value colours each curve.
type curveFamily struct {
	groups [][]Point
	bar    *figure.ColorBar
	color  func(v float64) color.RGBA // a curve's colour by its first-axis value
}

func (p *Plan) curveFamily() curveFamily {
	a := p.Axes[0]
	groups := [][]Point{p.Points}
	if len(p.Axes) == 2 {
		n1 := p.Axes[1].Count
		groups = make([][]Point, n1)
		for _, pt := range p.Points {
			groups[pt.Index%n1] = append(groups[pt.Index%n1], pt)
		}
	}
	position := func(v float64) float64 {
		t := a.Position(v)
		if a.To < a.From {
			t = 1 - t
		}
		return math.Min(1, math.Max(0, t))
	}
	bar := &figure.ColorBar{Label: scene.QuantityOf(a.Key).Title()}
	for i := 0; i < 256; i++ {
		bar.Colors = append(bar.Colors, colormap.Sequential.At(seqLo+(seqHi-seqLo)*float64(i)/255))
	}
	for _, v := range a.ticks() {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: position(v), Label: formatValue(v)})
	}
	return curveFamily{groups, bar, func(v float64) color.RGBA {
		return colormap.Sequential.At(seqLo + (seqHi-seqLo)*position(v))
	}}
}

// familySubtitle describes a group of curveFamily: its frames, the first
// axis's range and, for a grid, the group's value of the second axis.
func (p *Plan) familySubtitle(g []Point) string {
	a := p.Axes[0]
	t := fmt.Sprintf("%d frames, %s (%s spacing)", len(g), rangeText(scene.QuantityOf(a.Key), a.From, a.To), a.Spacing)
	if len(p.Axes) == 2 {
		t += "; " + scene.QuantityOf(p.Axes[1].Key).Value(formatValue(g[0].Values[1]))
	}
	return t
}

// familyName is the file of group j of curveFamily: stem.png, or for a
// grid stem-NN.png numbered by the second axis.
func (p *Plan) familyName(stem string, j int) string {
	if len(p.Axes) == 2 {
		return fmt.Sprintf("%s-%0*d.png", stem, max(2, len(strconv.Itoa(p.Axes[1].Count-1))), j)
	}
	return stem + ".png"
}

// rangeText describes an axis's range in words, e.g. "spin a from 0.5 to
// 0.999", "inclination i from 20 to 80 deg".
func rangeText(q scene.Quantity, from, to float64) string {
	t := q.Name
	if q.Symbol != "" {
		t += " " + q.Symbol
	}
	t += " from " + formatValue(from) + " to " + formatValue(to)
	if q.Unit != "" {
		t += " " + q.Unit
	}
	return t
}

// axisKey returns the key of axis i, or "".
func axisKey(p *Plan, i int) string {
	if i < len(p.Axes) {
		return p.Axes[i].Key
	}
	return ""
}

// readSpectrum reads a spectrum CSV written by outputs.WriteCSV:
// bin centres, the lowest and highest bin edge, the total flux density
// per keV, and whether it is in physical units (its header says so).
func readSpectrum(path string) (e []float64, lo, hi float64, flux []float64, physical bool, err error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, 0, 0, nil, false, err
	}
	physical = bytes.Contains(data, []byte(outputs.PhysicalSpectrumUnits))
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		return nil, 0, 0, nil, false, err
	}
	if len(rows) < 2 || len(rows[0]) < 4 || rows[0][0] != "energy_kev" || rows[0][1] != "energy_lo_kev" || rows[0][2] != "energy_hi_kev" || rows[0][3] != "flux_total" {
		return nil, 0, 0, nil, false, errors.New("not a spectrum table (energy_kev, energy_lo_kev, energy_hi_kev, flux_total, ...)")
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for i, row := range rows[1:] {
		var v [4]float64
		for c := range v {
			if v[c], err = strconv.ParseFloat(row[c], 64); err != nil {
				return nil, 0, 0, nil, false, fmt.Errorf("row %d: %w", i+1, err)
			}
		}
		e, flux = append(e, v[0]), append(flux, v[3])
		lo, hi = math.Min(lo, v[1]), math.Max(hi, v[2])
	}
	return e, lo, hi, flux, physical, nil
}

// writeTable writes sweep-frames.csv: frame number, file prefix and the
// swept values of every frame.
func (p *Plan) writeTable(w io.Writer) error {
	fmt.Fprintf(w, "# kerrscope sweep: %d frames; swept:", len(p.Points))
	for _, a := range p.Axes {
		fmt.Fprintf(w, " %s", a)
	}
	fmt.Fprint(w, "\nframe,prefix")
	for _, a := range p.Axes {
		fmt.Fprintf(w, ",%s", a.Key)
	}
	fmt.Fprintln(w)
	for _, pt := range p.Points {
		prefix := p.framePrefix(pt.Index)
		if p.spot != nil {
			prefix = strings.TrimSuffix(p.spotFrameName(pt.Index), ".png")
		}
		fmt.Fprintf(w, "%d,%s", pt.Index, prefix)
		for _, v := range pt.Values {
			fmt.Fprintf(w, ",%s", formatValue(v))
		}
		if _, err := fmt.Fprintln(w); err != nil {
			return err
		}
	}
	return nil
}
