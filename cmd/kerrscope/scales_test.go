package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The colour-scale flags of render, demo and locate refuse values out of
// range with a usage error naming the flag, what was given and what is
// allowed, and write nothing.
func TestScaleFlagsRefused(t *testing.T) {
	cases := []struct {
		args []string
		flag string
		want string
	}{
		{[]string{"--g-min", "1.5"}, "--g-min", "between 0 and 1"},
		{[]string{"--g-max", "0.9"}, "--g-max", "above 1"},
		{[]string{"--g-max", "inf"}, "--g-max", "finite"},
		{[]string{"--intensity-max", "-2"}, "--intensity-max", "positive"},
		{[]string{"--intensity-decades", "40"}, "--intensity-decades", "at most 30"},
		{[]string{"--radius-min", "8", "--radius-max", "4"}, "--radius-max", "above scales.radius_min"},
		{[]string{"--radius-min", "50"}, "--radius-min", "outer edge"},
		{[]string{"--flux-max", "0"}, "--flux-max", "positive"},
		{[]string{"--scale-percentile", "50"}, "--scale-percentile", "below 50"},
		{[]string{"--scale-percentile", "-1"}, "--scale-percentile", "at least 0"},
		{[]string{"--scale-percentile", "x"}, "--scale-percentile", "not a number"},
	}
	for _, cmd := range []string{"render", "demo", "locate"} {
		for _, c := range cases {
			dir := filepath.Join(t.TempDir(), "out")
			args := append([]string{cmd, "--width", "8", "--height", "8", "--out", dir, "--quiet"}, c.args...)
			code, _, errs := runCLI(args...)
			if code != 2 || !strings.Contains(errs, c.flag) || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
				t.Errorf("%s %v: exit %d, stderr %q; want one line naming %s and %q", cmd, c.args, code, errs, c.flag, c.want)
			}
			if _, err := os.Stat(dir); err == nil {
				t.Errorf("%s %v: wrote %s", cmd, c.args, dir)
			}
		}
	}
}

// A render's run record notes the colour scales used and holds the ones
// given; rendering the record again reproduces every file byte for byte,
// and a percentile scale narrows the redshift range the record notes.
func TestScalesRecordedAndReproduced(t *testing.T) {
	a := t.TempDir()
	args := []string{"--width", "40", "--height", "32", "--formats", "png,csv", "--maps", "redshift,intensity", "--quiet"}
	if code, _, errs := runCLI(append([]string{"render", "--out", a, "--g-max", "1.4", "--scale-percentile", "2"}, args...)...); code != 0 {
		t.Fatalf("render: exit %d: %s", code, errs)
	}
	rec := string(mustReadFile(t, filepath.Join(a, "kerrscope-run.toml")))
	for _, want := range []string{"[scales]", "g_max = 1.4", "percentile = 2.0", "# colour scales used (percentile 2)", "#   g_min = ", "#   g_max = 1.4", "#   intensity_max = "} {
		if !strings.Contains(rec, want) {
			t.Errorf("run record lacks %q:\n%s", want, rec)
		}
	}
	b := t.TempDir()
	if code, _, errs := runCLI("render", "--scene", filepath.Join(a, "kerrscope-run.toml"), "--out", b, "--quiet"); code != 0 {
		t.Fatalf("rerun: exit %d: %s", code, errs)
	}
	for _, name := range []string{"redshift.png", "intensity.png", "spectrum.csv", "spectrum.png"} {
		if string(mustReadFile(t, filepath.Join(a, name))) != string(mustReadFile(t, filepath.Join(b, name))) {
			t.Errorf("%s differs when the run record is rendered again", name)
		}
	}
	if ra, rb := strings.ReplaceAll(rec, a, "DIR"), strings.ReplaceAll(string(mustReadFile(t, filepath.Join(b, "kerrscope-run.toml"))), b, "DIR"); ra != rb {
		t.Errorf("the rerun's record differs:\n%s\n---\n%s", ra, rb)
	}
	// The whole range (the default) reaches lower than the 2nd percentile.
	c := t.TempDir()
	if code, _, errs := runCLI(append([]string{"render", "--out", c}, args...)...); code != 0 {
		t.Fatalf("render: exit %d: %s", code, errs)
	}
	if lo, lo2 := noted(t, string(mustReadFile(t, filepath.Join(c, "kerrscope-run.toml"))), "g_min"), noted(t, rec, "g_min"); !(lo < lo2) {
		t.Errorf("g min %v with the whole range, %v at the 2nd percentile", lo, lo2)
	}
}

// noted returns the value of key in a run record's note of scales.
func noted(t *testing.T, rec, key string) float64 {
	t.Helper()
	for _, line := range strings.Split(rec, "\n") {
		if v, ok := strings.CutPrefix(line, "#   "+key+" = "); ok {
			var x float64
			if _, err := fmt.Sscan(v, &x); err != nil {
				t.Fatal(err)
			}
			return x
		}
	}
	t.Fatalf("no %s in the note:\n%s", key, rec)
	return 0
}

func mustReadFile(t *testing.T, path string) []byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// helpNote returns the default a command's --help states for a flag in
// its usage text, "(default X)".
func helpNote(t *testing.T, cmd, flag string) string {
	t.Helper()
	_, out, _ := runCLI(cmd, "--help")
	for _, line := range strings.Split(out, "\n") {
		if strings.HasPrefix(strings.TrimSpace(line), "--"+flag+" ") {
			_, rest, ok := strings.Cut(line, "(default ")
			if !ok {
				break
			}
			v, _, _ := strings.Cut(rest, ")")
			v, _, _ = strings.Cut(v, ",")
			return v
		}
	}
	t.Fatalf("%s --help states no default for --%s", cmd, flag)
	return ""
}

// The numeric scale defaults that --help states are the ones the
// commands then use: render's run record notes them, sweep prints them.
func TestScaleHelpDefaultsUsed(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI("render", "--width", "8", "--height", "8", "--formats", "csv", "--maps", "intensity", "--out", dir, "--quiet"); code != 0 {
		t.Fatalf("render: exit %d: %s", code, errs)
	}
	rec := string(mustReadFile(t, filepath.Join(dir, "kerrscope-run.toml")))
	if p := helpNote(t, "render", "scale-percentile"); !strings.Contains(rec, "(percentile "+p+")") {
		t.Errorf("render --help: percentile %s; the record:\n%s", p, rec)
	}
	if d := helpNote(t, "render", "intensity-decades"); fmt.Sprint(noted(t, rec, "intensity_decades")) != d {
		t.Errorf("render --help: %s decades; the record:\n%s", d, rec)
	}
	code, out, errs := runCLI("sweep", "--vary", "spin=0.5:0.6:2", "--width", "8", "--height", "8", "--formats", "csv", "--out", t.TempDir(), "--quiet")
	if code != 0 {
		t.Fatalf("sweep: exit %d: %s", code, errs)
	}
	if p := helpNote(t, "sweep", "scale-percentile"); !strings.Contains(out, "(pre-pass percentile "+p+")") {
		t.Errorf("sweep --help: percentile %s; the sweep said:\n%s", p, out)
	}
	if d := helpNote(t, "sweep", "intensity-decades"); !strings.Contains(out, "("+d+" decades)") {
		t.Errorf("sweep --help: %s decades; the sweep said:\n%s", d, out)
	}
}
