package scene

import (
	"math"
	"math/rand/v2"
	"testing"

	"kerrscope/raytrace"
)

// kerrEquator is the Boyer–Lindquist Kerr metric at θ = π/2 (Boyer &
// Lindquist 1967, J. Math. Phys. 8, 265), written out here independently of
// the package: forward components and the inverse of the (t, φ) block.
type kerrEquator struct {
	r, delta                float64
	gtt, gtp, gpp, grr, ghh float64 // g_tt, g_tφ, g_φφ, g_rr, g_θθ
	itt, itp, ipp, irr, ihh float64 // g^tt, g^tφ, g^φφ, g^rr, g^θθ
	dgtt, dgtp, dgpp        float64 // ∂_r of g_tt, g_tφ, g_φφ
}

func newKerrEquator(a, r float64) kerrEquator {
	m := kerrEquator{r: r}
	m.delta = r*r - 2*r + a*a
	m.gtt = -(1 - 2/r)
	m.gtp = -2 * a / r
	m.gpp = r*r + a*a + 2*a*a/r
	m.grr = r * r / m.delta
	m.ghh = r * r
	det := m.gtt*m.gpp - m.gtp*m.gtp
	m.itt = m.gpp / det
	m.itp = -m.gtp / det
	m.ipp = m.gtt / det
	m.irr = 1 / m.grr
	m.ihh = 1 / m.ghh
	m.dgtt = -2 / (r * r)
	m.dgtp = 2 * a / (r * r)
	m.dgpp = 2*r - 2*a*a/(r*r)
	return m
}

// radialPotential is R(r) for a photon with E = 1 (Carter 1968, Phys. Rev.
// 174, 1559).
func radialPotential(a, r, lambda, eta float64) float64 {
	k := r*r + a*a - a*lambda
	return k*k - (r*r-2*r+a*a)*(eta+(lambda-a)*(lambda-a))
}

// gasVelocity builds the gas 4-velocity (u^t, u^r, u^φ) without the
// package: for r ≥ r_isco a circular geodesic whose Ω solves the geodesic
// condition ∂_r g_tt + 2Ω ∂_r g_tφ + Ω² ∂_r g_φφ = 0 (prograde root, Bardeen,
// Press & Teukolsky 1972) with u^t from u·u = −1; inside, u_t = −E_isco,
// u_φ = L_isco raised with the inverse metric and u^r of Mummery & Balbus
// (2019).
func gasVelocity(a, r float64) (ut, ur, uphi float64) {
	m := newKerrEquator(a, r)
	risco := raytrace.ISCO(a)
	if r >= risco {
		omega := (-m.dgtp + math.Sqrt(m.dgtp*m.dgtp-m.dgtt*m.dgpp)) / m.dgpp
		ut = 1 / math.Sqrt(-(m.gtt + 2*m.gtp*omega + m.gpp*omega*omega))
		return ut, 0, ut * omega
	}
	o, _ := raytrace.CircularOrbit(a, risco)
	ut = m.itt*(-o.E) + m.itp*o.L
	uphi = m.itp*(-o.E) + m.ipp*o.L
	ur = -math.Sqrt(2/(3*risco)) * math.Pow(risco/r-1, 1.5)
	return ut, ur, uphi
}

// directRedshift returns g = 1/(−p_μ u^μ) and cos δ for a photon
// p_μ = (−1, p_r, p_θ, λ), p_r = ±sqrt(R)/Δ, p_θ = sqrt(η), seen by the gas
// at r, computed in an orthonormal gas frame. It also returns the photon's
// squared norm in that frame relative to E_loc², which must vanish.
func directRedshift(a, r, lambda, eta float64, outbound bool) (g, cosDelta, nullErr float64) {
	m := newKerrEquator(a, r)
	ut, ur, uphi := gasVelocity(a, r)
	pr := math.Sqrt(math.Max(radialPotential(a, r, lambda, eta), 0)) / m.delta
	if !outbound {
		pr = -pr
	}
	pth := math.Sqrt(eta)
	pt, pphi := -1.0, lambda
	eloc := -(pt*ut + pr*ur + pphi*uphi)

	// Spatial triad orthogonal to u: e_θ̂ = ∂_θ/r; e_1 from ∂_r and e_2 from
	// ∂_φ by Gram–Schmidt against u (with u·u = −1).
	type vec struct{ t, r, p float64 }
	dot := func(x, y vec) float64 {
		return m.gtt*x.t*y.t + m.gtp*(x.t*y.p+x.p*y.t) + m.gpp*x.p*y.p + m.grr*x.r*y.r
	}
	u := vec{ut, ur, uphi}
	proj := func(v vec, e vec) vec { // v − (v·e)/(e·e) e
		c := dot(v, e) / dot(e, e)
		return vec{v.t - c*e.t, v.r - c*e.r, v.p - c*e.p}
	}
	norm := func(v vec) vec {
		n := math.Sqrt(dot(v, v))
		return vec{v.t / n, v.r / n, v.p / n}
	}
	e1 := norm(proj(vec{0, 1, 0}, u))
	e2 := norm(proj(proj(vec{0, 0, 1}, u), e1))
	comp := func(e vec) float64 { return pt*e.t + pr*e.r + pphi*e.p }
	p1, p2, p3 := comp(e1), comp(e2), pth/r
	nullErr = (eloc*eloc - p1*p1 - p2*p2 - p3*p3) / (eloc * eloc)
	return 1 / eloc, p3 / eloc, nullErr
}

func mustGas(t testing.TB, a float64) Gas {
	t.Helper()
	g, err := NewGas(a)
	if err != nil {
		t.Fatalf("NewGas(%v): %v", a, err)
	}
	return g
}

func relDiff(x, y float64) float64 {
	return math.Abs(x-y) / math.Max(math.Abs(x), math.Abs(y))
}

var testSpins = []float64{-0.999, -0.9, -0.5, 0, 0.3, 0.7, 0.9, 0.998}

func TestRedshiftFaceOnSchwarzschild(t *testing.T) {
	gas := mustGas(t, 0)
	for r := 6.0; r < 1e5; r *= 1.07 {
		for _, eta := range []float64{0, 10, 27} { // η ≤ 27 reaches every r ≥ 3
			got, ok := gas.Redshift(r, 0, eta, true)
			want := math.Sqrt(1 - 3/r) // Cunningham 1975
			if !ok || relDiff(got, want) > 1e-14 {
				t.Errorf("r=%v η=%v: g = %v, %v; want %v", r, eta, got, ok, want)
			}
		}
	}
}

func TestRedshiftFaceOnSpinning(t *testing.T) {
	for _, a := range []float64{-0.998, -0.9, -0.5, 0.5, 0.9, 0.998} {
		gas := mustGas(t, a)
		for r := raytrace.ISCO(a); r < 1e4; r *= 1.05 {
			got, ok := gas.Redshift(r, 0, 0, true)
			// Cunningham 1975, face-on Keplerian form.
			want := math.Sqrt(1-3/r+2*a/math.Pow(r, 1.5)) / (1 + a/math.Pow(r, 1.5))
			if !ok || relDiff(got, want) > 1e-13 {
				t.Errorf("a=%v r=%v: g = %v, %v; want %v", a, r, got, ok, want)
			}
		}
	}
}

// samplePhoton draws (λ, η) of a photon that can be at r, R(r) ≥ 0
// (Carter 1968), and is future-directed there, p^t > 0 (in the ergoregion
// large λ with E = 1 fails this).
func samplePhoton(rng *rand.Rand, a, r float64) (lambda, eta float64) {
	m := newKerrEquator(a, r)
	for {
		lambda = -10 + 20*rng.Float64()
		eta = 40 * rng.Float64()
		if radialPotential(a, r, lambda, eta) >= 0 && -m.itt+m.itp*lambda > 0 {
			return lambda, eta
		}
	}
}

func TestRedshiftKeplerianDirect(t *testing.T) {
	var maxG, maxC float64
	rng := rand.New(rand.NewPCG(1, 2))
	for _, a := range testSpins {
		gas := mustGas(t, a)
		risco := raytrace.ISCO(a)
		for i := 0; i < 400; i++ {
			r := risco * math.Pow(200, rng.Float64())
			lambda, eta := samplePhoton(rng, a, r)
			out := rng.IntN(2) == 0
			want, wantCos, nullErr := directRedshift(a, r, lambda, eta, out) // Cunningham 1975
			if math.Abs(nullErr) > 1e-10 {
				t.Fatalf("a=%v r=%v λ=%v η=%v: test photon not null (%g)", a, r, lambda, eta, nullErr)
			}
			got, ok := gas.Redshift(r, lambda, eta, out)
			if !ok || relDiff(got, want) > 1e-12 {
				t.Errorf("a=%v r=%v λ=%v η=%v: g = %v, %v; want %v", a, r, lambda, eta, got, ok, want)
			}
			maxG = math.Max(maxG, relDiff(got, want))
			maxC = math.Max(maxC, math.Abs(EmissionCosine(got, r, eta)-wantCos))
			if c := EmissionCosine(got, r, eta); math.Abs(c-wantCos) > 1e-12 {
				t.Errorf("a=%v r=%v λ=%v η=%v: cos δ = %v, want %v", a, r, lambda, eta, c, wantCos)
			}
		}
	}
	t.Logf("max relative g difference %.2g, max cos δ difference %.2g", maxG, maxC)
}

func TestRedshiftPlungingDirect(t *testing.T) {
	var maxG, maxC float64
	rng := rand.New(rand.NewPCG(3, 4))
	for _, a := range testSpins {
		gas := mustGas(t, a)
		rh, risco := raytrace.Horizon(a), raytrace.ISCO(a)
		for i := 0; i < 400; i++ {
			r := rh + (risco-rh)*(0.02+0.97*rng.Float64())
			lambda, eta := samplePhoton(rng, a, r)
			out := rng.IntN(2) == 0
			// Cunningham 1975 with Mummery & Balbus 2019 u^r.
			want, wantCos, nullErr := directRedshift(a, r, lambda, eta, out)
			if math.Abs(nullErr) > 1e-9 {
				t.Fatalf("a=%v r=%v λ=%v η=%v: test photon not null (%g)", a, r, lambda, eta, nullErr)
			}
			got, ok := gas.Redshift(r, lambda, eta, out)
			if !ok || relDiff(got, want) > 1e-10 {
				t.Errorf("a=%v r=%v λ=%v η=%v out=%v: g = %v, %v; want %v", a, r, lambda, eta, out, got, ok, want)
			}
			maxG = math.Max(maxG, relDiff(got, want))
			maxC = math.Max(maxC, math.Abs(EmissionCosine(got, r, eta)-wantCos))
			if c := EmissionCosine(got, r, eta); math.Abs(c-wantCos) > 1e-10 {
				t.Errorf("a=%v r=%v λ=%v η=%v: cos δ = %v, want %v", a, r, lambda, eta, c, wantCos)
			}
		}
	}
	t.Logf("max relative g difference %.2g, max cos δ difference %.2g", maxG, maxC)
}

func TestPlungingNormalization(t *testing.T) {
	for _, a := range testSpins {
		gas := mustGas(t, a)
		rh, risco := raytrace.Horizon(a), raytrace.ISCO(a)
		isco, _ := raytrace.CircularOrbit(a, risco)
		for _, f := range []float64{0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99} {
			r := rh + f*(risco-rh)
			m := newKerrEquator(a, r)
			ut, ur, uphi := gas.velocity(r)
			terms := []float64{m.gtt * ut * ut, 2 * m.gtp * ut * uphi, m.gpp * uphi * uphi, m.grr * ur * ur}
			sum, scale := 0.0, 0.0
			for _, x := range terms {
				sum += x
				scale += math.Abs(x)
			}
			// u·u = −1 (timelike geodesic); Mummery & Balbus 2019 with the
			// ISCO constants of Bardeen, Press & Teukolsky 1972.
			if math.Abs(sum+1) > 1e-13*scale {
				t.Errorf("a=%v r=%v: u·u = %v, want -1", a, r, sum)
			}
			if !(ur < 0) || !(ut > 0) {
				t.Errorf("a=%v r=%v: u^t = %v, u^r = %v; want inflow, future-directed", a, r, ut, ur)
			}
			// Lowered components are the conserved E and L (Cunningham 1975).
			lt := m.gtt*ut + m.gtp*uphi
			lp := m.gtp*ut + m.gpp*uphi
			if math.Abs(lt+isco.E) > 1e-12*math.Abs(m.gtt*ut) || math.Abs(lp-isco.L) > 1e-12*math.Abs(m.gpp*uphi) {
				t.Errorf("a=%v r=%v: u_t = %v, u_φ = %v; want %v, %v", a, r, lt, lp, -isco.E, isco.L)
			}
		}
	}
}

func TestPlungingContinuity(t *testing.T) {
	for _, a := range testSpins {
		gas := mustGas(t, a)
		risco := raytrace.ISCO(a)
		n := 0
		for _, lambda := range []float64{-4, -1, 0, 1.5, 3} {
			for _, out := range []bool{true, false} {
				eta := 5.0
				if radialPotential(a, risco, lambda, eta) < 0 {
					continue
				}
				n++
				at, ok := gas.Redshift(risco, lambda, eta, out)
				if !ok {
					t.Fatalf("a=%v λ=%v: no redshift at r_isco", a, lambda)
				}
				// The plunging flow starts from the ISCO circular orbit
				// (Cunningham 1975; Mummery & Balbus 2019), so g is
				// continuous there.
				for _, h := range []float64{1e-6, 1e-8, 1e-10} {
					below, ok := gas.Redshift(risco*(1-h), lambda, eta, out)
					if !ok || math.Abs(below-at) > 100*h {
						t.Errorf("a=%v λ=%v out=%v h=%g: g below = %v, at r_isco = %v", a, lambda, out, h, below, at)
					}
				}
			}
		}
		if n == 0 {
			t.Errorf("a=%v: no photon tested", a)
		}
	}
}

func TestPlungingPhotonNull(t *testing.T) {
	n, worst := 0, 0.0
	for _, a := range testSpins {
		gas := mustGas(t, a)
		rh, risco := raytrace.Horizon(a), raytrace.ISCO(a)
		for _, f := range []float64{0.1, 0.4, 0.7, 0.95} {
			r := rh + f*(risco-rh)
			m := newKerrEquator(a, r)
			ut, ur, uphi := gas.velocity(r)
			for _, lambda := range []float64{-5, -2, 0, 1, 2.5} {
				for _, out := range []bool{true, false} {
					g, ok := gas.Redshift(r, lambda, 0, out)
					if !ok {
						if radialPotential(a, r, lambda, 0) >= 0 && -m.itt+m.itp*lambda > 0 {
							t.Errorf("a=%v r=%v λ=%v: no redshift", a, r, lambda)
						}
						continue
					}
					// Recover the p_r that Redshift used from g = 1/(u^t − λu^φ − p_r u^r).
					pr := (ut - lambda*uphi - 1/g) / ur
					if (pr > 0) != out && math.Abs(pr) > 1e-9 {
						t.Errorf("a=%v r=%v λ=%v out=%v: p_r = %v has the wrong sign", a, r, lambda, out, pr)
					}
					// Null photon with η = 0 in the plane, p_θ = 0 (Carter 1968).
					terms := []float64{m.itt, -2 * m.itp * lambda, m.ipp * lambda * lambda, m.irr * pr * pr}
					sum, scale := 0.0, 0.0
					for _, x := range terms {
						sum += x
						scale += math.Abs(x)
					}
					n++
					worst = math.Max(worst, math.Abs(sum)/scale)
					if math.Abs(sum) > 1e-9*scale {
						t.Errorf("a=%v r=%v λ=%v out=%v: p·p = %v (scale %v), want 0", a, r, lambda, out, sum, scale)
					}
				}
			}
		}
	}
	if n < 200 {
		t.Errorf("only %d photons checked", n)
	}
	t.Logf("%d photons, max |p·p|/scale %.2g", n, worst)
}

func TestEmissionCosineLimits(t *testing.T) {
	tests := []struct {
		name      string
		g, r, eta float64
		want      float64
	}{
		{"flat space, along the normal", 1, 50, 2500, 1}, // common practice
		{"in the plane", 0.8, 10, 0, 0},                  // common practice
		{"clamped above", 1.5, 10, 100, 1},               // clamp to [0, 1]
		{"negative η", 1, 10, -1e-14, 0},                 // Θ(π/2) = η ≥ 0 (Carter 1968)
		{"NaN g", math.NaN(), 10, 4, 0},                  // no NaN out
		{"NaN η", 1, 10, math.NaN(), 0},                  // no NaN out
		{"r = 0", 1, 0, 4, 0},                            // outside the domain
		{"infinite r and g", math.Inf(1), math.Inf(1), 4, 0},
	}
	for _, tt := range tests {
		if got := EmissionCosine(tt.g, tt.r, tt.eta); got != tt.want {
			t.Errorf("%s: cos δ = %v, want %v", tt.name, got, tt.want)
		}
	}
}

func TestRedshiftDomain(t *testing.T) {
	if _, err := NewGas(1); err == nil { // -1 < a < 1 (Kerr, sub-extremal)
		t.Error("NewGas(1): no error")
	}
	if _, err := NewGas(math.NaN()); err == nil {
		t.Error("NewGas(NaN): no error")
	}
	var zero Gas
	if g, ok := zero.Redshift(10, 0, 0, true); ok || g != 0 {
		t.Errorf("zero Gas: g = %v, %v; want 0, false", g, ok)
	}
	gas := mustGas(t, 0.5)
	rh := raytrace.Horizon(0.5)
	bad := []struct {
		name           string
		r, lambda, eta float64
	}{
		{"at horizon", rh, 0, 0},
		{"inside horizon", 1, 0, 0},
		{"negative r", -3, 0, 0},
		{"NaN r", math.NaN(), 0, 0},
		{"infinite r", math.Inf(1), 0, 0},
		{"NaN λ", 10, math.NaN(), 0},
		{"infinite λ", 10, math.Inf(-1), 0},
		{"NaN η", 10, 0, math.NaN()},
		{"infinite η", 10, 0, math.Inf(1)},
		// R(r) < 0: the photon cannot be at r (Carter 1968).
		{"forbidden photon, Keplerian", 10, 0, 1e4},
		{"forbidden photon, plunging", 3, 40, 0},
		// p^t < 0 in the ergoregion: not a photon from the disk (Misner,
		// Thorne & Wheeler 1973, future-directed momentum).
		{"time-reversed photon", 1.9, 20, 0},
	}
	for _, b := range bad {
		for _, out := range []bool{true, false} {
			if g, ok := gas.Redshift(b.r, b.lambda, b.eta, out); ok || g != 0 {
				t.Errorf("%s: g = %v, %v; want 0, false", b.name, g, ok)
			}
		}
	}
	if radialPotential(0.5, 3, 40, 0) >= 0 {
		t.Fatal("test photon meant to be forbidden at r = 3 is allowed")
	}
	if m := newKerrEquator(0.5, 1.9); radialPotential(0.5, 1.9, 20, 0) < 0 || -m.itt+m.itp*20 > 0 {
		t.Fatal("test photon meant to be time-reversed at r = 1.9 is not")
	}
}

func TestRedshiftEdgesNoNaN(t *testing.T) {
	for _, a := range []float64{-0.999999, -0.5, 0, 0.5, 0.999999} {
		gas := mustGas(t, a)
		rh, risco := raytrace.Horizon(a), raytrace.ISCO(a)
		for _, r := range []float64{rh + 1e-12, rh * (1 + 1e-9), risco, math.Nextafter(risco, 0), risco * (1 + 1e-15)} {
			for _, lambda := range []float64{-6, 0, 1.9} {
				for _, eta := range []float64{0, 1e-300, 3} {
					for _, out := range []bool{true, false} {
						g, ok := gas.Redshift(r, lambda, eta, out)
						if ok && !(g > 0 && !math.IsInf(g, 0)) || !ok && g != 0 {
							t.Errorf("a=%v r=%v λ=%v η=%v out=%v: g = %v, %v", a, r, lambda, eta, out, g, ok)
						}
						if c := EmissionCosine(g, r, eta); !(c >= 0 && c <= 1) {
							t.Errorf("a=%v r=%v: cos δ = %v", a, r, c)
						}
					}
				}
			}
		}
		// At r_isco the gas is on a circular orbit and every photon that
		// reaches it has a finite positive g (Cunningham 1975).
		if g, ok := gas.Redshift(risco, 0, 0, true); !ok {
			t.Errorf("a=%v: no redshift at r_isco (g = %v)", a, g)
		}
		// Just outside the horizon an outbound photon is redshifted
		// toward 0 but stays positive (Cunningham 1975).
		if g, ok := gas.Redshift(rh*(1+1e-9), 0, 0, true); !ok || !(g < 1e-3) {
			t.Errorf("a=%v: outbound photon near the horizon: g = %v, %v", a, g, ok)
		}
	}
}

var sinkG float64

func BenchmarkGasRedshift(b *testing.B) {
	gas := mustGas(b, 0.9)
	risco := raytrace.ISCO(0.9)
	for _, bc := range []struct {
		name string
		r    float64
	}{{"keplerian", 3 * risco}, {"plunging", 0.8 * risco}} {
		b.Run(bc.name, func(b *testing.B) {
			b.ReportAllocs()
			s := 0.0
			for i := 0; b.Loop(); i++ {
				g, _ := gas.Redshift(bc.r, 1.5, 4, i&1 == 0)
				s += g
			}
			sinkG = s
		})
	}
}
