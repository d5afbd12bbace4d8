package echo

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// lampScene returns a small lamp-lit scene.
func lampScene(t *testing.T, a, h, inc, inner, outer float64, px int) scene.Resolved {
	t.Helper()
	s := scene.Default()
	s.Hole.Spin = a
	s.Observer.InclinationDeg = inc
	s.Emission.Emissivity = "lamp"
	s.Emission.LampHeight = &h
	s.Disk.InnerRadius = &inner
	s.Disk.OuterRadius = outer
	s.Screen.Width, s.Screen.Height = px, px
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestLagsOfKnownResponses checks Lags on responses whose Fourier phase is
// known in closed form (shift theorem; common practice): a flash echoed
// once at τ0 lags by τ0 at every frequency below 1/(2τ0), and an echo
// spread evenly over [t1, t2] (a box, whose transform is a real sinc
// times e^{−iπf(t1+t2)}) lags by (t1 + t2)/2 wherever the sinc is
// positive, f < 1/(t2 − t1), until the phase wraps at 1/(t1 + t2).
func TestLagsOfKnownResponses(t *testing.T) {
	const n, dt = 200, 0.5
	psi := make([]float64, n)
	psi[37] = 1
	tau0 := 37.5 * dt
	f, lag, _ := Lags(psi, dt, 4)
	for k := range f {
		if f[k] < 0.9/(2*tau0) && math.Abs(lag[k]-tau0) > 1e-9 {
			t.Errorf("δ at %v: lag %v at f = %v", tau0, lag[k], f[k])
		}
	}
	box := make([]float64, n)
	for k := 20; k < 60; k++ {
		box[k] = 1
	}
	centre := 40 * dt
	f, lag, _ = Lags(box, dt, 4)
	for k := range f {
		if f[k] < 0.95/(2*centre) && math.Abs(lag[k]-centre) > 1e-9 {
			t.Errorf("box around %v: lag %v at f = %v", centre, lag[k], f[k])
		}
	}
}

// TestEchoFlatSpace checks the lags of a lamp high above a disk far from
// the hole against flat space, where a flash at height h on the axis
// reaches the disk element (r, φ) after sqrt(r² + h²) and the element's
// light reaches a distant observer at inclination i earlier than the
// lamp's own by the path difference r sin i cos φ − h cos i (φ measured
// from the observer's azimuth), so
//
//	lag = sqrt(r² + h²) + h cos i − r sin i cos φ
//
// (derived here from straight paths). The rest is the Shapiro delay and
// the bending of the three paths, of order 2M ln(r/M) each (Shapiro 1964,
// PRL 13, 789): bounded here by 2 M ln(h/M) (measured 6.1 M at h = 300 M,
// 6.4 M at h = 3000 M), a fraction of the lag that falls like 1/h.
func TestEchoFlatSpace(t *testing.T) {
	prev := math.Inf(1)
	for _, h := range []float64{300, 3000} {
		inc := 40.0
		r := lampScene(t, 0.5, h, inc, h/3, 3*h, 48)
		r.Disk.Orders = 1
		resp, err := Compute(context.Background(), r, Options{})
		if err != nil {
			t.Fatal(err)
		}
		ci, si := math.Cos(inc*math.Pi/180), math.Sin(inc*math.Pi/180)
		worst, worstRel := 0.0, 0.0
		for _, ht := range resp.Hits {
			flat := math.Hypot(ht.R, h) + h*ci - ht.R*si*math.Cos(ht.Phi)
			d := math.Abs(ht.Lag - flat)
			worst = math.Max(worst, d)
			worstRel = math.Max(worstRel, d/flat)
		}
		t.Logf("h = %v M: %d images; worst lag difference from flat space %.3g M (%.2e of the lag), bound %.3g M", h, len(resp.Hits), worst, worstRel, 2*math.Log(h))
		if len(resp.Hits) < 100 || worst > 2*math.Log(h) || !(worstRel < prev) {
			t.Errorf("h = %v: lags differ from flat space by up to %v M (%v of the lag)", h, worst, worstRel)
		}
		prev = worstRel
	}
}

// TestEchoIntegralAndCausality checks that the time-integrated response
// holds the steady reflected line flux, measured independently by the
// steady render's spectrum (pixels.Render, no timing) to 1e-6 (its records
// are float32), that nothing arrives before the flash seen directly
// (every lag positive: no disk path beats the straight one), and that ψ
// is zero in every time bin before the first echo.
func TestEchoIntegralAndCausality(t *testing.T) {
	for _, c := range []struct{ a, h, inc float64 }{{0.9, 3, 30}, {0, 10, 60}, {0.998, 2, 10}} {
		r := lampScene(t, c.a, c.h, c.inc, raytrace.ISCO(c.a), 200, 96)
		resp, err := Compute(context.Background(), r, Options{})
		if err != nil {
			t.Fatal(err)
		}
		f, err := pixels.Render(context.Background(), resp.Res, nil)
		if err != nil {
			t.Fatal(err)
		}
		sp := f.Spectrum()
		steady := sp.Sum() + sp.Below + sp.Above
		sum := 0.0
		de := (resp.EMax - resp.EMin) / float64(resp.NE)
		dt := resp.TMax / float64(resp.NT)
		for _, v := range resp.Psi {
			sum += v * de * dt
		}
		t.Logf("%+v: ∫∫ψ %.9g + outside %.3g, steady %.9g (%.1e); first echo %.4g M, mean lag %.4g M", c, sum, resp.Outside, steady, (sum+resp.Outside)/steady-1, resp.First, resp.MeanLag())
		if math.Abs((sum+resp.Outside)/steady-1) > 1e-6 || math.Abs(resp.Total/steady-1) > 1e-6 {
			t.Errorf("%+v: response holds %v (+%v outside), steady spectrum %v", c, sum, resp.Outside, steady)
		}
		if !(resp.First > 0) {
			t.Errorf("%+v: an echo %v M before the flash", c, resp.First)
		}
		for e := range resp.NE {
			for k := range resp.NT {
				if float64(k+1)*dt < resp.First && resp.Psi[e*resp.NT+k] != 0 {
					t.Fatalf("%+v: ψ = %v at t = %v before the first echo %v", c, resp.Psi[e*resp.NT+k], float64(k)*dt, resp.First)
				}
			}
		}
		// At low frequency the lag tends to the mean lag (first moment
		// of the response: expand the phase of Ψ in f; common practice).
		fr, lag := resp.LagFrequency()
		if math.Abs(lag[0]-resp.MeanLag()) > 0.05*resp.MeanLag() {
			t.Errorf("%+v: lag %v at f = %v, mean lag %v", c, lag[0], fr[0], resp.MeanLag())
		}
	}
}

// TestRunWritesFiles runs the echo twice into one directory: every file is
// written, the FITS image reads back through astropy when it is installed
// (outputs' tests do the same), and the second run gives the same bytes.
func TestRunWritesFiles(t *testing.T) {
	r := lampScene(t, 0.9, 4, 30, raytrace.ISCO(0.9), 100, 48)
	r.Output.Directory = t.TempDir()
	var first map[string][]byte
	for run := range 2 {
		sum, err := Run(context.Background(), r, Options{TimeBins: 64})
		if err != nil {
			t.Fatal(err)
		}
		got := map[string][]byte{}
		for _, f := range sum.Files {
			b, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			got[filepath.Base(f)] = b
		}
		for _, name := range []string{ProfileCSV, ProfilePNG, ResponseFITS, ResponsePNG, LagFrequencyCSV, LagEnergyCSV, SceneTOML} {
			if len(got[name]) == 0 {
				t.Errorf("run %d: %s not written", run, name)
			}
		}
		if run == 0 {
			first = got
			continue
		}
		for name, b := range got {
			if !bytes.Equal(b, first[name]) {
				t.Errorf("%s differs between two runs", name)
			}
		}
	}
	if _, err := exec.LookPath("python3"); err != nil {
		t.Skip("no python3 to read the FITS file back")
	}
	script := `import sys
from astropy.io import fits
h = fits.open(sys.argv[1])
d = h['ECHO'].data
print(d.shape[0], d.shape[1], h['ECHO'].header['CTYPE2'], h[0].header['LAMPH'])`
	out, err := exec.Command("python3", "-c", script, filepath.Join(r.Output.Directory, ResponseFITS)).CombinedOutput()
	if err != nil {
		if strings.Contains(string(out), "No module named") {
			t.Skip("astropy not installed")
		}
		t.Fatalf("astropy: %v\n%s", err, out)
	}
	if got := strings.TrimSpace(string(out)); got != fmt.Sprintf("%d 64 EOBS 4.0", r.Spectrum.Bins) {
		t.Errorf("astropy reads %q", got)
	}
}
