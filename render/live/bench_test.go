package live

import (
	"context"
	"testing"

	"kerrscope/scene"
)

// benchView is the page's view of the default scene at a 256² view, its
// automatic window framed once (as after the first update of a page).
func benchView(b *testing.B, params map[string]string) (*Server, ViewRequest) {
	b.Helper()
	s, err := New(Config{Base: scene.Default(), OutDir: b.TempDir()})
	if err != nil {
		b.Fatal(err)
	}
	req := ViewRequest{Params: params, Settings: Settings{Map: "redshift", Size: 256}}
	if _, err := s.prepare(context.Background(), req); err != nil {
		b.Fatal(err)
	}
	return s, req
}

// updateOnce is what one update does: validate and frame, the coarse pass
// and the full one (map image, PNG, line profile, critical curve).
func updateOnce(b *testing.B, s *Server, req ViewRequest) {
	ctx := context.Background()
	v, err := s.prepare(ctx, req)
	if err != nil {
		b.Fatal(err)
	}
	if _, err := v.render(ctx, v.size/coarseDivisor, false); err != nil {
		b.Fatal(err)
	}
	if _, err := v.render(ctx, v.size, true); err != nil {
		b.Fatal(err)
	}
}

// BenchmarkUpdate256 is a whole update of a 256² view (a = 0.9, i = 60°,
// three image orders), as when a slider other than spin or inclination
// moves: the framed window is reused.
func BenchmarkUpdate256(b *testing.B) {
	s, req := benchView(b, map[string]string{"index": "2.5"})
	b.ResetTimer()
	for b.Loop() {
		updateOnce(b, s, req)
	}
}

// BenchmarkUpdate256Reframed changes the spin on every update, so that
// every update also frames its automatic window (pixels.FrameWindowAt, liveFramingSide).
func BenchmarkUpdate256Reframed(b *testing.B) {
	s, req := benchView(b, nil)
	spins := []string{"0.5", "0.6", "0.7", "0.8", "0.9", "0.95", "0.99", "0.3"}
	i := 0
	for b.Loop() {
		s.frames = frameCache{}
		req.Params = map[string]string{"spin": spins[i%len(spins)]}
		i++
		updateOnce(b, s, req)
	}
}

// BenchmarkUpdate256Zoomed is an update with a window given (after a
// zoom): no framing at all.
func BenchmarkUpdate256Zoomed(b *testing.B) {
	s, req := benchView(b, map[string]string{"fov": "20", "center-alpha": "-2", "center-beta": "1"})
	for b.Loop() {
		updateOnce(b, s, req)
	}
}

// BenchmarkFullPass256 is the full pass alone.
func BenchmarkFullPass256(b *testing.B) {
	s, req := benchView(b, nil)
	v, err := s.prepare(context.Background(), req)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := v.render(context.Background(), 256, true); err != nil {
			b.Fatal(err)
		}
	}
}
