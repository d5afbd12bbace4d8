package maps

import (
	"context"
	"image"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// BenchmarkImage draws each map's pixel-exact image of a 512² frame
// (a = 0.94, 63°, 3 orders), scales fixed beforehand, into one image
// reused from draw to draw.
//
//	go test ./render/maps -run X -bench Image
func BenchmarkImage(b *testing.B) { benchImage(b, 512, scene.MapNames) }

// BenchmarkImage2048 is BenchmarkImage at 2048² for the maps of a
// default run.
func BenchmarkImage2048(b *testing.B) {
	benchImage(b, 2048, []string{"redshift", "intensity", "radius", "order", "shadow"})
}

func benchImage(b *testing.B, n int, names []string) {
	s := scene.Default()
	s.Hole.Spin, s.Observer.InclinationDeg = 0.94, 63
	s.Screen.Width, s.Screen.Height = n, n
	r, err := s.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		b.Fatal(err)
	}
	sc := Scales{}.Fill(f)
	for _, name := range names {
		m, _ := Lookup(name)
		b.Run(name, func(b *testing.B) {
			img := image.NewRGBA(image.Rect(0, 0, f.W, f.H)) // reused, as the outputs do
			for b.Loop() {
				m.Draw(img, f, sc)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(f.W*f.H), "ns/pixel")
		})
	}
}
