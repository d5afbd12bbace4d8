package pixels

import (
	"context"
	"math"
	"testing"

	"kerrscope/scene"
)

// l1 returns Σ|a - b| / Σ b over bins.
func l1(a, b []float64) float64 {
	d, s := 0.0, 0.0
	for k := range a {
		d += math.Abs(a[k] - b[k])
		s += b[k]
	}
	return d / s
}

func demoAt(t testing.TB, n int) scene.Resolved {
	s, err := scene.Demo()
	if err != nil {
		t.Fatal(err)
	}
	s.Screen.Width, s.Screen.Height = n, n
	s.Screen.FieldOfView = 64
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestSpectrumConverges(t *testing.T) {
	// One photon per pixel samples the image: the collapsed spectrum must
	// settle as the pixels shrink (common practice for ray-traced profiles).
	if testing.Short() {
		t.Skip("renders up to 1024²")
	}
	var specs [][]float64
	for _, n := range []int{256, 512, 1024} {
		f, err := Render(context.Background(), demoAt(t, n), nil)
		if err != nil {
			t.Fatal(err)
		}
		s := f.Spectrum()
		specs = append(specs, s.Total())
	}
	a, b := l1(specs[0], specs[1]), l1(specs[1], specs[2])
	t.Logf("spectrum L1 change: 256²→512² %.4f, 512²→1024² %.4f", a, b)
	if !(b < a) || b > 0.1 {
		t.Errorf("spectrum does not converge: L1 %.4f then %.4f", a, b)
	}
}

// BenchmarkRender1024 renders a 1024² opaque disk with 3 image orders.
func BenchmarkRender1024(b *testing.B) {
	r := demoAt(b, 1024)
	for b.Loop() {
		if _, err := Render(context.Background(), r, nil); err != nil {
			b.Fatal(err)
		}
	}
}
