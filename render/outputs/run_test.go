package outputs

import (
	"bytes"
	"context"
	"encoding/json"
	"image/png"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

func resolve(t *testing.T, edit func(s *scene.Scene)) scene.Resolved {
	t.Helper()
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 64, 64
	edit(&s)
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func runScene(t *testing.T, dir string, edit func(s *scene.Scene)) []string {
	t.Helper()
	r := resolve(t, func(s *scene.Scene) {
		s.Output.Directory = dir
		edit(s)
	})
	sum, err := Run(context.Background(), r, Options{Version: "test", Band: true})
	if err != nil {
		t.Fatal(err)
	}
	return sum.Files
}

func TestRunIsReproducible(t *testing.T) {
	// Same scene twice → byte-identical files (common practice for
	// reproducible figures).
	a, b := t.TempDir(), t.TempDir()
	edit := func(s *scene.Scene) { s.Screen.Width, s.Screen.Height = 48, 40; s.Spectrum.FWHMeV = 100 }
	fa := runScene(t, a, edit)
	fb := runScene(t, b, edit)
	if len(fa) != len(fb) || len(fa) < 3 {
		t.Fatalf("files %v vs %v", fa, fb)
	}
	for i := range fa {
		x, _ := os.ReadFile(fa[i])
		y, _ := os.ReadFile(fb[i])
		// Only the output directory may differ (it is recorded in the manifest).
		y = bytes.ReplaceAll(y, []byte(b), []byte(a))
		if filepath.Base(fa[i]) != filepath.Base(fb[i]) || !bytes.Equal(x, y) {
			t.Errorf("%s differs between runs", filepath.Base(fa[i]))
		}
	}
	// The manifest reproduces the run.
	m, err := scene.Load(filepath.Join(a, "kerrscope-run.toml"))
	if err != nil {
		t.Fatal(err)
	}
	if m.Screen.Width != 48 || m.Spectrum.FWHMeV != 100 {
		t.Errorf("manifest lost values: %+v", m)
	}
}

func TestFailedRunLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	// An interrupt midway through the rows: no frame, no files.
	r := resolve(t, func(s *scene.Scene) { s.Output.Directory = filepath.Join(dir, "out"); s.Screen.Height = 200 })
	ctx, cancel := context.WithCancel(context.Background())
	f, err := pixels.Render(ctx, r, func(n int) {
		if n == 50 {
			cancel()
		}
	})
	if err == nil || f != nil {
		t.Fatalf("cancelled render returned %v, %v", f, err)
	}
	ctx, cancel = context.WithCancel(context.Background())
	cancel()
	if _, err := Run(ctx, r, Options{Version: "test"}); err == nil {
		t.Fatal("cancelled run succeeded")
	}
	if _, err := os.Stat(r.Output.Directory); !os.IsNotExist(err) {
		t.Errorf("a cancelled run created %s", r.Output.Directory)
	}
	// An output directory that cannot be made.
	bad := filepath.Join(dir, "not-a-dir")
	os.WriteFile(bad, []byte("x"), 0o644)
	r2 := resolve(t, func(s *scene.Scene) { s.Output.Directory = bad })
	if _, err := Run(context.Background(), r2, Options{}); err == nil {
		t.Fatal("writing into a file succeeded")
	}
	// A write that fails after another file was staged: Abort leaves nothing.
	lk, err := Lock(filepath.Join(dir, "staged"))
	if err != nil {
		t.Fatal(err)
	}
	defer lk.Unlock()
	out, err := NewOutputs(context.Background(), lk, "")
	if err != nil {
		t.Fatal(err)
	}
	if err := out.Write("a.txt", func(w io.Writer) error { _, err := w.Write([]byte("whole")); return err }); err != nil {
		t.Fatal(err)
	}
	if err := out.Write("b.txt", func(w io.Writer) error { return os.ErrInvalid }); err == nil {
		t.Fatal("failing writer reported no error")
	}
	out.Abort()
	lk.Unlock()
	if left, _ := os.ReadDir(filepath.Join(dir, "staged")); len(left) != 0 {
		t.Errorf("aborted outputs left %v", left)
	}
}

// findAstropy returns a Python that imports astropy, or "".
func findAstropy(t *testing.T) string {
	for _, py := range []string{"/usr/bin/python3", "python3"} {
		if exec.Command(py, "-c", "import astropy.io.fits, astropy.wcs").Run() == nil {
			return py
		}
	}
	if os.Getenv("CI") != "" {
		t.Fatal("CI needs python3-astropy (see .ci/run)")
	}
	t.Skip("no python3 with astropy")
	return ""
}

const readMaps = `
import json, sys, numpy as np
from astropy.io import fits
from astropy.wcs import WCS
out = {}
with fits.open(sys.argv[1]) as h:
    h.verify('exception')
    out['primary'] = {k: h[0].header[k] for k in ('SPIN', 'INCLIN', 'RISCO', 'ORIGIN')}
    for e in h[1:]:
        d = e.data
        w = WCS(e.header)
        ny, nx = d.shape
        corners = w.wcs_pix2world([[1, 1], [nx, ny], [3, 2]], 1).tolist()
        out[e.header['EXTNAME']] = {'shape': [nx, ny], 'corners': corners,
            'p32': None if np.isnan(d[1, 2]) else float(d[1, 2]),
            'nan': int(np.isnan(d).sum()), 'sum': float(np.nansum(d.astype(np.float64)))}
print(json.dumps(out))
`

func TestFITSReadByAstropy(t *testing.T) {
	// Independent reader: astropy.io.fits and astropy.wcs (IAU FITS Standard 4.0).
	py := findAstropy(t)
	dir := t.TempDir()
	r := resolve(t, func(s *scene.Scene) {
		s.Output.Directory = dir
		s.Output.Formats = []string{"fits"}
		s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 37, 29, 40
		s.Screen.CenterAlpha, s.Screen.CenterBeta = -1.5, 2.25
	})
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	outb, err := exec.Command(py, "-c", readMaps, filepath.Join(dir, "maps.fits")).CombinedOutput()
	if err != nil {
		t.Fatalf("astropy: %v\n%s", err, outb)
	}
	var got map[string]struct {
		Shape   []int
		Corners [][]float64
		P32     *float64
		NaN     int
		Sum     float64
	}
	if err := json.Unmarshal(outb, &got); err != nil {
		// The primary entry has another shape; decode it apart.
		t.Logf("%s", outb)
	}
	var prim struct {
		Primary map[string]any `json:"primary"`
	}
	json.Unmarshal(outb, &prim)
	if prim.Primary["SPIN"].(float64) != r.Hole.Spin || prim.Primary["RISCO"].(float64) != r.ISCO {
		t.Errorf("primary header %v", prim.Primary)
	}
	want := map[string][]float32{"REDSHIFT": f.FirstSeen(f.G), "RADIUS": f.FirstSeen(f.R), "INTENSITY": f.Total(f.Line)}
	for name, vals := range want {
		e, ok := got[name]
		if !ok {
			t.Fatalf("no extension %s in %v", name, outb)
		}
		if e.Shape[0] != f.W || e.Shape[1] != f.H {
			t.Errorf("%s shape %v", name, e.Shape)
		}
		// FITS pixel (1,1) is our bottom-left pixel centre; (W,H) the top-right.
		checks := [][3]float64{
			{pixels.PixelAlpha(r, 0), pixels.PixelBeta(r, f.H-1)},
			{pixels.PixelAlpha(r, f.W-1), pixels.PixelBeta(r, 0)},
			{pixels.PixelAlpha(r, 2), pixels.PixelBeta(r, f.H-2)},
		}
		for i, c := range checks {
			if math.Abs(e.Corners[i][0]-c[0]) > 1e-12 || math.Abs(e.Corners[i][1]-c[1]) > 1e-12 {
				t.Errorf("%s: WCS of corner %d = %v, renderer used (%v, %v)", name, i, e.Corners[i], c[0], c[1])
			}
		}
		// numpy d[1, 2] is FITS pixel (3, 2): our column 2, row H-2.
		v := vals[(f.H-2)*f.W+2]
		if (e.P32 == nil) != math.IsNaN(float64(v)) || (e.P32 != nil && float32(*e.P32) != v) {
			t.Errorf("%s pixel (3,2): astropy %v, renderer %v", name, e.P32, v)
		}
		nan, sum := 0, 0.0
		for _, x := range vals {
			if math.IsNaN(float64(x)) {
				nan++
			} else {
				sum += float64(x)
			}
		}
		if e.NaN != nan || math.Abs(e.Sum-sum) > 1e-9*math.Abs(sum) {
			t.Errorf("%s: astropy %d NaN, sum %v; renderer %d, %v", name, e.NaN, e.Sum, nan, sum)
		}
	}
}

func TestZoomWindow(t *testing.T) {
	// A window 1e-6 M wide on the near-extremal vertical piece: distinct,
	// evenly spaced pixel centres and a figure whose axes stay readable.
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg = 1-1e-8, 75
		s.Screen.Width, s.Screen.Height = 32, 32
		s.Screen.FieldOfView = 1e-6
		s.Screen.CenterAlpha, s.Screen.CenterBeta = -2.0707, 0.3
		s.Output.Directory = t.TempDir()
		s.Output.Maps = []string{"redshift", "shadow"}
	})
	for i := 1; i < 32; i++ {
		d := pixels.PixelAlpha(r, i) - pixels.PixelAlpha(r, i-1)
		if math.Abs(d-1e-6/32) > 1e-9*1e-6 {
			t.Fatalf("column spacing %v", d)
		}
	}
	if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
}

func TestBandReportFiles(t *testing.T) {
	// band.json names every side of every order with its units, and
	// agrees with the report Run returns; the text report has its table.
	dir := t.TempDir()
	r := resolve(t, func(s *scene.Scene) {
		s.Output.Directory = dir
		s.Refine.Depth = 2
		s.Disk.Opaque = false
		s.Band.RMin, s.Band.RMax = "horizon", "isco*1.5"
	})
	sum, err := Run(context.Background(), r, Options{Version: "test", Band: true})
	if err != nil {
		t.Fatal(err)
	}
	raw, err := os.ReadFile(filepath.Join(dir, "band.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		WindowFlux float64 `json:"window_line_flux"`
		Area       float64 `json:"area_m2"`
		Orders     []struct {
			Order              int
			Escaping, Captured map[string]*float64
		} `json:"orders"`
	}
	if err := json.Unmarshal(raw, &m); err != nil {
		t.Fatal(err)
	}
	if len(m.Orders) != r.Disk.Orders || m.WindowFlux != sum.Band.WindowFlux || m.Area != sum.Band.Area || m.Area <= 0 {
		t.Fatalf("band.json: %s", raw)
	}
	for _, o := range m.Orders {
		for _, side := range []map[string]*float64{o.Escaping, o.Captured} {
			for _, k := range []string{"area_m2", "flux", "flux_fraction", "alpha_min", "alpha_max", "beta_min", "beta_max", "g_min", "g_max"} {
				if _, ok := side[k]; !ok {
					t.Errorf("order %d: no %q in %v", o.Order, k, side)
				}
			}
		}
	}
	var b bytes.Buffer
	if err := WriteBandText(&b, *sum.Band); err != nil || !bytes.Contains(b.Bytes(), []byte("captured")) || !bytes.Contains(b.Bytes(), []byte("escaping")) {
		t.Errorf("band.txt: %v\n%s", err, b.String())
	}
}

// TestRunRings checks a run of the rings map: its figure (at the
// double-column width, a row of one panel per image order) and
// pixel-exact image are written, and the
// summary carries the ring width of every order n ≥ 1, the ones the
// figure's panels give (maps.RingWidths of the same frame).
func TestRunRings(t *testing.T) {
	dir := t.TempDir()
	r := resolve(t, func(s *scene.Scene) {
		s.Output.Directory, s.Output.Maps, s.Output.Formats = dir, []string{"rings"}, []string{"png", "bare"}
		s.Screen.FieldOfView = 16
		s.Output.OrientationMarks = true
		s.Output.Column = "double"
	})
	sum, err := Run(context.Background(), r, Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	if len(sum.Rings) != r.Disk.Orders-1 {
		t.Fatalf("%d ring widths for %d orders", len(sum.Rings), r.Disk.Orders)
	}
	for i, w := range sum.Rings {
		if w.Order != i+1 || w.Pixels == 0 {
			t.Errorf("ring %d: %+v", i, w)
		}
	}
	if w := sum.Rings[0]; !(w.Directions > 0 && w.Min <= w.Median && w.Median <= w.Max && w.Max < 16) {
		t.Errorf("n = 1 ring %+v", w)
	}
	f, err := os.Open(filepath.Join(dir, "rings.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil {
		t.Fatal(err)
	}
	if cfg.Width <= cfg.Height { // a row of panels with their labels and captions is wider than tall
		t.Errorf("rings figure %d×%d is not a row of %d panels", cfg.Width, cfg.Height, r.Disk.Orders)
	}
	if _, err := os.Stat(filepath.Join(dir, "rings-bare.png")); err != nil {
		t.Error(err)
	}
}
