package sweep

import (
	"context"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/scene"
)

// BenchmarkSpinSweep is a 60-frame spin sweep at 256×256 pixels, a from
// 0.5 to 0.999999 with 1 − a log-spaced, followed by its merge. Timed:
// the scale pre-pass (16 frames at 96 px), tracing the 60 frames, per
// frame the redshift map as pixel-exact and palette PNG and the spectrum
// CSV, the manifest rewrites, then the merge (hash check of every file,
// the redshift GIF, the spectra plot, the frame table). Decorated
// figures and FITS are left out: at this size they cost more than the
// tracing (about 1 s per frame for all five maps).
//
//	go test ./render/sweep -run X -bench SpinSweep -benchtime 1x
func BenchmarkSpinSweep(b *testing.B) {
	a, err := ParseAxis("spin=0.5:0.999999:60:log1m")
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		s := scene.Default()
		s.Screen.Width, s.Screen.Height = 256, 256
		s.Output.Directory = b.TempDir()
		s.Output.Maps = []string{"redshift"}
		s.Output.Formats = []string{"bare", "csv"}
		p, err := NewPlan(s, []Axis{a}, maps.Scales{})
		if err != nil {
			b.Fatal(err)
		}
		if _, err := Run(context.Background(), p, Options{}); err != nil {
			b.Fatal(err)
		}
		if _, err := Merge(context.Background(), p.Dir(), MergeOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
