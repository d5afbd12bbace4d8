package fits

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"
	"time"
)

// astropyScript reads a FITS file with astropy.io.fits, an independent
// implementation of FITS Standard 4.0, and prints what it found as JSON.
// argv: file path, JSON request {"primary": [keys], "ext": [{"keys": [...],
// "pixels": [[i, j], ...]}]} with 1-based FITS pixel indices.
const astropyScript = `
import json, sys, warnings
import numpy as np
from astropy.io import fits
from astropy.wcs import WCS

path, req = sys.argv[1], json.loads(sys.argv[2])
out = {"warnings": []}

def typed(v):
    # bool before int: bool is a subclass of int in Python.
    for name, t in (("bool", bool), ("int", int), ("float", float), ("str", str)):
        if isinstance(v, t):
            return [name, v]
    return [type(v).__name__, repr(v)]

with warnings.catch_warnings(record=True) as caught:
    warnings.simplefilter("always")
    with fits.open(path) as hdul:
        hdul.verify("exception")
        out["n_hdus"] = len(hdul)
        out["primary"] = {k: typed(hdul[0].header[k]) for k in req["primary"]}
        out["primary_history"] = [str(h) for h in hdul[0].header.get("HISTORY", [])]
        out["ext"] = []
        for hdu, r in zip(hdul[1:], req["ext"]):
            h = hdu.header
            a = np.asarray(hdu.data)
            bits = a.view(a.dtype.str.replace("f", "u"))
            H, W = a.shape
            world = WCS(h).wcs_pix2world(np.array([[1.0, 1.0], [W, H]]), 1)
            out["ext"].append({
                "xtension": h["XTENSION"],
                "extname": h.get("EXTNAME"),
                "bunit": h.get("BUNIT"),
                "dtype": a.dtype.str,
                "shape": list(a.shape),
                "pixels": [int(bits[j - 1, i - 1]) for i, j in r["pixels"]],
                "world": [[float(x) for x in row] for row in world],
                "keys": {k: typed(h[k]) for k in r["keys"]},
            })
    out["warnings"] = [str(w.message) for w in caught]
print(json.dumps(out))
`

// findAstropyPython returns a Python interpreter that can import
// astropy.io.fits and astropy.wcs, or "".
func findAstropyPython(t *testing.T) string {
	t.Helper()
	cands := []string{"/usr/bin/python3"}
	if p, err := exec.LookPath("python3"); err == nil {
		cands = append(cands, p)
	}
	for _, py := range cands {
		ctx, cancel := context.WithTimeout(t.Context(), time.Minute)
		err := exec.CommandContext(ctx, py, "-c", "import astropy.io.fits, astropy.wcs").Run()
		cancel()
		if err == nil {
			return py
		}
	}
	return ""
}

// TestAstropyReadsBack has astropy open a file written by Encode, check it
// against the standard (HDUList.verify("exception")) and report headers,
// pixels and world coordinates, which must match what was written.
func TestAstropyReadsBack(t *testing.T) {
	py := findAstropyPython(t)
	if py == "" {
		if os.Getenv("CI") != "" {
			t.Fatal("no Python with astropy.io.fits found (CI installs Debian's python3-astropy)")
		}
		t.Skip("no Python with astropy.io.fits; install python3-astropy to run this check")
	}

	nan := math.Float32frombits(0x7fc00000)
	negZero := float32(math.Copysign(0, -1))
	a := ramp(7, 4)
	a[1] = nan       // pixel (2, 1)
	a[7] = negZero   // pixel (1, 2)
	a[27] = -1.5e-30 // pixel (7, 4)
	b := ramp(3, 5)
	b[14] = math.MaxFloat32 // pixel (3, 5)

	primary := []Card{
		{Key: "OBJECT", Value: "Kerr disk", Comment: "what is shown"},
		{Key: "OBSERVER", Value: "O'Brien's screen"},
		{Key: "SPIN", Value: 0.998, Comment: "a/M"},
		{Key: "INCL", Value: 1.0 / 3},
		{Key: "RETRO", Value: false},
		{Key: "NPIX", Value: 28},
		{Key: "BIG", Value: int64(math.MaxInt64)},
		{Key: "HUGE", Value: -math.MaxFloat64, Comment: "free-format real"},
		{Key: "ODD", Value: -1.2345678901234567e-10},
		{Key: "HISTORY", Value: "encoded by kerrscope"},
	}
	images := []Image{
		{
			Name: "REDSHIFT", Unit: "", Width: 7, Height: 4, Data: a,
			Axes: [2]Axis{
				{Type: "ALPHA", Unit: "deg", RefPixel: 4, RefValue: 0.25, Delta: -0.125},
				{Type: "DELTA", Unit: "deg", RefPixel: 2.5, RefValue: -1e-3, Delta: 1.0 / 3},
			},
			Cards: []Card{
				{Key: "QUANTITY", Value: "g = nu_obs/nu_em"},
				{Key: "TRACED", Value: true},
				{Key: "RIN", Value: 1.2369706551751847},
			},
		},
		{
			// Given row by row, as the renderer streams its maps.
			Name: "FLUX", Unit: "erg/(s cm2)", Width: 3, Height: 5,
			Rows: func(j int, row []float32) { copy(row, b[3*j:]) },
			Axes: [2]Axis{
				{Type: "XSCREEN", RefPixel: 1, RefValue: -30, Delta: 20},
				{Type: "YSCREEN", RefPixel: 5, RefValue: 40, Delta: 0.5},
			},
			Cards: []Card{{Key: "NBINS", Value: -7}},
		},
	}
	path := filepath.Join(t.TempDir(), "check.fits")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := Encode(f, primary, images); err != nil {
		f.Close()
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}

	type extReq struct {
		Keys   []string `json:"keys"`
		Pixels [][2]int `json:"pixels"`
	}
	req := struct {
		Primary []string `json:"primary"`
		Ext     []extReq `json:"ext"`
	}{}
	for _, c := range primary {
		if c.Key != "HISTORY" {
			req.Primary = append(req.Primary, c.Key)
		}
	}
	for _, im := range images {
		r := extReq{Pixels: [][2]int{{1, 1}, {2, 1}, {1, 2}, {im.Width, 1}, {1, im.Height}, {im.Width, im.Height}}}
		for _, c := range im.Cards {
			r.Keys = append(r.Keys, c.Key)
		}
		req.Ext = append(req.Ext, r)
	}
	reqJSON, err := json.Marshal(req)
	if err != nil {
		t.Fatal(err)
	}

	ctx, cancel := context.WithTimeout(t.Context(), 3*time.Minute)
	defer cancel()
	var stdout, stderr bytes.Buffer
	cmd := exec.CommandContext(ctx, py, "-c", astropyScript, path, string(reqJSON))
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("astropy rejected the file: %v\n%s", err, stderr.String())
	}

	type typed = [2]json.RawMessage
	var got struct {
		Warnings       []string
		NHDUs          int `json:"n_hdus"`
		Primary        map[string]typed
		PrimaryHistory []string `json:"primary_history"`
		Ext            []struct {
			Xtension string
			Extname  *string
			Bunit    *string
			Dtype    string
			Shape    []int
			Pixels   []uint32
			World    [][2]float64
			Keys     map[string]typed
		}
	}
	if err := json.Unmarshal(stdout.Bytes(), &got); err != nil {
		t.Fatalf("reading astropy's report: %v\n%s", err, stdout.String())
	}
	for _, w := range got.Warnings {
		t.Errorf("astropy warning: %s", w)
	}
	if got.NHDUs != 1+len(images) {
		t.Fatalf("astropy sees %d HDUs, want %d", got.NHDUs, 1+len(images))
	}
	checkCards(t, "primary", primary, got.Primary)
	if len(got.PrimaryHistory) != 1 || got.PrimaryHistory[0] != "encoded by kerrscope" {
		t.Errorf("primary HISTORY read as %q", got.PrimaryHistory)
	}
	if len(got.Ext) != len(images) {
		t.Fatalf("astropy reports %d extensions, want %d", len(got.Ext), len(images))
	}
	for k, im := range images {
		e := got.Ext[k]
		if e.Xtension != "IMAGE" {
			t.Errorf("%s: XTENSION %q", im.Name, e.Xtension)
		}
		if e.Extname == nil || *e.Extname != im.Name {
			t.Errorf("%s: EXTNAME read as %v", im.Name, e.Extname)
		}
		if im.Unit == "" {
			if e.Bunit != nil {
				t.Errorf("%s: BUNIT %q present, none written", im.Name, *e.Bunit)
			}
		} else if e.Bunit == nil || *e.Bunit != im.Unit {
			t.Errorf("%s: BUNIT read as %v, want %q", im.Name, e.Bunit, im.Unit)
		}
		if e.Dtype != ">f4" && e.Dtype != "<f4" {
			t.Errorf("%s: dtype %s, want float32", im.Name, e.Dtype)
		}
		// numpy shape is (NAXIS2, NAXIS1) = (Height, Width).
		if len(e.Shape) != 2 || e.Shape[0] != im.Height || e.Shape[1] != im.Width {
			t.Errorf("%s: shape %v, want [%d %d]", im.Name, e.Shape, im.Height, im.Width)
		}
		// data[j-1, i-1] is FITS pixel (i, j) = Data[(j-1)*Width + (i-1)].
		for n, p := range req.Ext[k].Pixels {
			if n >= len(e.Pixels) {
				t.Fatalf("%s: only %d pixels reported", im.Name, len(e.Pixels))
			}
			data := im.Data
			if im.Rows != nil {
				data = b // what the rows copy from
			}
			want := math.Float32bits(data[(p[1]-1)*im.Width+p[0]-1])
			if e.Pixels[n] != want {
				t.Errorf("%s: pixel %v bits %#08x, want %#08x", im.Name, p, e.Pixels[n], want)
			}
		}
		// World coordinates of pixel centres (1,1) and (W,H):
		// world = CRVAL + CDELT·(pixel − CRPIX) (Standard 4.0, sec. 8).
		for n, p := range [][2]float64{{1, 1}, {float64(im.Width), float64(im.Height)}} {
			if n >= len(e.World) {
				t.Fatalf("%s: only %d world points reported", im.Name, len(e.World))
			}
			for ax := range 2 {
				want := im.Axes[ax].RefValue + im.Axes[ax].Delta*(p[ax]-im.Axes[ax].RefPixel)
				if g := e.World[n][ax]; math.Abs(g-want) > 1e-12*math.Max(math.Abs(want), 1e-300) {
					t.Errorf("%s: axis %d world at pixel %v = %v, want %v", im.Name, ax+1, p, g, want)
				}
			}
		}
		checkCards(t, im.Name, im.Cards, e.Keys)
	}
}

// checkCards compares the values astropy read with those written: the same
// Python type and exactly the same value.
func checkCards(t *testing.T, where string, cards []Card, got map[string][2]json.RawMessage) {
	t.Helper()
	for _, c := range cards {
		if c.Key == "HISTORY" || c.Key == "COMMENT" {
			continue
		}
		g, ok := got[c.Key]
		if !ok {
			t.Errorf("%s %s: not reported", where, c.Key)
			continue
		}
		var kind string
		if err := json.Unmarshal(g[0], &kind); err != nil {
			t.Errorf("%s %s: %v", where, c.Key, err)
			continue
		}
		raw := string(g[1])
		var match bool
		switch v := c.Value.(type) {
		case bool:
			match = kind == "bool" && raw == strconv.FormatBool(v)
		case int:
			match = kind == "int" && raw == strconv.Itoa(v)
		case int64:
			match = kind == "int" && raw == strconv.FormatInt(v, 10)
		case float64:
			x, err := strconv.ParseFloat(raw, 64)
			match = kind == "float" && err == nil && math.Float64bits(x) == math.Float64bits(v)
		case string:
			var s string
			match = kind == "str" && json.Unmarshal(g[1], &s) == nil && s == v
		}
		if !match {
			t.Errorf("%s %s: astropy read %s %s, wrote %T %v", where, c.Key, kind, raw, c.Value, c.Value)
		}
	}
}
