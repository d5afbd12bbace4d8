package spot

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"image"
	"image/color"
	"image/gif"
	"io"
	"math"
	"strconv"
	"strings"

	"kerrscope/colormap"
	"kerrscope/raytrace"
	"kerrscope/render/internal/figure"
	"kerrscope/render/internal/workers"
	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Options control a spot movie.
type Options struct {
	Version string // program version recorded in the outputs
	// Progress, if not nil, is called with the number of rows traced.
	Progress func(rows int)
}

// Summary is what a movie run did.
type Summary struct {
	Files   []string // paths written, sorted
	Photons int64    // photons traced (once, for all frames)
	Period  float64  // orbital period of the spot, M
	// FluxMin, FluxMax are the extremes of the light curve.
	FluxMin, FluxMax float64
}

// MaxMovieBytes bounds the palette frames kept for the GIF (one byte per
// pixel per frame).
const MaxMovieBytes = 1 << 30

// gifDelay is the GIF frame time, centiseconds (25 frames a second).
const gifDelay = 4

// Run traces the scene once and writes the movie of its spot into the
// output directory, staged and committed together (outputs.Outputs, set
// "spot"): the frames as palette PNGs (spot-frame-NNNN.png, the intensity
// map's colours on one fixed scale for all frames), their animated GIF
// (spot-movie.gif), the light curve (spot-lightcurve.csv and .png), the
// centroid track (spot-centroid.csv, and .png over the time-averaged
// image), the line profile against time (spot-spectra.csv and .png) and
// spot.toml, the effective scene. An automatic window is framed first
// (FrameWindow), and spot.toml records the concrete one. On any error no
// file is changed.
func Run(ctx context.Context, r scene.Resolved, sp scene.SpotEmission, opt Options) (Summary, error) {
	if n := int64(r.Spot.Frames) * int64(r.Screen.Width) * int64(r.Screen.Height); n > MaxMovieBytes {
		return Summary{}, fmt.Errorf("spot.frames = %d of %d×%d pixels: %d MB of frames, more than the %d MB a movie may hold; use fewer frames or pixels",
			r.Spot.Frames, r.Screen.Width, r.Screen.Height, n>>20, MaxMovieBytes>>20)
	}
	lk, err := outputs.Lock(r.Output.Directory)
	if err != nil {
		return Summary{}, err
	}
	defer lk.Unlock()
	if r, err = FrameWindow(ctx, r, sp); err != nil {
		return Summary{}, err
	}
	tb, err := Trace(ctx, r, sp, opt.Progress)
	if err != nil {
		return Summary{}, err
	}
	mv := tb.Movie(ctx)
	if err := ctx.Err(); err != nil {
		return Summary{}, err
	}
	out, err := outputs.NewOutputs(ctx, lk, "spot")
	if err != nil {
		return Summary{}, err
	}
	if err := mv.WriteFiles(out.Write, opt.Version, true); err != nil {
		out.Abort()
		return Summary{}, err
	}
	sum := Summary{Photons: tb.Photons, Period: sp.Period(), FluxMin: math.Inf(1), FluxMax: math.Inf(-1)}
	for _, s := range mv.Snap {
		sum.FluxMin, sum.FluxMax = math.Min(sum.FluxMin, s.Flux), math.Max(sum.FluxMax, s.Flux)
	}
	sum.Files, err = out.Commit()
	return sum, err
}

// Movie is a table sampled at the scene's frame times.
type Movie struct {
	Table   *Table
	Snap    []Snapshot
	Spectra []pixels.Spectrum // the spot's light by energy, per frame
	IMax    float64           // brightest pixel of any frame
}

// Movie samples every frame time (Times); see MovieAt.
func (t *Table) Movie(ctx context.Context) *Movie { return t.MovieAt(ctx, t.Times()) }

// MovieAt samples the observer times given, on all cores: the snapshot,
// the spot's spectrum and the brightest pixel of each frame. Each frame is
// summed on one goroutine, so the result does not depend on scheduling.
func (t *Table) MovieAt(ctx context.Context, times []float64) *Movie {
	r := t.Res
	mv := &Movie{Table: t, Snap: make([]Snapshot, len(times)), Spectra: make([]pixels.Spectrum, len(times))}
	imax := make([]float64, len(times))
	workers.Each(ctx, len(times), func() []float64 { return make([]float64, t.W*t.H) }, func(k int, img []float64) {
		mv.Spectra[k] = pixels.NewSpectrum(r.MinKeV, r.MaxKeV, r.Emission.LineKeV, r.Spectrum.Bins, r.Disk.Orders)
		mv.Snap[k] = t.At(times[k], img, &mv.Spectra[k], true)
		for _, v := range img {
			imax[k] = math.Max(imax[k], v)
		}
	})
	for _, v := range imax {
		mv.IMax = math.Max(mv.IMax, v)
	}
	if !(mv.IMax > 0) {
		mv.IMax = 1
	}
	return mv
}

// position places a pixel's intensity on the colour scale: the scene's
// output.intensity_scale, linear from 0 or log over 4 decades below IMax.
func (mv *Movie) position(v float64) float64 {
	if mv.Table.Res.Output.IntensityScale == "linear" {
		return colormap.Linear(v, 0, mv.IMax)
	}
	return colormap.Log(v, mv.IMax*1e-4, mv.IMax)
}

// indexed colours one frame's intensities with the intensity map's
// palette: pixels whose photon shows no disk are the no-disk grey (from
// infinity; for a lone spot, the bottom of the scale) or the shadow
// (from the horizon).
func (mv *Movie) indexed(img []float64, pal color.Palette) *image.Paletted {
	t := mv.Table
	p := image.NewPaletted(image.Rect(0, 0, t.W, t.H), pal)
	for k, v := range img {
		switch {
		case t.Lit[k]:
			p.Pix[k] = colormap.PaletteIndex(mv.position(v))
		case t.Fate[k] == raytrace.Captured:
			p.Pix[k] = colormap.ShadowIndex
		case t.Spot.Alone:
			p.Pix[k] = colormap.PaletteIndex(0)
		default:
			p.Pix[k] = colormap.NoHitIndex
		}
	}
	return p
}

// FrameName returns the file name of frame k, spot-frame-NNNN.png.
func (mv *Movie) FrameName(k int) string {
	return fmt.Sprintf("spot-frame-%0*d.png", max(4, len(strconv.Itoa(len(mv.Snap)-1))), k)
}

// frame returns the intensities of frame k in img (W×H values) and its
// palette image on the movie's scale (IMax).
func (mv *Movie) frame(k int, img []float64, pal color.Palette) *image.Paletted {
	mv.Table.At(mv.Snap[k].T, img, nil, false)
	return mv.indexed(img, pal)
}

// WriteFrame writes frame k as the palette PNG that WriteFiles writes
// under FrameName(k), byte for byte.
func (mv *Movie) WriteFrame(k int, w io.Writer) error {
	if k < 0 || k >= len(mv.Snap) {
		return fmt.Errorf("frame %d of a movie of %d frames", k, len(mv.Snap))
	}
	im, err := maps.Lookup("intensity")
	if err != nil {
		return err
	}
	t := mv.Table
	return figure.EncodePNG(w, mv.frame(k, make([]float64, t.W*t.H), im.Palette()))
}

// WriteFiles stages the files of the movie through put: the frames (only
// if frames is set), the GIF made of them, the light curve, the centroid
// track, the line profile against time and spot.toml.
func (mv *Movie) WriteFiles(put outputs.Put, version string, frames bool) error {
	t := mv.Table
	r := t.Res
	im, err := maps.Lookup("intensity")
	if err != nil {
		return err
	}
	pal := im.Palette()
	img := make([]float64, t.W*t.H)
	mean := make([]float64, t.W*t.H)
	anim := &gif.GIF{Config: image.Config{ColorModel: pal, Width: t.W, Height: t.H}}
	for k := range mv.Snap {
		p := mv.frame(k, img, pal)
		for i, v := range img {
			mean[i] += v / float64(len(mv.Snap))
		}
		if frames {
			if err := put(mv.FrameName(k), func(w io.Writer) error { return figure.EncodePNG(w, p) }); err != nil {
				return err
			}
		}
		anim.Image = append(anim.Image, p)
		anim.Delay = append(anim.Delay, gifDelay)
	}
	if err := put("spot-movie.gif", func(w io.Writer) error { return gif.EncodeAll(w, anim) }); err != nil {
		return err
	}
	if err := put("spot-lightcurve.csv", mv.writeLightCurve); err != nil {
		return err
	}
	if err := putFigure(put, "spot-lightcurve.png", func() (image.Image, error) { return figure.DrawPlot(mv.LightCurvePlot()) }); err != nil {
		return err
	}
	svg := r.Output.Has("svg")
	if err := putSVG(put, svg, "spot-lightcurve.svg", func(w io.Writer) error { return figure.PlotSVG(w, mv.LightCurvePlot()) }); err != nil {
		return err
	}
	if err := put("spot-centroid.csv", mv.writeCentroid); err != nil {
		return err
	}
	if err := putFigure(put, "spot-centroid.png", func() (image.Image, error) { return figure.DrawPanel(mv.centroidPanel(mean), 0) }); err != nil {
		return err
	}
	if err := putSVG(put, svg, "spot-centroid.svg", func(w io.Writer) error { return figure.PanelSVG(w, mv.centroidPanel(mean)) }); err != nil {
		return err
	}
	if err := put("spot-spectra.csv", mv.writeSpectra); err != nil {
		return err
	}
	if err := putFigure(put, "spot-spectra.png", func() (image.Image, error) { return figure.DrawPanel(mv.spectraPanel(), 0) }); err != nil {
		return err
	}
	if err := putSVG(put, svg, "spot-spectra.svg", func(w io.Writer) error { return figure.PanelSVG(w, mv.spectraPanel()) }); err != nil {
		return err
	}
	return put("spot.toml", func(w io.Writer) error {
		text, err := r.Scene.TOML()
		if err != nil {
			return err
		}
		_, err = fmt.Fprintf(w, "# kerrscope %s — effective scene of this spot movie; make it again with\n#   kerrscope spot --scene spot.toml\n\n%s", version, strings.TrimLeft(string(text), "\n"))
		return err
	})
}

// putSVG writes a figure as SVG when the scene's formats ask for it
// (want), drawn to memory first so that a drawing error names the file
// and leaves nothing half-written.
func putSVG(put outputs.Put, want bool, name string, draw func(io.Writer) error) error {
	if !want {
		return nil
	}
	var b bytes.Buffer
	if err := draw(&b); err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	return put(name, func(w io.Writer) error { _, err := w.Write(b.Bytes()); return err })
}

func putFigure(put outputs.Put, name string, draw func() (image.Image, error)) error {
	img, err := draw()
	if err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	return put(name, func(w io.Writer) error { return figure.EncodePNG(w, img) })
}

// caption is the one-line description of the movie used in titles.
func (mv *Movie) caption() string {
	r := mv.Table.Res
	if mv.Table.Spot.Alone {
		return fmt.Sprintf("a = %g, i = %g°, lone spot at r = %g M", r.Hole.Spin, r.Observer.InclinationDeg, r.Spot.Radius)
	}
	return fmt.Sprintf("%s, spot at r = %g M", r.Caption(), r.Spot.Radius)
}

// header writes the commented lines common to the movie's tables.
func (mv *Movie) header(w io.Writer, what string) {
	t := mv.Table
	sp := t.Spot
	fmt.Fprintf(w, "# %s; %s\n", what, mv.caption())
	fmt.Fprintf(w, "# spot: %s at r = %g M, size %g M, contrast %g; orbital period 2π(r^{3/2}+a) = %.10g M", t.Res.Spot.Profile, sp.Radius, sp.Size, sp.Contrast, sp.Period())
	if sp.Alone {
		fmt.Fprint(w, "; alone (no steady disk)")
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "# t_obs: observer time in M, regularised like the time delays (only differences are physical)")
}

func (mv *Movie) writeLightCurve(w io.Writer) error {
	bw := bufio.NewWriter(w)
	mv.header(bw, "light curve")
	fmt.Fprintln(bw, "# flux: line photon flux, sum over pixels and orders of g^3 eps(r) limb dOmega, dOmega = pixel area in M^2 (observer at D = 1 M; scale by (M/D)^2)")
	fmt.Fprintln(bw, "# flux_spot: the spot's part of it; flux_bol: bolometric, g^4 in place of g^3 (same units)")
	fmt.Fprintln(bw, "t_obs_m,orbits,flux,flux_spot,flux_bol")
	p := mv.Table.Spot.Period()
	for _, s := range mv.Snap {
		fmt.Fprintf(bw, "%.10g,%.10g,%.10g,%.10g,%.10g\n", s.T, s.T/p, s.Flux, s.SpotFlux, s.Bol)
	}
	return bw.Flush()
}

func (mv *Movie) writeCentroid(w io.Writer) error {
	bw := bufio.NewWriter(w)
	mv.header(bw, "image centroid track")
	fmt.Fprintln(bw, "# centroid of the image weighted by the line intensity, screen coordinates alpha, beta in M (empty when the image is dark)")
	fmt.Fprintln(bw, "t_obs_m,orbits,alpha_m,beta_m")
	p := mv.Table.Spot.Period()
	for _, s := range mv.Snap {
		if math.IsNaN(s.Alpha) {
			fmt.Fprintf(bw, "%.10g,%.10g,,\n", s.T, s.T/p)
			continue
		}
		fmt.Fprintf(bw, "%.10g,%.10g,%.10g,%.10g\n", s.T, s.T/p, s.Alpha, s.Beta)
	}
	return bw.Flush()
}

func (mv *Movie) writeSpectra(w io.Writer) error {
	bw := bufio.NewWriter(w)
	mv.header(bw, "line profile of the spot against observer time")
	s0 := &mv.Spectra[0]
	fmt.Fprintf(bw, "# line rest energy %g keV; %d bins of %g keV from %g to %g keV\n", s0.LineKeV, s0.Bins(), s0.Width(), s0.MinKeV, s0.MaxKeV)
	fmt.Fprintln(bw, "# flux_spot: the spot's photon-number flux density per keV (units of flux in spot-lightcurve.csv per keV), all orders")
	fmt.Fprintln(bw, "t_obs_m,energy_kev,flux_spot_per_kev")
	for k := range mv.Spectra {
		s := &mv.Spectra[k]
		tot := s.Total()
		wd := s.Width()
		for b, v := range tot {
			fmt.Fprintf(bw, "%.10g,%.8g,%.10g\n", mv.Snap[k].T, s.MinKeV+(float64(b)+0.5)*wd, v/wd)
		}
	}
	return bw.Flush()
}

// LightCurvePlot is the figure of the light curve: the flux over its
// time average against observer time, with each completed orbit marked.
func (mv *Movie) LightCurvePlot() figure.Plot {
	t := mv.Table
	p := t.Spot.Period()
	x := make([]float64, len(mv.Snap))
	y := make([]float64, len(mv.Snap))
	mean := 0.0
	for _, s := range mv.Snap {
		mean += s.Flux / float64(len(mv.Snap))
	}
	for k, s := range mv.Snap {
		x[k], y[k] = s.T, s.Flux/mean
	}
	pl := figure.Plot{
		Title:    "light curve of the orbiting spot",
		Subtitle: mv.caption(),
		XLabel:   "observer time *{t}_{obs} [M]",
		YLabel:   "line flux / time average",
		Size:     maps.FigureSize(t.Res.Output),
		XMin:     0, XMax: t.Spot.Period() * t.Res.Spot.Periods,
		Series: []figure.Series{{X: x, Y: y, Color: color.RGBA{0x10, 0x10, 0x10, 0xff}, Width: 2.5}},
	}
	for n := 1; float64(n) <= t.Res.Spot.Periods*(1+1e-9) && n <= 20; n++ {
		label := ""
		if n == 1 {
			label = fmt.Sprintf("one orbit, %.4g M", p)
		}
		pl.VLines = append(pl.VLines, figure.VLine{X: float64(n) * p, Label: label, Color: color.RGBA{0x60, 0x60, 0x60, 0xff}, Dashed: true})
	}
	return pl
}

// centroidPanel draws the time-averaged image with the centroid track.
func (mv *Movie) centroidPanel(mean []float64) figure.Panel {
	t := mv.Table
	im, _ := maps.Lookup("intensity")
	idx := mv.indexed(mean, im.Palette())
	rgba := image.NewRGBA(idx.Rect)
	for k := range idx.Pix {
		rgba.Set(k%t.W, k/t.W, idx.Palette[idx.Pix[k]])
	}
	a0, a1 := t.alpha[0]-t.Res.PixelSize/2, t.alpha[t.W-1]+t.Res.PixelSize/2
	b0, b1 := t.beta[t.H-1]-t.Res.PixelSize/2, t.beta[0]+t.Res.PixelSize/2
	var track [][2]float64
	for _, s := range mv.Snap {
		track = append(track, [2]float64{s.Alpha, s.Beta})
	}
	return figure.Panel{
		Image:    rgba,
		X:        figure.Axis{Min: a0, Max: a1, Label: "*{α} [M]"},
		Y:        figure.Axis{Min: b0, Max: b1, Label: "*{β} [M]"},
		Title:    "time-averaged image and the centroid track",
		Size:     maps.FigureSize(t.Res.Output),
		Fills:    mv.fills(),
		Bar:      mv.intensityBar("time-averaged *{I} / movie maximum"),
		Subtitle: mv.caption(),
		Lines:    []figure.Polyline{{Points: track, Color: color.RGBA{0x00, 0xb4, 0xff, 0xff}, Width: 2, Closed: t.Res.Spot.Periods == math.Trunc(t.Res.Spot.Periods)}},
		Legend:   []figure.LegendEntry{{Color: color.RGBA{0x00, 0xb4, 0xff, 0xff}, Label: "centroid"}},
	}
}

// fills explains the flat colours of the movie's images: the shadow, and
// the no-disk grey unless the spot shines alone (then rays that miss it
// sit at the bottom of the scale).
func (mv *Movie) fills() []figure.Swatch {
	horizon := figure.Swatch{Color: colormap.Shadow, Label: "captured by the horizon"}
	if mv.Table.Spot.Alone {
		return []figure.Swatch{horizon}
	}
	return []figure.Swatch{{Color: colormap.NoHit, Label: "no disk on the ray"}, horizon}
}

// intensityBar is the key of the movie's intensity colours (position):
// log over four decades below the movie's maximum, or linear.
func (mv *Movie) intensityBar(label string) *figure.ColorBar {
	bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: label, Note: "log scale"}
	if mv.Table.Res.Output.IntensityScale == "linear" {
		bar.Note = ""
		for i := 0; i <= 4; i++ {
			bar.Ticks = append(bar.Ticks, figure.Tick{T: float64(i) / 4, Label: strconv.FormatFloat(float64(i)/4, 'g', 3, 64)})
		}
		return bar
	}
	for n := -4; n <= 0; n++ {
		label := "1"
		if n < 0 {
			label = "10^{−" + strconv.Itoa(-n) + "}"
		}
		bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(math.Pow(10, float64(n)), 1e-4, 1), Label: label})
	}
	return bar
}

// spectraPanel draws the spot's line profile against observer time:
// energy across, time upward, flux density on a linear colour scale.
func (mv *Movie) spectraPanel() figure.Panel {
	s0 := &mv.Spectra[0]
	nb, nf := s0.Bins(), len(mv.Spectra)
	rep := max(1, nb/(2*nf)) // rows per frame: a figure about twice as wide as tall
	peak := 0.0
	for k := range mv.Spectra {
		for _, v := range mv.Spectra[k].Total() {
			peak = math.Max(peak, v)
		}
	}
	if !(peak > 0) {
		peak = 1
	}
	img := image.NewRGBA(image.Rect(0, 0, nb, nf*rep))
	for k := range mv.Spectra {
		tot := mv.Spectra[k].Total()
		for y := 0; y < rep; y++ {
			row := (nf-1-k)*rep + y
			for b, v := range tot {
				img.SetRGBA(b, row, colormap.Sequential.At(v/peak))
			}
		}
	}
	p := mv.Table.Spot.Period()
	dt := p * mv.Table.Res.Spot.Periods / float64(nf)
	bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: "*{F}_{E} / maximum"}
	for i := 0; i <= 4; i++ {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: float64(i) / 4, Label: strconv.FormatFloat(float64(i)/4, 'g', 3, 64)})
	}
	return figure.Panel{
		Image:    img,
		X:        figure.Axis{Min: s0.MinKeV, Max: s0.MaxKeV, Label: "observed energy *{E}_{obs} [keV]"},
		Y:        figure.Axis{Min: -dt / 2, Max: float64(nf)*dt - dt/2, Label: "observer time *{t}_{obs} [M]"},
		Size:     maps.FigureSize(mv.Table.Res.Output),
		Title:    "line profile of the spot against time",
		Subtitle: mv.caption(),
		Bar:      bar,
	}
}
