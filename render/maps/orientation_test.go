package maps

import (
	"context"
	"math"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// TestOrientationMarksFollowTheFrame checks the orientation marks against
// the rendered frame itself, for observers above (θo < 90°) and below
// (θo > 90°) the disk and both spin directions:
//
//   - the approaching side is at α < 0: the mean redshift factor g of the
//     first image is larger there than at α > 0 (Doppler boosting of gas
//     moving towards the observer; Cunningham & Bardeen 1973, ApJ 183, 237);
//   - the near side of the disk is found from the image: along α ≈ 0 the
//     r = 10 M isoradial lies closer to the hole on the near side than on
//     the far side, whose light is bent up over the hole (Luminet 1979,
//     A&A 75, 228); the far side must be at β > 0 exactly when θo < 90°,
//     as it is when β is the projected +z axis that the straight arrow
//     follows;
//   - the curved arrow turns counter-clockwise (positive signed area)
//     for θo < 90° and clockwise for θo > 90°, and at its leftmost point,
//     on the approaching side, it runs towards the near side, i.e.
//     towards the observer.
func TestOrientationMarksFollowTheFrame(t *testing.T) {
	for _, c := range []struct{ a, inc float64 }{{0.5, 60}, {0.5, 120}, {-0.5, 45}, {0, 150}} {
		s := scene.Default()
		s.Hole.Spin, s.Observer.InclinationDeg = c.a, c.inc
		s.Screen.Width, s.Screen.Height = 120, 120
		s.Output.OrientationMarks = true
		r, err := s.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		f, err := pixels.Render(context.Background(), r, nil, pixels.KeepR|pixels.KeepG)
		if err != nil {
			t.Fatal(err)
		}
		var sum [2]float64
		var n [2]int
		for k := 0; k < f.W*f.H; k++ {
			g := float64(f.FirstSeenAt(f.G, k))
			if math.IsNaN(g) {
				continue
			}
			side := 0
			if pixels.PixelAlpha(r, k%f.W) > 0 {
				side = 1
			}
			sum[side] += g
			n[side]++
		}
		left, right := sum[0]/float64(n[0]), sum[1]/float64(n[1])
		if !(left > right) {
			t.Errorf("%+v: mean g %.4f at α < 0, %.4f at α > 0: the approaching side is not at α < 0", c, left, right)
		}

		// The r = 10 isoradial along the column nearest α = 0.
		col := 0
		for i := range f.W {
			if math.Abs(pixels.PixelAlpha(r, i)) < math.Abs(pixels.PixelAlpha(r, col)) {
				col = i
			}
		}
		up, down := math.NaN(), math.NaN()
		for j := range f.H {
			beta := pixels.PixelBeta(r, j)
			if v := float64(f.R[0][j*f.W+col]); v >= 10 { // the direct image (n = 0)
				if beta > 0 && (math.IsNaN(up) || beta < up) {
					up = beta
				}
				if beta < 0 && (math.IsNaN(down) || beta > down) {
					down = beta
				}
			}
		}
		if math.IsNaN(up) || math.IsNaN(down) {
			t.Fatalf("%+v: the r = 10 isoradial is not in the window along α = 0 (β %v, %v)", c, up, down)
		}
		nearSign := -1.0 // the near side is below the hole
		if up < -down {
			nearSign = 1
		}
		if farUp := nearSign < 0; farUp != (c.inc < 90) {
			t.Errorf("%+v: r = 10 at β = %.3g and %.3g: the far side is at β > 0: %v", c, up, down, farUp)
		}

		marks := OrientationMarks(f)
		if len(marks) != 4 {
			t.Fatalf("%+v: %d marks, want the spin axis, the orbit and the compass", c, len(marks))
		}
		axis, orbit := marks[0], marks[1]
		p0, p1 := axis.Points[0], axis.Points[len(axis.Points)-1]
		if p0 != [2]float64{0, 0} || p1[0] != 0 || !(p1[1] > 0) {
			t.Errorf("%+v: axis arrow from %v to %v, want from the hole along +β", c, p0, p1)
		}
		switch {
		case c.a > 0 && (axis.Label != "spin axis" || axis.Note != ""):
			t.Errorf("%+v: axis labelled %q, %q", c, axis.Label, axis.Note)
		case c.a < 0 && axis.Note != "hole counter-rotating":
			t.Errorf("%+v: axis labelled %q, %q; want the counter-rotation note", c, axis.Label, axis.Note)
		case c.a == 0 && axis.Note != "":
			t.Errorf("%+v: axis noted %q for a hole without spin", c, axis.Note)
		}
		area := 0.0 // shoelace, closing the arc through its gap
		pts := orbit.Points
		for i := range pts {
			q, p := pts[i], pts[(i+1)%len(pts)]
			area += q[0]*p[1] - p[0]*q[1]
		}
		if ccw := area > 0; ccw != (c.inc < 90) {
			t.Errorf("%+v: orbit arrow counter-clockwise: %v (signed area %.3g)", c, ccw, area/2)
		}
		lm := 0
		for i, p := range pts {
			if p[0] < pts[lm][0] {
				lm = i
			}
		}
		if lm == 0 || lm == len(pts)-1 {
			t.Fatalf("%+v: the orbit arrow's leftmost point is an end", c)
		}
		if dBeta := pts[lm+1][1] - pts[lm-1][1]; !(dBeta*nearSign > 0) {
			t.Errorf("%+v: at α < 0 the orbit arrow moves by dβ = %.3g, not towards the near side (β sign %v)", c, dBeta, nearSign)
		}
	}
}

// TestSkyCompass checks the compass against the sky offsets of
// scene.SkyOffset (the WCS's rotation, read back by astropy in
// render/outputs): its N arrow points due north and its E arrow due east,
// at any position angle, inside the window.
func TestSkyCompass(t *testing.T) {
	for _, pa := range []float64{0, 37, 90, 180, -127.5, 300} {
		marks := skyCompass(pa, -10, 14, -8, 8)
		if len(marks) != 2 || marks[0].Label != "N" || marks[1].Label != "E" {
			t.Fatalf("PA %v: marks %+v", pa, marks)
		}
		for i, want := range [][2]float64{{0, 1}, {1, 0}} { // (east, north)
			p, q := marks[i].Points[0], marks[i].Points[1]
			e, n := scene.SkyOffset(q[0]-p[0], q[1]-p[1], pa)
			l := math.Hypot(e, n)
			if math.Abs(e/l-want[0]) > 1e-12 || math.Abs(n/l-want[1]) > 1e-12 {
				t.Errorf("PA %v: %s arrow points (east %.3g, north %.3g), want %v", pa, marks[i].Label, e/l, n/l, want)
			}
			for _, pt := range append(marks[i].Points, marks[i].LabelAt) {
				if pt[0] < -10 || pt[0] > 14 || pt[1] < -8 || pt[1] > 8 {
					t.Errorf("PA %v: %s arrow point %v outside the window", pa, marks[i].Label, pt)
				}
			}
		}
	}
}
