package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestClippedWindowWarns renders a window narrower than the disk: the
// command warns on stderr with the estimate, and the same render with the
// automatic window is silent.
func TestClippedWindowWarns(t *testing.T) {
	for _, c := range []struct {
		fov  []string
		warn bool
	}{{[]string{"--fov", "30"}, true}, {nil, false}} {
		dir := t.TempDir()
		args := append([]string{"render", "--spin", "0.95", "--inclination", "75", "--width", "40", "--height", "40", "--formats", "csv", "--out", dir, "--quiet"}, c.fov...)
		code, _, errs := runCLI(args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		warned := strings.Contains(errs, "warning:") && strings.Contains(errs, "outside the window") && strings.Contains(errs, "%")
		if warned != c.warn {
			t.Errorf("%v: warned %v, want %v; stderr %q", c.fov, warned, c.warn, errs)
		}
		csv, err := os.ReadFile(filepath.Join(dir, "spectrum.csv"))
		if err != nil {
			t.Fatal(err)
		}
		if got := strings.HasPrefix(string(csv), "# the disk image touches the window's border"); got != c.warn {
			t.Errorf("%v: spectrum.csv notes the clipping: %v, want %v", c.fov, got, c.warn)
		}
	}
}
