package sweep

import (
	"math"
	"strings"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/scene"
)

// TestSweepLineWeight: a sweep varies a line's weight by the key
// lines.N.weight; every frame resolves with that weight (the fractions
// follow), the base scene's list is left as it was, and a line the scene
// does not have is refused naming the key.
func TestSweepLineWeight(t *testing.T) {
	base := scene.Default()
	base.Screen.Width, base.Screen.Height = 8, 8
	base.Output.Directory = t.TempDir()
	base.Lines = []scene.Line{{EnergyKeV: 6.4}, {EnergyKeV: 6.97}}
	a, err := ParseAxis("lines.2.weight=0:3:4")
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewPlan(base, []Axis{a}, maps.Scales{})
	if err != nil {
		t.Fatal(err)
	}
	for i, pt := range p.Points {
		w := float64(i) // 0, 1, 2, 3
		ls := pt.Scene.RestLines
		if got := ls.Lines[1].Weight; got != w {
			t.Errorf("frame %d: weight %v, want %v", i, got, w)
		}
		if want := w / (1 + w); math.Abs(ls.Lines[1].Fraction-want) > 1e-15 {
			t.Errorf("frame %d: fraction %v, want %v", i, ls.Lines[1].Fraction, want)
		}
	}
	if base.Lines[1].Weight != nil {
		t.Error("the sweep changed the base scene's list")
	}
	if q := scene.QuantityOf(a.Key); !strings.Contains(p.valueLabel([]float64{2}), q.Symbol+" = 2") {
		t.Errorf("label %q", p.valueLabel([]float64{2}))
	}
	a3, err := ParseAxis("lines.3.weight=0:1:2")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := NewPlan(base, []Axis{a3}, maps.Scales{}); err == nil || !strings.Contains(err.Error(), "lines.3.weight") {
		t.Errorf("line 3 of 2: %v", err)
	}
}
