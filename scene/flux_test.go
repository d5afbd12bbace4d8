package scene

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate"

	"kerrscope/raytrace"
)

func TestAreaIntegralClosedForms(t *testing.T) {
	// ∫ r^{-q} r dr = (b^{2-q} - a^{2-q}) / (2 - q), ln(b/a) at q = 2
	// (elementary calculus).
	for _, c := range []struct{ q, a, b float64 }{
		{3, 6, 30}, {2, 1.5, 400}, {0, 2, 3}, {-1.5, 1.2, 1e4}, {8, 1.2, 50}, {4.2, 2.3, 1e7},
	} {
		want := math.Log(c.b / c.a)
		if c.q != 2 {
			want = (math.Pow(c.b, 2-c.q) - math.Pow(c.a, 2-c.q)) / (2 - c.q)
		}
		got := Emissivity{Kind: PowerLaw, Q: c.q}.AreaIntegral(c.a, c.b, 6)
		if math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("q = %v over %v–%v M: %v, want %v", c.q, c.a, c.b, got, want)
		}
	}
	// Broken law: the sum of the two closed forms, the outer one scaled
	// by r_b^{q_out - q_in} (continuity at the break).
	e := Emissivity{Kind: BrokenPowerLaw, QIn: 6, QOut: 2.5, RBreak: 5}
	pl := func(q, a, b float64) float64 { return (math.Pow(b, 2-q) - math.Pow(a, 2-q)) / (2 - q) }
	want := pl(6, 1.8, 5) + math.Pow(5, 2.5-6)*pl(2.5, 5, 90)
	if got := e.AreaIntegral(1.8, 90, 6); math.Abs(got-want) > 1e-12*want {
		t.Errorf("broken law: %v, want %v", got, want)
	}
}

func TestAreaIntegralNovikovThorne(t *testing.T) {
	// Independent method: composite Simpson's rule (gonum/integrate) on a
	// fine grid in r, against the Gauss–Legendre panels in ln r.
	for _, a := range []float64{0, 0.9, -0.5} {
		e := Emissivity{Kind: NovikovThorne, Spin: a}
		isco := raytrace.ISCO(a)
		lo, hi := isco*0.8, 60.0 // starts inside the ISCO, where ε = 0
		const n = 400001
		x, y := make([]float64, n), make([]float64, n)
		for i := range x {
			x[i] = lo + (hi-lo)*float64(i)/(n-1)
			y[i] = e.At(x[i]) * x[i]
		}
		want := integrate.Simpsons(x, y)
		if got := e.AreaIntegral(lo, hi, isco); math.Abs(got-want) > 1e-6*want {
			t.Errorf("a = %v: %v, Simpson %v", a, got, want)
		}
	}
}

func TestLimbFluxMoment(t *testing.T) {
	// ∫₀¹ f(μ) μ dμ by Simpson's rule (exact for these polynomials).
	x, y := make([]float64, 101), make([]float64, 101)
	for _, k := range []LimbKind{Isotropic, Laor} {
		l := Limb{Kind: k}
		for i := range x {
			x[i] = float64(i) / 100
			y[i] = l.At(x[i]) * x[i]
		}
		if got, want := l.FluxMoment(), integrate.Simpsons(x, y); math.Abs(got-want) > 1e-14 {
			t.Errorf("%v: %v, want %v", k, got, want)
		}
	}
}

func TestPhotonRate(t *testing.T) {
	mass, dist, lum := 1e7, 1e4, 1e42
	s := Default()
	s.Hole.MassSolar, s.Hole.DistanceKpc = &mass, &dist
	s.Emission.LineLuminosityErgS = &lum
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	// Ṅ = L / E_line; K = Ṅ / (2π ∫ ε r dr); n = K ε f / (4π ∫ f μ dμ),
	// isotropic: 4π · 1/2 = 2π. ε = r^-3 from the ISCO to 30 M.
	ndot := lum / (6.4 * 1.602176634e-9)
	area := 1/r.ISCO - 1/30.0
	want := ndot / (2 * math.Pi * area) / (2 * math.Pi)
	if math.Abs(r.PhotonRate-ndot) > 1e-14*ndot || math.Abs(r.PhotonNorm-want) > 1e-12*want {
		t.Errorf("Ṅ = %v, norm %v; want %v, %v", r.PhotonRate, r.PhotonNorm, ndot, want)
	}
	if !r.Physical() || r.SpectrumPerUnit() <= 0 {
		t.Error("not physical with mass, distance and luminosity")
	}
	// GM_sun/c² = 1.4766 km (IAU 2015 nominal value); 1 kpc = 3.0857e21 cm.
	if math.Abs(r.GravRadiusCm/1.4766250e12-1) > 1e-7 || math.Abs(r.DistanceCm/3.0856776e25-1) > 1e-7 {
		t.Errorf("GM/c² = %v cm, D = %v cm", r.GravRadiusCm, r.DistanceCm)
	}
	// One pixel is (PixelSize GM/(c² D))² sr.
	if sr := math.Pow(r.PixelSize*r.GravRadiusCm/r.DistanceCm, 2); math.Abs(r.PixelSolidAngle()-sr) > 1e-12*sr {
		t.Errorf("pixel solid angle %v, want %v", r.PixelSolidAngle(), sr)
	}

	// Refused: no distance; out of range; a law that emits nothing.
	for _, c := range []struct {
		name string
		edit func(s *Scene)
	}{
		{"no mass", func(s *Scene) { s.Hole.MassSolar, s.Hole.DistanceKpc = nil, nil }},
		{"negative", func(s *Scene) { x := -1.0; s.Emission.LineLuminosityErgS = &x }},
		{"huge", func(s *Scene) { x := 1e70; s.Emission.LineLuminosityErgS = &x }},
		{"dark disk", func(s *Scene) {
			in := 2.0
			s.Emission.Emissivity, s.Disk.Plunging, s.Disk.InnerRadius, s.Disk.OuterRadius = "novikov-thorne", true, &in, 2.2
		}},
	} {
		bad := s
		c.edit(&bad)
		var fe *FieldError
		if _, err := bad.Resolve(); !errors.As(err, &fe) || fe.Key != "emission.line_luminosity_erg_s" {
			t.Errorf("%s: error %v, want one naming emission.line_luminosity_erg_s", c.name, err)
		}
	}
}

func TestSkyOffsetAndChecks(t *testing.T) {
	// PA = 0: +β is north and +α (observer's right) is west; PA = 90°:
	// +β is east (position angle north through east; common practice).
	for _, c := range []struct{ a, b, pa, e, n float64 }{
		{0, 1, 0, 0, 1}, {1, 0, 0, -1, 0}, {0, 1, 90, 1, 0}, {1, 0, 90, 0, 1}, {-1, 0, 90, 0, -1}, {0, 1, 180, 0, -1},
	} {
		e, n := SkyOffset(c.a, c.b, c.pa)
		if math.Abs(e-c.e) > 1e-15 || math.Abs(n-c.n) > 1e-15 {
			t.Errorf("SkyOffset(%v, %v, %v) = %v, %v; want %v, %v", c.a, c.b, c.pa, e, n, c.e, c.n)
		}
	}
	for _, c := range []struct {
		key  string
		edit func(s *Scene)
	}{
		{"observer.position_angle_deg", func(s *Scene) { s.Observer.PositionAngleDeg = 400 }},
		{"observer.position_angle_deg", func(s *Scene) { s.Observer.PositionAngleDeg = math.NaN() }},
		{"black_hole.dec_deg", func(s *Scene) { x := 10.0; s.Hole.RADeg = &x }},
		{"black_hole.ra_deg", func(s *Scene) { x := 10.0; s.Hole.DecDeg = &x }},
		{"black_hole.ra_deg", func(s *Scene) { x, y := 360.0, 0.0; s.Hole.RADeg, s.Hole.DecDeg = &x, &y }},
		{"black_hole.dec_deg", func(s *Scene) { x, y := 10.0, -91.0; s.Hole.RADeg, s.Hole.DecDeg = &x, &y }},
	} {
		s := Default()
		c.edit(&s)
		var fe *FieldError
		if _, err := s.Resolve(); !errors.As(err, &fe) || fe.Key != c.key {
			t.Errorf("error %v, want one naming %s", err, c.key)
		}
	}
}
