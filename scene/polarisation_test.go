package scene

import (
	"errors"
	"math"
	"strings"
	"testing"

	"kerrscope/raytrace"
)

// The gas frame is orthonormal with the Kerr metric (U timelike unit, the
// spatial axes unit and orthogonal to U and to each other), inside and
// outside the ISCO, for both spin signs up to |a| = 1 − 1e-8 (to 1e-8:
// the plunging 4-velocity's own rounding near the horizon); the
// definition of an orthonormal frame (e.g. Misner, Thorne & Wheeler 1973,
// §13.6) is the reference.
func TestGasFrameOrthonormal(t *testing.T) {
	for _, a := range []float64{0, 0.5, -0.7, 0.998, 1 - 1e-8, -(1 - 1e-8)} {
		g, err := NewGas(a)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range []float64{raytrace.Horizon(a) * 1.05, raytrace.ISCO(a) * 0.9, raytrace.ISCO(a), 8, 40, 1e4} {
			if r <= raytrace.Horizon(a) {
				continue
			}
			fr := g.Frame(r)
			e := []raytrace.Vector{fr.U, fr.R, fr.Phi, fr.Z}
			for i := range e {
				for j := range e {
					want := 0.0
					switch {
					case i == j && i == 0:
						want = -1
					case i == j:
						want = 1
					}
					if got := raytrace.Dot(a, r, e[i], e[j]); math.Abs(got-want) > 1e-8 {
						t.Errorf("a=%v r=%v: e%d·e%d = %v, want %v", a, r, i, j, got, want)
					}
				}
			}
		}
	}
}

// The emitted polarisation is a unit spacelike vector orthogonal to the
// wave vector, to the gas's 4-velocity and to the field: E ⊥ k and E ⊥ B
// in the gas frame for synchrotron light (Rybicki & Lightman 1979, sec.
// 6.5); sin θ_B is the sine of the angle between k̂ and B̂ there.
func TestEmitOrthogonal(t *testing.T) {
	for _, a := range []float64{0, 0.9, -0.6} {
		g, _ := NewGas(a)
		for _, b := range [][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {0.3, -0.5, 0.81}} {
			n := math.Sqrt(b[0]*b[0] + b[1]*b[1] + b[2]*b[2])
			m := PolarisationModel{B: [3]float64{b[0] / n, b[1] / n, b[2] / n}, Fraction: 0.7}
			for _, c := range []struct {
				r, lambda, eta float64
				out, up        bool
			}{{8, 2, 30, true, true}, {12, -4, 5, false, true}, {raytrace.ISCO(a) * 0.95, 1, 20, true, false}, {6.5, 0, 40, true, false}} {
				d := c.r*c.r - 2*c.r + a*a
				w := c.r*c.r + a*a - a*c.lambda
				if c.r <= raytrace.Horizon(a) || w*w-d*(c.eta+(c.lambda-a)*(c.lambda-a)) < 0 {
					continue // the photon cannot be at r (R(r) < 0)
				}
				k := raytrace.EquatorialMomentum(a, c.lambda, c.eta, c.r, c.out, c.up)
				fr := g.Frame(c.r)
				em := m.Emit(fr, a, c.r, k)
				if !em.OK {
					t.Fatalf("a=%v %+v: no polarisation", a, c)
				}
				dot := func(v, w raytrace.Vector) float64 { return raytrace.Dot(a, c.r, v, w) }
				var bv raytrace.Vector
				for i := range bv {
					bv[i] = m.B[0]*fr.R[i] + m.B[1]*fr.Phi[i] + m.B[2]*fr.Z[i]
				}
				e := -dot(k, fr.U)
				cosB := dot(k, bv) / e
				for name, v := range map[string]float64{
					"f·k": dot(em.F, k) / e, "f·u": dot(em.F, fr.U), "f·B": dot(em.F, bv),
					"f·f − 1": dot(em.F, em.F) - 1, "sin θ_B": em.SinB - math.Sqrt(1-cosB*cosB),
				} {
					if math.Abs(v) > 1e-9 {
						t.Errorf("a=%v B=%v %+v: %s = %v", a, b, c, name, v)
					}
				}
				if !(em.Angle > -math.Pi/2 && em.Angle <= math.Pi/2) {
					t.Errorf("emitted angle %v outside (−π/2, π/2]", em.Angle)
				}
			}
		}
	}
}

// SkyAngle follows SkyOffset and the IAU convention (north through east,
// Transactions of the IAU XVB, 1974): with the spin axis at position angle
// 0 an electric vector along +β is at 0°, one along −α (east) at 90°; a
// position angle PA of the spin axis adds PA.
func TestSkyAngle(t *testing.T) {
	deg := math.Pi / 180
	for _, c := range []struct{ ea, eb, pa, want float64 }{
		{0, 1, 0, 0}, {-1, 0, 0, 90 * deg}, {1, 0, 0, 90 * deg}, {-1, 1, 0, 45 * deg}, {1, 1, 0, -45 * deg},
		{0, 1, 30, 30 * deg}, {-1, 0, 30, -60 * deg}, {0, -1, 100, -80 * deg},
	} {
		if got := SkyAngle(c.ea, c.eb, c.pa); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("SkyAngle(%v, %v, %v°) = %v°, want %v°", c.ea, c.eb, c.pa, got/deg, c.want/deg)
		}
	}
}

// Bad polarisation keys are FieldErrors naming the key and what is
// allowed; the field keys take numbers from the command line and from
// the scene file alike.
func TestPolarisationValidation(t *testing.T) {
	for _, c := range []struct {
		edit func(p *Polarisation)
		key  string
	}{
		{func(p *Polarisation) { p.Fraction = 1.5 }, "polarisation.fraction"},
		{func(p *Polarisation) { p.Fraction = -0.1 }, "polarisation.fraction"},
		{func(p *Polarisation) { *p = Polarisation{Fraction: 0.5} }, "polarisation.field_azimuthal"},
		{func(p *Polarisation) { p.SinPower = -1 }, "polarisation.sin_power"},
		{func(p *Polarisation) { p.SinPower = 11 }, "polarisation.sin_power"},
		{func(p *Polarisation) { p.FieldVertical = 1e300 }, "polarisation.field_vertical"},
	} {
		s := Default()
		c.edit(&s.Polarisation)
		_, err := s.Resolve()
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Key != c.key {
			t.Errorf("%+v: error %v, want a FieldError for %s", s.Polarisation, err, c.key)
		}
	}
	s := Default()
	s.Output.Maps = []string{PolarisationMap}
	s.Refine.Depth = 2
	if _, err := s.Resolve(); err == nil || !strings.Contains(err.Error(), "refine.depth") {
		t.Errorf("polarisation map with refinement: %v", err)
	}
	s, err := Parse("pol.toml", []byte("[polarisation]\nfield_radial = 1\nfield_azimuthal = -2\nfield_vertical = 2\nfraction = 0.3\nsin_power = 2\n"))
	if err != nil {
		t.Fatal(err)
	}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if want := [3]float64{1.0 / 3, -2.0 / 3, 2.0 / 3}; r.Polar.B != want || r.Polar.Fraction != 0.3 || r.Polar.SinPower != 2 {
		t.Errorf("resolved %+v, want B %v, fraction 0.3, power 2", r.Polar, want)
	}
	for _, f := range Fields() {
		if f.Flag == "field-vertical" {
			if err := f.Set(&s, "0.25"); err != nil || s.Polarisation.FieldVertical != 0.25 {
				t.Errorf("--field-vertical 0.25: %v, field %v", err, s.Polarisation.FieldVertical)
			}
		}
	}
}
