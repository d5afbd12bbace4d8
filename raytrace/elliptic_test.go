package raytrace

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mathext"
)

func TestCarlsonRF(t *testing.T) {
	// Carlson 1995, Numer. Algorithms 10, 13, test values.
	near(t, "RF(1,2,0)", mathext.EllipticRF(1, 2, 0), 1.3110287771461, 1e-13)
	near(t, "RF(2,3,4)", mathext.EllipticRF(2, 3, 4), 0.58408284167715, 1e-13)
	// K(-1) = RF(0, 2, 1) = RF(1, 2, 0) (DLMF 19.25.1 and symmetry).
	near(t, "K(-1)", EllipticK(-1), 1.3110287771461, 1e-13)
}

func TestCompleteK(t *testing.T) {
	// K(0) = π/2; K(1/2) = Γ(1/4)²/(4√π) (DLMF 19.6.1, 19.20.2 lemniscatic case).
	near(t, "K(0)", EllipticK(0), math.Pi/2, 1e-15)
	g := math.Gamma(0.25)
	near(t, "K(1/2)", EllipticK(0.5), g*g/(4*math.Sqrt(math.Pi)), 1e-14)
	// K(m) ~ ln(4/sqrt(1-m)) as m → 1 (DLMF 19.12.1).
	m := 1 - 1e-14
	mc := 1 - m // exact in floating point (Sterbenz)
	near(t, "K(1-1e-14)", EllipticK(m), math.Log(4/math.Sqrt(mc)), 1e-12)
}

// quadF integrates the Legendre integrand of F(φ|m) (DLMF 19.2.4).
func quadF(phi, m float64) float64 {
	f := func(th float64) float64 {
		s := math.Sin(th)
		return 1 / math.Sqrt(1-m*s*s)
	}
	if phi < 0 {
		return -quad.Fixed(f, 0, -phi, 400, quad.Legendre{}, 0)
	}
	return quad.Fixed(f, 0, phi, 400, quad.Legendre{}, 0)
}

func TestEllipticFAgainstQuadrature(t *testing.T) {
	// F(φ|m) by direct Gauss–Legendre quadrature of DLMF 19.2.4, for φ
	// beyond π/2 too (where the bare R_F form is wrong) and for m < 0.
	for _, m := range []float64{-7, -1, -0.01, 0, 0.3, 0.9} {
		for _, phi := range []float64{0.1, 1.0, math.Pi / 2, 2.0, 3.0, 3.9, 7.5, -2.5} {
			got := EllipticF(phi, m)
			want := quadF(phi, m)
			if math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
				t.Errorf("F(%v|%v) = %.15g, quadrature %.15g", phi, m, got, want)
			}
		}
	}
	// F(π - φ) = 2K - F(φ) (DLMF 19.2.10) through ellipFcos with x < 0.
	for _, x := range []float64{-0.99, -0.5, -0.1} {
		mc := 0.37
		got := ellipFcos(x, mc)
		want := quadF(math.Acos(x), 1-mc)
		if math.Abs(got-want) > 1e-12 {
			t.Errorf("F(arccos %v) = %.15g, quadrature %.15g", x, got, want)
		}
	}
	if !math.IsNaN(EllipticF(1, 1)) || !math.IsNaN(EllipticF(math.NaN(), 0.5)) {
		t.Error("F outside its domain should be NaN")
	}
}

func TestJacobiSpecialValues(t *testing.T) {
	// m = 0: sin, cos, 1; m = 1: tanh, sech, sech (DLMF 22.5.3, 22.5.4).
	for _, u := range []float64{-3, -0.2, 0, 0.7, 2.5, 40} {
		sn, cn, dn := JacobiSCD(u, 0)
		near(t, "sn(u|0)", sn, math.Sin(u), 1e-15)
		near(t, "cn(u|0)", cn, math.Cos(u), 1e-15)
		near(t, "dn(u|0)", dn, 1, 0)
		sn, cn, dn = JacobiSCD(u, 1)
		near(t, "sn(u|1)", sn, math.Tanh(u), 1e-15)
		near(t, "cn(u|1)", cn, 1/math.Cosh(u), 1e-15)
		near(t, "dn(u|1)", dn, 1/math.Cosh(u), 1e-15)
	}
	// Quarter and half periods: sn(K) = 1, cn(K) = 0, dn(K) = sqrt(1-m);
	// sn(K/2) = 1/sqrt(1 + k'), cn(K/2) = sqrt(k'/(1 + k')), dn(K/2) = sqrt(k')
	// (DLMF 22.5.1, 22.5.2).
	for _, m := range []float64{0.1, 0.5, 0.9, 0.999999, 1 - 1e-12} {
		K := EllipticK(m)
		kp := math.Sqrt(1 - m)
		sn, cn, dn := JacobiSCD(K, m)
		near(t, "sn(K)", sn, 1, 1e-14)
		near(t, "cn(K)", cn, 0, 1e-7*(1+K))
		near(t, "dn(K)", dn, kp, 1e-7*(1+K))
		sn, cn, dn = JacobiSCD(K/2, m)
		rel := func(what string, got, want float64) {
			if math.Abs(got-want) > 2e-14*math.Abs(want)*(1+K) {
				t.Errorf("m=%v %s = %.16g, want %.16g", m, what, got, want)
			}
		}
		rel("sn(K/2)", sn, 1/math.Sqrt(1+kp))
		rel("cn(K/2)", cn, math.Sqrt(kp/(1+kp)))
		rel("dn(K/2)", dn, math.Sqrt(kp))
	}
}

func TestJacobiIdentities(t *testing.T) {
	for _, m := range []float64{1e-9, 0.2, 0.5, 0.8, 0.99, 1 - 1e-9, 1 - 1e-15} {
		K := EllipticK(m)
		for _, u := range []float64{-5.5, -1, 0.1, 0.9, 2.2, 6.3, 17} {
			sn, cn, dn := JacobiSCD(u, m)
			// sn² + cn² = 1, dn² + m sn² = 1 (DLMF 22.6.1).
			if e := math.Abs(sn*sn + cn*cn - 1); e > 4e-15 {
				t.Errorf("m=%v u=%v: sn²+cn²-1 = %g", m, u, e)
			}
			if e := math.Abs(dn*dn + m*sn*sn - 1); e > 4e-15 {
				t.Errorf("m=%v u=%v: dn²+m sn²-1 = %g", m, u, e)
			}
			// Addition theorem (DLMF 22.8.1) with v = 0.37.
			v := 0.37
			sv, cv, dv := JacobiSCD(v, m)
			want := (sn*cv*dv + sv*cn*dn) / (1 - m*sn*sn*sv*sv)
			got, _, _ := JacobiSCD(u+v, m)
			if e := math.Abs(got - want); e > 1e-13 {
				t.Errorf("m=%v u=%v: addition theorem off by %g", m, u, e)
			}
			// Periodicity: sn(u + 2K) = -sn(u), cn(u + 4K) = cn(u) (DLMF 22.4.1).
			if m < 0.999 {
				s2, _, _ := JacobiSCD(u+2*K, m)
				_, c4, _ := JacobiSCD(u+4*K, m)
				if math.Abs(s2+sn) > 1e-13 || math.Abs(c4-cn) > 1e-13 {
					t.Errorf("m=%v u=%v: periodicity off: %g %g", m, u, s2+sn, c4-cn)
				}
			}
		}
		// Inverse: sn(F(φ|m)|m) = sin φ (DLMF 22.15.11, 22.16.1), F by Carlson's R_F.
		for _, phi := range []float64{0.01, 0.5, 1.2, 1.5, 1.5707} {
			sn, cn, _ := JacobiSCD(EllipticF(phi, m), m)
			if math.Abs(sn-math.Sin(phi)) > 1e-14 || math.Abs(cn-math.Cos(phi)) > 1e-13*math.Max(1e-3, math.Cos(phi))/1e-3*1e-1 {
				t.Errorf("m=%v φ=%v: sn(F) = %.16g (want %.16g), cn(F) = %.16g (want %.16g)", m, phi, sn, math.Sin(phi), cn, math.Cos(phi))
			}
		}
	}
	if sn, _, _ := JacobiSCD(math.NaN(), 0.5); !math.IsNaN(sn) {
		t.Error("sn(NaN) should be NaN")
	}
}

// TestCosThirdAcos checks the resolvent's trigonometric root against
// math.Cos(math.Acos(x)/3) (the closed form of DLMF 1.11(iii)) over the
// whole range, both sides of its switch at −0.99, and at the ends, where
// cos(0) = 1, cos(π/6) = √3/2 and cos(π/3) = ½.
func TestCosThirdAcos(t *testing.T) {
	worst := 0.0
	for k := 0; k <= 100000; k++ {
		x := -1 + 2*float64(k)/100000
		want := math.Cos(math.Acos(x) / 3)
		worst = max(worst, math.Abs(cosThirdAcos(x)-want)/want)
	}
	if worst > 2e-15 {
		t.Errorf("cos(acos(x)/3): worst relative error %g, want ≤ 2e-15", worst)
	}
	near(t, "x=1", cosThirdAcos(1), 1, 1e-15)
	near(t, "x=0", cosThirdAcos(0), math.Sqrt(3)/2, 1e-15)
	near(t, "x=-1", cosThirdAcos(-1), 0.5, 1e-15)
}

// TestEllipKSn2 checks K and ∫₀^K sn² = (K − E)/m from the AGM against
// ellipK (the same K to the last bit), against R_D(0, 1 − m, 1)/3 (DLMF
// 19.25.1) by gonum's EllipticRD, and against K(1/2) and E(1/2) of the
// lemniscatic case (DLMF 19.20.2: K = Γ(1/4)²/(4√π), E = K/2 + π/(4K)), for
// m from −40 to 1 − 1e-12, where the sum must not cancel as m → 0.
func TestEllipKSn2(t *testing.T) {
	for _, mc := range []float64{1e-12, 1e-6, 0.01, 0.3, 0.5, 0.9, 1 - 1e-9, 1, 1 + 1e-9, 1.7, 5, 41} {
		k, zk := ellipKSn2(mc)
		if k != ellipK(mc) {
			t.Errorf("mc=%g: K %v, ellipK %v", mc, k, ellipK(mc))
		}
		want := mathext.EllipticRD(0, mc, 1) / 3
		if math.Abs(zk/want-1) > 4e-15 {
			t.Errorf("mc=%g: ∫sn² %.17g, R_D/3 %.17g", mc, zk, want)
		}
	}
	g := math.Gamma(0.25)
	kl := g * g / (4 * math.Sqrt(math.Pi))
	el := kl/2 + math.Pi/(4*kl)
	k, zk := ellipKSn2(0.5)
	near(t, "K(1/2)", k, kl, 1e-15)
	near(t, "(K − E)/m at m = 1/2", zk, (kl-el)/0.5, 2e-15)
}
