package pixels

import (
	"math"
	"math/cmplx"

	"kerrscope/scene"
)

// Stokes sums of a frame's seen light (KeepLine, KeepStokes): every order
// a pixel shows (Frame.TotalAt), in the IAU convention of Hit.Q, Hit.U.

// StokesAt returns the line intensity I and Stokes Q, U of pixel k summed
// over the orders seen (NaN where none is seen). The frame must hold
// Line, Q and U.
func (f *Frame) StokesAt(k int) (i, q, u float64) {
	return float64(f.TotalAt(f.Line, k)), float64(f.TotalAt(f.Q, k)), float64(f.TotalAt(f.U, k))
}

// NetPolarisation is the linear polarisation of the whole image.
type NetPolarisation struct {
	I, Q, U float64 // sums over the image (line intensity units × pixels)
	// Fraction is sqrt(Q² + U²)/I, the net linear polarisation fraction
	// of the unresolved source; Angle its electric-vector position angle,
	// ½ atan2(U, Q), radians from north through east in (−π/2, π/2].
	Fraction, Angle float64
	// Beta2 is the azimuthal-mode coefficient β₂ of the polarisation
	// pattern (Palumbo, Wong & Prather 2020, ApJ 894, 156):
	//
	//	β₂ = Σ_k (Q_k + iU_k) e^{−2iφ_k} / Σ_k I_k
	//
	// over every pixel, φ_k the position angle (north through east) of
	// the pixel centre about the hole (α = β = 0; scene.SkyOffset). Its
	// phase is 0 for a radial electric-vector pattern and ±π for a
	// toroidal one; |β₂| ≤ the largest local fraction.
	Beta2 complex128
}

// Net returns the image's net polarisation and β₂ (NetPolarisation).
// Without light (I = 0) every field is 0. The frame must hold Line, Q and
// U (KeepLine, KeepStokes).
func (f *Frame) Net() NetPolarisation {
	var n NetPolarisation
	var b complex128
	pa := f.Res.Observer.PositionAngleDeg
	for j := 0; j < f.H; j++ {
		beta := PixelBeta(f.Res, j)
		for i := 0; i < f.W; i++ {
			k := j*f.W + i
			ii, q, u := f.StokesAt(k)
			if math.IsNaN(ii) {
				continue
			}
			n.I += ii
			n.Q += q
			n.U += u
			east, north := scene.SkyOffset(PixelAlpha(f.Res, i), beta, pa)
			if east == 0 && north == 0 {
				continue
			}
			phi := math.Atan2(east, north)
			b += complex(q, u) * cmplx.Exp(complex(0, -2*phi))
		}
	}
	if !(n.I > 0) {
		return NetPolarisation{}
	}
	n.Fraction = math.Hypot(n.Q, n.U) / n.I
	n.Angle = math.Atan2(n.U, n.Q) / 2
	if n.Angle <= -math.Pi/2 {
		n.Angle += math.Pi
	}
	n.Beta2 = b / complex(n.I, 0)
	return n
}

// StokesSpectrum returns the spectra of Stokes Q and U collapsed from the
// frame exactly as Spectrum collapses the line intensity (same bins,
// spreading over each pixel's range of g, instrument broadening), so that
// bin by bin Q(E)/I(E) and U(E)/I(E) are the polarisation of the light
// seen at that energy. The frame must hold G, Q and U, and not be
// refined.
func (f *Frame) StokesSpectrum() (q, u Spectrum) {
	return f.collapse(f.Q), f.collapse(f.U)
}
