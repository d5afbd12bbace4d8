package pixels

import (
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// BenchmarkShade and BenchmarkShadeStokes compare the cost of one photon
// without and with the polarisation carried to the screen.
func BenchmarkShade(b *testing.B)       { benchShade(b, false) }
func BenchmarkShadeStokes(b *testing.B) { benchShade(b, true) }

func benchShade(b *testing.B, stokes bool) {
	s := scene.Default()
	s.Disk.Opaque = false
	r, err := s.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	m, err := NewModel(r)
	if err != nil {
		b.Fatal(err)
	}
	m.Stokes = stokes
	p := raytrace.Path{Crossings: make([]raytrace.Crossing, 0, m.Orders)}
	var smp Sample
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		x := float64(i%97)/97*24 - 12
		m.Shade(x, 5-x/3, &p, &smp)
	}
}
