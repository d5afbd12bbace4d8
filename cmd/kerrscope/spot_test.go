package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A spot movie made in two shares and merged has the files of one made
// in one go, the frames byte for byte; misplaced flags are refused.
func TestSpotShardedCLI(t *testing.T) {
	dir := t.TempDir()
	movie := []string{"--spin", "0.9", "--inclination", "60", "--width", "24", "--height", "24", "--fov", "30",
		"--spot-alone", "--spot-radius", "7", "--spot-size", "0.7", "--frames", "4", "--quiet"}
	one, shared := filepath.Join(dir, "one"), filepath.Join(dir, "shared")
	if code, _, stderr := runCLI(append([]string{"spot", "--out", one}, movie...)...); code != 0 {
		t.Fatalf("spot: exit %d: %s", code, stderr)
	}
	for _, sh := range []string{"1/2", "2/2"} {
		code, stdout, stderr := runCLI(append([]string{"spot", "--out", shared, "--shard", sh}, movie...)...)
		if code != 0 || !strings.Contains(stdout, "shard "+sh+": 2 frames, 0 already finished, 2 rendered now") {
			t.Fatalf("spot --shard %s: exit %d: %s%s", sh, code, stdout, stderr)
		}
	}
	if code, _, stderr := runCLI("sweep-merge", "--out", shared); code != 0 {
		t.Fatalf("sweep-merge: exit %d: %s", code, stderr)
	}
	for _, n := range []string{"spot-frame-0000.png", "spot-frame-0003.png", "spot-movie.gif", "spot-lightcurve.csv", "spot-centroid.png", "spot-spectra.csv"} {
		a, err1 := os.ReadFile(filepath.Join(one, n))
		b, err2 := os.ReadFile(filepath.Join(shared, n))
		if err1 != nil || err2 != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: in one go and in shares differ (%v, %v)", n, err1, err2)
		}
	}
	bad := filepath.Join(dir, "bad")
	cases := []struct {
		args []string
		flag string
	}{
		{[]string{"--restart"}, "--restart"},
		{[]string{"--intensity-max", "2"}, "--intensity-max"},
		{[]string{"--shard", "3/2"}, "--shard"},
		{[]string{"--shard", "1/1", "--intensity-max", "-1"}, "--intensity-max"},
	}
	for _, c := range cases {
		code, stdout, stderr := runCLI(append(append([]string{"spot", "--out", bad}, c.args...), movie...)...)
		if code != 2 || stdout != "" || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, c.flag) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", c.args, code, stdout, stderr)
		}
	}
	if _, err := os.Stat(bad); !os.IsNotExist(err) {
		t.Errorf("refused movies created %s", bad)
	}
	if code, _, stderr := runCLI("sweep-merge", "--out", shared, "--gif", "intensity"); code == 0 || !strings.Contains(stderr, "spot-movie.gif") {
		t.Errorf("sweep-merge --gif of a spot movie: exit %d, %q", code, stderr)
	}
}
