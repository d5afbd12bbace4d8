package spot

import (
	"bytes"
	"context"
	"encoding/xml"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kerrscope/scene"
)

// Two runs of one scene write the same files, byte for byte, and the
// tables carry their units.
func TestRunReproducible(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "movie")
	var runs []map[string][]byte
	for range 2 {
		r, sp := movieScene(t, 0.9, 60, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height, s.Spot.Frames = 32, 32, 8
			s.Output.Directory = dir
		})
		sum, err := Run(context.Background(), r, sp, Options{Version: "test"})
		if err != nil {
			t.Fatal(err)
		}
		if len(sum.Files) != 8+8 {
			t.Fatalf("%d files, want 16: %v", len(sum.Files), sum.Files)
		}
		files := map[string][]byte{}
		for _, n := range sum.Files {
			b, err := os.ReadFile(n)
			if err != nil {
				t.Fatal(err)
			}
			files[filepath.Base(n)] = b
		}
		runs = append(runs, files)
	}
	for n, a := range runs[0] {
		if !bytes.Equal(a, runs[1][n]) {
			t.Errorf("%s differs between runs", n)
		}
	}
	lc := string(runs[0]["spot-lightcurve.csv"])
	if !strings.Contains(lc, "t_obs_m,orbits,flux,flux_spot,flux_bol\n") || !strings.Contains(lc, "M^2") {
		t.Errorf("light curve header lacks columns or units:\n%s", lc)
	}
}

// With svg among the formats the light curve, the centroid and the
// spectra figures are also written as SVG: well-formed XML (encoding/xml)
// carrying the axis labels as text, the same bytes on a second run.
func TestRunSVG(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "movie")
	var first map[string][]byte
	for run := range 2 {
		r, sp := movieScene(t, 0.9, 60, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height, s.Spot.Frames = 24, 24, 6
			s.Output.Directory = dir
			s.Output.Formats = []string{"png", "svg"}
		})
		if _, err := Run(context.Background(), r, sp, Options{Version: "test"}); err != nil {
			t.Fatal(err)
		}
		got := map[string][]byte{}
		for name, label := range map[string]string{"spot-lightcurve.svg": "observer time tobs [M]", "spot-centroid.svg": "β [M]", "spot-spectra.svg": "observed energy Eobs [keV]"} {
			data, err := os.ReadFile(filepath.Join(dir, name))
			if err != nil {
				t.Fatal(err)
			}
			got[name] = data
			var text strings.Builder
			dec := xml.NewDecoder(bytes.NewReader(data))
			for {
				tok, err := dec.Token()
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatalf("%s is not XML: %v", name, err)
				}
				if cd, ok := tok.(xml.CharData); ok {
					text.Write(cd)
				}
			}
			if !strings.Contains(text.String(), label) {
				t.Errorf("%s has no text %q", name, label)
			}
			if run == 1 && !bytes.Equal(data, first[name]) {
				t.Errorf("%s differs between runs", name)
			}
		}
		first = got
	}
}
