package echo

import (
	"bufio"
	"context"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"strings"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/internal/fits"
	"kerrscope/render/outputs"
	"kerrscope/scene"
)

// The files of an echo run, in the order Run stages them.
const (
	ProfileCSV      = "lamp-profile.csv"
	ProfilePNG      = "lamp-profile.png"
	ResponseFITS    = "echo.fits"
	ResponsePNG     = "echo.png"
	LagFrequencyCSV = "echo-lag-frequency.csv"
	LagEnergyCSV    = "echo-lag-energy.csv"
	SceneTOML       = "echo.toml"
)

// Summary is what an echo run did.
type Summary struct {
	Files []string // paths written, sorted
	Illum *scene.Illumination
	// First and Mean are the earliest and the flux-weighted mean lag, M;
	// Frequency the lag–energy frequency, c³/GM.
	First, Mean, Frequency float64
	Photons                int64
}

// Run computes the echo of the scene and writes its files into the output
// directory, staged and committed together (outputs.Outputs, set "echo"):
// the lamp's profile (ProfileCSV, ProfilePNG), ψ(E, t) (ResponseFITS,
// ResponsePNG), the lag spectra (LagFrequencyCSV, LagEnergyCSV) and the
// effective scene (SceneTOML). On any error no file is changed.
func Run(ctx context.Context, r scene.Resolved, opt Options) (Summary, error) {
	if err := opt.Check(); err != nil {
		return Summary{}, err
	}
	lk, err := outputs.Lock(r.Output.Directory)
	if err != nil {
		return Summary{}, err
	}
	defer lk.Unlock()
	resp, err := Compute(ctx, r, opt)
	if err != nil {
		return Summary{}, err
	}
	out, err := outputs.NewOutputs(ctx, lk, "echo")
	if err != nil {
		return Summary{}, err
	}
	f := resp.LagFrequencyDefault(opt.Frequency)
	if err := resp.WriteFiles(out.Write, opt.Version, f); err != nil {
		out.Abort()
		return Summary{}, err
	}
	sum := Summary{Illum: resp.Illum, First: resp.First, Mean: resp.MeanLag(), Frequency: f, Photons: resp.Photons}
	sum.Files, err = out.Commit()
	return sum, err
}

// WriteFiles stages the files of Run through put, with the lag–energy
// spectrum at frequency f (c³/GM).
func (r *Response) WriteFiles(put outputs.Put, version string, f float64) error {
	il := r.Illum
	title := fmt.Sprintf("lamp at h = %g M, Γ = %g; %s", il.Height, il.Index, r.Res.Caption())
	if err := put(ProfileCSV, func(w io.Writer) error { return WriteProfileCSV(w, il, title) }); err != nil {
		return err
	}
	if err := put(ProfilePNG, func(w io.Writer) error {
		return WriteProfileFigure(w, []*scene.Illumination{il}, "Lamp illumination of the disk", title)
	}); err != nil {
		return err
	}
	if err := put(ResponseFITS, func(w io.Writer) error { return r.writeFITS(w, version) }); err != nil {
		return err
	}
	if err := putFigure(put, ResponsePNG, func() (image.Image, error) { return figure.DrawPanel(r.Panel(), 0) }); err != nil {
		return err
	}
	if err := put(LagFrequencyCSV, func(w io.Writer) error { return r.writeLagFrequency(w, title) }); err != nil {
		return err
	}
	if err := put(LagEnergyCSV, func(w io.Writer) error { return r.writeLagEnergy(w, title, f) }); err != nil {
		return err
	}
	return put(SceneTOML, func(w io.Writer) error {
		text, err := r.Res.Scene.TOML()
		if err != nil {
			return err
		}
		_, err = fmt.Fprintf(w, "# kerrscope %s — effective scene of this echo; make it again with\n#   kerrscope echo --scene echo.toml\n\n%s", version, strings.TrimLeft(string(text), "\n"))
		return err
	})
}

func putFigure(put outputs.Put, name string, draw func() (image.Image, error)) error {
	img, err := draw()
	if err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	return put(name, func(w io.Writer) error { return figure.EncodePNG(w, img) })
}

// WriteProfileCSV writes the lamp's profile: a commented header with the
// fractions, then one row per radial bin: edges and centre (M), photons
// per unit area (the lamp's photon fraction per M² of 2πr dr), the
// flat-space law's average over the bin (scene.FlatDiskFraction per area),
// the emissivity ε, the mean shift g = E_gas/E_lamp and the lamp-to-disk
// time at the centre (M).
func WriteProfileCSV(w io.Writer, il *scene.Illumination, title string) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "# %s\n", title)
	fmt.Fprintf(bw, "# fractions of the lamp's photons: disk %.10g, infinity %.10g, horizon %.10g; disk/infinity %.10g\n", il.Disk, il.Escape, il.Horizon, il.Reflection())
	fmt.Fprintln(bw, "# photons: fraction of the lamp's photons landing per M^2 of disk area 2 pi r dr (= per unit proper time and comoving area of the gas)")
	fmt.Fprintln(bw, "# flat: the same for flat space, h/(4 pi (r^2+h^2)^1.5) averaged over the bin; emissivity = sum of photon fractions g^(Gamma-1) per area")
	fmt.Fprintln(bw, "r_lo_m,r_hi_m,r_m,photons_per_m2,flat_photons_per_m2,emissivity,shift_g,delay_m")
	for i := range il.Photons {
		r0, r1 := il.Edges[i], il.Edges[i+1]
		flat := scene.FlatDiskFraction(il.Height, r0, r1) / (math.Pi * (r1 - r0) * (r1 + r0))
		fmt.Fprintf(bw, "%.10g,%.10g,%.10g,%.10g,%.10g,%.10g,%.10g,%.10g\n", r0, r1, il.Centre(i), il.Photons[i], flat, il.Emission[i], il.Shift[i], il.Delay[i])
	}
	return bw.Flush()
}

// WriteProfileFigure draws ProfilePlot of one or more lamps and writes it
// as PNG to w.
func WriteProfileFigure(w io.Writer, ils []*scene.Illumination, title, subtitle string) error {
	img, err := figure.DrawPlot(ProfilePlot(ils, title, subtitle))
	if err != nil {
		return err
	}
	return figure.EncodePNG(w, img)
}

// ProfilePlot draws the photons per unit area of one or more lamps against
// radius, both logarithmic (x as log₁₀ r), each with its flat-space law
// h/(4π (r² + h²)^{3/2}) dashed in the same colour.
func ProfilePlot(ils []*scene.Illumination, title, subtitle string) figure.Plot {
	p := figure.Plot{Title: title, Subtitle: subtitle, XLabel: "log₁₀ r [M]", YLabel: "photons per area [lamp fraction M⁻²]", LogY: true, Legend: true}
	for k, il := range ils {
		x := make([]float64, len(il.Photons))
		y := make([]float64, len(il.Photons))
		yf := make([]float64, len(il.Photons))
		for i := range il.Photons {
			c := il.Centre(i)
			x[i] = math.Log10(c)
			y[i] = il.Photons[i]
			yf[i] = scene.FlatPhotons(il.Height, c)
		}
		col := colormap.Order(k)
		p.Series = append(p.Series,
			figure.Series{X: x, Y: y, Color: col, Width: 2.5, Label: fmt.Sprintf("h = %g M (disk %.3f, infinity %.3f, horizon %.3f)", il.Height, il.Disk, il.Escape, il.Horizon)},
			figure.Series{X: x, Y: yf, Color: col, Width: 1.5, Dashed: true, Label: fmt.Sprintf("flat space, h = %g M", il.Height)})
	}
	return p
}

// Panel is the figure of ψ(E, t): time across, energy up, the flux per keV
// per M on a logarithmic colour scale over four decades.
func (r *Response) Panel() figure.Panel {
	top := 0.0
	for _, v := range r.Psi {
		top = math.Max(top, v)
	}
	if !(top > 0) {
		top = 1
	}
	lo := top * 1e-4
	img := image.NewRGBA(image.Rect(0, 0, r.NT, r.NE))
	cm := colormap.Sequential
	for e := range r.NE {
		row := r.NE - 1 - e // row 0 is the highest energy
		for k := range r.NT {
			v := r.Psi[e*r.NT+k]
			c := colormap.NoHit
			if v > 0 {
				c = cm.At(colormap.Log(v, lo, top))
			}
			img.SetRGBA(k, row, c)
		}
	}
	bar := &figure.ColorBar{Colors: cm.Table(256), Label: "ψ(E, t) [keV⁻¹ M⁻¹, relative]"}
	for d := 0; d <= 4; d++ {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: float64(d) / 4, Label: figure.BarNumber(lo * math.Pow(10, float64(d)))})
	}
	il := r.Illum
	return figure.Panel{
		Image:    img,
		X:        figure.Axis{Min: 0, Max: r.TMax, Label: "time after the flash seen directly [M]"},
		Y:        figure.Axis{Min: r.EMin, Max: r.EMax, Label: "observed energy E [keV]"},
		Title:    "Echo of a flash of the lamp",
		Subtitle: fmt.Sprintf("lamp h = %g M, Γ = %g; %s; first echo %.3g M", il.Height, il.Index, r.Res.Caption(), r.First),
		Bar:      bar,
		Fills:    []figure.Swatch{{Color: colormap.NoHit, Label: "no echo in the bin"}},
		Lines:    []figure.Polyline{{Points: [][2]float64{{0, r.Res.Emission.LineKeV}, {r.TMax, r.Res.Emission.LineKeV}}, Color: color.RGBA{0x60, 0x60, 0x60, 0xff}, Dashed: true}},
	}
}

// writeFITS writes ψ(E, t) as one image: axis 1 time (M), axis 2
// observed energy (keV), FITS row 1 the lowest energy.
func (r *Response) writeFITS(w io.Writer, version string) error {
	il := r.Illum
	de := (r.EMax - r.EMin) / float64(r.NE)
	dt := r.TMax / float64(r.NT)
	data := make([]float32, r.NE*r.NT)
	for i, v := range r.Psi {
		data[i] = float32(v)
	}
	primary := []fits.Card{
		{Key: "CREATOR", Value: "kerrscope " + version},
		{Key: "SPIN", Value: r.Res.Hole.Spin, Comment: "black-hole spin a"},
		{Key: "INCL", Value: r.Res.Observer.InclinationDeg, Comment: "observer inclination, deg"},
		{Key: "LAMPH", Value: il.Height, Comment: "lamp height on the spin axis, M"},
		{Key: "GAMMA", Value: il.Index, Comment: "lamp photon index"},
		{Key: "FDISK", Value: il.Disk, Comment: "fraction of lamp photons on the disk"},
		{Key: "FINF", Value: il.Escape, Comment: "fraction reaching infinity"},
		{Key: "FHOR", Value: il.Horizon, Comment: "fraction falling into the hole"},
		{Key: "FIRST", Value: r.First, Comment: "earliest echo after the direct flash, M"},
		{Key: "MEANLAG", Value: r.MeanLag(), Comment: "flux-weighted mean lag, M"},
		{Key: "TOTAL", Value: r.Total, Comment: "steady line flux (spectrum units)"},
		{Key: "OUTSIDE", Value: r.Outside, Comment: "flux outside the grid"},
		{Key: "COMMENT", Value: "psi(E,t): line flux per keV per M after a unit flash"},
	}
	img := fits.Image{Name: "ECHO", Width: r.NT, Height: r.NE, Data: data,
		Axes: [2]fits.Axis{
			{Type: "LAG", RefPixel: 1, RefValue: dt / 2, Delta: dt},
			{Type: "EOBS", Unit: "keV", RefPixel: 1, RefValue: r.EMin + de/2, Delta: de},
		},
		Cards: []fits.Card{{Key: "COMMENT", Value: "axis 1: time after the direct flash in M = GM/c^3"}},
	}
	return fits.Encode(w, primary, []fits.Image{img})
}

// writeLagFrequency writes the lag–frequency spectrum of the
// energy-integrated response.
func (r *Response) writeLagFrequency(w io.Writer, title string) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "# %s\n", title)
	fmt.Fprintln(bw, "# lag of the energy-integrated echo behind the flash: -arg(Psi(f))/(2 pi f), Psi the Fourier transform of psi(t); positive = echo later")
	fmt.Fprintln(bw, "# frequency in c^3/GM (1/M); lags and |Psi| (relative flux) as for the response; lags wrap where the phase passes pi")
	fmt.Fprintln(bw, "frequency_per_m,lag_m,amplitude")
	f, lag, spec := Lags(r.Curve(), r.TMax/float64(r.NT), lagPad)
	for k := range f {
		fmt.Fprintf(bw, "%.10g,%.10g,%.10g\n", f[k], lag[k], math.Hypot(real(spec[k]), imag(spec[k])))
	}
	return bw.Flush()
}

// writeLagEnergy writes the lag–energy spectrum at frequency f.
func (r *Response) writeLagEnergy(w io.Writer, title string, f float64) error {
	bw := bufio.NewWriter(w)
	freq, e, lag := r.LagEnergy(f)
	fmt.Fprintf(bw, "# %s\n", title)
	fmt.Fprintf(bw, "# lag of each energy bin's echo behind the flash at frequency %.10g c^3/GM (nearest grid frequency to %.10g); empty bins: NaN\n", freq, f)
	fmt.Fprintln(bw, "energy_kev,lag_m")
	for k := range e {
		fmt.Fprintf(bw, "%.8g,%.10g\n", e[k], lag[k])
	}
	return bw.Flush()
}
