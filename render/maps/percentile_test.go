package maps

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// nearestRank is the p-th percentile of equally weighted values by the
// nearest-rank definition, the inverse of the empirical distribution
// function (Hyndman & Fan 1996, Am. Stat. 50, 361, definition 1): the
// value of rank ceil(p/100 · N) in ascending order.
func nearestRank(vals []float64, p float64) float64 {
	s := slices.Clone(vals)
	slices.Sort(s)
	k := int(math.Ceil(p / 100 * float64(len(s))))
	return s[max(k, 1)-1]
}

// Percentiles with equal weights agree with the nearest-rank definition,
// and a weight of n counts as n copies of a value.
func TestPercentiles(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	vals := make([]float64, 1003)
	for i := range vals {
		vals[i] = rng.NormFloat64()
	}
	for _, p := range []float64{0, 0.5, 1, 5, 25, 49.9} {
		var s []Sample
		for _, v := range vals {
			s = append(s, Sample{v, 0.25})
		}
		lo, hi, ok := Percentiles(s, p)
		neg := make([]float64, len(vals))
		for i, v := range vals {
			neg[i] = -v
		}
		wantLo, wantHi := nearestRank(vals, p), -nearestRank(neg, p)
		if p == 0 {
			wantLo, wantHi = slices.Min(vals), slices.Max(vals)
		}
		if !ok || lo != wantLo || hi != wantHi {
			t.Errorf("p = %g: %v–%v, want %v–%v", p, lo, hi, wantLo, wantHi)
		}
	}
	// Weights as copies: 1 (weight 3) and 2..9 (weight 1 each), 11
	// samples of area; the 20th percentile is rank ceil(2.2) = 3 → 1;
	// the 30th, rank ceil(3.3) = 4 → 2.
	w := []Sample{{1, 3}}
	for v := 2.0; v <= 9; v++ {
		w = append(w, Sample{v, 1})
	}
	if lo, _, _ := Percentiles(slices.Clone(w), 20); lo != 1 {
		t.Errorf("20th percentile %v, want 1", lo)
	}
	if lo, _, _ := Percentiles(slices.Clone(w), 30); lo != 2 {
		t.Errorf("30th percentile %v, want 2", lo)
	}
	if _, _, ok := Percentiles([]Sample{{math.NaN(), 1}, {3, 0}}, 1); ok {
		t.Error("no usable sample, yet a range")
	}
}

// A frame's percentile scale: with every disk pixel's g set to known
// values, scales.percentile = 1 puts the redshift range at the 1st and
// 99th percentile of them by area (independently, the nearest rank of
// the sorted values, all pixels having one area), while 0 keeps the
// absolute extremes, which a handful of near-horizon values set.
func TestAutoScalesPercentile(t *testing.T) {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 64, 48, 70
	s.Output.Maps = []string{"redshift", "intensity"}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	f, err := pixels.RenderScene(context.Background(), r, nil, pixels.KeepG|pixels.KeepLine)
	if err != nil {
		t.Fatal(err)
	}
	var disk []int
	for k := range f.First {
		if f.First[k] >= 0 {
			disk = append(disk, k)
		}
	}
	if len(disk) < 300 {
		t.Fatalf("only %d disk pixels", len(disk))
	}
	var gs []float64
	for i, k := range disk {
		g := 0.5 + 0.8*float64(i)/float64(len(disk)-1) // 0.5 … 1.3
		if i%211 == 5 {
			g = 0.0064 // a few pixels of light from just outside the horizon
		}
		f.G[f.First[k]][k] = float32(g)
		gs = append(gs, float64(float32(g)))
	}
	auto := AutoScales(f)
	if want := float64(float32(0.0064)); auto.GMin != want {
		t.Errorf("percentile 0: g min %v, want the smallest value %v", auto.GMin, want)
	}
	f.Res.Scales.Percentile = new(float64)
	*f.Res.Scales.Percentile = 1
	sc := AutoScales(f)
	neg := make([]float64, len(gs))
	for i, v := range gs {
		neg[i] = -v
	}
	if lo, hi := nearestRank(gs, 1), -nearestRank(neg, 1); sc.GMin != lo || sc.GMax != hi {
		t.Errorf("percentile 1: g %v–%v, want %v–%v", sc.GMin, sc.GMax, lo, hi)
	}
	if sc.GMin < 0.5 {
		t.Errorf("percentile 1: g min %v still set by the %d extreme pixels", sc.GMin, len(disk)/211+1)
	}
	// The scene's fixed ends win over the frame's choice, each on its own.
	g := 0.3
	f.Res.Scales.GMin = &g
	if got := (Scales{}).Fill(f); got.GMin != 0.3 || got.GMax != sc.GMax {
		t.Errorf("fixed g min: %v–%v, want 0.3–%v", got.GMin, got.GMax, sc.GMax)
	}
}

// The full ranges AutoScales takes at percentile 0 without gathering
// samples are those of Percentiles over the gathered samples.
func TestExtremesArePercentileZero(t *testing.T) {
	f := renderDefault(t, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 64, 48, 50
		s.Disk.Opaque = false
	})
	for name, c := range map[string]struct {
		fast    func(*pixels.Frame) (float64, float64, bool)
		samples func([]Sample, *pixels.Frame) []Sample
	}{"g": {gExtremes, GSamples}, "intensity": {intensityExtremes, IntensitySamples}} {
		lo, hi, ok := c.fast(f)
		wlo, whi, wok := Percentiles(c.samples(nil, f), 0)
		if !ok || !wok || lo != wlo || hi != whi {
			t.Errorf("%s: extremes %v … %v (%v), percentile 0 %v … %v (%v)", name, lo, hi, ok, wlo, whi, wok)
		}
	}
}
