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

// BenchmarkTraceGrid traces the pixel centres of a 256² screen of the
// default scene (a = 0.9, 60°, field of view 40 M, 3 crossings) on one
// goroutine and reports rays per second per core: the regression
// benchmark of the hot path (keep it above 1.8 M rays/s on the build
// machine).
//
//	go test ./raytrace -run X -bench TraceGrid -benchtime 20x
func BenchmarkTraceGrid(b *testing.B) {
	p := Path{Crossings: make([]Crossing, 0, 3)}
	benchGrid(b, func(o Observer, alpha, beta float64) { o.Trace(alpha, beta, 3, &p) })
}

// BenchmarkTraceGridTimed is BenchmarkTraceGrid with the time delay and
// azimuth of every crossing (TraceTimed).
func BenchmarkTraceGridTimed(b *testing.B) {
	p := TimedPath{Path: Path{Crossings: make([]Crossing, 0, 3)}, Times: make([]Timing, 0, 3)}
	benchGrid(b, func(o Observer, alpha, beta float64) { o.TraceTimed(alpha, beta, 3, &p) })
}

// benchGrid runs trace over the 256² grid of BenchmarkTraceGrid and
// reports rays/s and ns/ray.
func benchGrid(b *testing.B, trace func(o Observer, alpha, beta float64)) {
	const n, fov = 256, 40.0
	o, err := NewObserver(0.9, 60)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		for j := 0; j < n; j++ {
			beta := (float64(n)/2 - float64(j) - 0.5) * fov / n
			for i := 0; i < n; i++ {
				trace(o, (float64(i)+0.5-float64(n)/2)*fov/n, beta)
			}
		}
	}
	rays := float64(b.N) * n * n
	b.ReportMetric(rays/b.Elapsed().Seconds(), "rays/s")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/rays, "ns/ray")
}
