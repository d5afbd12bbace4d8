package outputs

import (
	"context"
	"io"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// benchScene is the scene of the output benchmarks: a = 0.94 seen at 63°,
// 3 image orders, the disk to 30 M, every map and format, n × n pixels.
func benchScene(b testing.TB, n int, formats ...string) scene.Resolved {
	b.Helper()
	s := scene.Default()
	s.Hole.Spin, s.Observer.InclinationDeg = 0.94, 63
	s.Screen.Width, s.Screen.Height = n, n
	s.Output.Directory = b.TempDir()
	if len(formats) > 0 {
		s.Output.Formats = formats
	}
	r, err := s.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	return r
}

func benchRun(b *testing.B, r scene.Resolved) {
	for b.Loop() {
		if _, err := Run(context.Background(), r, Options{Version: "bench"}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRun2048 is a whole default run at 2048²: trace, every map as
// figure and pixel-exact PNG, FITS, spectrum CSV and figure, manifest.
//
//	go test ./render/outputs -run X -bench Run2048 -benchtime 1x
func BenchmarkRun2048(b *testing.B) { benchRun(b, benchScene(b, 2048)) }

// BenchmarkRun2048Spectrum is the same scene with the spectrum CSV only:
// the trace and the spectrum, the reference the whole run is measured
// against.
func BenchmarkRun2048Spectrum(b *testing.B) { benchRun(b, benchScene(b, 2048, "csv")) }

// BenchmarkWrite2048 is the output stage alone: every artifact of the
// default 2048² run, from a frame rendered once, written to io.Discard.
//
//	go test ./render/outputs -run X -bench Write2048 -benchtime 3x -cpuprofile cpu.out
func BenchmarkWrite2048(b *testing.B) {
	r := benchScene(b, 2048)
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		b.Fatal(err)
	}
	arts := Artifacts(r.Output, Set{Manifest: true})
	put := func(_ string, write func(io.Writer) error) error { return write(io.Discard) }
	for b.Loop() {
		if err := Write(context.Background(), arts, Job{Frame: f, Version: "bench"}, put); err != nil {
			b.Fatal(err)
		}
	}
}
