package scene

import (
	"math"
	"os"
	"strings"
	"testing"
)

func TestDefaultAndDemoResolve(t *testing.T) {
	for name, s := range map[string]func() (Scene, error){
		"default": func() (Scene, error) { return Default(), nil },
		"demo":    Demo,
	} {
		sc, err := s()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if _, err := sc.Resolve(); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
	}
	d, _ := Demo()
	if !(d.Hole.Spin > 0.9) || !(d.Observer.InclinationDeg > 50) {
		t.Errorf("demo should be a high-spin hole seen above 50°: %+v %+v", d.Hole, d.Observer)
	}
}

func TestParseErrorsNameKeyAndLine(t *testing.T) {
	cases := []struct{ src, want string }{
		{"[black_hole]\nspin = \"fast\"\n", `scene.toml:2: key "black_hole.spin": wrong type: TOML string where a number is expected`},
		{"[disk]\norbits = 3\n", `scene.toml:2: key "disk.orbits": unknown key (valid keys: inner_radius, outer_radius, opaque, orders, plunging)`},
		{"[screen]\nwidth = 2.5\n", `scene.toml:2: key "screen.width": wrong type`},
		{"[disk]\nopaque = 1\n", `scene.toml:2: key "disk.opaque": wrong type`},
		{"[output]\nmaps = \"redshift\"\n", `scene.toml:2: key "output.maps": wrong type`},
		{"[output]\norientation_marks = \"yes\"\n", `scene.toml:2: key "output.orientation_marks": wrong type`},
		{"\n\n[observer]\ninclination_deg = \n", `scene.toml:4:`},
		{"[nowhere]\nx = 1\n", `key "nowhere": unknown key (valid keys: [black_hole], [observer], [screen]`},
	}
	for _, c := range cases {
		_, err := Parse("scene.toml", []byte(c.src))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want it to contain %q", c.src, err, c.want)
		}
	}
}

func TestResolveRejects(t *testing.T) {
	f := func(v float64) *float64 { return &v }
	cases := []struct {
		name string
		edit func(s *Scene)
		want string
	}{
		{"spin 1", func(s *Scene) { s.Hole.Spin = 1 }, "black_hole.spin"},
		{"spin -1.2", func(s *Scene) { s.Hole.Spin = -1.2 }, "black_hole.spin"},
		{"mass without distance", func(s *Scene) { s.Hole.MassSolar = f(4e6) }, "distance"},
		{"two distances", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc, s.Hole.DistanceMpc = f(1), f(1), f(1) }, "not both"},
		{"negative mass", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc = f(-1), f(8) }, "mass_msun"},
		{"zero distance", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc = f(1e6), f(0) }, "distance"},
		{"inclination 200", func(s *Scene) { s.Observer.InclinationDeg = 200 }, "inclination_deg"},
		{"inclination -1", func(s *Scene) { s.Observer.InclinationDeg = -1 }, "inclination_deg"},
		{"zero width", func(s *Scene) { s.Screen.Width = 0 }, "screen.width"},
		{"absurd height", func(s *Scene) { s.Screen.Height = 1 << 20 }, "screen.height = 1048576: must be between 1 and 16384"},
		{"negative fov", func(s *Scene) { s.Screen.FieldOfView = -1 }, "field_of_view"},
		{"fov finer than float", func(s *Scene) { s.Screen.FieldOfView, s.Screen.CenterAlpha = 1e-12, 5 }, "floating point"},
		{"orders 0", func(s *Scene) { s.Disk.Orders = 0 }, "disk.orders"},
		{"orders 99", func(s *Scene) { s.Disk.Orders = 99 }, "disk.orders"},
		{"inner inside horizon", func(s *Scene) { s.Disk.InnerRadius = f(1.2) }, "horizon"},
		{"outer below inner", func(s *Scene) { s.Disk.OuterRadius = 2 }, "outer_radius"},
		{"line 0 keV", func(s *Scene) { s.Emission.LineKeV = 0 }, "line_kev"},
		{"unknown emissivity", func(s *Scene) { s.Emission.Emissivity = "gaussian" }, "emission.emissivity"},
		{"broken without break", func(s *Scene) { s.Emission.Emissivity, s.Emission.BreakRad = "broken", 0 }, "emission"},
		{"unknown limb", func(s *Scene) { s.Emission.Limb = "dark" }, "emission.limb"},
		{"energy range reversed", func(s *Scene) { s.Spectrum.MinKeV, s.Spectrum.MaxKeV = f(7), f(2) }, "energy_min_kev"},
		{"negative energy", func(s *Scene) { s.Spectrum.MinKeV = f(-1) }, "energy_min_kev"},
		{"zero bins", func(s *Scene) { s.Spectrum.Bins = 0 }, "spectrum.bins"},
		{"negative FWHM", func(s *Scene) { s.Spectrum.FWHMeV = -5 }, "instrument_fwhm_ev"},
		{"no directory", func(s *Scene) { s.Output.Directory = " " }, "output.directory"},
		{"unknown map", func(s *Scene) { s.Output.Maps = []string{"redshift", "temperature"} }, "output.maps"},
		{"map twice", func(s *Scene) { s.Output.Maps = []string{"order", "order"} }, "twice"},
		{"no formats", func(s *Scene) { s.Output.Formats = nil }, "output.formats"},
		{"bad scale", func(s *Scene) { s.Output.IntensityScale = "sqrt" }, "intensity_scale"},
	}
	for _, c := range cases {
		s := Default()
		c.edit(&s)
		_, err := s.Resolve()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want it to mention %q", c.name, err, c.want)
		}
	}
}

func TestInnerEdgeInsideISCO(t *testing.T) {
	s := Default()
	in := 1.6
	s.Disk.InnerRadius = &in
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if r.Inner != r.ISCO {
		t.Errorf("without plunging gas the edge should rise to the ISCO, got %v", r.Inner)
	}
	s.Disk.Plunging = true
	if r, _ = s.Resolve(); r.Inner != in {
		t.Errorf("with plunging gas the edge should stay at %v, got %v", in, r.Inner)
	}
	// Plunging gas with no inner edge given reaches the horizon,
	// r₊ = 1 + sqrt(1 − a²) (Bardeen, Press & Teukolsky 1972).
	s.Disk.InnerRadius = nil
	if r, _ = s.Resolve(); math.Abs(r.Inner-(1+math.Sqrt(1-0.81))) > 1e-12 {
		t.Errorf("plunging gas without an inner edge: edge %v, want the horizon", r.Inner)
	}
	s.Disk.OuterRadius = 1.2
	if _, err := s.Resolve(); err == nil || !strings.Contains(err.Error(), "the horizon") {
		t.Errorf("outer edge inside the horizon-reaching disk: error %v, want it to name the horizon", err)
	}
}

func TestManifestRoundTrip(t *testing.T) {
	s, _ := Demo()
	in := 3.5
	s.Disk.InnerRadius = &in
	s.Output.Maps = []string{"redshift"}
	text, err := s.TOML()
	if err != nil {
		t.Fatal(err)
	}
	back, err := Parse("kerrscope-run.toml", text)
	if err != nil {
		t.Fatal(err)
	}
	again, _ := back.TOML()
	if string(again) != string(text) {
		t.Errorf("manifest does not round-trip:\n%s\n---\n%s", text, again)
	}
}

func TestFieldsSet(t *testing.T) {
	s := Default()
	set := func(flag, v string) error {
		for _, f := range Fields() {
			if f.Flag == flag {
				return f.Set(&s, v)
			}
		}
		t.Fatalf("no flag %s", flag)
		return nil
	}
	for _, c := range [][2]string{{"spin", "0.95"}, {"inclination", "75"}, {"transparent", "true"}, {"maps", "redshift, order"}, {"inner", "4"}, {"width", "100"}, {"orientation-marks", "true"}} {
		if err := set(c[0], c[1]); err != nil {
			t.Fatalf("%v: %v", c, err)
		}
	}
	if s.Hole.Spin != 0.95 || s.Observer.InclinationDeg != 75 || s.Disk.Opaque || len(s.Output.Maps) != 2 || *s.Disk.InnerRadius != 4 || s.Screen.Width != 100 || !s.Output.OrientationMarks {
		t.Errorf("flags not applied: %+v", s)
	}
	for _, c := range [][2]string{{"spin", "fast"}, {"spin", "NaN"}, {"width", "1.5"}, {"transparent", "maybe"}} {
		if err := set(c[0], c[1]); err == nil {
			t.Errorf("%v accepted", c)
		}
	}
	seen := map[string]bool{}
	for _, f := range Fields() {
		if seen[f.Flag] || seen[f.Key] {
			t.Errorf("duplicate field %s / %s", f.Flag, f.Key)
		}
		seen[f.Flag], seen[f.Key] = true, true
	}
}

func TestReadmeSceneExample(t *testing.T) {
	// The scene example in README.md must parse and equal the defaults.
	data, err := os.ReadFile("../README.md")
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	i := strings.Index(text, "```toml\n[black_hole]")
	if i < 0 {
		t.Fatal("no scene example in README.md")
	}
	block := text[i+len("```toml\n"):]
	block = block[:strings.Index(block, "```")]
	s, err := Parse("README.md", []byte(block))
	if err != nil {
		t.Fatal(err)
	}
	a, _ := s.TOML()
	b, _ := Default().TOML()
	if string(a) != string(b) {
		t.Errorf("README example differs from the defaults:\n%s\n---\n%s", a, b)
	}
}

func TestAngularScale(t *testing.T) {
	// One M at distance D subtends the angle GM/(c² D) (the length unit
	// GM/c² seen from D), with the IAU 2015 nominal GM_sun =
	// 1.3271244e20 m³ s⁻² (IAU 2015 Resolution B3) and c = 299792458 m/s.
	s := Default()
	m, d := 2.5e7, 3.2 // invented: 2.5e7 solar masses at 3.2 Mpc
	s.Hole.MassSolar, s.Hole.DistanceMpc = &m, &d
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	const gm, c, pc = 1.3271244e20, 299792458.0, 3.0856775814913673e16
	want := m * gm / (c * c) / (d * 1e6 * pc) * 180 / 3.141592653589793 * 3600e6
	if math.Abs(r.MicroArcsecPerM/want-1) > 1e-7 {
		t.Errorf("µas per M = %v, want %v", r.MicroArcsecPerM, want)
	}
	kpc := d * 1000
	s.Hole.DistanceMpc, s.Hole.DistanceKpc = nil, &kpc
	if r2, _ := s.Resolve(); math.Abs(r2.MicroArcsecPerM/r.MicroArcsecPerM-1) > 1e-12 {
		t.Errorf("kpc and Mpc disagree: %v vs %v", r2.MicroArcsecPerM, r.MicroArcsecPerM)
	}
}

func TestDelayMapNeedsPixelCentres(t *testing.T) {
	s := Default()
	if s.NeedsTiming() {
		t.Error("the default maps ask for time delays")
	}
	s.Output.Maps = []string{"redshift", "delay"}
	if !s.NeedsTiming() {
		t.Error("the delay map does not ask for time delays")
	}
	if _, err := s.Resolve(); err != nil {
		t.Fatal(err)
	}
	s.Refine.Depth = 2
	_, err := s.Resolve()
	if err == nil || !strings.Contains(err.Error(), "output.maps") || !strings.Contains(err.Error(), "refine.depth = 2") {
		t.Errorf("delay map with refinement: error %v", err)
	}
}
