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
