package scene

import (
	"errors"
	"math"
	"testing"
)

// Bad spot values are *FieldErrors naming the spot key.
func TestResolveSpotErrors(t *testing.T) {
	cases := []struct {
		key  string
		edit func(*Spot)
	}{
		{"spot.profile", func(s *Spot) { s.Profile = "square" }},
		{"spot.radius", func(s *Spot) { s.Radius = 1.5 }},                 // inside the ISCO (2.32 M at a = 0.9)
		{"spot.radius", func(s *Spot) { s.Radius = 40 }},                  // off the 30 M disk
		{"spot.size", func(s *Spot) { s.Size = 0 }},                       //
		{"spot.size", func(s *Spot) { s.Profile, s.Size = "annulus", 9 }}, // annulus off the disk
		{"spot.contrast", func(s *Spot) { s.Contrast = -1 }},
		{"spot.phase_deg", func(s *Spot) { s.PhaseDeg = 1e9 }},
		{"spot.arc_deg", func(s *Spot) { s.ArcDeg = 400 }},
		{"spot.frames", func(s *Spot) { s.Frames = 0 }},
		{"spot.periods", func(s *Spot) { s.Periods = math.Inf(1) }},
	}
	for _, c := range cases {
		s := Default()
		c.edit(&s.Spot)
		r, err := s.Resolve()
		if err != nil {
			t.Fatalf("%s: Resolve: %v", c.key, err)
		}
		_, err = ResolveSpot(r)
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Key != c.key {
			t.Errorf("%s: got %v, want a *FieldError for %s", c.key, err, c.key)
		}
	}
	s := Default()
	s.Spot.Radius, s.Spot.Alone = 40, true // beyond the disk, but alone
	r, _ := s.Resolve()
	if _, err := ResolveSpot(r); err != nil {
		t.Errorf("a lone spot beyond the disk: %v", err)
	}
}

// The Gaussian spot: contrast × ε_disk(r_s) at its centre, e^{-1/2} of it
// one σ away along the orbit's chord, and Ω = 1/(r^{3/2} + a) (Bardeen,
// Press & Teukolsky 1972, eq. 2.16).
func TestSpotEmission(t *testing.T) {
	s := Default()
	r, _ := s.Resolve()
	sp, err := ResolveSpot(r)
	if err != nil {
		t.Fatal(err)
	}
	rs, sig := s.Spot.Radius, s.Spot.Size
	peak := s.Spot.Contrast * r.Emissivity.At(rs)
	if got := sp.At(rs, 0); math.Abs(got-peak) > 1e-14*peak {
		t.Errorf("centre: %g, want %g", got, peak)
	}
	// A chord of length σ subtends 2 asin(σ/2r_s).
	if got, want := sp.At(rs, 2*math.Asin(sig/(2*rs))), peak*math.Exp(-0.5); math.Abs(got-want) > 1e-12*want {
		t.Errorf("σ away: %g, want %g", got, want)
	}
	if got := sp.At(rs+sig, 2*math.Pi); math.Abs(got-peak*math.Exp(-0.5)) > 1e-12*peak {
		t.Errorf("σ outward, a turn later: %g, want %g", got, peak*math.Exp(-0.5))
	}
	if want := 2 * math.Pi * (math.Pow(rs, 1.5) + s.Hole.Spin); math.Abs(sp.Period()-want) > 1e-13*want {
		t.Errorf("period %g, want %g", sp.Period(), want)
	}
}
