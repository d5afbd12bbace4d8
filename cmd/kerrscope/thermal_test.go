package main

import (
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// continuumBolometric reads the bolometric flux a continuum table states
// and the energy of the peak of its E² N_E column.
func continuumBolometric(t *testing.T, path string) (bol, peak float64) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	best := 0.0
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		if rest, ok := strings.CutPrefix(line, "# bolometric flux in the image "); ok {
			bol, _ = strconv.ParseFloat(strings.Fields(rest)[0], 64)
		}
		if line[0] == '#' || strings.HasPrefix(line, "energy") {
			continue
		}
		cols := strings.Split(line, ",")
		e, _ := strconv.ParseFloat(cols[0], 64)
		v, _ := strconv.ParseFloat(cols[len(cols)-1], 64)
		if v > best {
			best, peak = v, e
		}
	}
	return bol, peak
}

// TestSweepThermalKeys: a sweep varies the Eddington ratio and the colour
// correction. The disk's bolometric flux is proportional to the
// accretion rate (L = (1 − E_isco) Ṁ c², Page & Thorne 1974) and does not
// depend on f_col, which moves the spectrum's peak by f_col (colour
// correction conserves the bolometric flux; Shimura & Takahara 1995, ApJ
// 445, 780).
func TestSweepThermalKeys(t *testing.T) {
	common := []string{"--mass", "10", "--distance-kpc", "8", "--width", "20", "--height", "20",
		"--maps", "temperature", "--formats", "csv,bare", "--quiet"}
	dir := filepath.Join(t.TempDir(), "mdot")
	if code, out, errs := runCLI(append([]string{"sweep", "--vary", "eddington-ratio=0.01:1:3:log", "--out", dir}, common...)...); code != 0 {
		t.Fatalf("exit %d\n%s%s", code, out, errs)
	}
	b0, _ := continuumBolometric(t, filepath.Join(dir, "frame-0000-continuum.csv"))
	b2, _ := continuumBolometric(t, filepath.Join(dir, "frame-0002-continuum.csv"))
	if !(b0 > 0) || math.Abs(b2/b0/100-1) > 1e-6 {
		t.Errorf("bolometric flux at Eddington ratios 0.01 and 1: %g and %g, ratio %g, want 100", b0, b2, b2/b0)
	}
	if code, out, errs := runCLI("sweep-merge", "--out", dir); code != 0 || !strings.Contains(out, "sweep-continua.png") {
		t.Errorf("merge: exit %d\n%s%s", code, out, errs)
	}
	dir = filepath.Join(t.TempDir(), "fcol")
	if code, out, errs := runCLI(append([]string{"sweep", "--vary", "fcol=1.5:2.5:2", "--eddington-ratio", "0.1",
		"--continuum-emin", "0.01", "--continuum-emax", "50", "--continuum-bins", "2000", "--out", dir}, common...)...); code != 0 {
		t.Fatalf("exit %d\n%s%s", code, out, errs)
	}
	b0, p0 := continuumBolometric(t, filepath.Join(dir, "frame-0000-continuum.csv"))
	b1, p1 := continuumBolometric(t, filepath.Join(dir, "frame-0001-continuum.csv"))
	if math.Abs(b1/b0-1) > 1e-6 {
		t.Errorf("bolometric flux at f_col 1.5 and 2.5: %g and %g", b0, b1)
	}
	// Bins of 0.38 % in energy: the peaks agree to a bin.
	if math.Abs(p1/p0/(2.5/1.5)-1) > 0.01 {
		t.Errorf("peak of E² N_E at f_col 1.5 and 2.5: %g and %g keV, ratio %g, want %g", p0, p1, p1/p0, 2.5/1.5)
	}
	// Without a thermal disk the temperature maps are refused.
	if code, _, errs := runCLI("render", "--maps", "temperature", "--out", t.TempDir()); code != 2 || !strings.Contains(errs, "output.maps") {
		t.Errorf("temperature map without a thermal disk: exit %d, %q", code, errs)
	}
}
