package outputs

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// SpectrumOptions shape the spectrum figure (the scene's output.
// spectrum_* keys).
type SpectrumOptions struct {
	// LogY makes the flux axis logarithmic (three decades below the
	// peak).
	LogY bool
	// Norm scales the curves: "flux" or "" (as computed), "area" (the
	// total has unit integral over observed energy; the orders keep
	// their share) or "peak" (the total peaks at 1).
	Norm string
	// Overlay, if not nil, is drawn over the spectrum for comparison,
	// normalised like the total by its own area or peak.
	Overlay *Overlay
	// Size is the printed size.
	Size figure.Size
}

// Overlay is a user spectrum read by ReadOverlay.
type Overlay struct {
	Name    string // the file's base name, for the key
	E, Flux []float64
}

// MaxOverlayBytes is the largest overlay file ReadOverlay reads.
const MaxOverlayBytes = 16 << 20

// ReadOverlay reads a comparison spectrum: a CSV file (commas, or
// spaces/tabs) whose first two columns are the observed energy in keV
// (positive, strictly increasing) and the flux per keV (finite, not
// negative), at least two rows; lines starting with '#' and one header
// line of column names are skipped. Anything else is a
// *scene.FieldError for output.spectrum_overlay naming the file, the
// line and the value.
func ReadOverlay(path string) (*Overlay, error) {
	name := filepath.Base(path)
	fail := func(line int, format string, args ...any) (*Overlay, error) {
		msg := fmt.Sprintf(format, args...)
		if line > 0 {
			msg = fmt.Sprintf("line %d: %s", line, msg)
		}
		return nil, &scene.FieldError{Key: "output.spectrum_overlay", Value: strconv.Quote(path), Allowed: msg}
	}
	fh, err := os.Open(path)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return fail(0, "cannot be read (%v)", err)
	}
	defer fh.Close()
	data, err := io.ReadAll(io.LimitReader(fh, MaxOverlayBytes+1))
	if err != nil {
		return fail(0, "cannot be read (%v)", err)
	}
	if len(data) > MaxOverlayBytes {
		return fail(0, "is larger than %d MiB", MaxOverlayBytes>>20)
	}
	ov := &Overlay{Name: name}
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 64<<10), MaxOverlayBytes)
	header := false
	for n := 1; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		cols := strings.FieldsFunc(line, func(r rune) bool { return r == ',' || r == ' ' || r == '\t' || r == ';' })
		if len(cols) < 2 {
			return fail(n, "has %d column, need energy [keV] and flux", len(cols))
		}
		e, errE := strconv.ParseFloat(cols[0], 64)
		v, errV := strconv.ParseFloat(cols[1], 64)
		if (errE != nil || errV != nil) && len(ov.E) == 0 && !header {
			header = true // a line of column names
			continue
		}
		switch {
		case errE != nil:
			return fail(n, "energy %q is not a number", cols[0])
		case errV != nil:
			return fail(n, "flux %q is not a number", cols[1])
		case !(e > 0) || math.IsInf(e, 0):
			return fail(n, "energy %v keV must be positive and finite", e)
		case !(v >= 0) || math.IsInf(v, 0):
			return fail(n, "flux %v must be finite and not negative", v)
		case len(ov.E) > 0 && !(e > ov.E[len(ov.E)-1]):
			return fail(n, "energy %v keV does not increase (previous %v keV)", e, ov.E[len(ov.E)-1])
		}
		ov.E, ov.Flux = append(ov.E, e), append(ov.Flux, v)
	}
	if err := sc.Err(); err != nil {
		return fail(0, "cannot be read (%v)", err)
	}
	if len(ov.E) < 2 {
		return fail(0, "has %d data rows, need at least 2", len(ov.E))
	}
	if peak(ov.Flux) == 0 {
		return fail(0, "has no positive flux to compare")
	}
	return ov, nil
}

// SpectrumOptionsOf returns the spectrum figure options of a resolved
// scene, reading the overlay file if there is one.
func SpectrumOptionsOf(r scene.Resolved) (SpectrumOptions, error) {
	o := r.Output
	opt := SpectrumOptions{LogY: o.SpectrumAxis == "log", Norm: o.SpectrumNorm, Size: maps.FigureSize(o)}
	if o.SpectrumOverlay != "" {
		ov, err := ReadOverlay(o.SpectrumOverlay)
		if err != nil {
			return opt, err
		}
		opt.Overlay = ov
	}
	return opt, nil
}

// CheckInputs reads the files the artifacts of a run will need besides
// the scene (the spectrum overlay), so that a bad file stops the run
// before any rendering.
func CheckInputs(r scene.Resolved, arts []Artifact) error {
	for _, a := range arts {
		if a.Kind == SpectrumFigure || a.Kind == SpectrumSVG {
			_, err := SpectrumOptionsOf(r)
			return err
		}
	}
	return nil
}

// peak is the largest value of v (0 for none).
func peak(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}

// trapezoid is the integral of y over x by the trapezoidal rule.
func trapezoid(x, y []float64) float64 {
	s := 0.0
	for i := 1; i < len(x); i++ {
		s += 0.5 * (y[i] + y[i-1]) * (x[i] - x[i-1])
	}
	return s
}

// Colours of the spectrum figure's curves besides the orders.
var (
	totalColor   = color.RGBA{0x1c, 0x1b, 0x22, 0xff}
	restColor    = color.RGBA{0x6e, 0x6a, 0x72, 0xff}
	overlayColor = color.RGBA{0x5c, 0x6b, 0x00, 0xff}
)

// SpectrumPlot returns the figure of the spectrum: total and per order,
// per keV, with the rest energy marked; for a line list, total and per
// line, with every rest energy marked. perUnit > 0 (scene.Resolved.
// SpectrumPerUnit) scales the flux to photons cm⁻² s⁻¹ keV⁻¹; 0 keeps it
// relative. fluxMax, the top of the axis (0: from the data), is in the
// units shown, and applies only without normalisation.
func SpectrumPlot(s *pixels.Spectrum, title, subtitle string, fluxMax, perUnit float64, opt SpectrumOptions) figure.Plot {
	ylabel, unit := "photon flux *{F}_{E} [keV⁻¹, relative]", 1.0
	if perUnit > 0 {
		ylabel, unit = "photon flux *{F}_{E} [photons cm⁻² s⁻¹ keV⁻¹]", perUnit
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
	total := perKeV(s.Total())
	scale := 1.0
	switch opt.Norm {
	case "area":
		if a := trapezoid(x, total); a > 0 {
			scale = 1 / a
		}
		ylabel, fluxMax = "*{F}_{E} / ∫*{F}_{E} d*{E} [keV⁻¹]", 0
	case "peak":
		if m := peak(total); m > 0 {
			scale = 1 / m
		}
		ylabel, fluxMax = "*{F}_{E} / peak", 0
	}
	scaled := func(v []float64) []float64 {
		for k := range v {
			v[k] *= scale
		}
		return v
	}
	p := figure.Plot{
		Title: title, Subtitle: subtitle,
		XLabel: "observed energy *{E}_{obs} [keV]",
		YLabel: ylabel,
		XMin:   s.MinKeV, XMax: s.MaxKeV, YMax: fluxMax,
		LogY:   opt.LogY,
		Legend: true,
		Size:   opt.Size,
		VLines: []figure.VLine{{X: s.LineKeV, Label: fmt.Sprintf("rest energy %g keV", s.LineKeV), Color: restColor, Dashed: true}},
	}
	if s.Line != nil {
		// A line list: the sum and each line (all orders), each rest
		// energy marked; the orders are in the table.
		p.VLines = nil
		p.Series = append(p.Series, figure.Series{X: x, Y: scaled(total), Color: totalColor, Width: 2.5, Label: "all lines"})
		for l, e0 := range s.LinesKeV {
			c := colormap.Order(l)
			p.Series = append(p.Series, figure.Series{X: x, Y: scaled(perKeV(s.Line[l])), Color: c, Width: 1.5, Label: fmt.Sprintf("%g keV line", e0), Dashed: l%2 == 1})
			p.VLines = append(p.VLines, figure.VLine{X: e0, Color: c, Dashed: true})
		}
	} else {
		p.Series = append(p.Series, figure.Series{X: x, Y: scaled(total), Color: totalColor, Width: 2.5, Label: "all orders"})
		if len(s.Order) > 1 {
			for o, ord := range s.Order {
				p.Series = append(p.Series, figure.Series{X: x, Y: scaled(perKeV(ord)), Color: colormap.Order(o), Width: 1.5, Label: fmt.Sprintf("order *{n} = %d", o), Dashed: o > 0})
			}
		}
	}
	if ov := opt.Overlay; ov != nil {
		k := 1.0
		switch opt.Norm {
		case "area":
			k = 1 / trapezoid(ov.E, ov.Flux)
		case "peak":
			k = 1 / peak(ov.Flux)
		}
		y := make([]float64, len(ov.Flux))
		for i, v := range ov.Flux {
			y[i] = k * v
		}
		p.Series = append(p.Series, figure.Series{X: ov.E, Y: y, Color: overlayColor, Width: 2, Label: "compared: " + ov.Name})
	}
	if opt.LogY {
		top := 0.0
		for _, sr := range p.Series {
			top = math.Max(top, peak(sr.Y))
		}
		if top > 0 {
			p.YMin, p.YMax = top*1e-3, top*1.6
		}
		if fluxMax > 0 {
			p.YMax = fluxMax
			p.YMin = math.Min(p.YMin, fluxMax*1e-3)
		}
	}
	return p
}

// jobSpectrumPlot is the spectrum figure of a run.
func jobSpectrumPlot(job Job, spec *pixels.Spectrum) (figure.Plot, error) {
	f := job.Frame
	title := job.SpectrumTitle
	if title == "" {
		title = "line profile collapsed from the image"
	}
	opt, err := SpectrumOptionsOf(f.Res)
	if err != nil {
		return figure.Plot{}, err
	}
	return SpectrumPlot(spec, title, f.Res.Caption(), job.Scales.FluxMax, f.Res.SpectrumPerUnit(), opt), nil
}

// spectrumSVG writes the spectrum figure as SVG.
func spectrumSVG(job Job, spec *pixels.Spectrum) ([]byte, error) {
	pl, err := jobSpectrumPlot(job, spec)
	if err != nil {
		return nil, fmt.Errorf("spectrum vector figure: %w", err)
	}
	var b bytes.Buffer
	if err := figure.PlotSVG(&b, pl); err != nil {
		return nil, fmt.Errorf("spectrum vector figure: %w", err)
	}
	return b.Bytes(), nil
}
