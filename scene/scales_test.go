package scene

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Every colour-scale key refuses a value outside its range, and NaN or
// infinities a TOML file may hold, with a *FieldError naming the key.
func TestScalesRefused(t *testing.T) {
	cases := []struct {
		name string
		edit func(s *Scales)
		key  string
	}{
		{"g_min at 1", func(s *Scales) { s.GMin = ptr(1) }, "scales.g_min"},
		{"g_min zero", func(s *Scales) { s.GMin = ptr(0) }, "scales.g_min"},
		{"g_max at 1", func(s *Scales) { s.GMax = ptr(1) }, "scales.g_max"},
		{"g_max infinite", func(s *Scales) { s.GMax = ptr(math.Inf(1)) }, "scales.g_max"},
		{"intensity_max negative", func(s *Scales) { s.IntensityMax = ptr(-1) }, "scales.intensity_max"},
		{"intensity_max NaN", func(s *Scales) { s.IntensityMax = ptr(math.NaN()) }, "scales.intensity_max"},
		{"intensity_decades zero", func(s *Scales) { s.IntensityDecades = ptr(0) }, "scales.intensity_decades"},
		{"intensity_decades 31", func(s *Scales) { s.IntensityDecades = ptr(31) }, "scales.intensity_decades"},
		{"radius_min zero", func(s *Scales) { s.RadiusMin = ptr(0) }, "scales.radius_min"},
		{"radius range empty", func(s *Scales) { s.RadiusMin, s.RadiusMax = ptr(10), ptr(10) }, "scales.radius_max"},
		{"radius_min beyond the disk", func(s *Scales) { s.RadiusMin = ptr(40) }, "scales.radius_min"},
		{"radius_max inside the disk's edge", func(s *Scales) { s.RadiusMax = ptr(2) }, "scales.radius_max"},
		{"flux_max zero", func(s *Scales) { s.FluxMax = ptr(0) }, "scales.flux_max"},
		{"percentile 50", func(s *Scales) { s.Percentile = ptr(50) }, "scales.percentile"},
		{"percentile negative", func(s *Scales) { s.Percentile = ptr(-0.1) }, "scales.percentile"},
	}
	for _, c := range cases {
		s := Default() // outer edge 30 M, inner edge the ISCO of a = 0.9 (2.32 M)
		c.edit(&s.Scales)
		_, err := s.Resolve()
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Key != c.key || fe.Allowed == "" {
			t.Errorf("%s: %v, want a *FieldError for %s", c.name, err, c.key)
		}
	}
	s := Default()
	s.Scales = Scales{GMin: ptr(0.2), GMax: ptr(1.4), IntensityMax: ptr(3), IntensityDecades: ptr(30), RadiusMin: ptr(2), RadiusMax: ptr(40), FluxMax: ptr(1e-3), Percentile: ptr(0)}
	if _, err := s.Resolve(); err != nil {
		t.Errorf("scales in range refused: %v", err)
	}
}

// The [scales] section reads back from the scene's TOML as written and is
// absent when nothing is fixed, so scenes without it keep their text.
func TestScalesTOML(t *testing.T) {
	text, err := Default().TOML()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(text), "[scales]") {
		t.Errorf("the default scene writes an empty [scales] section:\n%s", text)
	}
	s := Default()
	for key, v := range map[string]string{"g-min": "0.25", "scale-percentile": "0.5", "radius-max": "25"} {
		for _, f := range Fields() {
			if f.Flag == key {
				if err := f.Set(&s, v); err != nil {
					t.Fatal(err)
				}
			}
		}
	}
	if text, err = s.TOML(); err != nil {
		t.Fatal(err)
	}
	back, err := Parse("scene.toml", text)
	if err != nil {
		t.Fatal(err)
	}
	got := back.Scales
	if got.GMin == nil || *got.GMin != 0.25 || got.Percentile == nil || *got.Percentile != 0.5 || got.RadiusMax == nil || *got.RadiusMax != 25 || got.GMax != nil {
		t.Errorf("read back %+v from:\n%s", got, text)
	}
}

// Every numeric scene value has a readable name for figures, and the
// titles and values read as intended.
func TestQuantities(t *testing.T) {
	for _, f := range Fields() {
		probe := Default()
		numeric := !f.Bool && f.Set(&probe, "0.5") == nil && f.Set(&probe, "x") != nil
		if numeric && !strings.HasPrefix(f.Key, "screen.") && !strings.HasPrefix(f.Key, "scales.") && f.Key != "spectrum.energy_min_kev" && f.Key != "spectrum.energy_max_kev" {
			if q := QuantityOf(f.Key); q.Name == f.Key || q.Symbol == "" {
				t.Errorf("%s has no readable name", f.Key)
			}
		}
	}
	for _, c := range []struct{ key, title, value string }{
		{"black_hole.spin", "spin a", "a = 0.998"},
		{"observer.inclination_deg", "inclination i [deg]", "i = 0.998°"},
		{"disk.outer_radius", "outer edge r_out [M]", "r_out = 0.998 M"},
		{"no.such_key", "no.such_key", "no.such_key = 0.998"},
	} {
		q := QuantityOf(c.key)
		if q.Title() != c.title || q.Value("0.998") != c.value {
			t.Errorf("%s: %q, %q; want %q, %q", c.key, q.Title(), q.Value("0.998"), c.title, c.value)
		}
	}
}
