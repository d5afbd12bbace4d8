package sweep

import (
	"context"
	"math"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/scene"
)

// A handful of extreme pixels (light from just outside the horizon, or a
// beamed spot 1000 times brighter) does not move the pooled pre-pass
// ranges at the default percentile, while the whole range (percentile 0)
// follows them: the redshift floor collapses to the extreme value.
func TestPrepassRobustToExtremePixels(t *testing.T) {
	const area = 0.09 // M² per pixel
	var gs, is []maps.Sample
	for i := 0; i < 20000; i++ {
		x := float64(i) / 19999
		gs = append(gs, maps.Sample{V: 0.45 + 0.8*x, W: area}) // g from 0.45 to 1.25
		is = append(is, maps.Sample{V: 1e-3 * (1 + 9*x), W: area})
	}
	extreme := func(gs, is []maps.Sample) ([]maps.Sample, []maps.Sample) {
		g, in := append([]maps.Sample(nil), gs...), append([]maps.Sample(nil), is...)
		for i := 0; i < 6; i++ {
			g = append(g, maps.Sample{V: 0.0064, W: area})
			in = append(in, maps.Sample{V: 10, W: area})
		}
		return g, in
	}
	pct := scene.DefaultSweepPercentile
	clean := prepassScales(maps.Scales{}, append([]maps.Sample(nil), gs...), append([]maps.Sample(nil), is...), 1, pct)
	g2, i2 := extreme(gs, is)
	dirty := prepassScales(maps.Scales{}, g2, i2, 1, pct)
	if clean != dirty {
		t.Errorf("6 extreme pixels of 20006 moved the scales: %+v → %+v", clean, dirty)
	}
	// The 0.5th percentile of g over 0.45…1.25 is 0.454, times 0.97 and
	// rounded down to two digits: 0.44; the 99.5th, 1.246 × 1.03 up: 1.3.
	if clean.GMin != 0.44 || clean.GMax != 1.3 {
		t.Errorf("g range %v–%v, want 0.44–1.3", clean.GMin, clean.GMax)
	}
	g3, i3 := extreme(gs, is)
	whole := prepassScales(maps.Scales{}, g3, i3, 1, 0)
	if want := roundSig(0.0064*0.97, false); whole.GMin != want || whole.IMax != 15 {
		t.Errorf("percentile 0: g min %v, intensity max %v; want %v and 15 (the extremes)", whole.GMin, whole.IMax, want)
	}
	// Fixed ends are kept.
	if got := prepassScales(maps.Scales{GMin: 0.2, IMax: 7}, g3, i3, 1, pct); got.GMin != 0.2 || got.IMax != 7 || got.GMax != 1.3 {
		t.Errorf("fixed ends: %+v", got)
	}
}

// The pre-pass of a real sweep uses the default percentile unless the
// scene gives one, and its redshift floor is then never below the floor
// of the whole range.
func TestPrepassPercentileOfScene(t *testing.T) {
	p := testPlan(t, t.TempDir(), []string{"spin=0.5:0.998:3"}, nil, maps.Scales{})
	if got := p.Percentile(); got != scene.DefaultSweepPercentile {
		t.Errorf("default percentile %v", got)
	}
	robust, err := p.chooseScales(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	zero := 0.0
	q := testPlan(t, t.TempDir(), []string{"spin=0.5:0.998:3"}, func(s *scene.Scene) { s.Scales.Percentile = &zero }, maps.Scales{})
	whole, err := q.chooseScales(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	if !(robust.GMin >= whole.GMin && robust.GMax <= whole.GMax && robust.IMax <= whole.IMax) || math.IsNaN(robust.GMin) {
		t.Errorf("percentile %v scales %+v reach beyond the whole range %+v", scene.DefaultSweepPercentile, robust, whole)
	}
	t.Logf("g %v–%v (whole range %v–%v)", robust.GMin, robust.GMax, whole.GMin, whole.GMax)
}
