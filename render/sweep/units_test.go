package sweep

import (
	"bytes"
	"context"
	"math"
	"os"
	"path/filepath"
	"testing"

	"kerrscope/render/outputs"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

func TestReadSpectrumUnits(t *testing.T) {
	// The merged spectra plot reads each frame's table back: the numbers
	// as written, and whether they are physical (the table's header).
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 24, 24
	rel, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	mass, dist, lum := 3.1e7, 8.0, 1e35
	s.Hole.MassSolar, s.Hole.DistanceKpc, s.Emission.LineLuminosityErgS = &mass, &dist, &lum
	phys, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	f, err := pixels.Render(context.Background(), rel, nil)
	if err != nil {
		t.Fatal(err)
	}
	spec := f.Spectrum()
	peak := func(v []float64) float64 {
		m := 0.0
		for _, x := range v {
			m = math.Max(m, x)
		}
		return m
	}
	var peaks [2]float64
	for i, r := range []scene.Resolved{rel, phys} {
		var b bytes.Buffer
		if err := outputs.WriteCSV(&b, &spec, "t", r); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(t.TempDir(), "s.csv")
		if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		_, _, _, flux, physical, err := readSpectrum(path)
		if err != nil {
			t.Fatal(err)
		}
		if physical != (i == 1) {
			t.Errorf("table %d read as physical = %v", i, physical)
		}
		peaks[i] = peak(flux)
	}
	if want := peaks[0] * phys.SpectrumPerUnit(); math.Abs(peaks[1]/want-1) > 1e-8 {
		t.Errorf("physical peak %v, want %v", peaks[1], want)
	}
}
