package maps

import (
	"context"
	"math"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// The ticks point along the electric vector: turned back to the sky with
// scene.SkyAngle (the inverse of the turn PolarisationTicks makes, both
// from scene.SkyOffset) a tick's direction is the position angle
// ½ atan2(U, Q) of its cell, and its length fraction × cell side is the
// cell's sqrt(Q² + U²)/I; cells without light get none.
func TestPolarisationTicks(t *testing.T) {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 56, 56, 40
	s.Observer.PositionAngleDeg = 40
	s.Output.Maps = []string{scene.PolarisationMap}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	f, err := pixels.Render(context.Background(), r, nil, pixels.KeepLine|pixels.KeepStokes)
	if err != nil {
		t.Fatal(err)
	}
	chi, m := 30*math.Pi/180, 0.35
	for o := range f.Line {
		for k, l := range f.Line[o] {
			if math.IsNaN(float64(l)) {
				continue
			}
			f.Q[o][k], f.U[o][k] = float32(m*float64(l)*math.Cos(2*chi)), float32(m*float64(l)*math.Sin(2*chi))
		}
	}
	ticks := PolarisationTicks(f)
	if len(ticks) == 0 {
		t.Fatal("no ticks")
	}
	for _, tk := range ticks {
		if d := math.Abs(scene.SkyAngle(tk.DAlpha, tk.DBeta, 40) - chi); d > 1e-6 {
			t.Fatalf("tick at (%v, %v): position angle %v°, want 30°", tk.Alpha, tk.Beta, scene.SkyAngle(tk.DAlpha, tk.DBeta, 40)*180/math.Pi)
		}
		if math.Abs(tk.Fraction-m) > 1e-5 {
			t.Fatalf("tick fraction %v, want %v", tk.Fraction, m)
		}
	}
	if PolarisationTicks(&pixels.Frame{}) != nil {
		t.Error("ticks from a frame without Stokes records")
	}
}
