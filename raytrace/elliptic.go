package raytrace

import "math"

// The functions below take the parameter m of Legendre's and Jacobi's
// functions together with its complement mc = 1 - m wherever the callers
// can compute mc without cancellation (near-critical photons have m → 1).

// EllipticK returns the complete elliptic integral of the first kind
// K(m) = R_F(0, 1-m, 1) (Carlson 1995, Numer. Algorithms 10, 13; DLMF 19.25.1),
// computed as π/(2 AGM(1, sqrt(1 − m))) (DLMF 19.8.5).
// Domain: m < 1, including m < 0 (gonum's CompleteK refuses m < 0).
func EllipticK(m float64) float64 {
	return ellipK(1 - m)
}

// ellipK is K for the complementary parameter mc = 1 − m > 0, by the
// arithmetic–geometric mean (DLMF 19.8.5; see agmTable): exact to a few
// rounding units for every mc > 0, including mc → 0 (m → 1, the
// near-critical photons) and mc > 1 (m < 0), at a fifth of the cost of
// R_F(0, mc, 1). gonum's CompleteK takes m itself, which cannot carry a
// small mc to full relative accuracy, and refuses m < 0.
func ellipK(mc float64) float64 {
	if !(mc > 0) || math.IsInf(mc, 1) {
		return math.NaN()
	}
	return math.Pi / (2 * agm(mc))
}

// EllipticF returns the incomplete elliptic integral of the first kind
// F(φ|m) = ∫₀^φ dθ / sqrt(1 - m sin²θ) for any real φ and m < 1
// (m < 0 allowed). It uses F(φ|m) = sin φ R_F(cos²φ, 1 - m sin²φ, 1)
// for |φ| ≤ π/2 (Carlson 1995; DLMF 19.25.5) and reduces other φ with
// F(φ + jπ|m) = 2jK(m) + F(φ|m) and F(-φ|m) = -F(φ|m) (DLMF 19.2.10,
// 19.2.9): the R_F form alone is wrong beyond π/2.
func EllipticF(phi, m float64) float64 {
	if math.IsNaN(phi) || math.IsInf(phi, 0) || math.IsNaN(m) || m >= 1 {
		return math.NaN()
	}
	mc := 1 - m
	j := math.Round(phi / math.Pi)
	r := phi - j*math.Pi // |r| ≤ π/2
	s, c := math.Sincos(r)
	f := math.Copysign(ellipFsc(s*s, c*c, mc), r)
	if j != 0 {
		f += 2 * j * ellipK(mc)
	}
	return f
}

// ellipFsc returns F(φ|m) for 0 ≤ φ ≤ π/2 given s2 = sin²φ, c2 = cos²φ and
// mc = 1 - m, in the form sqrt(s2) R_F(c2, c2 + mc s2, 1) which keeps full
// relative accuracy when both m → 1 and φ → π/2 (Carlson 1995).
func ellipFsc(s2, c2, mc float64) float64 {
	if s2 <= 0 {
		return 0
	}
	return math.Sqrt(s2) * carlsonRF(c2, c2+mc*s2, 1)
}

// ellipFsc2 is ellipFsc for two amplitudes and parameters at once, with
// the same steps for each, so the same results to the last bit, but the
// two duplications of R_F side by side, where the processor overlaps them
// (carlsonRF2).
func ellipFsc2(s2a, c2a, mca, s2b, c2b, mcb float64) (fa, fb float64) {
	if s2a <= 0 || s2b <= 0 {
		return ellipFsc(s2a, c2a, mca), ellipFsc(s2b, c2b, mcb)
	}
	ra, rb := carlsonRF2(c2a, c2a+mca*s2a, c2b, c2b+mcb*s2b)
	return math.Sqrt(s2a) * ra, math.Sqrt(s2b) * rb
}

// ellipFcos returns F(arccos x | m) for -1 ≤ x ≤ 1 (so 0 ≤ φ ≤ π), with
// F(φ) = 2K - F(π - φ) for φ > π/2 (DLMF 19.2.10).
func ellipFcos(x, mc float64) float64 {
	x = max(-1, min(1, x))
	if x >= 0 {
		return ellipFsc((1-x)*(1+x), x*x, mc)
	}
	return 2*ellipK(mc) - ellipFsc((1-x)*(1+x), x*x, mc)
}

// JacobiSCD returns the Jacobi elliptic functions sn, cn and dn of u for
// parameter 0 ≤ m ≤ 1 by the descending Landen (Gauss) transformation in
// the form of Bulirsch (1965, Numer. Math. 7, 78, algorithm sncndn): the
// arithmetic–geometric mean of 1 and sqrt(1-m) scales the argument
// (Abramowitz & Stegun 16.4; DLMF 22.20), and the back-substitution carries
// the ratio cn/sn instead of the amplitude, so cn and dn keep their relative
// accuracy where they are small (m → 1, u near the quarter period).
// m = 1 gives tanh u, sech u, sech u (DLMF 22.5.3).
func JacobiSCD(u, m float64) (sn, cn, dn float64) {
	return jacobi(u, m, 1-m)
}

// agmSteps bounds the arithmetic–geometric mean of 1 and sqrt(mc): it
// converges quadratically, in 4 to 6 steps for most parameters of photon
// paths, 9 for mc = 1e-16 and 11 for mc = 1e-300.
const agmSteps = 16

// agmTable is the arithmetic–geometric mean of 1 and sqrt(mc) step by
// step (Abramowitz & Stegun 17.6): a₀ = 1, b₀ = sqrt(mc),
// a_{i+1} = (a_i + b_i)/2, b_{i+1} = sqrt(a_i b_i), stopped once
// |a − b| ≤ 1e-9 a, the next mean then being exact to rounding. It
// depends on the parameter only, so one photon sets it up once for all
// its Jacobi functions and its K(m) = π/(2 AGM) (DLMF 19.8.5).
type agmTable struct {
	last   int               // index of the last step kept
	am, bm [agmSteps]float64 // a_i and b_i
	mean   float64           // AGM(1, sqrt(mc))
}

// set fills the table for 0 < mc (mc > 1, that is m < 0, allowed).
func (t *agmTable) set(mc float64) {
	a, b := 1.0, mc
	var c float64
	for i := 0; i < agmSteps; i++ {
		t.last = i
		t.am[i] = a
		b = math.Sqrt(b)
		t.bm[i] = b
		c = (a + b) / 2
		if math.Abs(a-b) <= 1e-9*a {
			break
		}
		b *= a
		a = c
	}
	t.mean = c
}

// agm returns AGM(1, sqrt(mc)) for 0 < mc, as agmTable.set without the
// table.
func agm(mc float64) float64 {
	a, b := 1.0, math.Sqrt(mc)
	for i := 0; i < agmSteps; i++ {
		c := (a + b) / 2
		if math.Abs(a-b) <= 1e-9*a {
			return c
		}
		b = math.Sqrt(a * b)
		a = c
	}
	return a
}

// ellipKSn2 returns K(m) and ∫₀^K sn²(u|m) du = (K − E)/m for mc = 1 − m
// > 0 (m < 0 allowed), by the arithmetic–geometric mean of 1 and √mc with
// Legendre's sum E = K (1 − Σ 2^{n−1} c_n²), c_0² = m, c_{n+1} = (a_n − b_n)/2
// (Abramowitz & Stegun 1964, 17.6.3–17.6.4): (K − E)/m = K Σ 2^{n−1} c_n²/m,
// with the c_n² carried as c_n²/m and c_{n+1} = c_n²/(4a_{n+1}), so nothing
// cancels as m → 0. K is ellipK's to the last bit (the same steps as agm).
func ellipKSn2(mc float64) (k, zk float64) {
	a, b := 1.0, math.Sqrt(mc)
	m := 1 - mc
	cr := m / (4 * (1 + b) * (1 + b)) // c_1²/m
	cc := m * cr                      // c_1²
	sum, pow := 0.5, 1.0              // Σ 2^{n−1} c_n²/m so far, 2^n
	for i := 0; i < agmSteps; i++ {
		c := (a + b) / 2
		sum += pow * cr
		if math.Abs(a-b) <= 1e-9*a {
			k = math.Pi / (2 * c)
			return k, k * sum
		}
		b = math.Sqrt(a * b)
		a = c
		pow *= 2
		an := (a + b) / 2
		f := cc / (16 * an * an)
		cr *= f
		cc *= f
	}
	k = math.Pi / (2 * a)
	return k, k * sum
}

// jacobi is JacobiSCD with the complementary parameter mc = 1 - m given
// separately, for accuracy as m → 1.
func jacobi(u, m, mc float64) (sn, cn, dn float64) {
	if math.IsNaN(u) || math.IsNaN(m) || math.IsInf(u, 0) || m < 0 || mc < 0 {
		return math.NaN(), math.NaN(), math.NaN()
	}
	if m == 0 {
		sn, cn = math.Sincos(u)
		return sn, cn, 1
	}
	if mc == 0 {
		sn = math.Tanh(u)
		cn = 1 / math.Cosh(u)
		return sn, cn, cn
	}
	var t agmTable
	t.set(mc)
	return t.jacobi(u)
}

// jacobi returns sn, cn and dn of u for the table's parameter, 0 < m < 1
// (Bulirsch 1965 as for JacobiSCD, with the mean already taken).
func (t *agmTable) jacobi(u float64) (sn, cn, dn float64) {
	c := t.mean
	sn, cn = math.Sincos(u * c)
	dn = 1
	if sn != 0 {
		ratio := cn / sn // cot of the transformed amplitude
		c *= ratio
		for i := t.last; i >= 0; i-- {
			ratio *= c
			c *= dn
			dn = (t.bm[i] + ratio) / (t.am[i] + ratio)
			ratio = c / t.am[i]
		}
		s := 1 / math.Sqrt(c*c+1)
		sn = math.Copysign(s, sn)
		cn = c * sn
	}
	return sn, cn, dn
}
