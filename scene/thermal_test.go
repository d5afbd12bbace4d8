package scene

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"kerrscope/raytrace"
)

// thermalScene is a 10-solar-mass hole at 8 kpc with a thermal disk.
func thermalScene(a, eddington, inner, outer float64) Scene {
	s := Default()
	s.Hole.Spin = a
	s.Hole.MassSolar, s.Hole.DistanceKpc = ptr(10), ptr(8)
	s.Thermal.EddingtonRatio = ptr(eddington)
	if inner > 0 {
		s.Disk.InnerRadius = ptr(inner)
	}
	s.Disk.OuterRadius = outer
	return s
}

func mustResolve(t *testing.T, s Scene) Resolved {
	t.Helper()
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestEmittedLuminosityIsBindingEnergy: a Novikov–Thorne disk from the
// ISCO outwards radiates (1 − E_isco) Ṁ c², E_isco = sqrt(1 − 2/(3 r_isco))
// (Bardeen, Press & Teukolsky 1972, ApJ 178, 347; Page & Thorne 1974, ApJ
// 191, 499). The disk ends at 1e7 M; beyond it the Newtonian flux
// 3/(8π r³) would add 3/(2 r_out) Ṁ c² (common practice), taken off the
// expectation.
func TestEmittedLuminosityIsBindingEnergy(t *testing.T) {
	const rOut = 1e7
	for _, a := range []float64{-0.99, -0.5, 0, 0.5, 0.9, 0.998} {
		r := mustResolve(t, thermalScene(a, 0.1, 0, rOut))
		th := r.Thermal
		risco := raytrace.ISCO(a)
		eff := 1 - math.Sqrt(1-2/(3*risco))
		mdotC2 := th.MdotGS * speedOfLight * speedOfLight
		want := (eff - 3/(2*rOut)) * mdotC2
		got := th.EmittedLuminosity()
		if rel := math.Abs(got/want - 1); rel > 1e-6 {
			t.Errorf("a = %v: L = %.10g erg/s, want (1 − E_isco) Ṁc² = %.10g (relative difference %.2g)", a, got, want, rel)
		}
		// The Eddington ratio is L / L_Edd, L_Edd = 1.2572e38 erg/s per
		// solar mass (Frank, King & Raine 2002, sec. 1.2: 1.3e38 M/M_sun).
		if ratio := eff * mdotC2 / (10 * 1.25724e38); math.Abs(ratio-0.1) > 1e-4 {
			t.Errorf("a = %v: L/L_Edd = %v, want 0.1", a, ratio)
		}
		t.Logf("a = %v: efficiency %.6f, L = %.6g erg/s, relative difference %.2g", a, eff, got, math.Abs(got/want-1))
	}
}

// TestColourCorrectedBlackbodyIntegral: ∫ E n_E dE = σ T⁴ / π for any
// colour correction, σ = 5.670374419e-5 erg cm⁻² s⁻¹ K⁻⁴ (CODATA 2018),
// which checks Planck's constants in PhotonIntensity.
func TestColourCorrectedBlackbodyIntegral(t *testing.T) {
	const sigma = 5.670374419e-5
	const keVPerK = 8.617333262e-8 // CODATA 2018
	for _, tk := range []float64{3e4, 1e7} {
		for _, f := range []float64{1, 1.7, 2.5} {
			kt := f * tk * keVPerK
			// In u = ln E, E n_E dE = E² n_E du.
			g := func(u float64) float64 { e := math.Exp(u); return e * e * PhotonIntensity(e, kt, f) }
			sum := 0.0
			lo, hi := math.Log(kt*1e-6), math.Log(kt*100)
			const panels = 200
			h := (hi - lo) / panels
			for p := range panels {
				sum += quad.Fixed(g, lo+float64(p)*h, lo+float64(p+1)*h, 8, quad.Legendre{}, 0)
			}
			sum *= ErgPerKeV // keV → erg
			want := sigma * math.Pow(tk, 4) / math.Pi
			if math.Abs(sum/want-1) > 1e-8 {
				t.Errorf("T = %g K, f = %v: ∫ E n_E dE = %.10g, want σT⁴/π = %.10g", tk, f, sum, want)
			}
		}
	}
}

// TestMultiTemperatureSlope: far from the hole, the disk's spectrum
// between the temperatures of its outer and inner rings is the
// multi-colour blackbody F_E ∝ E^{1/3} (common practice; Pringle 1981,
// ARA&A 19, 137 for the standard thin disk, T ∝ r^{-3/4}). The emitted
// spectrum of a disk from 1e3 to 1e7 M (temperatures over a factor
// 1000), summed over rings in flat space, rises by a factor 10^{1/3}
// (within 0.01 in the exponent) over the decade in the middle, and its
// local slope d ln(E N_E)/d ln E stays within 0.025 of 1/3 there (0.018
// at worst, at the decade's ends, where the disk's edges start to show).
func TestMultiTemperatureSlope(t *testing.T) {
	r := mustResolve(t, thermalScene(0, 0.1, 1e3, 1e7))
	th := r.Thermal
	spectrum := func(e float64) float64 { // E N_E, up to a constant
		g := func(u float64) float64 {
			rr := math.Exp(u)
			return PhotonIntensity(e, th.ColorKeV(rr), th.FCol) * rr * rr
		}
		sum := 0.0
		lo, hi := math.Log(1e3), math.Log(1e7)
		const panels = 400
		h := (hi - lo) / panels
		for p := range panels {
			sum += quad.Fixed(g, lo+float64(p)*h, lo+float64(p+1)*h, 8, quad.Legendre{}, 0)
		}
		return e * sum
	}
	kin, kout := th.ColorKeV(1e3), th.ColorKeV(1e7)
	mid := math.Sqrt(kin * kout)
	worst := 0.0
	for _, x := range []float64{1 / math.Sqrt(10), 0.5, 1, 2, math.Sqrt(10)} {
		e := mid * x
		slope := (math.Log(spectrum(e*1.05)) - math.Log(spectrum(e/1.05))) / (2 * math.Log(1.05))
		worst = math.Max(worst, math.Abs(slope-1.0/3))
		if math.Abs(slope-1.0/3) > 0.025 {
			t.Errorf("E = %.4g keV (kT from %.4g to %.4g keV): slope %.4f, want 1/3", e, kout, kin, slope)
		}
	}
	// Over the whole decade.
	e0, e1 := mid/math.Sqrt(10), mid*math.Sqrt(10)
	if s := math.Log10(spectrum(e1) / spectrum(e0)); math.Abs(s-1.0/3) > 0.01 {
		t.Errorf("slope over the decade %.4g–%.4g keV: %.4f, want 1/3", e0, e1, s)
	}
	t.Logf("largest departure of the local slope from 1/3: %.4f", worst)
}

// TestThermalRefusals: the thermal keys are checked, each error naming
// its key.
func TestThermalRefusals(t *testing.T) {
	cases := []struct {
		edit func(*Scene)
		key  string
	}{
		{func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc = nil, nil }, "thermal.eddington_ratio"},
		{func(s *Scene) { s.Thermal.AccretionRateGS = ptr(1e18) }, "thermal.accretion_rate_g_s"},
		{func(s *Scene) { s.Thermal.EddingtonRatio = ptr(-1) }, "thermal.eddington_ratio"},
		{func(s *Scene) { s.Thermal.EddingtonRatio = ptr(math.NaN()) }, "thermal.eddington_ratio"},
		{func(s *Scene) { s.Thermal.ColorCorrection = 0.5 }, "thermal.color_correction"},
		{func(s *Scene) { s.Thermal.Bins = 0 }, "thermal.bins"},
		{func(s *Scene) { s.Thermal.MinKeV = ptr(5); s.Thermal.MaxKeV = ptr(4) }, "thermal.energy_max_kev"},
		{func(s *Scene) { s.Thermal.MinKeV = ptr(0) }, "thermal.energy_min_kev"},
		{func(s *Scene) { s.Disk.Plunging = true; s.Disk.OuterRadius = 2 }, "thermal.eddington_ratio"},
	}
	for i, c := range cases {
		s := thermalScene(0.9, 0.1, 0, 30)
		c.edit(&s)
		_, err := s.Resolve()
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Key != c.key {
			t.Errorf("case %d: error %v, want one naming %s", i, err, c.key)
		}
	}
	if r := mustResolve(t, thermalScene(0.9, 0.1, 0, 30)); !r.Thermal.On || !(r.Thermal.MinKeV < r.Thermal.MaxKeV) {
		t.Errorf("thermal disk not on: %+v", r.Thermal)
	}
	if r := mustResolve(t, Default()); r.Thermal.On {
		t.Error("the default scene has no accretion rate, yet the thermal disk is on")
	}
	if !strings.Contains(validKeys([]string{"thermal", "x"}), "color_correction") {
		t.Error("thermal keys not listed")
	}
}

// TestTemperatureFarOut: far from the hole the Novikov–Thorne temperature
// is the Newtonian thin disk's, σT⁴ = 3GMṀ/(8πR³) (1 − sqrt(R_in/R))
// (Shakura & Sunyaev 1973, A&A 24, 337; Pringle 1981, ARA&A 19, 137),
// R_in the ISCO. The relativistic factors differ from 1 by O(M/R), the
// logarithms of the zero-torque term by O(sqrt(M/R) ln(R/M)): measured
// 0.35 % at 1e4 M and 0.11 % at 1e5 M; the check allows 0.5 sqrt(M/R).
func TestTemperatureFarOut(t *testing.T) {
	const sigma = 5.670374419e-5 // CODATA 2018
	r := mustResolve(t, thermalScene(0.7, 0.3, 0, 1e6))
	th := r.Thermal
	risco := raytrace.ISCO(0.7)
	for _, rr := range []float64{1e4, 1e5} {
		R := rr * th.GravRadiusCm
		gm := th.GravRadiusCm * speedOfLight * speedOfLight
		want := math.Pow(3*gm*th.MdotGS/(8*math.Pi*R*R*R)*(1-math.Sqrt(risco/rr))/sigma, 0.25)
		if got := th.TemperatureK(rr); math.Abs(got/want-1) > 0.5/math.Sqrt(rr) {
			t.Errorf("r = %g M: T = %.8g K, Newtonian %.8g K", rr, got, want)
		}
	}
}
