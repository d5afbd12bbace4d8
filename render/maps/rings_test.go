package maps

import (
	"context"
	"math"
	"slices"
	"testing"

	"kerrscope/raytrace/survey"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// ringScene is a disk that fills every lensing band: transparent or
// opaque, from just outside the horizon (plunging gas inside the ISCO) to
// 10⁴ M, seen in a window of side fov M around the shadow's centre.
func ringScene(t *testing.T, spin, inc float64, opaque bool, px int, fov float64) scene.Resolved {
	t.Helper()
	s := scene.Default()
	s.Hole.Spin, s.Observer.InclinationDeg = spin, inc
	s.Disk.Opaque, s.Disk.Plunging, s.Disk.Orders = opaque, true, 3
	s.Disk.OuterRadius = 1e4
	in := 1.0001 * (1 + math.Sqrt(1-spin*spin))
	s.Disk.InnerRadius = &in
	s.Emission.Emissivity, s.Emission.Index = "powerlaw", 0
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = px, px, fov
	s.Output.Maps = []string{"rings"}
	r0, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	m, err := pixels.NewModel(r0)
	if err != nil {
		t.Fatal(err)
	}
	s.Screen.CenterAlpha, s.Screen.CenterBeta = survey.ShadowCenter(m.Obs)
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestRingWidthsMatchLensingBands checks the measured photon rings
// against the lensing bands of survey.LensingBands, found by bisection on
// the photons' plane-crossing count (Johnson et al. 2020, Science
// Advances 6, eaaz1310, define the n-th band as the screen region whose
// photons cross the equatorial plane at least n+1 times). For a disk that
// fills every band (ringScene) the light of order n lies exactly in band
// n, so along every direction the ring's extent must equal the band's
// width within 2 pixels (the nearest-pixel sampling of each edge is off
// by up to about √2/2 pixel, plus the quarter-pixel sampling step).
// Directions along which the ring is not measured must be those where the
// band leaves the window or is narrower than a pixel's diagonal. Both the transparent disk and the opaque one
// (whose hidden crossings the frame keeps with KeepBehind) are measured.
func TestRingWidthsMatchLensingBands(t *testing.T) {
	for _, c := range []struct {
		a, inc float64
		opaque bool
	}{{0, 17, false}, {0, 17, true}, {0.9, 60, true}, {-0.7, 130, false}} {
		r := ringScene(t, c.a, c.inc, c.opaque, 320, 16)
		f, err := pixels.Render(context.Background(), r, nil, pixels.KeepLine|pixels.KeepBehind)
		if err != nil {
			t.Fatal(err)
		}
		tol := 2 * r.PixelSize
		a0, a1, b0, b1 := f.Window()
		ca, cb := survey.ShadowCenter(f.Model.Obs)
		for d := 0; d < RingDirections; d += 5 {
			dir := 360 * float64(d) / RingDirections
			s, co := math.Sincos(dir * math.Pi / 180)
			for _, b := range survey.LensingBands(f.Model.Obs, ca, cb, dir, 2) {
				w, ok := ringExtent(f, b.Order, ca, cb, dir)
				if !ok {
					// A band narrower than a pixel's diagonal may
					// fall between the pixel centres.
					al, be := ca+b.Outer*co, cb+b.Outer*s
					if al > a0 && al < a1 && be > b0 && be < b1 && b.Width > math.Sqrt2*r.PixelSize {
						t.Errorf("%+v dir %v: order %d not measured, but its band [%.4g, %.4g] M ends inside the window", c, dir, b.Order, b.Inner, b.Outer)
					}
					continue
				}
				if math.Abs(w-b.Width) > tol {
					t.Errorf("%+v dir %v: order %d ring %.4g M wide, band %.4g M (tolerance %.3g M, 2 pixels)", c, dir, b.Order, w, b.Width, tol)
				}
			}
		}
		// The reported median over all directions against the bands'.
		for _, rw := range RingWidths(f) {
			var w []float64
			for d := 0; d < RingDirections; d++ {
				dir := 360 * float64(d) / RingDirections
				if _, ok := ringExtent(f, rw.Order, ca, cb, dir); ok {
					w = append(w, survey.LensingBands(f.Model.Obs, ca, cb, dir, rw.Order)[rw.Order-1].Width)
				}
			}
			slices.Sort(w)
			if len(w) != rw.Directions || len(w) == 0 {
				t.Fatalf("%+v: order %d measured along %d directions, %d bands", c, rw.Order, rw.Directions, len(w))
			}
			med := (w[(len(w)-1)/2] + w[len(w)/2]) / 2
			if math.Abs(rw.Median-med) > tol || rw.Min < w[0]-tol || rw.Max > w[len(w)-1]+tol {
				t.Errorf("%+v: order %d ring width median %.4g (%.4g–%.4g) M, bands %.4g (%.4g–%.4g) M", c, rw.Order, rw.Median, rw.Min, rw.Max, med, w[0], w[len(w)-1])
			}
			t.Logf("%+v: order %d: %s; bands median %.4g M", c, rw.Order, rw.Caption(0), med)
		}
	}
}

// TestOrderLineIsTransparent checks that the light an opaque disk's frame
// keeps for every order (Line, and Behind for what an earlier landing
// hides) is the light a transparent disk shows, bit for bit, and that an
// opaque frame without KeepBehind has no hidden light; refinement keeps
// the hidden light too.
func TestOrderLineIsTransparent(t *testing.T) {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 120, 90
	s.Hole.Spin, s.Observer.InclinationDeg = 0.6, 75
	opaque, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	s.Disk.Opaque = false
	clear, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	fo, err := pixels.Render(ctx, opaque, nil, pixels.KeepLine|pixels.KeepBehind)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := pixels.Render(ctx, clear, nil, pixels.KeepLine)
	if err != nil {
		t.Fatal(err)
	}
	plain, err := pixels.Render(ctx, opaque, nil, pixels.KeepLine)
	if err != nil {
		t.Fatal(err)
	}
	if plain.Behind != nil || plain.Has(pixels.KeepBehind) || !fo.Has(pixels.KeepBehind) || !fc.Has(pixels.KeepBehind) {
		t.Fatalf("Behind kept without asking (%v) or Has wrong (%v %v %v)", plain.Behind != nil, plain.Has(pixels.KeepBehind), fo.Has(pixels.KeepBehind), fc.Has(pixels.KeepBehind))
	}
	hidden := 0
	for o := 0; o < fo.Orders; o++ {
		for k := range fo.Line[o] {
			a, b := fo.OrderLine(o, k), fc.OrderLine(o, k)
			if math.Float32bits(a) != math.Float32bits(b) && !(math.IsNaN(float64(a)) && math.IsNaN(float64(b))) {
				t.Fatalf("order %d pixel %d: opaque disk's own light %v, transparent disk's %v", o, k, a, b)
			}
			if v := fo.Line[o][k]; math.Float32bits(v) != math.Float32bits(plain.Line[o][k]) && !math.IsNaN(float64(v)) {
				t.Fatalf("order %d pixel %d: KeepBehind changed the image's light: %v, without it %v", o, k, v, plain.Line[o][k])
			}
			if !math.IsNaN(float64(fo.Behind[o][k])) {
				hidden++
			}
		}
	}
	if hidden == 0 {
		t.Fatal("an opaque disk at 75° hides no crossing")
	}
	// Refined: every pixel whose corners all see an order in the
	// transparent render has that order's light in the opaque one.
	s.Disk.Opaque = true
	s.Refine.Depth = 1
	ref, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	fr, err := pixels.RenderScene(ctx, ref, nil, pixels.KeepLine|pixels.KeepBehind)
	if err != nil {
		t.Fatal(err)
	}
	missing, lit := 0, 0
	for o := 1; o < fr.Orders; o++ {
		for k := range fr.Line[o] {
			if !math.IsNaN(float64(fc.Line[o][k])) {
				lit++
				if math.IsNaN(float64(fr.OrderLine(o, k))) {
					missing++
				}
			}
		}
	}
	if lit == 0 || missing > 0 {
		t.Errorf("refined opaque frame: %d of %d pixels with light of order ≥ 1 lack it", missing, lit)
	}
}

// TestRingsPixel checks the rings map's single image: each pixel shows
// the highest order whose own crossing lands there.
func TestRingsPixel(t *testing.T) {
	r := ringScene(t, 0.5, 40, true, 64, 16)
	f, err := pixels.Render(context.Background(), r, nil, pixels.KeepLine|pixels.KeepBehind)
	if err != nil {
		t.Fatal(err)
	}
	m, err := Lookup("rings")
	if err != nil {
		t.Fatal(err)
	}
	class, v := m.Classify(f, Scales{})
	count := make([]int, f.Orders)
	for k := range class {
		want := -1
		for o := 0; o < f.Orders; o++ {
			if !math.IsNaN(float64(f.OrderLine(o, k))) {
				want = o
			}
		}
		if want >= 0 {
			count[want]++
		}
		if (want >= 0) != (class[k] == Category) || (want >= 0 && int(v[k]) != want) {
			t.Fatalf("pixel %d: class %v order %v, want order %d", k, class[k], v[k], want)
		}
	}
	if count[1] == 0 || count[2] == 0 {
		t.Errorf("pixels per highest order %v: the n = 1 and 2 rings are missing", count)
	}
}
