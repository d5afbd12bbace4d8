package render

import (
	"math"
	"testing"

	"kerrscope/raytrace"
)

func TestLensingBandsSchwarzschild(t *testing.T) {
	// For a = 0 successive lensing bands shrink by e^{-π}, the photon-ring
	// Lyapunov exponent of Schwarzschild (Johnson et al. 2020, Science
	// Advances 6, eaaz1310).
	for _, inc := range []float64{0, 17, 60} {
		o, _ := raytrace.NewObserver(0, inc)
		for _, dir := range []float64{0, 90, 225} {
			bands := LensingBands(o, 0, 0, dir, 5)
			for _, b := range bands {
				if !(b.Inner < math.Sqrt(27) && b.Outer > math.Sqrt(27)) {
					t.Errorf("i=%v dir=%v band %d [%v, %v] does not straddle sqrt(27)", inc, dir, b.Order, b.Inner, b.Outer)
				}
			}
			last := bands[len(bands)-1].Demagnified
			t.Logf("i=%v dir=%v: width ratios %.5f %.5f %.5f %.5f (e^-π = %.5f)", inc, dir,
				bands[1].Demagnified, bands[2].Demagnified, bands[3].Demagnified, bands[4].Demagnified, math.Exp(-math.Pi))
			if math.Abs(last/math.Exp(-math.Pi)-1) > 0.01 {
				t.Errorf("i=%v dir=%v: ratio of bands 5/4 = %v, want e^-π = %v within 1%%", inc, dir, last, math.Exp(-math.Pi))
			}
		}
	}
}
