package pixels

import (
	"context"
	"math"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// timedFrame renders a small frame with time delays.
func timedFrame(t *testing.T, spin, inc float64, w int) *Frame {
	t.Helper()
	s := scene.Default()
	s.Hole.Spin, s.Observer.InclinationDeg = spin, inc
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = w, w, 36
	s.Disk.Opaque = false
	s.Output.Maps = []string{"delay"}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	f, err := Render(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	if f.T == nil {
		t.Fatal("frame without time delays")
	}
	return f
}

// findImage solves for the screen point whose order-0 photon leaves the
// disk at (r, φ mod 2π), by Newton's method on (α, β) with a
// finite-difference Jacobian, from a start point: an independent way to
// pair the images of one disk point.
func findImage(o raytrace.Observer, r, phi, alpha, beta float64) (raytrace.Timing, bool) {
	var p raytrace.TimedPath
	eval := func(a, b float64) (float64, float64, raytrace.Timing, bool) {
		o.TraceTimed(a, b, 1, &p)
		if len(p.Crossings) == 0 {
			return 0, 0, raytrace.Timing{}, false
		}
		return math.Log(p.Crossings[0].R / r), math.Remainder(p.Times[0].DeltaPhi-phi, 2*math.Pi), p.Times[0], true
	}
	for it := 0; it < 30; it++ {
		f1, f2, tm, ok := eval(alpha, beta)
		if !ok {
			return tm, false
		}
		if math.Abs(f1) < 1e-12 && math.Abs(f2) < 1e-12 {
			return tm, true
		}
		const h = 1e-6
		a1, a2, _, ok1 := eval(alpha+h, beta)
		b1, b2, _, ok2 := eval(alpha, beta+h)
		if !ok1 || !ok2 {
			return tm, false
		}
		j11, j21 := (a1-f1)/h, (a2-f2)/h
		j12, j22 := (b1-f1)/h, (b2-f2)/h
		det := j11*j22 - j12*j21
		if det == 0 {
			return tm, false
		}
		alpha -= (f1*j22 - f2*j12) / det
		beta -= (j11*f2 - j21*f1) / det
	}
	return raytrace.Timing{}, false
}

// TestSubimageDelayAgainstDirectSearch: the binned pairing of
// SubimageDelay against pairing each order-1 pixel with the order-0
// photon found by root-finding on the screen (findImage), which shares
// only the tracer with it.
func TestSubimageDelayAgainstDirectSearch(t *testing.T) {
	for _, c := range [][2]float64{{0, 60}, {0.9, 30}} {
		f := timedFrame(t, c[0], c[1], 96)
		dt := f.SubimageDelay(1)
		checked, worst := 0, 0.0
		for k := 0; k < f.W*f.H && checked < 25; k += 7 {
			if math.IsNaN(float64(dt[k])) {
				continue
			}
			r, phi := float64(f.R[1][k]), float64(f.Phi[1][k])
			// Start from the order-0 pixel nearest the disk point.
			best, bk := math.Inf(1), -1
			for q := range f.R[0] {
				if math.IsNaN(float64(f.R[0][q])) {
					continue
				}
				d := math.Abs(math.Log(float64(f.R[0][q])/r)) + math.Abs(math.Remainder(float64(f.Phi[0][q])-phi, 2*math.Pi))
				if d < best {
					best, bk = d, q
				}
			}
			tm, ok := findImage(f.Model.Obs, r, phi, PixelAlpha(f.Res, bk%f.W), PixelBeta(f.Res, bk/f.W))
			if !ok {
				continue
			}
			want := float64(f.T[1][k]) - tm.Delay
			e := math.Abs(float64(dt[k]) - want)
			worst = math.Max(worst, e/want)
			checked++
			if e > 1e-6*want {
				t.Errorf("a=%v i=%v pixel %d (r=%.4g φ=%.4g): subimage delay %.6g M, direct search %.6g M", c[0], c[1], k, r, phi, dt[k], want)
			}
		}
		if checked < 10 {
			t.Fatalf("a=%v i=%v: only %d pixels checked", c[0], c[1], checked)
		}
		t.Logf("a=%v i=%v: %d pixels, worst relative difference %.2e", c[0], c[1], checked, worst)
	}
}

// TestDelayFaceOnAxisymmetric: seen face-on the disk is axisymmetric (the
// Kerr metric and a face-on observer share the spin axis; common practice), so
// the delay of the first image can depend only on the source radius:
// within each thin annulus of r the first-seen delays agree (to the
// change of t across the annulus, a few times its width).
func TestDelayFaceOnAxisymmetric(t *testing.T) {
	f := timedFrame(t, 0.7, 0, 80)
	type acc struct{ lo, hi float64 }
	bins := map[int]*acc{}
	const width = 0.05 // M
	for k := range f.First {
		o := f.First[k]
		if o != 0 {
			continue
		}
		r, d := float64(f.R[0][k]), float64(f.T[0][k])
		b := int(r / width)
		a := bins[b]
		if a == nil {
			a = &acc{d, d}
			bins[b] = a
		}
		a.lo, a.hi = math.Min(a.lo, d), math.Max(a.hi, d)
	}
	if len(bins) < 50 {
		t.Fatalf("only %d annuli", len(bins))
	}
	for b, a := range bins {
		if a.hi-a.lo > 3*width {
			t.Errorf("annulus r ≈ %.2f M: first-seen delays span %.4g M", float64(b)*width, a.hi-a.lo)
		}
	}
}
