package outputs

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// TestContinuumFiles: a thermal scene writes continuum.csv and its plot,
// and the temperature maps into maps.fits (read back by astropy, with
// their units and the frame's values); the table's columns hold the
// bolometric flux its header states (∫ E N_E dE over the energies, a
// trapezoid in ln E, misses little of the blackbodies), and the run is
// byte-identical when repeated.
func TestContinuumFiles(t *testing.T) {
	dir := t.TempDir()
	r := resolve(t, func(s *scene.Scene) {
		mass, dist, edd := 10.0, 8.0, 0.1
		s.Hole.MassSolar, s.Hole.DistanceKpc, s.Thermal.EddingtonRatio = &mass, &dist, &edd
		s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 48, 40, 70 // a fixed window, as Render sees it
		s.Output.Directory = dir
		s.Output.Maps = []string{"temperature", "color-temperature"}
	})
	if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"continuum.csv", "continuum.png", "temperature.png", "color-temperature-bare.png", "spectrum.csv"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Error(err)
		}
	}
	data, err := os.ReadFile(filepath.Join(dir, "continuum.csv"))
	if err != nil {
		t.Fatal(err)
	}
	var bol float64
	var e, n []float64
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		if rest, ok := strings.CutPrefix(line, "# bolometric flux in the image "); ok {
			bol, _ = strconv.ParseFloat(strings.Fields(rest)[0], 64)
		}
		if line == "" || line[0] == '#' || strings.HasPrefix(line, "energy") {
			continue
		}
		cols := strings.Split(line, ",")
		x, _ := strconv.ParseFloat(cols[0], 64)
		y, _ := strconv.ParseFloat(cols[1], 64)
		e, n = append(e, x), append(n, y)
	}
	if len(e) != r.Thermal.Bins || !(bol > 0) {
		t.Fatalf("%d rows (want %d), bolometric flux %v", len(e), r.Thermal.Bins, bol)
	}
	sum := 0.0
	for k := 1; k < len(e); k++ {
		sum += 0.5 * (n[k]*e[k]*e[k] + n[k-1]*e[k-1]*e[k-1]) * math.Log(e[k]/e[k-1])
	}
	sum *= scene.ErgPerKeV
	if math.Abs(sum/bol-1) > 2e-3 {
		t.Errorf("∫ E N_E dE from the table = %.6g erg cm⁻² s⁻¹, header %.6g", sum, bol)
	}
	fitsData, err := os.ReadFile(filepath.Join(dir, "maps.fits"))
	if err != nil {
		t.Fatal(err)
	}
	for _, ext := range []string{"TEMPEFF", "TEMPCOL", "MDOT", "EFFIC", "FCOL"} {
		if !bytes.Contains(fitsData, []byte(ext)) {
			t.Errorf("maps.fits lacks %s", ext)
		}
	}
	// An independent reader (astropy) finds the temperature maps with
	// their units and the values of the frame.
	py := findAstropy(t)
	const read = `
import json, sys, numpy as np
from astropy.io import fits
with fits.open(sys.argv[1]) as h:
    h.verify('exception')
    print(json.dumps({e.header['EXTNAME']: [e.header.get('BUNIT', ''), float(np.nansum(e.data.astype(np.float64)))] for e in h[1:] if e.header['EXTNAME'] in ('TEMPEFF', 'TEMPCOL')}))
`
	outb, err := exec.Command(py, "-c", read, filepath.Join(dir, "maps.fits")).CombinedOutput()
	if err != nil {
		t.Fatalf("astropy: %v\n%s", err, outb)
	}
	var got map[string][2]any
	if err := json.Unmarshal(outb, &got); err != nil {
		t.Fatalf("%v: %s", err, outb)
	}
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	for name, c := range map[string]struct {
		unit string
		at   func(int) float32
	}{"TEMPEFF": {"K", f.TemperatureAt}, "TEMPCOL": {"keV", f.ColorTemperatureAt}} {
		want := 0.0
		for k := range f.Fate {
			if v := float64(c.at(k)); !math.IsNaN(v) {
				want += v
			}
		}
		g := got[name]
		if unit, _ := g[0].(string); unit != c.unit {
			t.Errorf("%s: BUNIT %q, want %q", name, g[0], c.unit)
		}
		if sum, _ := g[1].(float64); !(want > 0) || math.Abs(sum/want-1) > 1e-6 {
			t.Errorf("%s: sum %v as astropy reads it, %v in the frame", name, g[1], want)
		}
	}
	if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	if again, _ := os.ReadFile(filepath.Join(dir, "continuum.csv")); !bytes.Equal(again, data) {
		t.Error("continuum.csv differs between two runs of the same scene")
	}
}
