package pixels

import "math"

// Spectrum is the line profile collapsed from an image: the flux of every
// seen crossing, g³ ε L ΔΩ, binned at the observed energy g E0
// (physics: Liouville's theorem, I_ν/ν³ conserved; Cunningham 1975).
// Flux is per bin, not per keV, in units of M² of screen area for an
// observer at distance D = 1 M (multiply by (M/D)² for a real distance).
type Spectrum struct {
	MinKeV, MaxKeV float64
	LineKeV        float64
	FWHMeV         float64     // instrument broadening applied (0: none)
	Order          [][]float64 // [order][bin]
	Below, Above   float64     // flux that fell outside the energy range
}

// NewSpectrum returns an empty spectrum with bins equal bins over [min, max] keV.
func NewSpectrum(minKeV, maxKeV, lineKeV float64, bins, orders int) Spectrum {
	s := Spectrum{MinKeV: minKeV, MaxKeV: maxKeV, LineKeV: lineKeV, Order: make([][]float64, orders)}
	for o := range s.Order {
		s.Order[o] = make([]float64, bins)
	}
	return s
}

// Bins returns the number of bins.
func (s *Spectrum) Bins() int { return len(s.Order[0]) }

// Width returns the bin width in keV.
func (s *Spectrum) Width() float64 { return (s.MaxKeV - s.MinKeV) / float64(s.Bins()) }

// Add deposits flux of image order o observed with redshift factor g.
func (s *Spectrum) Add(o int, g, flux float64) {
	e := g * s.LineKeV
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
}

// Merge adds another spectrum of the same binning.
func (s *Spectrum) Merge(t *Spectrum) {
	for o := range s.Order {
		for k := range s.Order[o] {
			s.Order[o][k] += t.Order[o][k]
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
	wa, wb := math.Abs(dgx)*s.LineKeV, math.Abs(dgy)*s.LineKeV
	if wa < wb {
		wa, wb = wb, wa
	}
	e := g * s.LineKeV
	half := (wa + wb) / 2
	if !(half > 1e-6*s.Width()) || math.IsInf(half, 0) {
		s.Add(o, g, flux)
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
		s.Order[o][k] += flux * (trapezoidCDF(bl+w, wa, wb) - trapezoidCDF(bl, wa, wb))
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
// For a frame made by RenderRefined it is the spectrum of the refined
// samples, weighted by their areas. Otherwise the frame must hold G and
// Line (KeepG, KeepLine).
func (f *Frame) Spectrum() Spectrum {
	r := f.Res
	if f.refined != nil {
		s := *f.refined
		if r.Spectrum.FWHMeV > 0 {
			s = s.Broaden(r.Spectrum.FWHMeV)
		}
		return s
	}
	s := NewSpectrum(r.MinKeV, r.MaxKeV, r.Emission.LineKeV, r.Spectrum.Bins, f.Orders)
	dOmega := r.PixelSize * r.PixelSize
	for o := 0; o < f.Orders; o++ {
		g := f.G[o]
		for k, l := range f.Line[o] {
			if math.IsNaN(float64(l)) {
				continue
			}
			i, j := k%f.W, k/f.W
			dx := f.slope(g, k, i, j, 1)
			dy := f.slope(g, k, i, j, f.W)
			s.AddSpread(o, float64(g[k]), dx, dy, float64(l)*dOmega)
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
	for o, ord := range s.Order {
		for i, v := range ord {
			if v == 0 {
				continue
			}
			ei := s.MinKeV + (float64(i)+0.5)*w
			for j := max(0, i-reach); j <= min(s.Bins()-1, i+reach); j++ {
				lo := s.MinKeV + float64(j)*w - ei
				out.Order[o][j] += v * (cdf(lo+w) - cdf(lo))
			}
		}
	}
	return out
}
