// Package echo computes the disk's echo of a flash of a lamp (a point
// source on the spin axis, scene emissivity "lamp"): the response of the
// observed line in energy and time, ψ(E, t), its lag–frequency and
// lag–energy spectra, and the lamp's illumination profile, and writes
// them (`kerrscope echo`). It uses raytrace for the photons, scene for the
// disk and the lamp's profile, and render/pixels for the screen.
package echo

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"

	"kerrscope/raytrace"
	"kerrscope/render/internal/workers"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// DefaultTimeBins is the number of time bins of ψ(E, t) unless Options
// say otherwise; MaxTimeBins bounds it.
const (
	DefaultTimeBins = 256
	MaxTimeBins     = 1 << 14
	// MaxDuration bounds Options.Duration, in M.
	MaxDuration = 1e8
	// MaxImages bounds pixels × image orders of an echo: Compute keeps
	// every lit image (40 bytes each) to bin it once the time range is
	// known, about 670 MB at the bound.
	MaxImages = 1 << 24
)

// Options control an echo.
type Options struct {
	// Duration is the time range of ψ(E, t) from the flash as seen
	// directly, in M; 0 chooses the latest echo of any pixel, plus 2 %.
	Duration float64
	// TimeBins is the number of time bins; 0 means DefaultTimeBins.
	TimeBins int
	// Frequency is the frequency of the lag–energy spectrum in c³/(GM)
	// (1/M); 0 chooses 1/(8 τ̄), τ̄ the mean lag, where the mean echo is
	// π/4 out of phase.
	Frequency float64
	// Progress, if not nil, is called with the number of rows traced.
	Progress func(rows int)
	// Version is the program version recorded in the outputs.
	Version string
}

// OptionError is an Options value out of range, with the option's name.
type OptionError struct {
	Option, Value, Allowed string
}

func (e *OptionError) Error() string {
	return fmt.Sprintf("%s = %s: %s", e.Option, e.Value, e.Allowed)
}

// Check validates o.
func (o Options) Check() error {
	if !(o.Duration == 0 || (o.Duration > 0 && o.Duration <= MaxDuration)) {
		return &OptionError{"duration", fmt.Sprint(o.Duration), fmt.Sprintf("must be 0 (automatic) or a time in M up to %g", float64(MaxDuration))}
	}
	if o.TimeBins < 0 || o.TimeBins > MaxTimeBins || o.TimeBins == 1 {
		return &OptionError{"time-bins", fmt.Sprint(o.TimeBins), fmt.Sprintf("must be 0 (default %d) or 2 to %d", DefaultTimeBins, MaxTimeBins)}
	}
	if !(o.Frequency == 0 || (o.Frequency > 0 && o.Frequency < math.Inf(1))) {
		return &OptionError{"lag-frequency", fmt.Sprint(o.Frequency), "must be 0 (automatic) or a positive frequency in c³/GM"}
	}
	return nil
}

// Hit is one image of a disk element lit by the lamp: where it is, what
// the observer sees of it and when.
type Hit struct {
	R, Phi float64 // radius (M) and azimuth φ − φ_o (radians)
	G      float64 // redshift factor E_obs/E_emit
	Lag    float64 // time after the flash seen directly, M
	Flux   float64 // line flux g³ ε L ΔαΔβ (the spectrum's units)
}

// Response is the echo of a unit flash of the lamp.
type Response struct {
	Res   scene.Resolved
	Illum *scene.Illumination
	// DirectPsi is the emission angle (radians from the upward axis) of
	// the photon that reaches the observer directly and DirectArrival its
	// regularised arrival (raytrace.AxisSource.Direct).
	DirectPsi, DirectArrival float64
	// Hits are the pixels' lit images, in pixel order then image order.
	Hits []Hit
	// The grid: NE energy bins over [EMin, EMax] keV, NT time bins over
	// [0, TMax] M.
	EMin, EMax float64
	NE, NT     int
	TMax       float64
	// Psi is ψ(E, t) per keV per M, energy-major: Psi[e*NT+k]. Summed
	// times the bin sizes it is the steady line flux of the scene
	// (Frame.Spectrum's units) minus Outside.
	Psi []float64
	// Total is the flux of all hits; Outside the part outside the grid.
	Total, Outside float64
	// First is the earliest lag of any hit, M.
	First float64
	// Photons traced.
	Photons int64
}

// ErrNotLamp: the echo needs the lamp emissivity.
var ErrNotLamp = errors.New("the echo needs emission.emissivity = lamp (a point source on the spin axis)")

// Compute traces the scene's screen (one photon per pixel, with time
// delays) and returns the echo. The lag of an image of disk element
// (r, φ) is t_lamp→disk(r) + Delay − Arrival: the lamp-to-disk time of the
// lamp's profile (scene.Illumination.DelayAt), plus the crossing's
// raytrace.Timing.Delay, minus the direct photon's regularised arrival
// (both regularised alike, so their difference is physical). The
// observer must be above the disk (inclination below 90°), on the lamp's
// side.
func Compute(ctx context.Context, r scene.Resolved, opt Options) (*Response, error) {
	if err := opt.Check(); err != nil {
		return nil, err
	}
	if r.Emissivity.Kind != scene.Lamp || r.Emissivity.Illumination == nil {
		return nil, &scene.FieldError{Key: "emission.emissivity", Value: r.Emission.Emissivity, Allowed: ErrNotLamp.Error()}
	}
	if r.RestLines.List {
		return nil, &scene.FieldError{Key: "lines", Value: fmt.Sprintf("%d lines", len(r.RestLines.Lines)), Allowed: "the echo is of the one line emission.line_kev; remove the [[lines]] list"}
	}
	if !(r.Observer.InclinationDeg < 90) {
		return nil, &scene.FieldError{Key: "observer.inclination_deg", Value: fmt.Sprint(r.Observer.InclinationDeg), Allowed: "must be below 90 for the echo: the lamp lights the disk's upper face"}
	}
	il := r.Emissivity.Illumination
	src, err := raytrace.NewAxisSource(r.Hole.Spin, il.Height)
	if err != nil {
		return nil, err
	}
	psi, arrival, err := src.Direct(r.Observer.InclinationDeg)
	if err != nil {
		return nil, fmt.Errorf("lamp at %v M seen at %v°: %w", il.Height, r.Observer.InclinationDeg, err)
	}
	if r, err = pixels.FrameWindow(ctx, r); err != nil {
		return nil, err
	}
	m, err := pixels.NewModel(r)
	if err != nil {
		return nil, err
	}
	w, h, orders := r.Screen.Width, r.Screen.Height, r.Disk.Orders
	if n := int64(w) * int64(h) * int64(orders); n > MaxImages {
		return nil, &scene.FieldError{Key: "screen.width", Value: fmt.Sprint(w),
			Allowed: fmt.Sprintf("%d×%d pixels × %d orders is %d images, more than the %d an echo may hold; use fewer pixels or orders", w, h, orders, n, MaxImages)}
	}
	area := r.PixelSize * r.PixelSize
	hits := make([]Hit, w*h*orders)
	for i := range hits {
		hits[i].Flux = math.NaN()
	}
	type scratch struct {
		tp raytrace.TimedPath
		s  pixels.Sample
	}
	var mu sync.Mutex
	done := 0
	workers.Each(ctx, h, func() *scratch { return &scratch{} }, func(j int, sc *scratch) {
		beta := pixels.PixelBeta(r, j)
		for i := range w {
			m.ShadeTimed(pixels.PixelAlpha(r, i), beta, &sc.tp, &sc.s)
			for n := range orders {
				hit := sc.s.Hits[n]
				if !hit.Seen || !(hit.Line > 0) {
					continue
				}
				hits[(j*w+i)*orders+n] = Hit{R: hit.R, Phi: hit.Phi, G: hit.G,
					Lag: il.DelayAt(hit.R) + hit.T - arrival, Flux: hit.Line * area}
			}
		}
		if opt.Progress != nil {
			mu.Lock()
			done++
			opt.Progress(done)
			mu.Unlock()
		}
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	res := &Response{Res: r, Illum: il, DirectPsi: psi, DirectArrival: arrival,
		EMin: r.MinKeV, EMax: r.MaxKeV, NE: r.Spectrum.Bins, NT: opt.TimeBins, First: math.Inf(1),
		Photons: int64(w) * int64(h)}
	if res.NT == 0 {
		res.NT = DefaultTimeBins
	}
	last := 0.0
	for _, ht := range hits {
		if math.IsNaN(ht.Flux) {
			continue
		}
		if math.IsNaN(ht.Lag) || math.IsInf(ht.Lag, 0) || math.IsNaN(ht.G) {
			return nil, fmt.Errorf("echo: image of r = %v M has lag %v and g %v", ht.R, ht.Lag, ht.G)
		}
		res.Hits = append(res.Hits, ht)
		res.First = math.Min(res.First, ht.Lag)
		last = math.Max(last, ht.Lag)
	}
	if len(res.Hits) == 0 {
		return nil, errors.New("echo: no pixel sees the lit disk; widen the window (screen.field_of_view)")
	}
	res.TMax = opt.Duration
	if res.TMax == 0 {
		res.TMax = 1.02 * last
	}
	res.Psi = make([]float64, res.NE*res.NT)
	de := (res.EMax - res.EMin) / float64(res.NE)
	dt := res.TMax / float64(res.NT)
	line := r.Emission.LineKeV
	for _, ht := range res.Hits {
		res.Total += ht.Flux
		e := int(math.Floor((ht.G*line - res.EMin) / de))
		k := int(math.Floor(ht.Lag / dt))
		if e < 0 || e >= res.NE || k < 0 || k >= res.NT {
			res.Outside += ht.Flux
			continue
		}
		res.Psi[e*res.NT+k] += ht.Flux / (de * dt)
	}
	return res, nil
}

// Curve returns the energy-integrated response ψ(t) = ∫ψ(E, t) dE per M,
// one value per time bin.
func (r *Response) Curve() []float64 {
	de := (r.EMax - r.EMin) / float64(r.NE)
	out := make([]float64, r.NT)
	for e := range r.NE {
		for k := range r.NT {
			out[k] += r.Psi[e*r.NT+k] * de
		}
	}
	return out
}

// MeanLag returns the flux-weighted mean lag of the hits, M.
func (r *Response) MeanLag() float64 {
	s, st := 0.0, 0.0
	for _, h := range r.Hits {
		s += h.Flux
		st += h.Flux * h.Lag
	}
	return st / s
}

// Lags returns the time lags of the response ψ(t) (bins of width dt, bin k
// centred on (k + 1/2) dt) relative to the flash, at the frequencies
// f_k = k/(n dt), k = 1 … n/2, of its discrete Fourier transform, taken
// with gonum's real FFT on n = pad × len(psi) points (zero-padded):
//
//	Ψ(f) = Σ_k ψ_k e^{−2πi f t_k} dt,   lag(f) = −arg Ψ(f) / (2πf)
//
// the phase of the cross spectrum of the response against the flash
// divided by 2πf, with positive lags for a response that follows the
// flash (Uttley et al. 2014, Astron. Astrophys. Rev. 22, 72, sec. 2.2).
// The phase is taken in (−π, π], so lags wrap above f = 1/(2 lag).
func Lags(psi []float64, dt float64, pad int) (freq, lag []float64, spec []complex128) {
	n := len(psi) * max(1, pad)
	seq := make([]float64, n)
	copy(seq, psi)
	fft := fourier.NewFFT(n)
	c := fft.Coefficients(nil, seq)
	for k := 1; k < len(c) && k <= n/2; k++ {
		f := float64(k) / (float64(n) * dt)
		// Shift the sample times to the bin centres: t_k = (k + 1/2) dt.
		z := c[k] * complex(dt, 0) * cmplx.Exp(complex(0, -math.Pi*f*dt))
		freq = append(freq, f)
		spec = append(spec, z)
		lag = append(lag, -cmplx.Phase(z)/(2*math.Pi*f))
	}
	return freq, lag, spec
}

// lagPad is the zero padding of the lag spectra: a frequency grid four
// times finer than the response's own.
const lagPad = 4

// LagFrequency returns the lag–frequency spectrum of the energy-integrated
// response (Lags).
func (r *Response) LagFrequency() (freq, lag []float64) {
	f, l, _ := Lags(r.Curve(), r.TMax/float64(r.NT), lagPad)
	return f, l
}

// LagEnergy returns the lag of each energy bin's response at the frequency
// of the Fourier grid nearest to f (Lags; the lag–energy spectrum of
// Uttley et al. 2014 against the flash as reference), with that frequency.
// Bins without light get NaN.
func (r *Response) LagEnergy(f float64) (freq float64, energy, lag []float64) {
	dt := r.TMax / float64(r.NT)
	n := r.NT * lagPad
	k := int(math.Round(f * float64(n) * dt))
	k = min(n/2, max(1, k))
	freq = float64(k) / (float64(n) * dt)
	de := (r.EMax - r.EMin) / float64(r.NE)
	row := make([]float64, r.NT)
	for e := range r.NE {
		copy(row, r.Psi[e*r.NT:(e+1)*r.NT])
		energy = append(energy, r.EMin+(float64(e)+0.5)*de)
		lit := false
		for _, v := range row {
			lit = lit || v > 0
		}
		if !lit {
			lag = append(lag, math.NaN())
			continue
		}
		_, l, _ := Lags(row, dt, lagPad)
		lag = append(lag, l[k-1])
	}
	return freq, energy, lag
}

// LagFrequencyDefault returns the lag–energy frequency of Options: f if
// given, else 1/(8 τ̄).
func (r *Response) LagFrequencyDefault(f float64) float64 {
	if f > 0 {
		return f
	}
	return 1 / (8 * r.MeanLag())
}
