package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The echo command writes its files and reports the lamp's fractions;
// bad input exits with status 2 naming the key or flag, and writes
// nothing.
func TestEchoCLI(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "echo")
	code, stdout, stderr := runCLI("echo", "--out", out, "--width", "32", "--height", "32", "--lamp-height", "4", "--quiet")
	if code != 0 || !strings.Contains(stdout, "photons to the disk") || !strings.Contains(stdout, "wrote 7 files") {
		t.Fatalf("echo: exit %d: %s%s", code, stdout, stderr)
	}
	for _, n := range []string{"lamp-profile.csv", "lamp-profile.png", "echo.fits", "echo.png", "echo-lag-frequency.csv", "echo-lag-energy.csv", "echo.toml"} {
		if _, err := os.Stat(filepath.Join(out, n)); err != nil {
			t.Errorf("%s: %v", n, err)
		}
	}
	// The effective scene makes the same run again.
	again := filepath.Join(dir, "again")
	if code, _, stderr := runCLI("echo", "--scene", filepath.Join(out, "echo.toml"), "--out", again, "--quiet"); code != 0 {
		t.Fatalf("echo --scene echo.toml: exit %d: %s", code, stderr)
	}
	a, _ := os.ReadFile(filepath.Join(out, "echo.fits"))
	b, _ := os.ReadFile(filepath.Join(again, "echo.fits"))
	if len(a) == 0 || string(a) != string(b) {
		t.Errorf("echo.fits differs when made again from echo.toml")
	}
	bad := filepath.Join(dir, "bad")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--inclination", "95"}, "observer.inclination_deg"},
		{[]string{"--emissivity", "powerlaw"}, "emission.emissivity"},
		{[]string{"--lamp-height", "1.0"}, "emission.lamp_height"},
		{[]string{"--photon-index", "9"}, "emission.photon_index"},
		{[]string{"--time-bins", "1"}, "time-bins"},
		{[]string{"--duration", "-3"}, "duration"},
	} {
		code, _, stderr := runCLI(append([]string{"echo", "--out", bad, "--width", "16", "--height", "16", "--quiet"}, c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.want) {
			t.Errorf("echo %v: exit %d, stderr %q; want status 2 naming %s", c.args, code, stderr, c.want)
		}
	}
	if _, err := os.Stat(bad); err == nil {
		if ents, _ := os.ReadDir(bad); len(ents) > 0 {
			t.Errorf("refused runs left %d entries in %s", len(ents), bad)
		}
	}
}

// A sweep over the lamp's height and the spin renders every frame with its
// own lamp: the line profiles of different heights differ.
func TestLampSweepCLI(t *testing.T) {
	out := filepath.Join(t.TempDir(), "sw")
	code, stdout, stderr := runCLI("sweep", "--emissivity", "lamp", "--lamp-height", "3", "--vary", "lamp-height=2:10:2", "--vary", "spin=0.5:0.9:2",
		"--width", "24", "--height", "24", "--maps", "intensity", "--formats", "csv", "--out", out, "--quiet")
	if code != 0 || !strings.Contains(stdout, "4 rendered now") {
		t.Fatalf("sweep: exit %d: %s%s", code, stdout, stderr)
	}
	a, err1 := os.ReadFile(filepath.Join(out, "frame-0000-spectrum.csv"))
	b, err2 := os.ReadFile(filepath.Join(out, "frame-0001-spectrum.csv"))
	if err1 != nil || err2 != nil || string(a) == string(b) {
		t.Errorf("frames 0 and 1, one swept value apart, have the same spectrum (%v, %v)", err1, err2)
	}
}
