package raytrace

import (
	"math/rand/v2"
	"testing"
)

type benchRay struct {
	o           Observer
	alpha, beta float64
}

func benchRays(n int) []benchRay {
	rng := rand.New(rand.NewPCG(1, 2))
	rays := make([]benchRay, n)
	for i := range rays {
		o, _ := NewObserver(-0.999+1.998*rng.Float64(), 180*rng.Float64())
		rays[i] = benchRay{o, -15 + 30*rng.Float64(), -15 + 30*rng.Float64()}
	}
	return rays
}

// BenchmarkTrace: closed form, first three crossings, random rays.
func BenchmarkTrace(b *testing.B) {
	rays := benchRays(4096)
	p := Path{Crossings: make([]Crossing, 0, 3)}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		r := &rays[i&4095]
		r.o.Trace(r.alpha, r.beta, 3, &p)
		i++
	}
}

// BenchmarkIntegrate: the Dormand–Prince check at tolerance 1e-12.
func BenchmarkIntegrate(b *testing.B) {
	rays := benchRays(256)
	p := Path{Crossings: make([]Crossing, 0, 3)}
	i := 0
	for b.Loop() {
		r := &rays[i&255]
		_ = r.o.Integrate(r.alpha, r.beta, 3, 1e-12, &p)
		i++
	}
}

// BenchmarkTraceTimed: as BenchmarkTrace, with the time delay and azimuth
// of every crossing (TraceTimed).
func BenchmarkTraceTimed(b *testing.B) {
	rays := benchRays(4096)
	p := TimedPath{Path: Path{Crossings: make([]Crossing, 0, 3)}, Times: make([]Timing, 0, 3)}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		r := &rays[i&4095]
		r.o.TraceTimed(r.alpha, r.beta, 3, &p)
		i++
	}
}
