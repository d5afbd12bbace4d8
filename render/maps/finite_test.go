package maps

import (
	"math"
	"testing"

	"kerrscope/scene"
)

// TestColourBarTicksTerminate draws the colour-bar ticks of every map
// with scales that are infinite, NaN or span all of float64: each call
// returns, with ticks on the bar.
func TestColourBarTicksTerminate(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	for _, c := range [][2]float64{{inf, inf}, {0, 1}, {nan, 1}, {1, nan}, {1e-300, 1e300}, {5e-324, math.MaxFloat64}, {-1, 1}, {2, 1}} {
		if n := len(decadeTicks(c[0], c[1])); n > maxTickDecades {
			t.Errorf("decadeTicks(%v): %d ticks", c, n)
		}
		if n := len(logTicks(c[0], c[1])); n > 3*maxTickDecades+2 {
			t.Errorf("logTicks(%v): %d ticks", c, n)
		}
	}
	if got := decadeTicks(0.01, 100); len(got) != 5 || got[0] != 0.01 || got[4] != 100 {
		t.Errorf("decadeTicks(0.01, 100) = %v", got)
	}
	f := renderDefault(t, func(s *scene.Scene) { s.Screen.Width, s.Screen.Height = 8, 8 })
	for _, sc := range []Scales{
		{IMax: inf}, {IMax: 1e308}, {IMax: 1, IDecades: 1e308}, {IMax: nan}, {IMax: 5e-324, IDecades: 30},
		{GMin: nan, GMax: inf}, {GMin: 5e-324, GMax: 1e308}, {RMin: 5e-324, RMax: 1e308}, {RMin: 1, RMax: inf},
	} {
		for _, scale := range []string{"log", "linear"} {
			f.Res.Output.IntensityScale = scale
			for _, m := range table {
				p := m.Panel(f, sc)
				if p.Bar == nil {
					continue
				}
				for _, tk := range p.Bar.Ticks {
					if !(tk.T >= 0 && tk.T <= 1) {
						t.Errorf("%s %+v: tick %q at %v", m.Name, sc, tk.Label, tk.T)
					}
				}
				if len(p.Bar.Ticks) > 3*maxTickDecades+2 {
					t.Errorf("%s %+v: %d ticks", m.Name, sc, len(p.Bar.Ticks))
				}
			}
		}
	}
}
