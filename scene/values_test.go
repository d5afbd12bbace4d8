package scene

import (
	"path/filepath"
	"testing"
)

// Values gives each key's value as its TOML text, lists joined by
// commas, and keeps working when the scene has a line list (an array of
// tables, which it leaves out).
func TestValues(t *testing.T) {
	v := Default().Values()
	for key, want := range map[string]string{"black_hole.spin": "0.9", "observer.inclination_deg": "60", "disk.orders": "3", "output.formats": "png,bare,fits,csv"} {
		if v[key] != want {
			t.Errorf("Default().Values()[%q] = %q, want %q", key, v[key], want)
		}
	}
	s, err := Load(filepath.Join("..", "testdata", "scenes", "iron-lines.toml"))
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Lines) < 2 {
		t.Fatalf("iron-lines.toml has %d lines; not a test", len(s.Lines))
	}
	lv := s.Values()
	if lv["black_hole.spin"] == "" || lv["emission.line_kev"] == "" {
		t.Errorf("a scene with a line list loses its values: %v", lv)
	}
}
