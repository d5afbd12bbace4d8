package outputs

import (
	"bytes"
	"context"
	"image"
	"image/png"
	"io"
	"testing"

	"kerrscope/render/internal/figure"
	"kerrscope/render/maps"
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
func BenchmarkWrite2048(b *testing.B) { benchWrite(b, 2048, Set{Manifest: true}) }

// BenchmarkStage2048 is the output stage of the default 2048² run as
// a run does it: every artifact staged as files in the output directory
// (written, hashed and synced) and committed, from a frame rendered once.
//
//	go test ./render/outputs -run X -bench Stage2048 -benchtime 5x
func BenchmarkStage2048(b *testing.B) {
	r := benchScene(b, 2048)
	f, err := pixels.RenderChecked(context.Background(), r, nil, Needs(Artifacts(r.Output, Set{Manifest: true})))
	if err != nil {
		b.Fatal(err)
	}
	arts := Artifacts(r.Output, Set{Manifest: true})
	for b.Loop() {
		lk, err := Lock(r.Output.Directory)
		if err != nil {
			b.Fatal(err)
		}
		out, err := NewOutputs(context.Background(), lk, "render")
		if err != nil {
			b.Fatal(err)
		}
		if err := Write(context.Background(), arts, Job{Frame: f, Version: "bench"}, out.Write); err != nil {
			b.Fatal(err)
		}
		if _, err := out.Commit(); err != nil {
			b.Fatal(err)
		}
		lk.Unlock()
	}
}

// BenchmarkWriteFrame512 is the output stage of one 512² sweep frame:
// every map as figure, pixel-exact and palette PNG, FITS, spectrum CSV
// and figure.
func BenchmarkWriteFrame512(b *testing.B) {
	benchWrite(b, 512, Set{Prefix: "frame-0000-", Indexed: true})
}

func benchWrite(b *testing.B, n int, set Set) {
	r := benchScene(b, n)
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		b.Fatal(err)
	}
	arts := Artifacts(r.Output, set)
	put := func(_ string, write func(io.Writer) error) error { return write(io.Discard) }
	for b.Loop() {
		if err := Write(context.Background(), arts, Job{Frame: f, Version: "bench"}, put); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEncodePNG compares PNG encoders on the images of a 2048² run:
// the pixel-exact redshift map (smooth colours), the order map (a few
// flat colours) and the decorated redshift figure. "ours" is
// figure.EncodePNG; the others are image/png at its compression levels.
// It reports the file size.
//
//	go test ./render/outputs -run X -bench EncodePNG -benchtime 3x
func BenchmarkEncodePNG(b *testing.B) {
	r := benchScene(b, 2048)
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		b.Fatal(err)
	}
	sc := maps.Scales{}.Fill(f)
	red, _ := maps.Lookup("redshift")
	ord, _ := maps.Lookup("order")
	fig, err := figure.DrawPanel(red.Panel(f, sc), 0)
	if err != nil {
		b.Fatal(err)
	}
	images := []struct {
		name string
		img  image.Image
	}{{"redshift-bare", red.Image(f, sc)}, {"order-bare", ord.Image(f, sc)}, {"redshift-figure", fig}}
	encoders := []struct {
		name string
		enc  func(io.Writer, image.Image) error
	}{
		{"ours", figure.EncodePNG},
		{"png-BestSpeed", (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode},
		{"png-Default", (&png.Encoder{CompressionLevel: png.DefaultCompression}).Encode},
		{"png-Best", (&png.Encoder{CompressionLevel: png.BestCompression}).Encode},
	}
	for _, im := range images {
		for _, e := range encoders {
			b.Run(im.name+"/"+e.name, func(b *testing.B) {
				var size int
				for b.Loop() {
					var buf bytes.Buffer
					if err := e.enc(&buf, im.img); err != nil {
						b.Fatal(err)
					}
					size = buf.Len()
				}
				b.ReportMetric(float64(size)/1024, "KB")
			})
		}
	}
}

// BenchmarkFITS2048 is maps.fits of the default 2048² run (15 maps of
// 16 MiB), encoded to io.Discard.
//
//	go test ./render/outputs -run X -bench FITS2048 -benchtime 5x
func BenchmarkFITS2048(b *testing.B) {
	r := benchScene(b, 2048)
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if err := writeFITS(io.Discard, f, "bench"); err != nil {
			b.Fatal(err)
		}
	}
}
