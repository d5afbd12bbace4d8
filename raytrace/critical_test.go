package raytrace

import (
	"math"
	"testing"
)

func TestShadowSchwarzschild(t *testing.T) {
	// Schwarzschild shadow: a circle of radius sqrt(27) (Synge 1966, MNRAS 131, 463).
	for _, a := range []float64{0, 1e-12, -1e-12} {
		for _, inc := range []float64{0, 17, 90, 180} {
			o, _ := NewObserver(a, inc)
			pts := o.CriticalCurve(200)
			if len(pts) < 100 {
				t.Fatalf("a=%v i=%v: %d points", a, inc, len(pts))
			}
			for _, p := range pts {
				if r := math.Hypot(p.Alpha, p.Beta); math.Abs(r-math.Sqrt(27)) > 1e-9 {
					t.Fatalf("a=%v i=%v: point at radius %.12g", a, inc, r)
				}
			}
		}
	}
}

func TestShadowNearExtremalVerticalPiece(t *testing.T) {
	// For a → 1 and θo above ~47° the prograde side of the critical curve is
	// the vertical segment α = -2/sin θo, |β| ≤ sqrt(3 + cos²θo - 4 cot²θo)
	// (Bardeen 1973, in "Black Holes", Les Houches).
	// The curve meets the segment tangentially, so judge the extent of the
	// points within 1e-5 of the line, at a spin where the segment lies
	// within (1-a)^{1/3} = 1e-5 of its a = 1 position.
	a := 1 - 1e-15
	for _, inc := range []float64{60, 75, 90} {
		o, _ := NewObserver(a, inc)
		s, c := o.SinInclination(), o.CosInclination()
		want := -2 / s
		bmax := math.Sqrt(3 + c*c - 4*c*c/(s*s))
		minAlpha, top := math.Inf(1), 0.0
		for _, p := range o.CriticalCurve(2000) {
			minAlpha = math.Min(minAlpha, p.Alpha)
			if math.Abs(p.Alpha-want) < 1e-5 {
				top = math.Max(top, math.Abs(p.Beta))
			}
		}
		if math.Abs(minAlpha-want) > 1e-5 {
			t.Errorf("i=%v: leftmost α = %.6f, want %.6f", inc, minAlpha, want)
		}
		if math.Abs(top-bmax) > 0.02*bmax {
			t.Errorf("i=%v: vertical piece reaches |β| = %.4f, want %.4f", inc, top, bmax)
		}
	}
}

// TestShadowEdgeSeparatesFates checks the analytic curve against the
// closed-form trace (an independent route: root structure of R(r)): just
// inside it photons come from the horizon, just outside from infinity.
func TestShadowEdgeSeparatesFates(t *testing.T) {
	var p Path
	for _, a := range []float64{-0.9, 0.3, 0.94, 0.999} {
		for _, inc := range []float64{5, 45, 80, 135} {
			o, _ := NewObserver(a, inc)
			pts := o.CriticalCurve(100)
			// Centre: mean of the points; the shadow is star-shaped about it.
			var ca, cb float64
			for _, q := range pts {
				ca += q.Alpha
				cb += q.Beta
			}
			ca /= float64(len(pts))
			cb /= float64(len(pts))
			for i := 0; i < len(pts); i += 7 {
				q := pts[i]
				da, db := q.Alpha-ca, q.Beta-cb
				n := math.Hypot(da, db)
				const eps = 1e-4
				o.Trace(q.Alpha-eps*da/n, q.Beta-eps*db/n, 1, &p)
				if p.Fate != Captured {
					t.Errorf("a=%v i=%v: inside point %v escapes", a, inc, q)
				}
				o.Trace(q.Alpha+eps*da/n, q.Beta+eps*db/n, 1, &p)
				if p.Fate != Escaped {
					t.Errorf("a=%v i=%v: outside point %v is captured", a, inc, q)
				}
			}
		}
	}
}

func TestCriticalDistance(t *testing.T) {
	// Points pushed off the analytic curve (Bardeen 1973) along its normal
	// by a known distance must measure back that distance.
	for _, c := range []struct{ a, inc float64 }{{0, 30}, {0.7, 60}, {1 - 1e-10, 75}} {
		o, _ := NewObserver(c.a, c.inc)
		pts := o.CriticalCurve(300)
		for i := 5; i < len(pts)-5; i += 37 {
			p, q := pts[i-1], pts[i+1]
			dx, dy := q.Alpha-p.Alpha, q.Beta-p.Beta
			n := math.Hypot(dx, dy)
			if n == 0 || math.Abs(pts[i].Beta) < 1e-3 {
				continue
			}
			for _, d := range []float64{1e-9, 1e-5, 0.01} {
				x, y := pts[i].Alpha-d*dy/n, pts[i].Beta+d*dx/n
				got, _ := o.CriticalDistance(x, y)
				if math.Abs(got-d) > 1e-3*d+1e-12 {
					t.Errorf("a=%v i=%v point %d: distance %.6g, want %.6g", c.a, c.inc, i, got, d)
				}
			}
		}
	}
}
