package survey

import (
	"context"
	"math"
	"testing"

	"kerrscope/raytrace"
)

func TestLensingBandsSchwarzschild(t *testing.T) {
	// For a = 0 successive lensing bands shrink by e^{-π}, the photon-ring
	// Lyapunov exponent of Schwarzschild (Johnson et al. 2020, Science
	// Advances 6, eaaz1310).
	for _, inc := range []float64{0, 17, 60} {
		o, _ := raytrace.NewObserver(0, inc)
		for _, dir := range []float64{0, 90, 225} {
			bands := LensingBands(o, 0, 0, dir, 5)
			for _, b := range bands {
				if !(b.Inner < math.Sqrt(27) && b.Outer > math.Sqrt(27)) {
					t.Errorf("i=%v dir=%v band %d [%v, %v] does not straddle sqrt(27)", inc, dir, b.Order, b.Inner, b.Outer)
				}
			}
			if bands[0].Demagnified != nil {
				t.Errorf("i=%v dir=%v: the first band has a ratio to a previous one, %v", inc, dir, *bands[0].Demagnified)
			}
			for _, b := range bands[1:] {
				if b.Demagnified == nil {
					t.Fatalf("i=%v dir=%v: band %d has no ratio to the previous one", inc, dir, b.Order)
				}
			}
			last := *bands[len(bands)-1].Demagnified
			t.Logf("i=%v dir=%v: width ratios %.5f %.5f %.5f %.5f (e^-π = %.5f)", inc, dir,
				*bands[1].Demagnified, *bands[2].Demagnified, *bands[3].Demagnified, *bands[4].Demagnified, math.Exp(-math.Pi))
			if math.Abs(last/math.Exp(-math.Pi)-1) > 0.01 {
				t.Errorf("i=%v dir=%v: ratio of bands 5/4 = %v, want e^-π = %v within 1%%", inc, dir, last, math.Exp(-math.Pi))
			}
		}
	}
}

func TestLensingReport(t *testing.T) {
	// For a = 0 the critical curve is the circle of radius √27 about the
	// origin (Synge 1966), so the shadow's centre is (0, 0) and every band
	// straddles √27.
	o, err := raytrace.NewObserver(0, 45)
	if err != nil {
		t.Fatal(err)
	}
	dirs := []float64{0, 135}
	rep, err := Lensing(context.Background(), o, dirs, 3)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rep.CenterAlpha) > 1e-12 || math.Abs(rep.CenterBeta) > 1e-12 {
		t.Errorf("a = 0 shadow centre (%v, %v), want (0, 0)", rep.CenterAlpha, rep.CenterBeta)
	}
	if rep.Spin != 0 || rep.InclinationDeg != 45 || len(rep.Bands) != len(dirs)*3 {
		t.Fatalf("report a = %v, i = %v, %d bands; want 0, 45, %d", rep.Spin, rep.InclinationDeg, len(rep.Bands), len(dirs)*3)
	}
	for i, b := range rep.Bands {
		if b.Direction != dirs[i/3] || b.Order != i%3+1 || !(b.Inner < math.Sqrt(27) && b.Outer > math.Sqrt(27)) {
			t.Errorf("band %d = %+v", i, b)
		}
	}
	checkWriteErrors(t, "lensing text", rep.WriteText)
	checkWriteErrors(t, "lensing JSON", rep.WriteJSON)
}

// TestLensingBandEdges checks each band edge by its definition: just
// inside it the photon crosses the plane at least Order+1 times, just
// outside it fewer times. The directions include the wide n = 1 band
// below the shadow of a fast-spinning hole seen at 60°, which ends more
// than one critical-curve radius beyond the curve.
func TestLensingBandEdges(t *testing.T) {
	o, err := raytrace.NewObserver(0.9, 60)
	if err != nil {
		t.Fatal(err)
	}
	ca, cb := ShadowCenter(o)
	var p raytrace.Path
	for dir := 0.0; dir < 360; dir += 30 {
		s, c := math.Sincos(dir * math.Pi / 180)
		count := func(rho float64, max int) int { return crossings(o, ca, cb, c, s, rho, max, &p) }
		for _, b := range LensingBands(o, ca, cb, dir, 2) {
			need := b.Order + 1
			for _, e := range []struct {
				name      string
				edge, out float64 // the edge and the way out of the band
			}{{"inner", b.Inner, -1}, {"outer", b.Outer, 1}} {
				d := 1e-9 * e.edge
				if in, out := count(e.edge-e.out*d, need), count(e.edge+e.out*d, need); in < need || out >= need {
					t.Errorf("dir %v band %d %s edge %v: %d crossings inside, %d outside; want ≥ %d and < %d", dir, b.Order, e.name, e.edge, in, out, need, need)
				}
			}
		}
	}
}
