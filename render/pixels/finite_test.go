package pixels

import (
	"testing"

	"kerrscope/scene"
)

// TestExtremeAllowedIndexIsFinite renders at the steepest rising
// emissivity the scene accepts for the default disk: every map and the
// spectrum must be finite.
func TestExtremeAllowedIndexIsFinite(t *testing.T) {
	qmax, _ := scene.Emissivity{Kind: scene.PowerLaw}.IndexLimits(30)
	for _, q := range []float64{-qmax, qmax} {
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height = 24, 24
			s.Emission.Index = q
			s.Emission.Limb = "laor"
			s.Observer.InclinationDeg = 85
			s.Hole.Spin = 0.998
		})
		f := render(t, r)
		if _, err := CheckFinite(f); err != nil {
			t.Errorf("q = %v: %v", q, err)
		}
	}
}
