package scene

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func ptr(v float64) *float64 { return &v }

// TestHostileValuesRefused checks that values which overflow or underflow a
// derived quantity are refused up front with a *FieldError naming the key,
// the value and the allowed range.
func TestHostileValuesRefused(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(s *Scene)
		key   string
		value string
	}{
		{"steep negative index", func(s *Scene) { s.Emission.Index = -27 }, "emission.index", "-27"},
		{"index just past the disk bound", func(s *Scene) { s.Emission.Index = -20.4 }, "emission.index", "-20.4"},
		{"huge positive index", func(s *Scene) { s.Emission.Index = 1e300 }, "emission.index", "1e+300"},
		{"NaN index", func(s *Scene) { s.Emission.Index = math.NaN() }, "emission.index", "NaN"},
		{"broken inner index", func(s *Scene) {
			s.Emission.Emissivity, s.Emission.IndexInner, s.Emission.BreakRad = "broken", -60, 20
		}, "emission.index_inner", "-60"},
		{"broken outer index", func(s *Scene) {
			s.Emission.Emissivity, s.Emission.IndexInner, s.Emission.IndexOuter, s.Emission.BreakRad = "broken", -30, -20, 6
		}, "emission.index_outer", "-20"},
		{"break radius below 1 M", func(s *Scene) { s.Emission.Emissivity, s.Emission.BreakRad = "broken", 1e-300 }, "emission.break_radius", "1e-300"},
		{"subnormal line", func(s *Scene) { s.Emission.LineKeV = 1e-320 }, "emission.line_kev", "1e-320"},
		{"huge line", func(s *Scene) { s.Emission.LineKeV = 1e300 }, "emission.line_kev", "1e+300"},
		{"huge mass", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc = ptr(1e308), ptr(8) }, "black_hole.mass_msun", "1e+308"},
		{"tiny mass", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc = ptr(1e-300), ptr(8) }, "black_hole.mass_msun", "1e-300"},
		{"tiny distance", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc = ptr(4e6), ptr(1e-300) }, "black_hole.distance_kpc", "1e-300"},
		{"huge distance", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceMpc = ptr(4e6), ptr(1e300) }, "black_hole.distance_mpc", "1e+300"},
		{"huge energy max", func(s *Scene) { s.Spectrum.MaxKeV = ptr(1e308) }, "spectrum.energy_max_kev", "1e+308"},
		{"energy range too narrow", func(s *Scene) { s.Spectrum.MinKeV, s.Spectrum.MaxKeV = ptr(6.4), ptr(6.4+1e-9) }, "spectrum.energy_max_kev", "6.400000001"},
		{"huge FWHM", func(s *Scene) { s.Spectrum.FWHMeV = 1e300 }, "spectrum.instrument_fwhm_ev", "1e+300"},
		{"subnormal FWHM", func(s *Scene) { s.Spectrum.FWHMeV = 5e-324 }, "spectrum.instrument_fwhm_ev", "5e-324"},
		{"huge outer radius", func(s *Scene) { s.Disk.OuterRadius = 1e300 }, "disk.outer_radius", "1e+300"},
		{"infinite inner radius", func(s *Scene) { s.Disk.InnerRadius = ptr(math.Inf(1)) }, "disk.inner_radius", "+Inf"},
		{"huge centre", func(s *Scene) { s.Screen.CenterBeta = 1e300 }, "screen.center_beta", "1e+300"},
		{"NaN tolerance", func(s *Scene) { s.Refine.TolG = math.NaN() }, "refine.tolerance_g", "NaN"},
		{"band beyond float", func(s *Scene) { s.Band.RMax = "isco*1e308" }, "band.r_max", "isco*1e308"},
	}
	for _, c := range cases {
		s := Default()
		c.edit(&s)
		_, err := s.Resolve()
		var fe *FieldError
		if !errors.As(err, &fe) {
			t.Errorf("%s: error %v, want a *FieldError", c.name, err)
			continue
		}
		if fe.Key != c.key || fe.Value != c.value || fe.Allowed == "" {
			t.Errorf("%s: got key %q value %q allowed %q, want key %q value %q", c.name, fe.Key, fe.Value, fe.Allowed, c.key, c.value)
		}
	}
}

// TestIndexLimitKeepsEmissivityInRange checks the emissivity bound against
// direct evaluation: at the largest allowed index, r^-q at the outer edge
// is 10^±30, and g⁴ ε × limb summed over MaxOrders orders, with g = 3 and
// the Laor limb factor at its largest (3.06), stays a finite float32.
func TestIndexLimitKeepsEmissivityInRange(t *testing.T) {
	for _, rOut := range []float64{1.5, 30, 1000, MaxLength} {
		e := Emissivity{Kind: PowerLaw}
		q, _ := e.IndexLimits(rOut)
		q = math.Min(q, MaxAbsIndex)
		for _, sign := range []float64{-1, 1} {
			e.Q = sign * q
			eps := e.At(rOut)
			want := math.Pow(10, -sign*math.Min(EmissivityDecades, q*math.Log10(rOut)))
			if math.Abs(math.Log10(eps)-math.Log10(want)) > 1e-9 {
				t.Errorf("r_out %v, q %v: ε = %v, want %v", rOut, e.Q, eps, want)
			}
			g := 3.0
			if v := float32(MaxOrders * g * g * g * g * eps * 3.06); math.IsInf(float64(v), 0) {
				t.Errorf("r_out %v, q %v: intensity overflows float32", rOut, e.Q)
			}
		}
	}
	// Broken law: ε at every edge and at the break within 10^±30 at the limits.
	for _, c := range []struct{ rb, rOut, qin float64 }{{6, 30, 6}, {2, 1e5, -40}, {50, 30, 10}, {1, 100, 90}} {
		e := Emissivity{Kind: BrokenPowerLaw, QIn: c.qin, RBreak: c.rb}
		qin, _ := e.IndexLimits(c.rOut)
		e.QIn = math.Copysign(math.Min(math.Abs(c.qin), qin), c.qin)
		_, qout := e.IndexLimits(c.rOut)
		for _, sign := range []float64{-1, 1} {
			e.QOut = sign * math.Min(qout, MaxAbsIndex)
			for _, r := range []float64{1 + 1e-9, math.Min(c.rb, c.rOut), c.rOut} {
				if l := math.Abs(math.Log10(e.At(r))); !(l <= EmissivityDecades*(1+1e-12)) {
					t.Errorf("%+v q_out %v: |log10 ε(%v)| = %v", c, e.QOut, r, l)
				}
			}
		}
	}
}

// TestBlameTheKeyGiven checks that when the inner edge is not inside the
// outer edge, or the energy or band ends cross, the error names the value
// the user wrote.
func TestBlameTheKeyGiven(t *testing.T) {
	cases := []struct{ src, key string }{
		{"[disk]\ninner_radius = 40.0\n", "disk.inner_radius"},
		{"[disk]\nouter_radius = 2.0\n", "disk.outer_radius"},
		{"[disk]\ninner_radius = 40.0\nouter_radius = 35.0\n", "disk.outer_radius"},
		{"[spectrum]\nenergy_min_kev = 20.0\n", "spectrum.energy_min_kev"},
		{"[spectrum]\nenergy_max_kev = 1.0\n", "spectrum.energy_max_kev"},
		{"[band]\nr_min = \"12\"\n", "band.r_min"},
		{"[band]\nr_max = \"horizon\"\n", "band.r_max"},
	}
	for _, c := range cases {
		s, err := Parse("scene.toml", []byte(c.src))
		if err != nil {
			t.Fatalf("%q: %v", c.src, err)
		}
		_, err = s.Resolve()
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Key != c.key {
			t.Errorf("%q: error %v, want it to name %s", c.src, err, c.key)
		}
	}
	// The same through the flags.
	s := Default()
	for _, f := range Fields() {
		if f.Flag == "inner" {
			if err := f.Set(&s, "45"); err != nil {
				t.Fatal(err)
			}
		}
	}
	var fe *FieldError
	if _, err := s.Resolve(); !errors.As(err, &fe) || fe.Key != "disk.inner_radius" || !strings.Contains(fe.Allowed, "disk.outer_radius = 30") {
		t.Errorf("--inner 45: error %v, want it to blame disk.inner_radius", err)
	}
}

// TestParseMessagesInWords checks that scene file errors name the line,
// the key and what was found, in words instead of the decoder's terms,
// and quote at most MaxValueLen characters of a value.
func TestParseMessagesInWords(t *testing.T) {
	long := strings.Repeat("7", 5000)
	cases := []struct{ src, key, want string }{
		{"[black_hole]\nspin = 1e999\n", "black_hole.spin", "found 1e999"},
		{"[emission]\nline_kev = 0x10\n", "emission.line_kev", "not a number TOML can read"},
		{"black_hole = 5\n", "black_hole", "TOML integer where a table"},
		{"[black_hole]\nspin = {a = 1}\n", "black_hole.spin", "TOML inline table where a number is expected"},
		{"[black_hole.spin]\n", "black_hole.spin", "TOML table where a number is expected"},
		{"[screen]\nwidth = 99999999999999999999999\n", "screen.width", "whole number too large"},
		{"[disk]\nopaque = true\nopaque = false\n", "disk.opaque", "given twice"},
		{"[black_hole]\nspin = \"" + long + "\"\n", "black_hole.spin", "…"},
		{"[black_hole]\nspin = " + long + "e999\n", "black_hole.spin", "…"},
	}
	for _, c := range cases {
		_, err := Parse("scene.toml", []byte(c.src))
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%.40q: error %v, want a *ParseError", c.src, err)
			continue
		}
		msg := err.Error()
		if pe.Key != c.key || pe.Line < 1 || !strings.Contains(msg, c.want) {
			t.Errorf("%.40q: %v (key %q), want key %q and %q", c.src, msg, pe.Key, c.key, c.want)
		}
		for _, raw := range []string{"strconv", "scene.Hole", "scene.Scene", "cannot decode", "cannot store", "float64", "go-toml"} {
			if strings.Contains(msg, raw) {
				t.Errorf("%.40q: message %q shows the parser's %q", c.src, msg, raw)
			}
		}
		if len([]rune(pe.Found)) > MaxValueLen || len(msg) > 400 {
			t.Errorf("%.40q: message of %d bytes, found %q", c.src, len(msg), pe.Found)
		}
	}
	// A long value given by flag is cut too.
	s := Default()
	err := Fields()[0].Set(&s, long)
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Key != "black_hole.spin" || len([]rune(fe.Value)) != MaxValueLen || !strings.HasSuffix(fe.Value, "…") {
		t.Errorf("long flag value: %v", err)
	}
}

func TestByteOrderMarkAccepted(t *testing.T) {
	s, err := Parse("scene.toml", []byte("\xef\xbb\xbf[black_hole]\nspin = 0.5\n"))
	if err != nil || s.Hole.Spin != 0.5 {
		t.Errorf("BOM scene: %v, spin %v", err, s.Hole.Spin)
	}
	if _, err := Parse("scene.toml", []byte("[black_hole]\nspin = 0.5\n\xff\n")); err == nil || !strings.Contains(err.Error(), "scene.toml:3: not UTF-8") {
		t.Errorf("invalid UTF-8: %v", err)
	}
}

func TestLoadSizeCap(t *testing.T) {
	big := filepath.Join(t.TempDir(), "big.toml")
	if err := os.WriteFile(big, []byte("# "+strings.Repeat("x", MaxSceneBytes)+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	paths := []string{big}
	if _, err := os.Stat("/dev/zero"); err == nil {
		paths = append(paths, "/dev/zero") // never ends: Load must stop at the cap
	}
	for _, p := range paths {
		_, err := Load(p)
		var pe *ParseError
		if !errors.As(err, &pe) || !strings.Contains(err.Error(), "larger than 1024 KiB") {
			t.Errorf("%s: %v", p, err)
		}
	}
}

// TestResolveIsMachineIndependent checks that the largest scene Resolve
// accepts does not depend on the memory of the machine: memory is checked
// by the command, against outputs.MemoryEstimate.
func TestResolveIsMachineIndependent(t *testing.T) {
	s := Default()
	s.Screen.Width, s.Screen.Height, s.Disk.Orders = MaxPixels, MaxPixels, MaxOrders
	if _, err := s.Resolve(); err != nil {
		t.Errorf("largest screen refused: %v", err)
	}
}
