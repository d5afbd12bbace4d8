package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kerrscope/raytrace"
)

// plungingG is g = 1/(−p·u) for a photon (p_t = −1, p_φ = λ, p_r from the
// radial potential) emitted by gas plunging from the ISCO, written out
// from the Kerr metric at θ = π/2 in Boyer–Lindquist coordinates
// (Bardeen, Press & Teukolsky 1972, ApJ 178, 347): u_t = −E, u_φ = L with
// the ISCO's E and L (their eq. 2.12, 2.13), raised with the inverse of
// the (t, φ) block, whose determinant is −Δ, and
// u^r = −sqrt(2/(3 r_isco)) (r_isco/r − 1)^{3/2} (Mummery & Balbus 2019,
// PRL 123, 171104).
func plungingG(a, r, lambda, eta float64, outbound bool) float64 {
	ri := raytrace.ISCO(a)
	x := math.Sqrt(ri)
	den := math.Pow(ri, 0.75) * math.Sqrt(ri*x-3*x+2*a)
	e := (ri*x - 2*x + a) / den
	l := (ri*ri - 2*a*x + a*a) / den
	delta := r*r - 2*r + a*a
	gpp := r*r + a*a + 2*a*a/r
	ut := (gpp*e - 2*a*l/r) / delta
	uphi := (2*a*e/r + (1-2/r)*l) / delta
	ur := -math.Sqrt(2/(3*ri)) * math.Pow(ri/r-1, 1.5)
	k := r*r + a*a - a*lambda
	rr := k*k - delta*(eta+(lambda-a)*(lambda-a))
	pr := math.Sqrt(math.Max(rr, 0)) / delta
	if !outbound {
		pr = -pr
	}
	return 1 / (ut - lambda*uphi - pr*ur)
}

// TestProbePlungingReachesTheHorizon: with plunging gas and no inner edge
// given, the crossing at r ≈ 1.94 M (inside the ISCO, 2.32 M at a = 0.9)
// lands on the disk, and its g agrees with the crossing found by the
// independent integrator (raytrace.Integrate) and g written out from the
// metric.
func TestProbePlungingReachesTheHorizon(t *testing.T) {
	args := []string{"probe", "--spin", "0.9", "--inclination", "60", "--alpha", "-3", "--beta", "-1.5", "--orders", "3", "--json"}
	type crossing struct {
		R        float64  `json:"r"`
		Outbound bool     `json:"outbound"`
		G        *float64 `json:"g"`
	}
	probe := func(extra ...string) []crossing {
		code, out, errs := runCLI(append(args, extra...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var m struct {
			Crossings []crossing `json:"crossings"`
		}
		if err := json.Unmarshal([]byte(out), &m); err != nil || len(m.Crossings) != 3 {
			t.Fatalf("%v: %s", err, out)
		}
		return m.Crossings
	}
	without := probe()
	if without[1].G != nil {
		t.Errorf("without --plunging the crossing at r = %v M (inside the ISCO) should be off the disk, got g = %v", without[1].R, *without[1].G)
	}
	cs := probe("--plunging")
	c := cs[1]
	if !(c.R > 1.9 && c.R < 2.0) || c.G == nil {
		t.Fatalf("with --plunging: crossing 1 at r = %v, g = %v; want r ≈ 1.94 M with a g", c.R, c.G)
	}
	o, err := raytrace.NewObserver(0.9, 60)
	if err != nil {
		t.Fatal(err)
	}
	var p raytrace.Path
	if err := o.Integrate(-3, -1.5, 3, 1e-12, &p); err != nil {
		t.Fatal(err)
	}
	if len(p.Crossings) < 2 {
		t.Fatalf("integrator found %d crossings", len(p.Crossings))
	}
	ic := p.Crossings[1]
	if math.Abs(ic.R-c.R) > 1e-8 || ic.Outbound != c.Outbound {
		t.Errorf("crossing 1: probe r = %v outbound %v, integrator r = %v outbound %v", c.R, c.Outbound, ic.R, ic.Outbound)
	}
	want := plungingG(0.9, ic.R, p.Lambda, p.Eta, ic.Outbound)
	if math.Abs(*c.G-want) > 1e-7 {
		t.Errorf("g at r = %v: probe %v, metric with integrated crossing %v", c.R, *c.G, want)
	}
	t.Logf("r = %.10g M, g = %.10g (independent %.10g)", c.R, *c.G, want)
	// An inner edge given with --plunging is kept.
	if cs := probe("--plunging", "--inner", "2.1"); cs[1].G != nil {
		t.Errorf("with --inner 2.1 the crossing at r = %v should be off the disk", cs[1].R)
	}
}

// TestRenderingCommandsPlungeToTheHorizon: render, locate and sweep with
// --plunging and no inner edge record an effective inner edge at the
// horizon, r₊ = 1 + sqrt(1 − a²) (Bardeen, Press & Teukolsky 1972), and
// without --plunging at the ISCO.
func TestRenderingCommandsPlungeToTheHorizon(t *testing.T) {
	const a = 0.9
	horizon := 1 + math.Sqrt(1-a*a)
	small := []string{"--spin", "0.9", "--width", "12", "--height", "12", "--formats", "fits", "--quiet"}
	inner := func(fitsPath string) float64 {
		t.Helper()
		b, err := os.ReadFile(fitsPath)
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i+80 <= len(b) && i < 2880*4; i += 80 {
			card := string(b[i : i+80])
			if strings.HasPrefix(card, "RINNER  =") {
				v, _, _ := strings.Cut(card[10:], "/")
				var x float64
				if err := json.Unmarshal([]byte(strings.TrimSpace(v)), &x); err != nil {
					t.Fatalf("RINNER card %q: %v", card, err)
				}
				return x
			}
		}
		t.Fatalf("%s: no RINNER card", fitsPath)
		return 0
	}
	for _, cmd := range []string{"render", "locate"} {
		for _, plunging := range []bool{true, false} {
			dir := t.TempDir()
			args := append([]string{cmd, "--out", dir}, small...)
			if plunging {
				args = append(args, "--plunging")
			}
			if code, _, errs := runCLI(args...); code != 0 {
				t.Fatalf("%v: exit %d: %s", args, code, errs)
			}
			got := inner(filepath.Join(dir, "maps.fits"))
			want := raytrace.ISCO(a)
			if plunging {
				want = horizon
			}
			if math.Abs(got-want) > 1e-9 {
				t.Errorf("%s plunging=%v: inner edge %v, want %v", cmd, plunging, got, want)
			}
		}
	}
	dir := filepath.Join(t.TempDir(), "sweep")
	args := []string{"sweep", "--vary", "inclination=30:60:2", "--plunging", "--width", "12", "--height", "12",
		"--maps", "redshift", "--formats", "fits", "--out", dir, "--quiet"}
	if code, out, errs := runCLI(args...); code != 0 {
		t.Fatalf("sweep: exit %d\n%s%s", code, out, errs)
	}
	fits, _ := filepath.Glob(filepath.Join(dir, "*", "maps.fits"))
	if len(fits) == 0 {
		fits, _ = filepath.Glob(filepath.Join(dir, "*.fits"))
	}
	if len(fits) != 2 {
		t.Fatalf("sweep wrote %d FITS files", len(fits))
	}
	for _, f := range fits {
		if got := inner(f); math.Abs(got-horizon) > 1e-9 {
			t.Errorf("sweep frame %s: inner edge %v, want the horizon %v", f, got, horizon)
		}
	}
}
