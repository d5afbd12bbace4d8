package spot

import (
	"context"
	"testing"

	"kerrscope/scene"
)

// benchScene is a 256² movie of 64 frames.
func benchScene(b *testing.B) (scene.Resolved, scene.SpotEmission) {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 256, 256, 30
	s.Observer.InclinationDeg = 70
	r, err := s.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	sp, err := scene.ResolveSpot(r)
	if err != nil {
		b.Fatal(err)
	}
	return r, sp
}

// BenchmarkMovieTrace is the one timed trace of a 256² screen.
func BenchmarkMovieTrace(b *testing.B) {
	r, sp := benchScene(b)
	for b.Loop() {
		if _, err := Trace(context.Background(), r, sp, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkMovieFrames samples the 64 frames of a traced 256² screen
// (snapshot, spectrum, brightest pixel): compare with BenchmarkMovieTrace.
func BenchmarkMovieFrames(b *testing.B) {
	r, sp := benchScene(b)
	tb, err := Trace(context.Background(), r, sp, nil)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		tb.Movie(context.Background())
	}
}

// BenchmarkMovie is the whole 256² movie of 64 frames: one trace plus
// the frames.
func BenchmarkMovie(b *testing.B) {
	r, sp := benchScene(b)
	for b.Loop() {
		tb, err := Trace(context.Background(), r, sp, nil)
		if err != nil {
			b.Fatal(err)
		}
		tb.Movie(context.Background())
	}
}
