package pixels

import (
	"math"

	"kerrscope/scene"
)

// Spectrum is the line profile collapsed from an image: the flux of every
// seen crossing, g³ ε L ΔΩ, binned at the observed energy g E0
// (physics: Liouville's theorem, I_ν/ν³ conserved; Cunningham 1975).
// Flux is per bin, not per keV, in units of M² of screen area for an
// observer at distance D = 1 M (multiply by (M/D)² for a real distance).
//
// A spectrum of a line list (NewSceneSpectrum for a scene with [[lines]])
// also holds each line's flux summed over the orders; Order then holds
// the sum over the lines.
type Spectrum struct {
	MinKeV, MaxKeV float64
	// LineKeV is the rest energy of Add and AddSpread: the scene's one
	// line, or the first line of a list.
	LineKeV      float64
	FWHMeV       float64     // instrument broadening applied (0: none)
	Order        [][]float64 // [order][bin]
	Below, Above float64     // flux that fell outside the energy range
	// LinesKeV are the rest energies of a line list and Line[l] the
	// flux of line l per bin, summed over the orders; both nil for a
	// spectrum of one line.
	LinesKeV []float64
	Line     [][]float64
}

// NewSpectrum returns an empty spectrum with bins equal bins over [min, max] keV.
func NewSpectrum(minKeV, maxKeV, lineKeV float64, bins, orders int) Spectrum {
	s := Spectrum{MinKeV: minKeV, MaxKeV: maxKeV, LineKeV: lineKeV, Order: make([][]float64, orders)}
	for o := range s.Order {
		s.Order[o] = make([]float64, bins)
	}
	return s
}

// NewSceneSpectrum returns the empty spectrum of the scene: its energy
// range and bins, with orders image orders, and one flux per line when
// the scene gives a line list (scene.RestLines.List).
func NewSceneSpectrum(r scene.Resolved, orders int) Spectrum {
	ls := r.RestLines
	s := NewSpectrum(r.MinKeV, r.MaxKeV, r.Emission.LineKeV, r.Spectrum.Bins, orders)
	if ls.List {
		s.LineKeV = ls.Lines[0].EnergyKeV
		s.LinesKeV = ls.Energies()
		s.Line = make([][]float64, len(ls.Lines))
		for l := range s.Line {
			s.Line[l] = make([]float64, r.Spectrum.Bins)
		}
	}
	return s
}

// clear empties the spectrum, keeping its binning.
func (s *Spectrum) clear() {
	for o := range s.Order {
		clear(s.Order[o])
	}
	for l := range s.Line {
		clear(s.Line[l])
	}
	s.Below, s.Above = 0, 0
}

// Bins returns the number of bins.
func (s *Spectrum) Bins() int { return len(s.Order[0]) }

// Width returns the bin width in keV.
func (s *Spectrum) Width() float64 { return (s.MaxKeV - s.MinKeV) / float64(s.Bins()) }

// Add deposits flux of image order o observed with redshift factor g.
func (s *Spectrum) Add(o int, g, flux float64) { s.add(o, -1, s.LineKeV, g, flux) }

// AddLines deposits flux[l] of each line l of a line list, of image
// order o, observed at redshift g spread over the pixel as in AddSpread
// (dgx = dgy = 0: at g alone, as Add).
func (s *Spectrum) AddLines(o int, g, dgx, dgy float64, flux []float64) {
	for l, e0 := range s.LinesKeV {
		s.spread(o, l, e0, g, dgx, dgy, flux[l])
	}
}

// add is Add of line l (-1: no line list) of rest energy e0.
func (s *Spectrum) add(o, l int, e0, g, flux float64) {
	e := g * e0
	if e < s.MinKeV {
		s.Below += flux
		return
	}
	k := int((e - s.MinKeV) / s.Width())
	if k >= s.Bins() {
		if e <= s.MaxKeV { // e == max lands in the last bin
			k = s.Bins() - 1
		} else {
			s.Above += flux
			return
		}
	}
	s.Order[o][k] += flux
	if l >= 0 {
		s.Line[l][k] += flux
	}
}

// Merge adds another spectrum of the same binning.
func (s *Spectrum) Merge(t *Spectrum) {
	for o := range s.Order {
		for k := range s.Order[o] {
			s.Order[o][k] += t.Order[o][k]
		}
	}
	for l := range s.Line {
		for k := range s.Line[l] {
			s.Line[l][k] += t.Line[l][k]
		}
	}
	s.Below += t.Below
	s.Above += t.Above
}

// Total returns the summed flux per bin over all orders.
func (s *Spectrum) Total() []float64 {
	out := make([]float64, s.Bins())
	for _, ord := range s.Order {
		for k, v := range ord {
			out[k] += v
		}
	}
	return out
}

// Sum returns the total flux in range.
func (s *Spectrum) Sum() float64 {
	t := 0.0
	for _, v := range s.Total() {
		t += v
	}
	return t
}

// AddSpread deposits flux of order o observed at redshift g spread over
// the pixel: if g varies linearly across a pixel by dgx along one side and
// dgy along the other, the distribution of g over the pixel area is the
// convolution of two uniform distributions of widths |dgx| and |dgy| (a
// trapezoid), which this integrates exactly over every bin. It removes the
// shot noise of depositing each pixel at its centre value alone.
func (s *Spectrum) AddSpread(o int, g, dgx, dgy, flux float64) {
	s.spread(o, -1, s.LineKeV, g, dgx, dgy, flux)
}

// spread is AddSpread of line l (-1: no line list) of rest energy e0.
func (s *Spectrum) spread(o, l int, e0, g, dgx, dgy, flux float64) {
	wa, wb := math.Abs(dgx)*e0, math.Abs(dgy)*e0
	if wa < wb {
		wa, wb = wb, wa
	}
	e := g * e0
	half := (wa + wb) / 2
	if !(half > 1e-6*s.Width()) || math.IsInf(half, 0) {
		s.add(o, l, e0, g, flux)
		return
	}
	lo, hi := e-half, e+half
	if lo < s.MinKeV {
		s.Below += flux * trapezoidCDF(s.MinKeV-e, wa, wb)
	}
	if hi > s.MaxKeV {
		s.Above += flux * (1 - trapezoidCDF(s.MaxKeV-e, wa, wb))
	}
	w := s.Width()
	k0 := max(0, int(math.Floor((lo-s.MinKeV)/w)))
	k1 := min(s.Bins()-1, int(math.Floor((hi-s.MinKeV)/w)))
	for k := k0; k <= k1; k++ {
		bl := s.MinKeV + float64(k)*w - e
		v := flux * (trapezoidCDF(bl+w, wa, wb) - trapezoidCDF(bl, wa, wb))
		s.Order[o][k] += v
		if l >= 0 {
			s.Line[l][k] += v
		}
	}
}

// trapezoidCDF is the distribution function at x of the sum of two
// independent uniform variables of widths a ≥ b ≥ 0 centred on 0.
func trapezoidCDF(x, a, b float64) float64 {
	h := (a + b) / 2
	if x <= -h {
		return 0
	}
	if x >= h {
		return 1
	}
	if b == 0 {
		return (x + a/2) / a
	}
	c := (a - b) / 2 // the flat top spans [-c, c]
	switch {
	case x < -c:
		d := x + h
		return d * d / (2 * a * b)
	case x <= c:
		return (x + a/2) / a
	default:
		d := h - x
		return 1 - d*d/(2*a*b)
	}
}

// Spectrum collapses the frame: every seen crossing adds Line × h² at
// energy g E0 (the observed photon flux density is the sum of I_E ΔΩ over
// the image, Cunningham 1975, ApJ 202, 788), spread over the g range the pixel
// covers (AddSpread) using the differences of g to the neighbouring
// pixels of the same image order.
//
// With a line list each line l gets the share of the light its
// emissivity has at the pixel's source radius (scene.RestLines.Parts),
// at energy g E_l.
//
// For a frame made by RenderRefined it is the spectrum of the refined
// samples, weighted by their areas. Otherwise the frame must hold G and
// Line (KeepG, KeepLine), and R too for a line list whose lines have laws
// of their own (KeepR; scene.RestLines.Own).
func (f *Frame) Spectrum() Spectrum {
	r := f.Res
	if f.refined != nil {
		s := *f.refined
		if r.Spectrum.FWHMeV > 0 {
			s = s.Broaden(r.Spectrum.FWHMeV)
		}
		return s
	}
	return f.collapse(f.Line)
}

// collapse is Spectrum of the per-order record v (Line, or Stokes Q or
// U) of a frame that is not refined.
func (f *Frame) collapse(v [][]float32) Spectrum {
	r := f.Res
	s := NewSceneSpectrum(r, f.Orders)
	dOmega := r.PixelSize * r.PixelSize
	ls := f.Model.Lines
	var parts, flux []float64
	if s.Line != nil {
		parts, flux = make([]float64, len(ls.Lines)), make([]float64, len(ls.Lines))
		ls.Parts(math.NaN(), parts) // the fractions, unless a line has its own law
	}
	for o := 0; o < f.Orders; o++ {
		g := f.G[o]
		for k, l := range v[o] {
			if math.IsNaN(float64(l)) {
				continue
			}
			i, j := k%f.W, k/f.W
			dx := f.slope(g, k, i, j, 1)
			dy := f.slope(g, k, i, j, f.W)
			if s.Line == nil {
				s.AddSpread(o, float64(g[k]), dx, dy, float64(l)*dOmega)
				continue
			}
			if ls.Own() && f.R != nil {
				ls.Parts(float64(f.R[o][k]), parts)
			}
			for n := range flux {
				flux[n] = parts[n] * float64(l) * dOmega
			}
			s.AddLines(o, float64(g[k]), dx, dy, flux)
		}
	}
	if r.Spectrum.FWHMeV > 0 {
		s = s.Broaden(r.Spectrum.FWHMeV)
	}
	return s
}

// slope is the change of q per pixel at k along the step (1: right,
// W: down): the central difference, except across a jump (one one-sided
// difference more than 4 times the other, as where a neighbour belongs to
// another branch of the image), where the smaller one-sided difference is
// used. At the edge of a region the one-sided difference is used when the
// next difference inward agrees with it to the same factor, else 0.
// i, j locate pixel k.
func (f *Frame) slope(q []float32, k, i, j, step int) float64 {
	at := func(di int) float64 { // q at k + di·step, NaN off the grid
		ii, jj := i, j
		if step == 1 {
			ii += di
		} else {
			jj += di
		}
		if ii < 0 || ii >= f.W || jj < 0 || jj >= f.H {
			return math.NaN()
		}
		return float64(q[k+di*step])
	}
	c := float64(q[k])
	l, r := c-at(-1), at(1)-c
	agree := func(x, y float64) bool {
		ax, ay := math.Abs(x), math.Abs(y)
		return ax <= 4*ay && ay <= 4*ax
	}
	switch {
	case math.IsNaN(l) && math.IsNaN(r):
		return 0
	case math.IsNaN(l):
		if agree(r, at(2)-at(1)) {
			return r
		}
		return 0
	case math.IsNaN(r):
		if agree(l, at(-1)-at(-2)) {
			return l
		}
		return 0
	}
	al, ar := math.Abs(l), math.Abs(r)
	switch {
	case al > 4*ar:
		return r
	case ar > 4*al:
		return l
	}
	return (l + r) / 2
}

// Broaden convolves the spectrum with a Gaussian instrument response of
// the given FWHM (eV), σ = FWHM / (2 sqrt(2 ln 2)), integrating the
// Gaussian over each target bin so that flux in range is conserved up to
// what spreads past the ends.
func (s Spectrum) Broaden(fwhmEV float64) Spectrum {
	sigma := fwhmEV / 1000 / (2 * math.Sqrt(2*math.Ln2))
	out := NewSpectrum(s.MinKeV, s.MaxKeV, s.LineKeV, s.Bins(), len(s.Order))
	out.Below, out.Above, out.FWHMeV = s.Below, s.Above, fwhmEV
	w := s.Width()
	reach := int(math.Ceil(8*sigma/w)) + 1
	cdf := func(x float64) float64 { return 0.5 * math.Erfc(-x/(math.Sqrt2*sigma)) }
	broaden := func(src, dst []float64) {
		for i, v := range src {
			if v == 0 {
				continue
			}
			ei := s.MinKeV + (float64(i)+0.5)*w
			for j := max(0, i-reach); j <= min(s.Bins()-1, i+reach); j++ {
				lo := s.MinKeV + float64(j)*w - ei
				dst[j] += v * (cdf(lo+w) - cdf(lo))
			}
		}
	}
	for o, ord := range s.Order {
		broaden(ord, out.Order[o])
	}
	if s.Line != nil {
		out.LinesKeV = s.LinesKeV
		out.Line = make([][]float64, len(s.Line))
		for l, v := range s.Line {
			out.Line[l] = make([]float64, len(v))
			broaden(v, out.Line[l])
		}
	}
	return out
}
