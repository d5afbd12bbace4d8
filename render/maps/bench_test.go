package maps

import (
	"context"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// BenchmarkImage draws each map's pixel-exact image of a 512² frame
// (a = 0.94, 63°, 3 orders), scales fixed beforehand.
//
//	go test ./render/maps -run X -bench Image
func BenchmarkImage(b *testing.B) {
	s := scene.Default()
	s.Hole.Spin, s.Observer.InclinationDeg = 0.94, 63
	s.Screen.Width, s.Screen.Height = 512, 512
	r, err := s.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		b.Fatal(err)
	}
	sc := Scales{}.Fill(f)
	for _, name := range scene.MapNames {
		m, _ := Lookup(name)
		b.Run(name, func(b *testing.B) {
			for b.Loop() {
				m.Image(f, sc)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(f.W*f.H), "ns/pixel")
		})
	}
}
