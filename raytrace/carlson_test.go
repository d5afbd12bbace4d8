package raytrace

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mathext"
)

// carlsonQuad integrates (3/2)∫₀^∞ [(t+x)(t+y)(t+z)]^{-1/2} (t+p)^{-1} dt
// (DLMF 19.16.2) by Gauss–Legendre quadrature, independently of the
// duplication algorithm: t = (v/(1−v))² maps [0, ∞) to [0, 1) and removes
// the t^{-1/2} end point singularity when one argument is 0. For p < 0 the
// principal value subtracts the pole: on [0, 2t₀], t₀ = −p, the integrand
// (f(t) − f(t₀))/(t − t₀) is smooth and the subtracted f(t₀)/(t − t₀)
// integrates to 0 over the symmetric interval.
func carlsonQuad(x, y, z, p float64) float64 {
	f := func(t float64) float64 { return 1.5 / math.Sqrt((t+x)*(t+y)*(t+z)) }
	const nodes = 4000
	if p > 0 {
		g := func(v float64) float64 {
			w := v / (1 - v)
			t := w * w
			return f(t) / (t + p) * 2 * v / ((1 - v) * (1 - v) * (1 - v))
		}
		return quad.Fixed(g, 0, 1, nodes, quad.Legendre{}, 0)
	}
	t0 := -p
	ft0 := f(t0)
	inner := func(v float64) float64 { // t = 2 t0 v²
		t := 2 * t0 * v * v
		if t == t0 {
			return 0
		}
		return (f(t) - ft0) / (t - t0) * 4 * t0 * v
	}
	outer := func(v float64) float64 { // t = 2 t0 + (v/(1−v))²
		w := v / (1 - v)
		t := 2*t0 + w*w
		return f(t) / (t - t0) * 2 * v / ((1 - v) * (1 - v) * (1 - v))
	}
	return quad.Fixed(inner, 0, 1, nodes, quad.Legendre{}, 0) + quad.Fixed(outer, 0, 1, nodes, quad.Legendre{}, 0)
}

func TestCarlsonPublishedValues(t *testing.T) {
	// Carlson 1995, Numer. Algorithms 10, 13, table of test values (values
	// recalled from memory, 14 digits; the quadrature test below checks
	// the same functions independently).
	near(t, "RC(0,1/4)", CarlsonRC(0, 0.25), 3.1415926535898, 1e-13)
	near(t, "RC(9/4,2)", CarlsonRC(9.0/4, 2), 0.69314718055995, 1e-13)
	near(t, "RC(1/4,-2)", CarlsonRC(0.25, -2), 0.23104906018665, 1e-13)
	near(t, "RD(0,2,1)", CarlsonRD(0, 2, 1), 1.7972103521034, 1e-13)
	near(t, "RD(2,3,4)", CarlsonRD(2, 3, 4), 0.16510527294261, 1e-13)
	near(t, "RJ(0,1,2,3)", CarlsonRJ(0, 1, 2, 3), 0.77688623778582, 1e-13)
	near(t, "RJ(2,3,4,5)", CarlsonRJ(2, 3, 4, 5), 0.14297579667157, 1e-13)
	near(t, "RJ(2,3,4,-0.5)", CarlsonRJ(2, 3, 4, -0.5), 0.24723819703052, 1e-13)
	near(t, "RJ(2,3,4,-5)", CarlsonRJ(2, 3, 4, -5), -0.12711230042964, 1e-13)
	near(t, "RF(1,2,0)", carlsonRF(1, 2, 0), 1.3110287771461, 1e-13)
	near(t, "RF(2,3,4)", carlsonRF(2, 3, 4), 0.58408284167715, 1e-13)
	// Closed forms (DLMF 19.2.17–19.2.20): R_C(0, y) = π/(2√y),
	// R_C(x, x) = 1/√x, and R_C(x, y) = ln 2/√(x−y) where √(x/y) = 5/4.
	near(t, "RC(0,9)", CarlsonRC(0, 9), math.Pi/6, 1e-15)
	near(t, "RC(4,4)", CarlsonRC(4, 4), 0.5, 1e-15)
	near(t, "RC(25,16)", CarlsonRC(25, 16), math.Log(2)/3, 1e-15)
	// R_D(x, y, y) and R_J(x, y, z, z) = R_D(x, y, z) (DLMF 19.20.18).
	near(t, "RJ(1,2,3,3)=RD", CarlsonRJ(1, 2, 3, 3), CarlsonRD(1, 2, 3), 1e-15)
}

func TestCarlsonAgainstQuadrature(t *testing.T) {
	args := [][4]float64{
		{0, 1, 2, 3}, {2, 3, 4, 5}, {1e-3, 0.5, 1, 0.2}, {0.3, 0.3, 1, 7}, {0, 1e-4, 1, 1e-2},
		{0.1, 0.7, 1, 40}, {2, 3, 4, -0.5}, {0.2, 0.5, 1, -0.3}, {0, 0.5, 1, -2}, {1, 1, 1, -1e-3},
		{0.01, 0.02, 1, 3e-3},
	}
	for _, a := range args {
		got := CarlsonRJ(a[0], a[1], a[2], a[3])
		want := carlsonQuad(a[0], a[1], a[2], a[3])
		if math.Abs(got-want) > 1e-11*math.Max(1, math.Abs(want)) {
			t.Errorf("RJ%v = %.15g, quadrature %.15g", a, got, want)
		}
		if a[2] > 0 {
			got := CarlsonRD(a[0], a[1], a[2])
			want := carlsonQuad(a[0], a[1], a[2], a[2])
			if math.Abs(got-want) > 1e-11*math.Max(1, math.Abs(want)) {
				t.Errorf("RD%v = %.15g, quadrature %.15g", a[:3], got, want)
			}
		}
	}
	// Several p at once agree with one at a time.
	var out [3]float64
	rd := carlsonDJ(0.2, 0.5, 1, []float64{0.4, -0.3, 9}, out[:0])
	near(t, "fused RD", rd, CarlsonRD(0.2, 0.5, 1), 1e-15)
	for i, p := range []float64{0.4, -0.3, 9} {
		near(t, "fused RJ", out[i], CarlsonRJ(0.2, 0.5, 1, p), 1e-15)
	}
	if !math.IsNaN(CarlsonRJ(1, 2, 3, 0)) || !math.IsNaN(CarlsonRJ(-1, 2, 3, 1)) || !math.IsNaN(CarlsonRC(1, 0)) || !math.IsNaN(CarlsonRD(0, 0, 1)) {
		t.Error("Carlson integrals outside their domain should be NaN")
	}
}

func TestBulirschCel(t *testing.T) {
	// Against the Carlson forms (DLMF 19.25.1, 19.25.2 with 19.2.11):
	// K = R_F(0, kc², 1), ∫sin²/Δ = R_D(0, kc², 1)/3,
	// Π(n|m) = K + (n/3) R_J(0, kc², 1, 1 − n) (a principal value for n > 1).
	for _, mc := range []float64{1e-12, 0.01, 0.5, 1, 3, 40} {
		kc := math.Sqrt(mc)
		near(t, "cel K", bulirschCel(kc, 1, 1, 1), carlsonRF(0, mc, 1), 1e-14*carlsonRF(0, mc, 1))
		near(t, "cel D", bulirschCel(kc, 1, 0, 1), CarlsonRD(0, mc, 1)/3, 1e-14*CarlsonRD(0, mc, 1))
		for _, n := range []float64{-5, -0.3, 0.2, 0.9, 0.999999, 1.5, 7} {
			want := carlsonRF(0, mc, 1) + n/3*CarlsonRJ(0, mc, 1, 1-n)
			near(t, "cel Π", bulirschCel(kc, 1-n, 1, 1), want, 1e-13*math.Max(1, math.Abs(want)))
		}
	}
	// K(1/2) = Γ(1/4)²/(4√π) (DLMF 19.20.2, lemniscatic case).
	g := math.Gamma(0.25)
	near(t, "cel K(1/2)", bulirschCel(math.Sqrt(0.5), 1, 1, 1), g*g/(4*math.Sqrt(math.Pi)), 1e-15)
}

// TestCarlsonRFAgainstGonum compares the package's R_F with gonum's
// EllipticRF, an independent implementation (ACM TOMS algorithm 577
// lineage), over arguments spread across twenty decades, one of them
// possibly zero.
func TestCarlsonRFAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 7))
	worst := 0.0
	for i := 0; i < 200000; i++ {
		x := math.Pow(10, -10+20*rng.Float64())
		y := math.Pow(10, -10+20*rng.Float64())
		z := math.Pow(10, -10+20*rng.Float64())
		if i%3 == 0 {
			x = 0
		}
		want := mathext.EllipticRF(x, y, z)
		worst = max(worst, math.Abs(carlsonRF(x, y, z)/want-1))
	}
	if worst > 2e-15 {
		t.Errorf("R_F against gonum: worst relative difference %g, want ≤ 2e-15", worst)
	}
}

// TestCarlsonLoop3 checks that the three-p duplication loop gives the
// general loop's results to the last bit (the general loop runs for four
// p, the fourth a copy of the third).
func TestCarlsonLoop3(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 13))
	for i := 0; i < 20000; i++ {
		x, y := rng.Float64(), rng.Float64()*3
		ps := []float64{rng.Float64() * 2, math.Pow(10, -3+6*rng.Float64()), rng.Float64() * 50}
		var got [3]float64
		var want [4]float64
		rd3 := carlsonLoop(x, y, 1, ps, got[:])
		rd4 := carlsonLoop(x, y, 1, append(ps, ps[2]), want[:])
		if rd3 != rd4 || got[0] != want[0] || got[1] != want[1] || got[2] != want[2] {
			t.Fatalf("x=%g y=%g p=%v: R_D %v vs %v, R_J %v vs %v", x, y, ps, rd3, rd4, got, want[:3])
		}
	}
}

// TestCarlsonRF2 checks that the paired R_F gives carlsonRF's results to
// the last bit, for pairs needing different numbers of steps.
func TestCarlsonRF2(t *testing.T) {
	rng := rand.New(rand.NewPCG(19, 23))
	for i := 0; i < 50000; i++ {
		xa, ya := math.Pow(10, -12+12*rng.Float64()), 2*rng.Float64()
		xb, yb := rng.Float64(), math.Pow(10, -8+9*rng.Float64())
		ga, gb := carlsonRF2(xa, ya, xb, yb)
		if wa, wb := carlsonRF(xa, ya, 1), carlsonRF(xb, yb, 1); ga != wa || gb != wb {
			t.Fatalf("(%g,%g),(%g,%g): %v %v, want %v %v", xa, ya, xb, yb, ga, gb, wa, wb)
		}
	}
}

// TestCarlsonLoop1 checks that the one-p duplication loop gives the
// general loop's results to the last bit (the general loop runs for two
// p, the second a copy of the first).
func TestCarlsonLoop1(t *testing.T) {
	rng := rand.New(rand.NewPCG(29, 31))
	for i := 0; i < 20000; i++ {
		x, y := rng.Float64(), math.Pow(10, -6+7*rng.Float64())
		p := math.Pow(10, -4+6*rng.Float64())
		var got [1]float64
		var want [2]float64
		rd1 := carlsonLoop(x, y, 1, []float64{p}, got[:])
		rd2 := carlsonLoop(x, y, 1, []float64{p, p}, want[:])
		if rd1 != rd2 || got[0] != want[0] {
			t.Fatalf("x=%g y=%g p=%g: R_D %v vs %v, R_J %v vs %v", x, y, p, rd1, rd2, got[0], want[0])
		}
	}
}

// TestCarlsonRF2DJ checks the paired R_F with R_D and R_J on the second
// chain: both R_F are carlsonRF2's to the last bit, and R_D, R_J agree with
// gonum's EllipticRD (an independent implementation) and with the general
// duplication loop to rounding, with and without the first chain.
func TestCarlsonRF2DJ(t *testing.T) {
	rng := rand.New(rand.NewPCG(37, 41))
	worstD, worstJ := 0.0, 0.0
	for i := 0; i < 50000; i++ {
		xa, ya := math.Pow(10, -12+12*rng.Float64()), 2*rng.Float64()
		xb, yb := rng.Float64(), math.Pow(10, -8+9*rng.Float64())
		p := math.Pow(10, -6+7*rng.Float64())
		withA := i%4 != 0
		fa, fb, rd, rj := carlsonRF2DJ(xa, ya, xb, yb, p, withA)
		wa, wb := carlsonRF2(xa, ya, xb, yb)
		if !withA {
			wa = 0
		}
		if fa != wa || fb != wb {
			t.Fatalf("(%g,%g),(%g,%g), withA %v: R_F %v %v, want %v %v", xa, ya, xb, yb, withA, fa, fb, wa, wb)
		}
		var rjl [1]float64
		rdl := carlsonLoop(xb, yb, 1, []float64{p}, rjl[:])
		worstD = max(worstD, math.Abs(rd/mathext.EllipticRD(xb, yb, 1)-1), math.Abs(rd/rdl-1))
		worstJ = max(worstJ, math.Abs(rj/rjl[0]-1))
	}
	if worstD > 4e-15 || worstJ > 4e-15 {
		t.Errorf("R_D worst relative difference %g, R_J %g; want ≤ 4e-15", worstD, worstJ)
	}
}
