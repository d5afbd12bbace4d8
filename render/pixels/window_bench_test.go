package pixels

import (
	"context"
	"testing"

	"kerrscope/scene"
)

// BenchmarkFrameWindow is the framing pass of the default scene (512²),
// which runs before every render with an automatic window; compare
// BenchmarkRenderDefault, the render itself.
func BenchmarkFrameWindow(b *testing.B) {
	r, err := scene.Default().Resolve()
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := FrameWindow(context.Background(), r); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRenderDefault renders the default scene in its framed window.
func BenchmarkRenderDefault(b *testing.B) {
	r, err := scene.Default().Resolve()
	if err != nil {
		b.Fatal(err)
	}
	if r, err = FrameWindow(context.Background(), r); err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := Render(context.Background(), r, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCheckFinite is the finite check of a 2048² frame of the
// default run (a = 0.94, 63°, every record kept), the spectrum's
// collapse included, and BenchmarkCheckFinite/records the records alone.
//
//	go test ./render/pixels -run X -bench CheckFinite -benchtime 10x
func BenchmarkCheckFinite(b *testing.B) {
	s := scene.Default()
	s.Hole.Spin, s.Observer.InclinationDeg = 0.94, 63
	s.Screen.Width, s.Screen.Height = 2048, 2048
	r, err := s.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	f, err := Render(context.Background(), r, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.Run("all", func(b *testing.B) {
		for b.Loop() {
			if _, err := CheckFinite(f); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("records", func(b *testing.B) {
		g := *f
		g.G, g.Line = nil, nil // no spectrum then
		for b.Loop() {
			if _, err := CheckFinite(&g); err != nil {
				b.Fatal(err)
			}
		}
	})
}
