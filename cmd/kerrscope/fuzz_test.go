package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// fuzzTimeout bounds one fuzz input: parsing, validation and an 8 × 8
// render with its figures take milliseconds; only a loop that does not
// end takes this long.
const fuzzTimeout = 30 * time.Second

// fuzzAllocLimit bounds the bytes allocated for one fuzz input.
const fuzzAllocLimit = 512 << 20

// FuzzScene feeds scene files to the command's scene path (size cap,
// parsing, flags' validation) and renders what is accepted, made tiny (8 × 8
// pixels, at most 2 orders, refinement depth at most 1, at most 4096
// bins). The invariant: either the scene is refused with a one-line error
// naming a key (a *scene.FieldError with a scene key, or a
// *scene.ParseError with the file's line), which the command reports with
// exit status 2; or every map record and the spectrum are finite, the
// colour-bar ticks lie on their bars and the figures are drawn (or refused
// with an error), within fuzzTimeout and fuzzAllocLimit.
func FuzzScene(f *testing.F) {
	for _, p := range []string{"../../scene/demo.toml"} {
		data, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	if readme, err := os.ReadFile("../../README.md"); err == nil {
		text := string(readme)
		if i := strings.Index(text, "```toml\n[black_hole]"); i >= 0 {
			block := text[i+len("```toml\n"):]
			f.Add([]byte(block[:strings.Index(block, "```")]))
		}
	}
	for _, s := range hostileScenes {
		f.Add([]byte(s))
	}
	keys := map[string]bool{}
	for _, fl := range scene.Fields() {
		keys[fl.Key] = true
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		path := filepath.Join(dir, "scene.toml")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- checkScene(path, dir, keys) }()
		select {
		case err := <-done:
			if err != nil {
				t.Fatalf("scene %.200q: %v", data, err)
			}
		case <-time.After(fuzzTimeout):
			t.Fatalf("scene %.200q: no answer within %v", data, fuzzTimeout)
		}
	})
}

// checkScene is the body of FuzzScene for the scene file at path; it
// returns what breaks the invariant.
func checkScene(path, dir string, keys map[string]bool) error {
	var before runtime.MemStats
	runtime.ReadMemStats(&before)
	s, err := loadScene(path, scene.Default(), nil)
	if err == nil {
		_, err = s.Resolve()
	}
	if err != nil {
		return checkRefusal(path, dir, err, keys)
	}
	// Make the accepted scene tiny; it must stay valid.
	s.Screen.Width, s.Screen.Height = 8, 8
	s.Disk.Orders = min(s.Disk.Orders, 2)
	s.Refine.Depth = min(s.Refine.Depth, 1)
	s.Spectrum.Bins = min(s.Spectrum.Bins, 4096)
	r, err := s.Resolve()
	if err != nil {
		return fmt.Errorf("accepted scene refused once made smaller: %v", err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), fuzzTimeout)
	defer cancel()
	fr, err := pixels.RenderScene(ctx, r, nil, pixels.KeepAll|pixels.KeepBand)
	if err != nil {
		return fmt.Errorf("render of an accepted scene: %v", err)
	}
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	for o := 0; o < fr.Orders; o++ {
		for k := range fr.R[o] {
			q := [4]float64{float64(fr.R[o][k]), float64(fr.G[o][k]), float64(fr.Line[o][k]), float64(fr.Bol[o][k])}
			unseen := math.IsNaN(q[0]) && math.IsNaN(q[1]) && math.IsNaN(q[2]) && math.IsNaN(q[3])
			if !unseen && !(finite(q[0]) && finite(q[1]) && finite(q[2]) && finite(q[3])) {
				return fmt.Errorf("order %d pixel %d: records %v", o, k, q)
			}
		}
	}
	spec := fr.Spectrum()
	for _, v := range append(spec.Total(), spec.Below, spec.Above) {
		if !finite(v) {
			return fmt.Errorf("spectrum value %v", v)
		}
	}
	if _, err := pixels.CheckFinite(fr); err != nil {
		return fmt.Errorf("finite frame reported as %v", err)
	}
	for _, name := range scene.MapNames {
		m, err := maps.Lookup(name)
		if err != nil {
			return err
		}
		p := m.Panel(fr, maps.Scales{})
		if p.Bar != nil {
			for _, tk := range p.Bar.Ticks {
				if !(tk.T >= 0 && tk.T <= 1) {
					return fmt.Errorf("%s: colour-bar tick %q at %v", name, tk.Label, tk.T)
				}
			}
		}
	}
	// The figures with the widest-ranging scales, the spectrum and the
	// band files, drawn and encoded (not under -short, where the race
	// detector makes drawing slow); an error is an answer too.
	if testing.Short() {
		return nil
	}
	out := r.Output
	out.Maps, out.Formats = []string{"intensity", "radius"}, []string{"png", "csv"}
	discard := func(_ string, write func(io.Writer) error) error { return write(io.Discard) }
	_ = outputs.Write(ctx, outputs.Artifacts(out, outputs.Set{Band: true}),
		outputs.Job{Frame: fr, Version: "fuzz", Band: bandOf(fr)}, discard)
	var after runtime.MemStats
	runtime.ReadMemStats(&after)
	if a := after.TotalAlloc - before.TotalAlloc; a > fuzzAllocLimit {
		return fmt.Errorf("allocated %d bytes for an 8 × 8 render", a)
	}
	return nil
}

// checkRefusal checks that a refused scene names a key or a line, and
// that the command reports it on one line with exit status 2.
func checkRefusal(path, dir string, err error, keys map[string]bool) error {
	var fe *scene.FieldError
	var pe *scene.ParseError
	switch {
	case errors.As(err, &fe):
		if !keys[fe.Key] || fe.Allowed == "" {
			return fmt.Errorf("field error without a known key or range: %#v", fe)
		}
	case errors.As(err, &pe):
		if pe.File != path || pe.Problem == "" || (pe.Line < 1 && !strings.Contains(pe.Problem, "larger than")) {
			return fmt.Errorf("parse error without file and line: %#v", pe)
		}
	default:
		return fmt.Errorf("refusal %q is neither a *scene.FieldError nor a *scene.ParseError", err)
	}
	code, stdout, stderr := runCLI("render", "--scene", path, "--out", filepath.Join(dir, "out"), "--quiet")
	if code != 2 || stdout != "" || strings.Count(stderr, "\n") != 1 || len(stderr) > 1000 {
		return fmt.Errorf("command: exit %d, stdout %q, stderr %.300q", code, stdout, stderr)
	}
	return nil
}

// hostileScenes seed FuzzScene with values at and past every range.
var hostileScenes = []string{
	"",
	"\xef\xbb\xbf",
	"\xef\xbb\xbf[black_hole]\nspin = 0.99\n",
	"[emission]\nindex = -27.0\n",
	"[emission]\nindex = -20.3\n",
	"[emission]\nindex = 20.3\n",
	"[emission]\nemissivity = \"broken\"\nindex_inner = -38.0\nindex_outer = -9.0\nbreak_radius = 6.0\n",
	"[emission]\nemissivity = \"broken\"\nbreak_radius = 1.0\nindex_inner = 1e300\n",
	"[emission]\nemissivity = \"novikov-thorne\"\n[black_hole]\nspin = -0.999999\n",
	"[emission]\nline_kev = 1e-320\n",
	"[emission]\nline_kev = 1e-6\n",
	"[emission]\nline_kev = 1e6\n",
	"[black_hole]\nmass_msun = 1e308\ndistance_kpc = 8.0\n",
	"[black_hole]\nmass_msun = 1e15\ndistance_kpc = 1e-12\n",
	"[black_hole]\nmass_msun = 1e-10\ndistance_mpc = 1e7\n",
	"[spectrum]\nenergy_max_kev = 1e308\n",
	"[spectrum]\nenergy_min_kev = 0.0\nenergy_max_kev = 6400.0\nbins = 1048576\n",
	"[spectrum]\ninstrument_fwhm_ev = 6400.0\n",
	"[spectrum]\ninstrument_fwhm_ev = 1e-6\n",
	"[disk]\ninner_radius = 40.0\n",
	"[disk]\nouter_radius = 1e7\n[emission]\nindex = -4.28\n",
	"[disk]\ninner_radius = 1.0000001\nplunging = true\n[black_hole]\nspin = 0.999999\n",
	"[screen]\nfield_of_view = 1e-12\ncenter_alpha = 5.0\n",
	"[screen]\nfield_of_view = 1e7\ncenter_alpha = 1e7\ncenter_beta = -1e7\n",
	"[screen]\nwidth = 9223372036854775807\n",
	"[black_hole]\nspin = nan\n",
	"[black_hole]\nspin = inf\n",
	"[black_hole]\nspin = 1e999\n",
	"black_hole = 5\n",
	"[black_hole.spin]\n",
	"[black_hole]\nspin = {a = 1}\n",
	"[disk]\nopaque = true\nopaque = false\n",
	"[[disk]]\n",
	"[band]\nr_min = \"isco*1e308\"\n",
	"[band]\nr_min = \"horizon-5\"\n",
	"[refine]\ndepth = 12\ntolerance_r = 1e-300\ntolerance_g = 1e-300\n",
	"[output]\nintensity_scale = \"linear\"\n[observer]\ninclination_deg = 90.0\n",
	"[observer]\ninclination_deg = 180.0\n[black_hole]\nspin = -0.9999\n",
	"[black_hole]\nspin = \"" + strings.Repeat("x", 5000) + "\"\n",
	"\x00\x01\x02",
	"[black_hole]\nspin = 0.5\n\xff\xfe\n",
}

// bandOf locates the scene's band in the frame, for the band artifacts.
func bandOf(f *pixels.Frame) *outputs.Band {
	rep, err := f.LocateBand()
	if err != nil {
		return nil
	}
	return &outputs.Band{Report: rep, Mask: f.Band}
}
