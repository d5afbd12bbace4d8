package render

import (
	"context"
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"kerrscope/scene"
)

// TestOverflowIsAnErrorNotAnOutput renders a scene whose emissivity,
// set past the validated range, overflows the float32 intensity records:
// Run must fail naming the quantity, order and pixel, and write nothing.
func TestOverflowIsAnErrorNotAnOutput(t *testing.T) {
	for _, scale := range []string{"linear", "log"} {
		dir := t.TempDir()
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height = 16, 16
			s.Output.Directory = dir
			s.Output.IntensityScale = scale
		})
		// 30^40 ≈ 1e59 exceeds the largest float32, 3.4e38.
		r.Emissivity.Q = -40
		_, err := Run(context.Background(), r, Options{Version: "test"})
		var nf *NonFiniteError
		if !errors.As(err, &nf) {
			t.Fatalf("%s scale: error %v, want a *NonFiniteError", scale, err)
		}
		if !strings.Contains(nf.Quantity, "intensity") || nf.Order < -1 || nf.Pixel[0] < 0 || nf.Pixel[1] < 0 || !math.IsInf(nf.Value, 1) {
			t.Errorf("%s scale: %+v", scale, nf)
		}
		if entries, _ := os.ReadDir(dir); len(entries) != 0 {
			t.Errorf("%s scale: the failed run left %v", scale, entries)
		}
	}
}

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
		if err := CheckFinite(f); err != nil {
			t.Errorf("q = %v: %v", q, err)
		}
	}
}

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
	f := render(t, resolve(t, func(s *scene.Scene) { s.Screen.Width, s.Screen.Height = 8, 8 }))
	for _, sc := range []Scales{
		{IMax: inf}, {IMax: 1e308}, {IMax: 1, IDecades: 1e308}, {IMax: nan}, {IMax: 5e-324, IDecades: 30},
		{GMin: nan, GMax: inf}, {GMin: 5e-324, GMax: 1e308}, {RMin: 5e-324, RMax: 1e308}, {RMin: 1, RMax: inf},
	} {
		for _, scale := range []string{"log", "linear"} {
			f.Res.Output.IntensityScale = scale
			for _, m := range scene.MapNames {
				p := f.Panel(m, sc)
				if p.Bar == nil {
					continue
				}
				for _, tk := range p.Bar.Ticks {
					if !(tk.T >= 0 && tk.T <= 1) {
						t.Errorf("%s %+v: tick %q at %v", m, sc, tk.Label, tk.T)
					}
				}
				if len(p.Bar.Ticks) > 3*maxTickDecades+2 {
					t.Errorf("%s %+v: %d ticks", m, sc, len(p.Bar.Ticks))
				}
			}
		}
	}
}
