package outputs

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Every decorated figure of one run (maps, rings grid, spectrum, band
// figures) is exactly as wide as the run's column preset or width at its
// resolution, and each SVG states the same width in millimetres.
func TestRunFiguresShareWidth(t *testing.T) {
	for _, c := range []struct {
		column string
		mm     float64
		dpi    float64
		wantPx int
		wantMM float64
	}{
		{"single", 0, 300, 1016, 86},  // 86 mm at 300 dpi
		{"double", 0, 150, 1051, 178}, // 178 mm at 150 dpi
		{"single", 120, 100, 472, 120},
	} {
		dir := t.TempDir()
		r := resolve(t, func(s *scene.Scene) {
			s.Output.Directory = dir
			// Every map but the thermal ones, which need a [thermal] disk.
			s.Output.Maps = slices.DeleteFunc(slices.Clone(scene.MapNames), func(m string) bool { return slices.Contains(scene.ThermalMaps, m) })
			s.Output.Formats = []string{"png", "csv", "svg"}
			s.Output.Column, s.Output.WidthMM, s.Output.DPI = c.column, c.mm, c.dpi
			s.Screen.Width, s.Screen.Height = 48, 32
		})
		if _, err := Run(context.Background(), r, Options{Version: "test", Band: true}); err != nil {
			t.Fatal(err)
		}
		names, _ := filepath.Glob(filepath.Join(dir, "*.png"))
		n := 0
		for _, name := range names {
			if strings.HasSuffix(name, "-bare.png") {
				continue
			}
			n++
			f, err := os.Open(name)
			if err != nil {
				t.Fatal(err)
			}
			cfg, err := png.DecodeConfig(f)
			f.Close()
			if err != nil {
				t.Fatal(err)
			}
			if cfg.Width != c.wantPx {
				t.Errorf("%s %v mm at %v dpi: %s is %d px wide, want %d", c.column, c.mm, c.dpi, filepath.Base(name), cfg.Width, c.wantPx)
			}
		}
		maps := len(scene.MapNames) - len(scene.ThermalMaps)
		if n != maps+3 { // every map, the spectrum, the two band figures
			t.Errorf("%d decorated figures", n)
		}
		svgs, _ := filepath.Glob(filepath.Join(dir, "*.svg"))
		if len(svgs) != maps+3 {
			t.Errorf("%d SVG figures, want every map, the spectrum and the two band figures", len(svgs))
		}
		width := regexp.MustCompile(`<svg [^>]*width="([0-9.]+)mm"`)
		for _, name := range svgs {
			data, err := os.ReadFile(name)
			if err != nil {
				t.Fatal(err)
			}
			m := width.FindSubmatch(data)
			if m == nil {
				t.Fatalf("%s: no width in mm", name)
			}
			// The width in mm is the pixel width at the resolution.
			if mm, _ := strconv.ParseFloat(string(m[1]), 64); math.Abs(mm-float64(c.wantPx)/c.dpi*25.4) > 0.01 || math.Abs(mm-c.wantMM) > 0.2 {
				t.Errorf("%s: %v mm wide, want %v", filepath.Base(name), mm, c.wantMM)
			}
		}
	}
}

// The vector spectrum figure parses as XML and carries its axis labels as
// text (the markup turned into plain characters).
func TestSpectrumSVGText(t *testing.T) {
	dir := t.TempDir()
	r := resolve(t, func(s *scene.Scene) {
		s.Output.Directory = dir
		s.Output.Maps = []string{"redshift"}
		s.Output.Formats = []string{"csv", "svg"}
	})
	if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(filepath.Join(dir, "spectrum.svg"))
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(data))
	var text strings.Builder
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("spectrum.svg is not XML: %v", err)
		}
		if cd, ok := tok.(xml.CharData); ok {
			text.Write(cd)
		}
	}
	for _, want := range []string{"observed energy Eobs [keV]", "photon flux FE [keV−1, relative]", "rest energy 6.4 keV"} {
		if !strings.Contains(text.String(), want) {
			t.Errorf("spectrum.svg has no text %q", want)
		}
	}
}

// writeFile writes a test file and returns its path.
func writeFile(t *testing.T, name, body string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestReadOverlay(t *testing.T) {
	ov, err := ReadOverlay(writeFile(t, "cmp.csv", "# a comment\nE_keV,flux\n3, 0.5\n4\t1.5\n5;2\n"))
	if err != nil {
		t.Fatal(err)
	}
	if ov.Name != "cmp.csv" || len(ov.E) != 3 || ov.E[2] != 5 || ov.Flux[1] != 1.5 {
		t.Errorf("overlay %+v", ov)
	}
	for _, c := range []struct{ body, want string }{
		{"E,F\n3,1\n4,x\n", `line 3: flux "x" is not a number`},
		{"3,1\nfour,1\n", `line 2: energy "four" is not a number`},
		{"3,1\n3,2\n", "line 2: energy 3 keV does not increase"},
		{"3,1\n4,-1\n", "line 2: flux -1 must be finite and not negative"},
		{"-3,1\n4,1\n", "line 1: energy -3 keV must be positive"},
		{"3,1\n", "has 1 data rows, need at least 2"},
		{"3 1\n4\n", "line 2: has 1 column"},
		{"3,0\n4,0\n", "no positive flux"},
	} {
		_, err := ReadOverlay(writeFile(t, "bad.csv", c.body))
		var fe *scene.FieldError
		if !errors.As(err, &fe) || fe.Key != "output.spectrum_overlay" || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want a FieldError with %q", c.body, err, c.want)
		}
	}
	if _, err := ReadOverlay(filepath.Join(t.TempDir(), "missing.csv")); err == nil || !strings.Contains(err.Error(), "cannot be read") {
		t.Errorf("missing file: %v", err)
	}
}

// Area normalisation gives the total unit integral (checked by the
// midpoint rule over the bins, independent of the trapezoid the code
// uses), peak normalisation a maximum of exactly 1; the overlay is scaled
// by its own area or peak.
func TestSpectrumNormalisation(t *testing.T) {
	s := &pixels.Spectrum{MinKeV: 2, MaxKeV: 8, LineKeV: 6.4, Order: [][]float64{make([]float64, 60), make([]float64, 60)}}
	for k := range 60 {
		e := 2 + (float64(k)+0.5)*0.1
		s.Order[0][k] = math.Exp(-(e - 6) * (e - 6))
		s.Order[1][k] = 0.1 * math.Exp(-(e-5)*(e-5))
	}
	ov := &Overlay{Name: "o", E: []float64{3, 5, 7}, Flux: []float64{2, 4, 2}}
	area := SpectrumPlot(s, "t", "", 0, 0, SpectrumOptions{Norm: "area", Overlay: ov})
	sum := 0.0
	for _, y := range area.Series[0].Y {
		sum += y * 0.1
	}
	if math.Abs(sum-1) > 0.01 {
		t.Errorf("area-normalised total integrates to %v", sum)
	}
	last := area.Series[len(area.Series)-1]
	if got := 0.5*(last.Y[0]+last.Y[1])*2 + 0.5*(last.Y[1]+last.Y[2])*2; math.Abs(got-1) > 1e-12 {
		t.Errorf("overlay integrates to %v", got)
	}
	pk := SpectrumPlot(s, "t", "", 0, 0, SpectrumOptions{Norm: "peak", Overlay: ov, LogY: true})
	if m := peak(pk.Series[0].Y); m != 1 {
		t.Errorf("peak-normalised total peaks at %v", m)
	}
	if m := peak(pk.Series[len(pk.Series)-1].Y); m != 1 {
		t.Errorf("peak-normalised overlay peaks at %v", m)
	}
	if !pk.LogY || !(pk.YMin > 0 && pk.YMax > 1) {
		t.Errorf("log axis %v, range %v–%v", pk.LogY, pk.YMin, pk.YMax)
	}
}
