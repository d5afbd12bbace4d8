package raytrace

import (
	"math"
	"reflect"
	"testing"
)

// TestZeroObserver checks the documented promise that Observer{} behaves
// exactly as NewObserver(0, 0), through every exported method.
func TestZeroObserver(t *testing.T) {
	var zero Observer
	want, err := NewObserver(0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if zero.Spin() != 0 || zero.InclinationDeg() != 0 {
		t.Errorf("zero value: spin %v, inclination %v°, want 0, 0", zero.Spin(), zero.InclinationDeg())
	}
	// r₊ = 1 + sqrt(1 - a²) = 2 at a = 0 (Boyer & Lindquist 1967); face-on:
	// cos θo = 1, sin θo = 0.
	if zero.Horizon() != 2 || zero.CosInclination() != 1 || zero.SinInclination() != 0 {
		t.Errorf("zero value: r₊ %v, cos θo %v, sin θo %v, want 2, 1, 0",
			zero.Horizon(), zero.CosInclination(), zero.SinInclination())
	}
	screen := []float64{0, 1e-9, -0.7, 2.5, -4.9, 5.196152422706632, 5.3, -7.5, 12, -40}
	var pz, pw Path
	for _, alpha := range screen {
		for _, beta := range screen {
			lz, ez := zero.Constants(alpha, beta)
			lw, ew := want.Constants(alpha, beta)
			if lz != lw || ez != ew {
				t.Fatalf("α=%v β=%v: Constants (%v, %v), want (%v, %v)", alpha, beta, lz, ez, lw, ew)
			}
			zero.Trace(alpha, beta, 6, &pz)
			want.Trace(alpha, beta, 6, &pw)
			if !reflect.DeepEqual(pz, pw) {
				t.Fatalf("α=%v β=%v: Trace\n%+v\nwant\n%+v", alpha, beta, pz, pw)
			}
		}
	}
	for _, s := range [][2]float64{{3, 4}, {-5.3, 0.2}, {0.5, -6}} {
		ez := zero.Integrate(s[0], s[1], 3, 1e-10, &pz)
		ew := want.Integrate(s[0], s[1], 3, 1e-10, &pw)
		if ez != ew || !reflect.DeepEqual(pz, pw) {
			t.Fatalf("α=%v β=%v: Integrate %v %+v, want %v %+v", s[0], s[1], ez, pz, ew, pw)
		}
	}
	cz, cw := zero.CriticalCurve(64), want.CriticalCurve(64)
	if !reflect.DeepEqual(cz, cw) {
		t.Fatalf("CriticalCurve differs: %v vs %v", cz, cw)
	}
	// The shadow of a = 0 is the circle of radius √27 M (Synge 1966; Bardeen 1973).
	for _, p := range cz {
		if r := math.Hypot(p.Alpha, p.Beta); math.Abs(r-math.Sqrt(27)) > 1e-12 {
			t.Fatalf("zero value: critical curve point %+v at radius %v, want √27", p, r)
		}
	}
	dz, qz := zero.CriticalDistance(1, 2)
	dw, qw := want.CriticalDistance(1, 2)
	if dz != dw || qz != qw {
		t.Errorf("CriticalDistance %v %v, want %v %v", dz, qz, dw, qw)
	}
	var loc CriticalLocator
	if d, q := loc.Distance(1, 2); d != dw || q != qw {
		t.Errorf("CriticalLocator{}.Distance %v %v, want %v %v", d, q, dw, qw)
	}
}

// TestObserverAccessors checks that the constructor keeps what it was given
// and derives r₊ and the angles from it.
func TestObserverAccessors(t *testing.T) {
	for _, c := range []struct{ a, inc, rh, cos, sin float64 }{
		// r₊ = 1 + sqrt(1 - a²) (Boyer & Lindquist 1967): 1.8 at |a| = 0.6.
		{0.6, 60, 1.8, 0.5, math.Sqrt(3) / 2},
		{-0.6, 90, 1.8, 0, 1},
		{0.3, 180, 1 + math.Sqrt(0.91), -1, 0},
	} {
		o, err := NewObserver(c.a, c.inc)
		if err != nil {
			t.Fatal(err)
		}
		if o.Spin() != c.a || o.InclinationDeg() != c.inc {
			t.Errorf("NewObserver(%v, %v): Spin %v, InclinationDeg %v", c.a, c.inc, o.Spin(), o.InclinationDeg())
		}
		near(t, "r₊", o.Horizon(), c.rh, 1e-15)
		near(t, "cos θo", o.CosInclination(), c.cos, 1e-15)
		near(t, "sin θo", o.SinInclination(), c.sin, 1e-15)
	}
}
