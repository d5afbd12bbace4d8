package pixels

import (
	"context"
	"math"
	"math/cmplx"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// angleDiff is the difference of two polarisation angles modulo π, in
// [0, π/2].
func angleDiff(x, y float64) float64 {
	d := math.Mod(x-y, math.Pi)
	if d < 0 {
		d += math.Pi
	}
	return math.Min(d, math.Pi-d)
}

// faceOnAngle is the observed electric-vector position angle (north
// through east, position angle 0 of the spin axis) of the direct image of
// a Keplerian Schwarzschild disk seen exactly face-on, at screen point
// (α, β) whose photon left radius r, built without the Walker–Penrose
// constant, following the construction of Narayan et al. 2021 (ApJ 912,
// 35, sec. 2: boost into the gas frame, E ∝ k × B, boost back) with the
// exact emission direction in place of their approximate light bending:
//
//   - in the static frame the photon of impact parameter b = sqrt(η) has
//     k = (k_r, k_z) = (±sqrt(1 − b²(1 − 2/r)/r²), b sqrt(1 − 2/r)/r)
//     (Schwarzschild 1916; e.g. Misner, Thorne & Wheeler 1973, §25.6),
//     with k_r > 0 for a photon moving outward;
//   - the gas moves along +φ at v = 1/sqrt(r − 2) (Bardeen, Press &
//     Teukolsky 1972, a = 0), and the Lorentz boost gives its k̂';
//   - f' = k̂' × B̂ is boosted back and made spatial by subtracting a
//     multiple of k;
//   - in Schwarzschild the photon's orbit stays in one plane, here the
//     meridian through the emission point (face-on), and parallel
//     transport keeps the components of f along the plane's normal φ̂ and
//     along φ̂ × k̂; at the observer these become the tangential
//     (counter-clockwise, the gas's sense as seen from above) and radial
//     directions of the image point (a direct image lies on the side of
//     its emission point).
func faceOnAngle(alpha, beta, r float64, outbound bool, b [3]float64) float64 {
	imp := math.Hypot(alpha, beta)
	lapse := math.Sqrt(1 - 2/r)
	kz := imp * lapse / r
	kr := math.Sqrt(1 - kz*kz)
	if !outbound {
		kr = -kr
	}
	v := 1 / math.Sqrt(r-2)
	gam := 1 / math.Sqrt(1-v*v)
	// Gas frame, axes (r, φ, z), energy γ: k' = (k_r, −γv, k_z)/γ.
	kp := [3]float64{kr / gam, -v, kz / gam}
	f := [3]float64{kp[1]*b[2] - kp[2]*b[1], kp[2]*b[0] - kp[0]*b[2], kp[0]*b[1] - kp[1]*b[0]}
	// Back to the static frame: (f⁰, f_r, f_φ, f_z) = (γ v f'_φ, f'_r, γ f'_φ, f'_z),
	// then f − f⁰ k with k = (1, k_r, 0, k_z).
	f0 := gam * v * f[1]
	fs := [3]float64{f[0] - f0*kr, gam * f[1], f[2] - f0*kz}
	// Components along φ̂ (normal) and φ̂ × k̂ = k_z r̂ − k_r ẑ (in the plane).
	along := fs[0]*kz - fs[2]*kr
	normal := fs[1]
	// Screen: radial (α, β)/b, tangential (−β, α)/b.
	ea := (along*alpha - normal*beta) / imp
	eb := (along*beta + normal*alpha) / imp
	east, north := scene.SkyOffset(ea, eb, 0)
	return math.Atan2(east, north)
}

// TestFaceOnSchwarzschildAngles checks the whole chain of the polarisation
// (gas frame, emission along k × B, Walker–Penrose transport, screen and
// sky angle) against faceOnAngle, for radial, azimuthal, vertical and
// mixed fields, around the image and over radii: the angles agree to
// 1e-9 rad.
func TestFaceOnSchwarzschildAngles(t *testing.T) {
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg = 0, 0
		s.Output.Maps = []string{scene.PolarisationMap}
	})
	m, err := NewModel(r)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for _, b := range [][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {0.6, -0.8, 0}, {0.5, 0.5, 0.7071067811865476}} {
		m.Polar.B = b
		for _, bimp := range []float64{7, 9, 14, 25} {
			for k := 0; k < 12; k++ {
				phi := 2 * math.Pi * (float64(k) + 0.3) / 12
				al, be := bimp*math.Cos(phi), bimp*math.Sin(phi)
				var p raytrace.Path
				m.Obs.Trace(al, be, 1, &p)
				if len(p.Crossings) == 0 {
					t.Fatalf("b = %v: no crossing", bimp)
				}
				c := p.Crossings[0]
				_, got, ok := m.PolarisationAt(al, be, 0, c, p.Lambda, p.Eta)
				if !ok {
					t.Fatalf("B %v at (%v, %v): no polarisation", b, al, be)
				}
				want := faceOnAngle(al, be, c.R, c.Outbound, b)
				d := angleDiff(got, want)
				worst = math.Max(worst, d)
				if d > 1e-9 {
					t.Errorf("B %v at (%.3g, %.3g), r = %.4g: angle %.8f°, closed form %.8f°", b, al, be, c.R, got*180/math.Pi, want*180/math.Pi)
				}
			}
		}
	}
	t.Logf("worst difference %.3g rad", worst)
}

// ringBeta2 renders a narrow Schwarzschild ring (6–7 M) at inclination
// inc with field b and returns the image's β₂.
func ringBeta2(t *testing.T, inc float64, b [3]float64) complex128 {
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg = 0, inc
		in := 6.0
		s.Disk.InnerRadius, s.Disk.OuterRadius, s.Disk.Orders = &in, 7, 1
		s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 96, 96, 20
		s.Polarisation = scene.Polarisation{FieldRadial: b[0], FieldAzimuthal: b[1], FieldVertical: b[2], Fraction: 0.7}
		s.Output.Maps = []string{scene.PolarisationMap}
	})
	f, err := Render(context.Background(), r, nil, KeepAll|KeepStokes)
	if err != nil {
		t.Fatal(err)
	}
	return f.Net().Beta2
}

// TestRingPatterns compares the electric-vector pattern of a Schwarzschild
// ring seen at low inclination (10°) with the patterns of Narayan et al.
// 2021 (ApJ 912, 35; their face-on ring, sec. 3): a purely toroidal field
// gives a radial electric-vector pattern, arg β₂ within 15° of 0; a purely
// radial field a toroidal one, twisted by the orbital motion but with
// |arg β₂| above 135°; β₂'s phase is the pattern's (Palumbo, Wong & Prather
// 2020, ApJ 894, 156: 0 radial, ±180° toroidal). In both cases the pattern
// is nearly coherent around the ring: |β₂| above 0.9 of the emitted
// fraction. Reversing the field leaves the pattern unchanged (E ∝ k × B
// is a direction, and B → −B flips it).
func TestRingPatterns(t *testing.T) {
	deg := func(z complex128) float64 { return cmplx.Phase(z) * 180 / math.Pi }
	tor := ringBeta2(t, 10, [3]float64{0, 1, 0})
	rad := ringBeta2(t, 10, [3]float64{1, 0, 0})
	t.Logf("toroidal field: β₂ = %.4f at %.2f°; radial field: β₂ = %.4f at %.2f°", cmplx.Abs(tor), deg(tor), cmplx.Abs(rad), deg(rad))
	if math.Abs(deg(tor)) > 15 {
		t.Errorf("toroidal field: arg β₂ = %.2f°, want a radial pattern (near 0°)", deg(tor))
	}
	if math.Abs(deg(rad)) < 135 {
		t.Errorf("radial field: arg β₂ = %.2f°, want a toroidal pattern (near ±180°)", deg(rad))
	}
	for _, z := range []complex128{tor, rad} {
		if cmplx.Abs(z) < 0.9*0.7 || cmplx.Abs(z) > 0.7+1e-9 {
			t.Errorf("|β₂| = %.4f, want between 0.9 and 1 of the emitted fraction 0.7", cmplx.Abs(z))
		}
	}
	if back := ringBeta2(t, 10, [3]float64{0, -1, 0}); cmplx.Abs(back-tor) > 1e-6 {
		t.Errorf("reversed toroidal field: β₂ = %v, want %v", back, tor)
	}
}

// TestStokesFraction checks the bookkeeping of the Stokes records: every
// seen crossing has sqrt(Q² + U²) = fraction × I (float32 rounding), a
// frame without KeepStokes has none, and the net fraction of the image
// lies between 0 and the emitted fraction.
func TestStokesFraction(t *testing.T) {
	r := resolve(t, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height = 40, 32
		s.Polarisation.FieldRadial, s.Polarisation.FieldVertical, s.Polarisation.Fraction = 0.5, 0.3, 0.6
		s.Output.Maps = []string{scene.PolarisationMap}
	})
	f, err := Render(context.Background(), r, nil, KeepLine|KeepG|KeepStokes)
	if err != nil {
		t.Fatal(err)
	}
	seen := 0
	for o := 0; o < f.Orders; o++ {
		for k, l := range f.Line[o] {
			if math.IsNaN(float64(l)) {
				if !math.IsNaN(float64(f.Q[o][k])) {
					t.Fatalf("order %d pixel %d: Q without light", o, k)
				}
				continue
			}
			seen++
			p := math.Hypot(float64(f.Q[o][k]), float64(f.U[o][k]))
			if math.Abs(p-0.6*float64(l)) > 1e-6*float64(l) {
				t.Fatalf("order %d pixel %d: |P| = %g, 0.6 I = %g", o, k, p, 0.6*float64(l))
			}
		}
	}
	if seen == 0 {
		t.Fatal("no light")
	}
	n := f.Net()
	if !(n.Fraction > 0 && n.Fraction < 0.6) || cmplx.Abs(n.Beta2) > 0.6 {
		t.Errorf("net fraction %v, |β₂| %v: want within (0, 0.6)", n.Fraction, cmplx.Abs(n.Beta2))
	}
	plain, err := Render(context.Background(), r, nil, KeepLine)
	if err != nil {
		t.Fatal(err)
	}
	if plain.Q != nil || plain.Model.Stokes {
		t.Error("a frame without KeepStokes holds Stokes records")
	}
	if KeepStokes.BytesPerPixel(3)-Keep(0).BytesPerPixel(3) != 2*4*3 {
		t.Errorf("KeepStokes costs %d bytes per pixel for 3 orders, want 24", KeepStokes.BytesPerPixel(3)-2)
	}
}

// TestNetPolarisationSynthetic checks Net on hand-made Stokes maps: a
// uniform electric vector at position angle 30° gives fraction m and
// angle 30°; a purely radial pattern (χ = position angle of the pixel
// about the hole) gives β₂ = m with phase 0 and a toroidal one phase 180°
// (Palumbo, Wong & Prather 2020, ApJ 894, 156, sec. 2), both with no net
// polarisation by symmetry.
func TestNetPolarisationSynthetic(t *testing.T) {
	r := resolve(t, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 64, 64, 20
		s.Observer.PositionAngleDeg = 25
	})
	f := newFrame(r, Model{}, KeepLine|KeepStokes)
	const m = 0.4
	fill := func(chi func(alpha, beta float64) float64) {
		for j := 0; j < f.H; j++ {
			for i := 0; i < f.W; i++ {
				k := j*f.W + i
				al, be := PixelAlpha(r, i), PixelBeta(r, j)
				f.First[k] = 0
				f.Line[0][k] = 1
				s, c := math.Sincos(2 * chi(al, be))
				f.Q[0][k], f.U[0][k] = float32(m*c), float32(m*s)
				for o := 1; o < f.Orders; o++ {
					f.Line[o][k], f.Q[o][k], f.U[o][k] = float32(math.NaN()), float32(math.NaN()), float32(math.NaN())
				}
			}
		}
	}
	fill(func(_, _ float64) float64 { return 30 * math.Pi / 180 })
	n := f.Net()
	if math.Abs(n.Fraction-m) > 1e-6 || math.Abs(n.Angle-30*math.Pi/180) > 1e-6 {
		t.Errorf("uniform: fraction %v angle %v°, want %v at 30°", n.Fraction, n.Angle*180/math.Pi, m)
	}
	pa := func(al, be float64) float64 {
		e, no := scene.SkyOffset(al, be, 25)
		return math.Atan2(e, no)
	}
	fill(pa)
	n = f.Net()
	if cmplx.Abs(n.Beta2-m) > 1e-6 || n.Fraction > 1e-6 {
		t.Errorf("radial: β₂ = %v, net fraction %v; want %v and 0", n.Beta2, n.Fraction, m)
	}
	fill(func(al, be float64) float64 { return pa(al, be) + math.Pi/2 })
	n = f.Net()
	if cmplx.Abs(n.Beta2+m) > 1e-6 {
		t.Errorf("toroidal: β₂ = %v, want %v", n.Beta2, -m)
	}
}

// The probe's observed angle is the angle of the Stokes parameters the
// renderer records for the same photon, ½ atan2(U, Q), and the probe
// gives none off the disk.
func TestPolarisationAtMatchesShade(t *testing.T) {
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg, s.Observer.PositionAngleDeg = 0.7, 50, -35
		s.Disk.Opaque = false
		s.Polarisation.FieldRadial, s.Polarisation.FieldVertical = 0.4, -0.6
	})
	m, err := NewModel(r)
	if err != nil {
		t.Fatal(err)
	}
	m.Stokes = true
	var p raytrace.Path
	var s Sample
	checked := 0
	for _, ab := range [][2]float64{{3, 4}, {-7, 1}, {2, -5}, {-1.5, -2.2}, {11, 9}, {5.2, 0.3}, {-4, -6}, {0.5, 7}} {
		m.Shade(ab[0], ab[1], &p, &s)
		for n, c := range p.Crossings {
			h := s.Hits[n]
			_, obs, ok := m.PolarisationAt(ab[0], ab[1], n, c, p.Lambda, p.Eta)
			if ok != h.Seen {
				t.Fatalf("(%v, %v) order %d: probe ok %v, seen %v", ab[0], ab[1], n, ok, h.Seen)
			}
			if !ok {
				continue
			}
			checked++
			if d := angleDiff(obs, math.Atan2(h.U, h.Q)/2); d > 1e-12 {
				t.Errorf("(%v, %v) order %d: probe angle %v, Stokes angle %v", ab[0], ab[1], n, obs, math.Atan2(h.U, h.Q)/2)
			}
		}
	}
	if checked < 5 {
		t.Fatalf("only %d crossings checked", checked)
	}
}
