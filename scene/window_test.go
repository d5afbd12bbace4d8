package scene

import (
	"math"
	"strings"
	"testing"
)

func TestAutomaticWindow(t *testing.T) {
	s := Default()
	s.Screen.Width, s.Screen.Height = 300, 200
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if !r.AutoField || !r.AutoCenter || !s.Automatic("screen.field_of_view") || !s.Automatic("screen.center_beta") {
		t.Fatalf("default scene: AutoField %v, AutoCenter %v", r.AutoField, r.AutoCenter)
	}
	// The provisional window holds the ImageBox square with square pixels.
	b := r.ImageBox()
	hw, hh := r.PixelSize*300/2, r.PixelSize*200/2
	if r.PixelSize != r.Screen.FieldOfView/300 || hw < b || hh < b || math.Min(hw, hh) > b*(1+1e-12) {
		t.Errorf("provisional window %v × %v M for an image box of half-size %v M", 2*hw, 2*hh, b)
	}
	// A given centre is kept, and the provisional window still holds the box.
	for _, f := range Fields() {
		if f.Key == "screen.center_alpha" {
			if err := f.Set(&s, "-7"); err != nil {
				t.Fatal(err)
			}
		}
	}
	r, err = s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if !r.AutoField || r.AutoCenter || s.Automatic("screen.center_alpha") || !s.Automatic("screen.field_of_view") {
		t.Errorf("centre given: AutoField %v, AutoCenter %v", r.AutoField, r.AutoCenter)
	}
	if hw := r.PixelSize * 300 / 2; r.Screen.CenterAlpha != -7 || -7+hw < b || -7-hw > -b {
		t.Errorf("window %v M wide around -7 does not hold ±%v M", 2*hw, b)
	}
	// A concrete window clears the flags.
	w := r.WithWindow(50, 1, 2)
	if w.AutoField || w.AutoCenter || w.PixelSize != 50.0/300 || w.Screen.FieldOfView != 50 {
		t.Errorf("WithWindow: %+v, pixel %v", w.Screen, w.PixelSize)
	}
	// A negative field says 0 is automatic.
	s.Screen.FieldOfView = -3
	if _, err := s.Resolve(); err == nil || !strings.Contains(err.Error(), "0 for the automatic window") {
		t.Errorf("negative field: %v", err)
	}
}
