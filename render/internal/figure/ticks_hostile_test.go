package figure

import (
	"math"
	"testing"
)

// TestTickLoopsTerminate checks that the tick layout returns, with a
// bounded number of ticks, for ranges that are infinite, NaN, empty,
// reversed or span all of float64.
func TestTickLoopsTerminate(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	// Decades of the extremes of IEEE 754 binary64: the smallest subnormal
	// 4.9e-324 and the largest finite 1.8e308 (IEEE 754-2008, table 3.5).
	for _, c := range []struct {
		x    float64
		want int
	}{{5e-324, -324}, {math.MaxFloat64, 308}, {1e-300, -300}, {inf, 0}, {-inf, 0}, {nan, 0}, {0, 0}, {-5, 0}} {
		if got := decade(c.x); got != c.want {
			t.Errorf("decade(%v) = %d, want %d", c.x, got, c.want)
		}
	}
	ranges := [][2]float64{
		{0, inf}, {-inf, inf}, {nan, 1}, {1, nan}, {nan, nan}, {inf, inf}, {0, 0}, {5, 1},
		{-1, 1}, {0, 1e308}, {5e-324, math.MaxFloat64}, {1e-300, 1e300}, {-math.MaxFloat64, math.MaxFloat64},
	}
	for _, r := range ranges {
		for _, n := range []int{0, 1, 10, 1000} {
			if ts := niceTicks(r[0], r[1], n); len(ts.values) > 1001 {
				t.Errorf("niceTicks(%v, %d): %d ticks", r, n, len(ts.values))
			}
			if s := linearScale(r[0], r[1], n, "x [m]", false); len(s.ticks) > 1001 {
				t.Errorf("linearScale(%v, %d): %d ticks", r, n, len(s.ticks))
			}
			s := logScale(r[0], r[1], n, "y")
			if len(s.ticks) > 640 || len(s.minor) > 640 {
				t.Errorf("logScale(%v, %d): %d ticks, %d minor", r, n, len(s.ticks), len(s.minor))
			}
			for _, tk := range s.ticks {
				if !(tk.f >= -1e-9 && tk.f <= 1+1e-9) {
					t.Errorf("logScale(%v, %d): tick at fraction %v", r, n, tk.f)
				}
			}
		}
	}
}
