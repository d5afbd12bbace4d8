package outputs

import (
	"context"
	"encoding/json"
	"math"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// readSky has astropy (an independent FITS WCS reader, wcslib) read the
// REDSHIFT map of a file: whether the primary WCS is celestial, the world
// coordinates of the hole's pixel (argv[2], argv[3], 1-based), the
// brightest-g pixel (astropy's own argmax) with its world coordinates and
// its offsets east and north of the hole along great circles
// (SkyCoord.spherical_offsets_to), and the alternate WCS A at two pixels.
const readSky = `
import json, sys, warnings
import numpy as np
from astropy.io import fits
from astropy.wcs import WCS
from astropy.coordinates import SkyCoord
import astropy.units as u
with warnings.catch_warnings():
    warnings.simplefilter("error")
    with fits.open(sys.argv[1]) as h:
        h.verify("exception")
        out = {"units": {e.header["EXTNAME"]: e.header.get("BUNIT") for e in h[1:]}}
        for name in ("BUNIT", "CUNIT1", "CUNIT2"):
            for e in h[1:]:
                if name in e.header:
                    u.Unit(e.header[name], format="fits")  # a FITS standard unit
        e = h["REDSHIFT"]
        w = WCS(e.header)
        out["celestial"] = bool(w.has_celestial)
        out["radesys"] = w.wcs.radesys
        hx, hy = float(sys.argv[2]), float(sys.argv[3])
        ra0, dec0 = w.all_pix2world([[hx, hy]], 1)[0]
        out["hole"] = [float(ra0), float(dec0)]
        d = np.nan_to_num(e.data.astype(np.float64), nan=-1.0)
        j, i = np.unravel_index(np.argmax(d), d.shape)
        ra, dec = w.all_pix2world([[i + 1, j + 1]], 1)[0]
        out["max_pixel"] = [int(i + 1), int(j + 1)]
        de, dn = SkyCoord(ra0 * u.deg, dec0 * u.deg, frame="icrs").spherical_offsets_to(SkyCoord(ra * u.deg, dec * u.deg, frame="icrs"))
        out["max_offset_deg"] = [float(de.to_value(u.deg)), float(dn.to_value(u.deg))]
        a = WCS(e.header, key="A")
        out["alt"] = a.wcs_pix2world([[1, 1], [e.data.shape[1], e.data.shape[0]]], 1).tolist()
        out["altname"] = a.wcs.name
print(json.dumps(out))
`

func TestCelestialWCSByAstropy(t *testing.T) {
	py := findAstropy(t)
	mass, dist, lum := 1e9, 1.0, 1e40 // µas per M ≈ 9.9e3: angles well above float64 rounding
	ra, dec := 152.8375, 41.265       // an invented position
	for _, pa := range []float64{0, 90, -127.5} {
		dir := t.TempDir()
		r := resolve(t, func(s *scene.Scene) {
			s.Output.Directory = dir
			s.Output.Formats = []string{"fits"}
			s.Screen.Width, s.Screen.Height = 48, 40
			s.Screen.FieldOfView, s.Screen.CenterAlpha, s.Screen.CenterBeta = 40, 1.3, -0.7 // a fixed window: the test reads the hole's pixel from it
			s.Hole.MassSolar, s.Hole.DistanceKpc = &mass, &dist
			s.Hole.RADeg, s.Hole.DecDeg = &ra, &dec
			s.Emission.LineLuminosityErgS = &lum
			s.Observer.PositionAngleDeg = pa
		})
		f, err := pixels.Render(context.Background(), r, nil)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
			t.Fatal(err)
		}
		// The hole, α = β = 0, in 1-based FITS pixels: pixel centre i
		// (0-based column) is at α = c_α + (i + 1/2 − W/2) h, and FITS
		// row 1 is the bottom row.
		h := r.PixelSize
		hx := 1 + (float64(r.Screen.Width)/2 - 0.5) - r.Screen.CenterAlpha/h
		hy := 1 + (float64(r.Screen.Height)/2 - 0.5) - r.Screen.CenterBeta/h
		out, err := exec.Command(py, "-c", readSky, filepath.Join(dir, "maps.fits"),
			strconv.FormatFloat(hx, 'g', -1, 64), strconv.FormatFloat(hy, 'g', -1, 64)).CombinedOutput()
		if err != nil {
			t.Fatalf("astropy: %v\n%s", err, out)
		}
		var got struct {
			Units     map[string]*string
			Celestial bool
			Radesys   string
			Hole      [2]float64
			MaxPixel  [2]int       `json:"max_pixel"`
			MaxOffset [2]float64   `json:"max_offset_deg"`
			Alt       [][2]float64 `json:"alt"`
			AltName   string       `json:"altname"`
		}
		if err := json.Unmarshal(out, &got); err != nil {
			t.Fatalf("%v: %s", err, out)
		}
		if !got.Celestial || got.Radesys != "ICRS" {
			t.Errorf("PA %v: has_celestial %v, RADESYS %q", pa, got.Celestial, got.Radesys)
		}
		if math.Abs(got.Hole[0]-ra) > 1e-9 || math.Abs(got.Hole[1]-dec) > 1e-9 {
			t.Errorf("PA %v: the hole's pixel maps to %v, want (%v, %v)", pa, got.Hole, ra, dec)
		}
		// The largest g is on the approaching side, α < 0 (the disk
		// orbits in +φ, so its gas approaches the observer on the α < 0 side of
		// Bardeen's (1973) screen coordinates).
		gmap := f.FirstSeen(f.G)
		best := 0
		for k, g := range gmap {
			if g > gmap[best] || math.IsNaN(float64(gmap[best])) {
				best = k
			}
		}
		bi, bj := best%f.W, best/f.W
		if got.MaxPixel != [2]int{bi + 1, f.H - bj} {
			t.Fatalf("PA %v: astropy's largest g at %v, renderer's at column %d row %d", pa, got.MaxPixel, bi, bj)
		}
		alpha, beta := pixels.PixelAlpha(r, bi), pixels.PixelBeta(r, bj)
		if !(alpha < 0) {
			t.Fatalf("largest g at α = %v, want the approaching side α < 0", alpha)
		}
		deg := r.MicroArcsecPerM / 3.6e9
		e, n := scene.SkyOffset(alpha, beta, pa)
		e, n = e*deg, n*deg
		if d := math.Hypot(got.MaxOffset[0]-e, got.MaxOffset[1]-n); d > 1e-6*math.Hypot(e, n) {
			t.Errorf("PA %v: astropy puts the largest g at E, N = %v deg, SkyOffset %v, %v", pa, got.MaxOffset, e, n)
		}
		switch pa {
		case 0: // approaching side east of the hole
			if !(got.MaxOffset[0] > 0 && got.MaxOffset[0] > math.Abs(got.MaxOffset[1])) {
				t.Errorf("PA 0: largest g at E, N = %v, want east", got.MaxOffset)
			}
		case 90: // south of it
			if !(got.MaxOffset[1] < 0 && -got.MaxOffset[1] > math.Abs(got.MaxOffset[0])) {
				t.Errorf("PA 90: largest g at E, N = %v, want south", got.MaxOffset)
			}
		}
		// WCS A: α, β in M of the renderer's pixel centres.
		for k, c := range [][2]float64{
			{pixels.PixelAlpha(r, 0), pixels.PixelBeta(r, f.H-1)},
			{pixels.PixelAlpha(r, f.W-1), pixels.PixelBeta(r, 0)},
		} {
			if math.Abs(got.Alt[k][0]-c[0]) > 1e-12 || math.Abs(got.Alt[k][1]-c[1]) > 1e-12 {
				t.Errorf("PA %v: WCS A corner %d = %v, renderer (%v, %v)", pa, k, got.Alt[k], c[0], c[1])
			}
		}
		if got.AltName == "" {
			t.Error("WCS A has no WCSNAMEA")
		}
		for name, want := range map[string]string{"INTENSITY": "photon cm-2 s-1 sr-1", "BOLOMETRIC": "erg cm-2 s-1 sr-1", "I_ORD0": "photon cm-2 s-1 sr-1"} {
			if u := got.Units[name]; u == nil || *u != want {
				t.Errorf("%s BUNIT %v, want %q", name, u, want)
			}
		}
		for _, name := range []string{"RADIUS", "REDSHIFT", "CAPTURED"} {
			if u := got.Units[name]; u != nil {
				t.Errorf("%s BUNIT %q, want none", name, *u)
			}
		}
	}
}
