package raytrace

import (
	"math"
	"testing"
)

// FuzzTrace asserts the invariants of checkInvariants over arbitrary
// (spin, inclination, α, β); out-of-range spins and inclinations must be
// refused by NewObserver, never traced.
func FuzzTrace(f *testing.F) {
	f.Add(0.9, 60.0, -3.1, 4.2)
	f.Add(0.0, 90.0, 5.196152422706632, 0.0)
	f.Add(0.999999999, 75.0, -2.0705, 0.5)
	f.Add(-0.5, 0.0, 0.0, 0.0)
	f.Add(0.3, 180.0, 1e-13, -7.0)
	f.Fuzz(func(t *testing.T, a, inc, alpha, beta float64) {
		o, err := NewObserver(a, inc)
		if err != nil {
			if a > -1 && a < 1 && inc >= 0 && inc <= 180 {
				t.Fatalf("valid observer refused: %v", err)
			}
			return
		}
		if math.IsNaN(alpha) || math.IsNaN(beta) || math.Abs(alpha) > 1e6 || math.Abs(beta) > 1e6 {
			return // the screen is finite; callers validate their windows
		}
		var p Path
		o.Trace(alpha, beta, 5, &p)
		checkInvariants(t, o, alpha, beta, &p)
	})
}
