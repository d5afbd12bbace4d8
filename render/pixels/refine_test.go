package pixels

import (
	"context"
	"math"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

func TestRefinementBeatsUniform(t *testing.T) {
	// The refined spectrum must match a uniform 4096² render of the same
	// scene to L1 ≤ 1% with at most 1/8 of its photons (the L1 measure of
	// TestSpectrumConverges; common practice for adaptive sampling).
	if testing.Short() {
		t.Skip("renders 4096²")
	}
	ref, err := Render(context.Background(), demoAt(t, 4096), nil)
	if err != nil {
		t.Fatal(err)
	}
	rs := ref.Spectrum()
	want := rs.Total()
	refPhotons := ref.Photons
	ref = nil
	_, s, st, err := RenderRefined(context.Background(), demoAt(t, 256), Refinement{Depth: 4, TolR: 0.05, TolG: 0.01}, false, nil)
	photons := st.Photons
	if err != nil {
		t.Fatal(err)
	}
	e := l1(s.Total(), want)
	t.Logf("refined 256² depth 4: L1 %.4f with %d photons (%.3f of the uniform 4096² reference's %d)", e, photons, float64(photons)/float64(refPhotons), refPhotons)
	if e > 0.01 || photons*8 > refPhotons {
		t.Errorf("refinement L1 %.4f with %d photons; want ≤ 0.01 with ≤ %d", e, photons, refPhotons/8)
	}
}

func TestRefinedFrameBookkeeping(t *testing.T) {
	// The refined spectrum holds exactly the flux of the area-weighted
	// pixel means (flux = Σ I ΔΩ, Cunningham 1975), and the captured area of a = 0
	// approaches π·27 (Synge 1966) closer than one photon per pixel does.
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin = 0
		s.Observer.InclinationDeg = 40
		s.Screen.Width, s.Screen.Height = 48, 48
		s.Screen.FieldOfView = 14
		s.Disk.Opaque = false
		lo, hi := 0.1, 20.0
		s.Spectrum.MinKeV, s.Spectrum.MaxKeV = &lo, &hi
	})
	f, spec, st, err := RenderRefined(context.Background(), r, Refinement{Depth: 5, TolR: 0.02, TolG: 0.005}, true, nil)
	if err != nil {
		t.Fatal(err)
	}
	if f.Photons != st.Photons || st.Photons <= 49*49 {
		t.Errorf("photons %d / %d", f.Photons, st.Photons)
	}
	sum := 0.0
	for o := 0; o < f.Orders; o++ {
		for _, v := range f.Line[o] {
			if !math.IsNaN(float64(v)) {
				sum += float64(v)
			}
		}
	}
	sum *= r.PixelSize * r.PixelSize
	got := spec.Sum() + spec.Below + spec.Above
	if math.Abs(got-sum) > 1e-5*sum {
		t.Errorf("refined spectrum holds %v, pixel means %v", got, sum)
	}
	u := render(t, r)
	n := 0
	for _, v := range u.Fate {
		if v == raytrace.Captured {
			n++
		}
	}
	want := 27 * math.Pi
	eu := math.Abs(float64(n)*r.PixelSize*r.PixelSize - want)
	er := math.Abs(st.CapturedArea - want)
	t.Logf("shadow area error: uniform 48² %.3g M², refined %.3g M² (27π = %.6g)", eu, er, want)
	if !(er < eu/4) {
		t.Errorf("refined shadow area error %v not well below uniform %v", er, eu)
	}
}
