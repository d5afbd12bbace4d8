package main

import (
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"kerrscope/render/outputs"
	"kerrscope/scene"
)

// TestValuesThatOverflowAreRefused checks that values whose derived
// quantities overflow (a steep rising emissivity, a subnormal line energy,
// an absurd mass or energy range) are refused before anything is
// rendered: exit status 2, one line naming the key, nothing written.
func TestValuesThatOverflowAreRefused(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	steep := filepath.Join(dir, "steep.toml")
	if err := os.WriteFile(steep, []byte("[emission]\nindex = -27.0\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	small := []string{"--width", "64", "--height", "64", "--out", out, "--quiet"}
	cases := []struct {
		args []string
		key  string
	}{
		{[]string{"render", "--index=-27"}, "emission.index = -27"},
		{[]string{"render", "--scene", steep}, "emission.index = -27"},
		{[]string{"render", "--emissivity", "broken", "--index-outer=-40"}, "emission.index_outer = -40"},
		{[]string{"render", "--line", "1e-320"}, "emission.line_kev = 1e-320"},
		{[]string{"render", "--mass", "1e308", "--distance-kpc", "8"}, "black_hole.mass_msun = 1e+308"},
		{[]string{"render", "--emax", "1e308"}, "spectrum.energy_max_kev = 1e+308"},
		{[]string{"render", "--fwhm", "1e300"}, "spectrum.instrument_fwhm_ev"},
		{[]string{"sweep", "--vary", "index=-30:-20:3"}, "emission.index = -30"},
		{[]string{"sweep", "--vary", "line=1e-320:1:2"}, "emission.line_kev"},
	}
	for _, c := range cases {
		code, stdout, stderr := runCLI(append(c.args, small...)...)
		if code != 2 || stdout != "" || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, c.key) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", c.args, code, stdout, stderr)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("refused runs created %s", out)
	}
	// The command's error carries the typed scene error.
	err := runRender(context.Background(), append([]string{"--index=-27"}, small...), io.Discard, io.Discard)
	var fe *scene.FieldError
	if !errors.As(err, &fe) || fe.Key != "emission.index" || fe.Value != "-27" || !strings.Contains(fe.Allowed, "±20.3") {
		t.Errorf("runRender: %v", err)
	}
}

// TestSceneInputIsBoundedAndClear checks the scene file and flag input:
// a size cap (a device that never ends is refused quickly), a UTF-8 BOM
// accepted, long values cut, the decoder's own words replaced, and the key
// the user set blamed.
func TestSceneInputIsBoundedAndClear(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	long := strings.Repeat("9", 50000)
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"--scene", write("big.toml", "#"+strings.Repeat(" ", 2<<20))}, []string{"larger than 1024 KiB"}},
		{[]string{"--scene", write("float.toml", "[black_hole]\nspin = 1e999\n")}, []string{`key "black_hole.spin"`, "found 1e999"}},
		{[]string{"--scene", write("table.toml", "black_hole = 5\n")}, []string{`key "black_hole"`, "where a table"}},
		{[]string{"--scene", write("long.toml", "[black_hole]\nspin = \""+long+"\"\n")}, []string{`key "black_hole.spin"`, "…"}},
		{[]string{"--spin", "fast" + long}, []string{"--spin", "black_hole.spin = fast999", "…", "not a number"}},
		{[]string{"--spin", "1e999"}, []string{"--spin", "out of the range"}},
		{[]string{"--orders", "two"}, []string{"--orders", "disk.orders = two", "not a whole number"}},
		{[]string{"--inner", "45"}, []string{"disk.inner_radius = 45", "disk.outer_radius = 30"}},
		{[]string{"--scene", write("inner.toml", "[disk]\ninner_radius = 45.0\n")}, []string{"disk.inner_radius = 45"}},
		{[]string{"--outer", "2"}, []string{"disk.outer_radius = 2"}},
	}
	if _, err := os.Stat("/dev/zero"); err == nil {
		cases = append(cases, struct {
			args []string
			want []string
		}{[]string{"--scene", "/dev/zero"}, []string{"/dev/zero", "larger than 1024 KiB"}})
	}
	for _, c := range cases {
		code, stdout, stderr := runCLI(append(append([]string{"render"}, c.args...), "--out", out, "--quiet", "--width", "8", "--height", "8")...)
		ok := code == 2 && stdout == "" && strings.Count(stderr, "\n") == 1 && len(stderr) < 500
		for _, w := range c.want {
			ok = ok && strings.Contains(stderr, w)
		}
		for _, raw := range []string{"strconv", "scene.Hole", "cannot decode", "invalid value"} {
			ok = ok && !strings.Contains(stderr, raw)
		}
		if !ok {
			t.Errorf("%.60q: exit %d, stdout %q, stderr %.300q", c.args, code, stdout, stderr)
		}
	}
	bom := write("bom.toml", "\xef\xbb\xbf[black_hole]\nspin = 0.5\n")
	if code, _, stderr := runCLI("render", "--scene", bom, "--out", out, "--quiet", "--width", "8", "--height", "8", "--formats", "csv"); code != 0 {
		t.Errorf("scene with a byte-order mark: exit %d, %s", code, stderr)
	}
}

// TestMemoryCheckInCommand checks that the command refuses a scene whose
// memory estimate exceeds the limit the process may use, and accepts it
// when the limit is large enough.
func TestMemoryCheckInCommand(t *testing.T) {
	defer func(f func() (int64, string, bool)) { memoryLimit = f }(memoryLimit)
	dir := t.TempDir()
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 64, 64
	s.Output.Formats = []string{"csv"}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	need := outputs.MemoryEstimate(r, outputs.Set{Manifest: true}, runtime.GOMAXPROCS(0))
	memoryLimit = func() (int64, string, bool) { return need - 1, "a test limit", true }
	for _, cmd := range [][]string{{"render"}, {"locate"}, {"sweep", "--vary", "spin=0.1:0.2:2"}} {
		args := append(cmd, "--width", "64", "--height", "64", "--out", filepath.Join(dir, "out"), "--quiet", "--formats", "csv")
		code, _, stderr := runCLI(args...)
		if code != 2 || !strings.Contains(stderr, "needs about") || !strings.Contains(stderr, "a test limit") {
			t.Errorf("%v under a limit of %d bytes: exit %d, %q", cmd, need-1, code, stderr)
		}
	}
	memoryLimit = func() (int64, string, bool) { return need, "a test limit", true }
	if code, _, stderr := runCLI("render", "--width", "64", "--height", "64", "--out", filepath.Join(dir, "out"), "--quiet", "--formats", "csv"); code != 0 {
		t.Errorf("at the limit: exit %d, %s", code, stderr)
	}
	memoryLimit = func() (int64, string, bool) { return 0, "", false }
	if err := checkMemory(r, outputs.Set{Manifest: true}); err != nil {
		t.Errorf("no known limit: %v", err)
	}
}

// TestReadCgroupLimit checks the two formats of control-group limits:
// cgroup v2 memory.max ("max" = none, else bytes) and cgroup v1
// memory.limit_in_bytes (a number near 2⁶³ = none) (Linux kernel
// documentation, admin-guide/cgroup-v2 and cgroup-v1/memory).
func TestReadCgroupLimit(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		text string
		v    int64
		ok   bool
	}{{"max\n", 0, false}, {"4294967296\n", 4 << 30, true}, {"9223372036854771712\n", 0, false}, {"junk", 0, false}, {"0\n", 0, false}} {
		p := filepath.Join(dir, "limit")
		if err := os.WriteFile(p, []byte(c.text), 0o644); err != nil {
			t.Fatal(err)
		}
		if v, ok := readCgroupLimit(p); v != c.v || ok != c.ok {
			t.Errorf("%q: %d %v, want %d %v", c.text, v, ok, c.v, c.ok)
		}
	}
	if _, ok := readCgroupLimit(filepath.Join(dir, "absent")); ok {
		t.Error("absent file read as a limit")
	}
	kb, ok := meminfoField([]byte("MemTotal:       24000000 kB\nMemAvailable:   12345678 kB\n"), "MemAvailable")
	if !ok || kb != 12345678 {
		t.Errorf("MemAvailable: %d %v", kb, ok)
	}
}
