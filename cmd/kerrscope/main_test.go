package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"strings"
	"testing"

	"kerrscope/scene"
)

func runCLI(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestProbeJSONKeys(t *testing.T) {
	code, out, _ := runCLI("probe", "--spin", "0.9", "--inclination", "60", "--alpha", "-3.1", "--beta", "4.2", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	if strings.Count(strings.TrimSpace(out), "\n") != 0 {
		t.Fatalf("want exactly one JSON line, got %q", out)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"spin", "inclination_deg", "alpha", "beta", "lambda", "eta", "fate", "crossings"} {
		if _, ok := m[k]; !ok {
			t.Errorf("missing key %q", k)
		}
	}
	if f := m["fate"]; f != "horizon" && f != "infinity" {
		t.Errorf("fate %v", f)
	}
	cs := m["crossings"].([]any)
	if len(cs) == 0 {
		t.Fatal("no crossings")
	}
	for _, k := range []string{"order", "r", "mino_time", "outbound", "time_delay", "delta_phi"} {
		if _, ok := cs[0].(map[string]any)[k]; !ok {
			t.Errorf("crossing lacks %q", k)
		}
	}
	// λ = -α sin θo (Bardeen 1973).
	if l := m["lambda"].(float64); l < 2.6846 || l > 2.6847 {
		t.Errorf("lambda %v", l)
	}
}

func TestProbeRejects(t *testing.T) {
	cases := []struct {
		args []string
		flag string
	}{
		{[]string{"--spin", "1", "--alpha", "1", "--beta", "1"}, "--spin"},
		{[]string{"--spin", "-1.5", "--alpha", "1", "--beta", "1"}, "--spin"},
		{[]string{"--inclination", "181", "--alpha", "1", "--beta", "1"}, "--inclination"},
		{[]string{"--inclination", "-0.1", "--alpha", "1", "--beta", "1"}, "--inclination"},
		{[]string{"--alpha", "NaN", "--beta", "1"}, "--alpha"},
		{[]string{"--alpha", "x", "--beta", "1"}, "--alpha"},
		{[]string{"--alpha", "1", "--beta", "Inf"}, "--beta"},
		{[]string{"--alpha", "1", "--beta", "1", "--orders", "0"}, "--orders"},
		{[]string{"--alpha", "1", "--beta", "1", "--orders", "two"}, "--orders"},
		{[]string{"--beta", "1"}, "--alpha"},
	}
	for _, c := range cases {
		code, out, errs := runCLI(append([]string{"probe"}, c.args...)...)
		if code != 2 || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, c.flag) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", c.args, code, out, errs)
		}
	}
}

func TestProbeText(t *testing.T) {
	code, out, _ := runCLI("probe", "--alpha", "0", "--beta", "0", "--spin", "0", "--inclination", "0")
	if code != 0 || !strings.Contains(out, "horizon") {
		t.Errorf("exit %d: %s", code, out)
	}
}

func TestLensingCLI(t *testing.T) {
	code, out, _ := runCLI("lensing", "--spin", "0", "--inclination", "0", "--directions", "30", "--orders", "4", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var m struct {
		Bands []struct {
			Order int      `json:"order"`
			Width float64  `json:"width"`
			Ratio *float64 `json:"ratio_to_previous"`
		} `json:"bands"`
	}
	if err := json.Unmarshal([]byte(out), &m); err != nil || len(m.Bands) != 4 {
		t.Fatalf("%v: %s", err, out)
	}
	// The first band has no previous one: null, not a number.
	if !strings.Contains(out, `"ratio_to_previous":null`) || m.Bands[0].Ratio != nil {
		t.Errorf("first band's ratio is not null: %s", out)
	}
	// Successive widths shrink by ≈ e^{-π} for a = 0 (Johnson et al. 2020).
	if r := m.Bands[3].Ratio; r == nil || *r < 0.042 || *r > 0.0445 {
		t.Errorf("ratio %v", r)
	}
	// Without --spin and --inclination, the built-in scene's values.
	code, out, errs := runCLI("lensing", "--directions", "0", "--orders", "1", "--json")
	want := scene.Default()
	var d struct {
		Spin        float64 `json:"spin"`
		Inclination float64 `json:"inclination_deg"`
	}
	if err := json.Unmarshal([]byte(out), &d); code != 0 || err != nil || d.Spin != want.Hole.Spin || d.Inclination != want.Observer.InclinationDeg {
		t.Errorf("lensing defaults: exit %d, %v, spin %v inclination %v, want %v %v; %s", code, err, d.Spin, d.Inclination, want.Hole.Spin, want.Observer.InclinationDeg, errs)
	}
	for _, bad := range [][]string{{"--orders", "0"}, {"--directions", "north"}, {"--spin", "2"}} {
		if code, _, errs := runCLI(append([]string{"lensing"}, bad...)...); code != 2 || !strings.Contains(errs, bad[0]) {
			t.Errorf("%v: exit %d %q", bad, code, errs)
		}
	}
}

func TestLocateCLI(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI("locate", "--spin", "0.9", "--inclination", "60", "--width", "48", "--height", "48",
		"--band-min", "isco", "--band-max", "isco*1.2", "--refine-depth", "2", "--formats", "csv", "--out", dir, "--quiet")
	if code != 0 || !strings.Contains(out, "fraction of the window's line flux") {
		t.Fatalf("exit %d: %s %s", code, out, errs)
	}
	for _, bad := range [][]string{{"--band-min", "iscoo"}, {"--band-min", "5", "--band-max", "4"}, {"--refine-depth", "-1"}} {
		args := append([]string{"locate", "--out", dir, "--width", "8", "--height", "8"}, bad...)
		if code, _, errs := runCLI(args...); code != 2 || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d %q", bad, code, errs)
		}
	}
}

func TestRenderCLIRejects(t *testing.T) {
	dir := t.TempDir()
	for _, bad := range [][]string{{"--spin", "1.5"}, {"--width", "0"}, {"--outer", "1"}, {"--fwhm", "-1"}, {"--maps", "sky"}, {"--spin", "fast"}, {"--scene", "/nonexistent.toml"}} {
		args := append([]string{"render", "--out", dir}, bad...)
		code, out, errs := runCLI(args...)
		if code != 2 || out != "" || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d, %q %q", bad, code, out, errs)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 0 {
		t.Errorf("rejected runs left %v", entries)
	}
}

func TestProbeReportsG(t *testing.T) {
	code, out, _ := runCLI("probe", "--spin", "0", "--inclination", "0", "--alpha", "10", "--beta", "0", "--outer", "50", "--json")
	if code != 0 {
		t.Fatal(code)
	}
	var m struct {
		Crossings []struct {
			R float64  `json:"r"`
			G *float64 `json:"g"`
		} `json:"crossings"`
	}
	json.Unmarshal([]byte(out), &m)
	if len(m.Crossings) == 0 || m.Crossings[0].G == nil {
		t.Fatalf("%s", out)
	}
	// Face-on Schwarzschild: g = sqrt(1 - 3/r) (Cunningham 1975).
	c := m.Crossings[0]
	if want := math.Sqrt(1 - 3/c.R); math.Abs(*c.G-want) > 1e-12 {
		t.Errorf("g = %v at r = %v, want %v", *c.G, c.R, want)
	}
	code, out, _ = runCLI("probe", "--spin", "0", "--inclination", "0", "--alpha", "10", "--beta", "0", "--outer", "8", "--json")
	if code != 0 || !strings.Contains(out, `"g":null`) {
		t.Errorf("crossing beyond the outer edge should have g null: %s", out)
	}
}

func TestDemoCLI(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI("demo", "--out", dir, "--width", "96", "--height", "64", "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, name := range []string{"redshift.png", "redshift-bare.png", "spectrum.csv", "spectrum.png", "maps.fits", "kerrscope-run.toml", "shadow.png"} {
		if !strings.Contains(out, name) {
			t.Errorf("demo did not list %s:\n%s", name, out)
		}
		if _, err := os.Stat(dir + "/" + name); err != nil {
			t.Error(err)
		}
	}
	if code, _, _ := runCLI("demo", "--scene", "x.toml"); code != 2 {
		t.Errorf("demo --scene: exit %d", code)
	}
}

// failingWriter fails every write, like a closed pipe.
type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) { return 0, errors.New("closed pipe") }

func TestVersionWritesToStdout(t *testing.T) {
	var out bytes.Buffer
	if code := run([]string{"version"}, &out, io.Discard); code != 0 || out.String() != "kerrscope "+version+"\n" {
		t.Fatalf("version: exit %d, %q", code, out.String())
	}
	var errb bytes.Buffer
	if code := run([]string{"version"}, failingWriter{}, &errb); code == 0 || !strings.Contains(errb.String(), "closed pipe") {
		t.Fatalf("version into a failing writer: exit %d, %q", code, errb.String())
	}
}

func TestNoArgumentsIsAUsageError(t *testing.T) {
	code, out, errs := runCLI()
	if code != 2 || out != "" || !strings.Contains(errs, "usage: kerrscope <command>") {
		t.Fatalf("no arguments: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	for _, h := range []string{"help", "-h", "--help"} {
		code, out, errs := runCLI(h)
		if code != 0 || errs != "" || !strings.Contains(out, "usage: kerrscope <command>") {
			t.Errorf("%s: exit %d, stdout %q, stderr %q", h, code, out, errs)
		}
	}
}

func TestVersionFlags(t *testing.T) {
	for _, v := range []string{"--version", "-v"} {
		code, out, errs := runCLI(v)
		if code != 0 || errs != "" || out != "kerrscope "+version+"\n" {
			t.Errorf("%s: exit %d, stdout %q, stderr %q", v, code, out, errs)
		}
	}
}

// TestRenderPrintsRingWidths checks that render prints the width of every
// photon ring n ≥ 1 when the rings map is drawn, with µas when the scene
// gives mass and distance, and nothing of the kind otherwise.
func TestRenderPrintsRingWidths(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI("render", "--out", dir, "--width", "80", "--height", "80", "--fov", "16", "--maps", "rings",
		"--formats", "png", "--mass", "4e6", "--distance-kpc", "8", "--orientation-marks", "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"photon ring n = 1: ring width ", "photon ring n = 2: ", " µas", "rings.png"} {
		if !strings.Contains(out, want) {
			t.Errorf("render output lacks %q:\n%s", want, out)
		}
	}
	if _, out, _ := runCLI("render", "--out", t.TempDir(), "--width", "40", "--height", "40", "--maps", "order", "--formats", "png", "--quiet"); strings.Contains(out, "photon ring") {
		t.Errorf("ring widths printed without the rings map:\n%s", out)
	}
}
