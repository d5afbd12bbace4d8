package scene

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"kerrscope/raytrace"
)

// ntIntegral evaluates the defining integral of the Novikov–Thorne flux
// (Page & Thorne 1974, ApJ 191, 499),
//
//	F(r) = (1/(4π r)) (−dΩ/dr) / (E − ΩL)² ∫_{r_isco}^{r} (E − ΩL) (dL/dr) dr,
//
// at increasing radii rs, with E, L, Ω from raytrace.CircularOrbit and
// dΩ/dr, dL/dr differentiated analytically here. The integral is summed
// piecewise with 40-point Gauss–Legendre rules.
func ntIntegral(t *testing.T, a float64, rs []float64) []float64 {
	t.Helper()
	orbit := func(r float64) raytrace.Orbit {
		o, ok := raytrace.CircularOrbit(a, r)
		if !ok {
			t.Fatalf("a=%v: no circular orbit at r=%v", a, r)
		}
		return o
	}
	// Ω = 1/(r^{3/2} + a); L = N/sqrt(P) with N = r² − 2a r^{1/2} + a²,
	// P = r³ − 3r² + 2a r^{3/2} (Bardeen, Press & Teukolsky 1972).
	dOmega := func(r float64) float64 {
		x := math.Sqrt(r)
		d := r*x + a
		return -1.5 * x / (d * d)
	}
	dL := func(r float64) float64 {
		x := math.Sqrt(r)
		n := r*r - 2*a*x + a*a
		dn := 2*r - a/x
		p := r*r*r - 3*r*r + 2*a*r*x
		dp := 3*r*r - 6*r + 3*a*x
		return dn/math.Sqrt(p) - n*dp/(2*p*math.Sqrt(p))
	}
	integrand := func(r float64) float64 {
		o := orbit(r)
		return (o.E - o.Omega*o.L) * dL(r)
	}
	risco := raytrace.ISCO(a)
	out := make([]float64, len(rs))
	sum, lo := 0.0, risco
	for i, r := range rs {
		// Split [lo, r] so that no piece is longer than its distance from
		// the ISCO allows a 40-point rule to resolve easily.
		for lo < r {
			hi := math.Min(r, risco+2*(lo-risco)+0.01)
			sum += quad.Fixed(integrand, lo, hi, 40, quad.Legendre{}, 0)
			lo = hi
		}
		o := orbit(r)
		k := o.E - o.Omega*o.L
		out[i] = -dOmega(r) / (k * k) * sum / (4 * math.Pi * r)
	}
	return out
}

func TestNovikovThorneClosedFormVsIntegral(t *testing.T) {
	worst := 0.0
	for _, a := range []float64{-0.9, 0, 0.5, 0.998} {
		risco := raytrace.ISCO(a)
		var rs []float64
		for k := -3.0; ; k += 0.05 {
			r := risco + math.Pow(10, k)
			if r > 1000 {
				break
			}
			rs = append(rs, r)
		}
		rs = append(rs, 1000)
		want := ntIntegral(t, a, rs) // Page & Thorne 1974, defining integral
		e := Emissivity{Kind: NovikovThorne, Spin: a}
		for i, r := range rs {
			got := e.At(r)
			d := relDiff(got, want[i])
			worst = math.Max(worst, d)
			if !(d < 1e-8) {
				t.Errorf("a=%v r=%v: closed form %v, integral %v (rel. diff %.2g)", a, r, got, want[i], d)
			}
		}
	}
	t.Logf("max relative difference closed form vs integral: %.2g", worst)
}

func TestNovikovThorneAtISCO(t *testing.T) {
	for _, a := range []float64{-0.999999, -0.9, 0, 0.5, 0.998, 0.999999} {
		risco := raytrace.ISCO(a)
		e := Emissivity{Kind: NovikovThorne, Spin: a}
		// Zero torque at the ISCO: F = 0 there and inside (Page & Thorne 1974).
		for _, r := range []float64{risco, risco * (1 - 1e-12), 0.5 * risco, raytrace.Horizon(a)} {
			if f := e.At(r); f != 0 {
				t.Errorf("a=%v r=%v: F = %v, want 0", a, r, f)
			}
		}
		peak := 0.0
		for r := risco * 1.001; r < 100; r *= 1.01 {
			peak = math.Max(peak, e.At(r))
		}
		// F rises continuously from 0: quadratically in r − r_isco, since
		// dL/dr vanishes at the ISCO (Page & Thorne 1974).
		prev := 0.0
		for _, h := range []float64{1e-12, 1e-9, 1e-6, 1e-3} {
			f := e.At(risco * (1 + h))
			if !(f >= prev) || math.IsInf(f, 0) || !(f <= 1e3*h*peak) {
				t.Errorf("a=%v: F(r_isco(1+%g)) = %v (peak %v)", a, h, f, peak)
			}
			prev = f
		}
		if !(peak > 0) || math.IsInf(peak, 0) {
			t.Errorf("a=%v: peak flux %v", a, peak)
		}
	}
}

func TestNovikovThorneLargeR(t *testing.T) {
	for _, a := range []float64{-0.9, 0, 0.5, 0.998} {
		e := Emissivity{Kind: NovikovThorne, Spin: a}
		for _, c := range []struct{ r, tol float64 }{{1e6, 5e-2}, {1e9, 2e-3}, {1e12, 1e-4}} {
			// Leading behaviour 3/(8π r³) (Page & Thorne 1974); the next terms
			// are of relative order sqrt(r_isco/r) and ln(r)/sqrt(r).
			lead := 3 / (8 * math.Pi * c.r * c.r * c.r)
			if d := math.Abs(e.At(c.r)/lead - 1); !(d < c.tol) {
				t.Errorf("a=%v r=%g: F/(3/(8π r³)) − 1 = %.3g, want below %g", a, c.r, d, c.tol)
			}
		}
	}
}

func TestNovikovThorneLuminosity(t *testing.T) {
	// Energy conservation: the luminosity at infinity from both faces,
	// ∫ 4π r E F dr over the disk, is the binding energy released per unit
	// accreted rest mass, 1 − E_isco (Page & Thorne 1974).
	for _, a := range []float64{-0.9, 0, 0.5, 0.998} {
		risco := raytrace.ISCO(a)
		e := Emissivity{Kind: NovikovThorne, Spin: a}
		// r = r_isco / s² maps (0, 1] onto [r_isco, ∞).
		f := func(s float64) float64 {
			if s == 0 {
				return 0
			}
			r := risco / (s * s)
			o, _ := raytrace.CircularOrbit(a, r)
			return 4 * math.Pi * r * o.E * e.At(r) * 2 * risco / (s * s * s)
		}
		sum := 0.0
		for lo := 1e-8; lo < 1; lo *= 2 {
			sum += quad.Fixed(f, lo, math.Min(2*lo, 1), 40, quad.Legendre{}, 0)
		}
		want := raytrace.Efficiency(a)
		t.Logf("a=%v: luminosity %.12g, 1 − E_isco %.12g", a, sum, want)
		if d := relDiff(sum, want); !(d < 1e-9) {
			t.Errorf("a=%v: luminosity %v, want 1 − E_isco = %v (rel. diff %.2g)", a, sum, want, d)
		}
	}
}

func TestPowerLaw(t *testing.T) {
	e := DefaultEmissivity()
	if err := e.Validate(); err != nil {
		t.Fatal(err)
	}
	for _, r := range []float64{1.1, 6, 37.5, 1e4} {
		if got, want := e.At(r), 1/(r*r*r); relDiff(got, want) > 1e-15 { // common practice, q = 3
			t.Errorf("r=%v: ε = %v, want %v", r, got, want)
		}
	}
	e = Emissivity{Kind: PowerLaw, Q: 2.5}
	if got, want := e.At(4), 1.0/32; relDiff(got, want) > 1e-15 { // 4^{-2.5} = 1/32
		t.Errorf("ε(4) = %v, want %v", got, want)
	}
}

func TestBrokenPowerLaw(t *testing.T) {
	for _, c := range []struct{ qin, qout, rb float64 }{{6, 3, 4}, {2, 3.5, 10}, {0, 3, 6}, {-1, 2, 2.5}} {
		e := Emissivity{Kind: BrokenPowerLaw, QIn: c.qin, QOut: c.qout, RBreak: c.rb}
		if err := e.Validate(); err != nil {
			t.Fatal(err)
		}
		// Continuous at r_break (common practice).
		below, at := e.At(math.Nextafter(c.rb, 0)), e.At(c.rb)
		if relDiff(below, at) > 1e-13 {
			t.Errorf("%+v: ε just below r_break %v, at r_break %v", c, below, at)
		}
		// Power law r^{-q_in} inside, slope −q_out outside (common practice).
		if got, want := e.At(c.rb/2), math.Pow(c.rb/2, -c.qin); relDiff(got, want) > 1e-14 {
			t.Errorf("%+v: ε(r_break/2) = %v, want %v", c, got, want)
		}
		r1, r2 := 2*c.rb, 7*c.rb
		if s := math.Log(e.At(r2)/e.At(r1)) / math.Log(r2/r1); math.Abs(s+c.qout) > 1e-12 {
			t.Errorf("%+v: outer slope %v, want %v", c, s, -c.qout)
		}
	}
	// Equal indices give the plain power law (common practice).
	b := Emissivity{Kind: BrokenPowerLaw, QIn: 3, QOut: 3, RBreak: 8}
	p := Emissivity{Kind: PowerLaw, Q: 3}
	for _, r := range []float64{2, 8, 30} {
		if relDiff(b.At(r), p.At(r)) > 1e-14 {
			t.Errorf("r=%v: broken %v, power law %v", r, b.At(r), p.At(r))
		}
	}
}

func TestEmissivityValidate(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name string
		e    Emissivity
		ok   bool
	}{
		{"default", DefaultEmissivity(), true},
		{"zero kind", Emissivity{Q: 3}, false},
		{"unknown kind", Emissivity{Kind: 99}, false},
		{"powerlaw NaN q", Emissivity{Kind: PowerLaw, Q: nan}, false},
		{"powerlaw infinite q", Emissivity{Kind: PowerLaw, Q: -inf}, false},
		{"powerlaw negative q", Emissivity{Kind: PowerLaw, Q: -1}, true},
		{"broken ok", Emissivity{Kind: BrokenPowerLaw, QIn: 5, QOut: 3, RBreak: 5}, true},
		{"broken NaN q_in", Emissivity{Kind: BrokenPowerLaw, QIn: nan, QOut: 3, RBreak: 5}, false},
		{"broken infinite q_out", Emissivity{Kind: BrokenPowerLaw, QIn: 5, QOut: inf, RBreak: 5}, false},
		{"broken zero r_break", Emissivity{Kind: BrokenPowerLaw, QIn: 5, QOut: 3}, false},
		{"broken negative r_break", Emissivity{Kind: BrokenPowerLaw, QIn: 5, QOut: 3, RBreak: -2}, false},
		{"broken NaN r_break", Emissivity{Kind: BrokenPowerLaw, QIn: 5, QOut: 3, RBreak: nan}, false},
		{"broken infinite r_break", Emissivity{Kind: BrokenPowerLaw, QIn: 5, QOut: 3, RBreak: inf}, false},
		{"novikov-thorne ok", Emissivity{Kind: NovikovThorne, Spin: -0.7}, true},
		{"novikov-thorne spin 1", Emissivity{Kind: NovikovThorne, Spin: 1}, false},
		{"novikov-thorne spin -1", Emissivity{Kind: NovikovThorne, Spin: -1}, false},
		{"novikov-thorne NaN spin", Emissivity{Kind: NovikovThorne, Spin: nan}, false},
	}
	for _, k := range []EmissivityKind{0, 99} {
		if v := (Emissivity{Kind: k, Q: 3}).At(5); v != 0 {
			t.Errorf("kind %d: At(5) = %v, want 0", int(k), v)
		}
	}
	for _, tt := range tests {
		err := tt.e.Validate()
		if (err == nil) != tt.ok {
			t.Errorf("%s: Validate() = %v, want ok = %v", tt.name, err, tt.ok)
		}
		// Even an invalid law never gives NaN.
		for _, r := range []float64{1.5, 5, 10} {
			if v := tt.e.At(r); math.IsNaN(v) {
				t.Errorf("%s: At(%v) = %v", tt.name, r, v)
			}
		}
	}
}

func TestEmissivityEdges(t *testing.T) {
	laws := []Emissivity{
		DefaultEmissivity(),
		{Kind: BrokenPowerLaw, QIn: 6, QOut: 3, RBreak: 4},
		{Kind: NovikovThorne, Spin: 0.999999},
		{Kind: NovikovThorne, Spin: -0.999999},
		{Kind: NovikovThorne, Spin: 0},
	}
	for _, e := range laws {
		for _, r := range []float64{math.NaN(), -1, 0} {
			if v := e.At(r); v != 0 {
				t.Errorf("%v: At(%v) = %v, want 0", e.Kind, r, v)
			}
		}
		for _, a := range []float64{0.999999, -0.999999, 0} {
			for _, r := range []float64{raytrace.Horizon(a) + 1e-12, raytrace.ISCO(a), raytrace.ISCO(a) * (1 + 1e-15), 1e300, math.Inf(1)} {
				if v := e.At(r); math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
					t.Errorf("%v spin %v: At(%v) = %v", e.Kind, e.Spin, r, v)
				}
			}
		}
	}
}

func TestParseKinds(t *testing.T) {
	for _, k := range []EmissivityKind{PowerLaw, BrokenPowerLaw, NovikovThorne} {
		got, err := ParseEmissivityKind(k.String())
		if err != nil || got != k {
			t.Errorf("ParseEmissivityKind(%q) = %v, %v", k.String(), got, err)
		}
		var u EmissivityKind
		b, err := k.MarshalText()
		if err != nil || u.UnmarshalText(b) != nil || u != k {
			t.Errorf("text round trip of %v: %q, %v, %v", k, b, err, u)
		}
	}
	for _, k := range []LimbKind{Isotropic, Laor} {
		got, err := ParseLimbKind(k.String())
		if err != nil || got != k {
			t.Errorf("ParseLimbKind(%q) = %v, %v", k.String(), got, err)
		}
		var u LimbKind
		b, err := k.MarshalText()
		if err != nil || u.UnmarshalText(b) != nil || u != k {
			t.Errorf("text round trip of %v: %q, %v, %v", k, b, err, u)
		}
	}
	names := map[string]string{
		"powerlaw": "emissivity", "broken": "emissivity", "novikov-thorne": "emissivity",
		"isotropic": "limb", "laor": "limb",
	}
	for name, what := range names {
		var err error
		if what == "emissivity" {
			_, err = ParseEmissivityKind(name)
		} else {
			_, err = ParseLimbKind(name)
		}
		if err != nil {
			t.Errorf("%s law %q: %v", what, name, err)
		}
	}
	if _, err := ParseEmissivityKind("PowerLaw"); err == nil ||
		!strings.Contains(err.Error(), "powerlaw, broken, novikov-thorne") {
		t.Errorf("ParseEmissivityKind(bad): %v", err)
	}
	if _, err := ParseLimbKind("lambert"); err == nil || !strings.Contains(err.Error(), "isotropic, laor") {
		t.Errorf("ParseLimbKind(bad): %v", err)
	}
	if _, err := EmissivityKind(0).MarshalText(); err == nil {
		t.Error("MarshalText of zero EmissivityKind: no error")
	}
	if _, err := LimbKind(7).MarshalText(); err == nil {
		t.Error("MarshalText of invalid LimbKind: no error")
	}
}

func TestLimb(t *testing.T) {
	laor := Limb{Kind: Laor}
	iso := Limb{Kind: Isotropic}
	for _, l := range []Limb{laor, iso} {
		if err := l.Validate(); err != nil {
			t.Error(err)
		}
	}
	if err := (Limb{}).Validate(); err == nil {
		t.Error("zero Limb: no validation error")
	}
	tests := []struct {
		l        Limb
		mu, want float64
	}{
		{laor, 0, 1},            // Laor 1991: 1 + 2.06 μ at μ = 0
		{laor, 1, 3.06},         // Laor 1991 at μ = 1
		{laor, 0.5, 2.03},       // Laor 1991
		{laor, 1.5, 3.06},       // clamped to μ ≤ 1
		{laor, -0.2, 1},         // clamped to μ ≥ 0
		{laor, math.NaN(), 1},   // NaN counts as μ = 0
		{iso, 0, 1},             // isotropic: common practice
		{iso, 0.7, 1},           // isotropic: common practice
		{Limb{Kind: 9}, 0.5, 0}, // invalid law emits nothing
		{Limb{}, 0.5, 0},        // zero law emits nothing
	}
	for _, tt := range tests {
		if got := tt.l.At(tt.mu); math.Abs(got-tt.want) > 1e-15 {
			t.Errorf("%v.At(%v) = %v, want %v", tt.l.Kind, tt.mu, got, tt.want)
		}
	}
}

var sinkE float64

func BenchmarkEmissivityAt(b *testing.B) {
	for _, e := range []Emissivity{
		DefaultEmissivity(),
		{Kind: BrokenPowerLaw, QIn: 6, QOut: 3, RBreak: 4},
		{Kind: NovikovThorne, Spin: 0.9},
	} {
		b.Run(e.Kind.String(), func(b *testing.B) {
			b.ReportAllocs()
			s := 0.0
			r := 2.5
			for b.Loop() {
				s += e.At(r)
				r += 1e-6
			}
			sinkE = s
		})
	}
}

// TestPowNeg checks the multiplied whole powers against math.Pow.
func TestPowNeg(t *testing.T) {
	for q := 0.0; q <= 7; q += 0.5 {
		for _, r := range []float64{1.0001, 1.7, 2.9, 6, 33.3, 1e3, 2.5e5} {
			want := math.Pow(r, -q)
			if got := powNeg(r, q); math.Abs(got-want) > 4e-16*want {
				t.Errorf("r=%v q=%v: %v, math.Pow %v", r, q, got, want)
			}
		}
	}
}
