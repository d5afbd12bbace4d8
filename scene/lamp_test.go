package scene

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"kerrscope/raytrace"
)

func lit(t *testing.T, a, h, gamma, inner, outer float64) *Illumination {
	t.Helper()
	gas, err := NewGas(a)
	if err != nil {
		t.Fatal(err)
	}
	il, err := Illuminate(gas, h, gamma, inner, outer)
	if err != nil {
		t.Fatal(err)
	}
	return il
}

// TestLampCaptureFraction checks the fraction of a lamp's photons that fall
// into a Schwarzschild hole against Synge (1966, MNRAS 131, 463): a source
// at rest at radius h loses the cone of half-angle ψc about the inward
// direction, sin ψc = (3√3 M/h) sqrt(1 − 2M/h), ψc > 90° below 3 M, so the
// captured fraction of an isotropic source is (1 − cos ψc)/2. The disk is
// a thin ring far out, which no captured photon reaches; the fractions
// must sum to 1.
func TestLampCaptureFraction(t *testing.T) {
	for _, h := range []float64{2.3, 2.8, 3, 4, 6, 10, 40} {
		il := lit(t, 0, h, 2, 1e4, 1.001e4)
		s := 3 * math.Sqrt(3) / h * math.Sqrt(1-2/h)
		cos := math.Sqrt(1 - s*s)
		if h < 3 {
			cos = -cos
		}
		want := (1 - cos) / 2
		if e := math.Abs(il.Horizon - want); e > 1e-11 {
			t.Errorf("h = %v: captured fraction %.14f, Synge %.14f (error %.1e)", h, il.Horizon, want, e)
		}
		if sum := il.Disk + il.Escape + il.Horizon; math.Abs(sum-1) > 1e-14 {
			t.Errorf("h = %v: fractions sum to %v", h, sum)
		}
	}
}

// TestLampFlatSpace checks the lamp far from the hole against the
// flat-space law (common practice): the fraction landing on the disk tends
// to FlatDiskFraction and each bin's photons per area to the flat law's bin
// average of h/(4π (r² + h²)^{3/2}), with the corrections of light bending
// and redshift, O(M/h) and, where photons pass the hole, O(M/r): measured
// below 1.5 M/r + 3 M/h per bin, and the disk fraction within 3 M/h.
func TestLampFlatSpace(t *testing.T) {
	for _, h := range []float64{100, 1000, 10000} {
		il := lit(t, 0.7, h, 2, 20, 100*h)
		fd := FlatDiskFraction(h, il.Inner, il.Outer)
		worst, worstFar := 0.0, 0.0
		for i := range il.Photons {
			r0, r1 := il.Edges[i], il.Edges[i+1]
			flat := FlatDiskFraction(h, r0, r1) / (math.Pi * (r1*r1 - r0*r0))
			d := math.Abs(il.Photons[i]/flat - 1)
			worst = math.Max(worst, d/(1.5/r0+3/h))
			if r0 > h {
				worstFar = math.Max(worstFar, d)
			}
		}
		ed := math.Abs(il.Disk/fd - 1)
		t.Logf("h = %v M: disk fraction %.8f, flat %.8f (relative %.2e); worst bin beyond r = h %.2e; worst bin / (1.5 M/r + 3 M/h) %.2f",
			h, il.Disk, fd, ed, worstFar, worst)
		if worst > 1 || ed*h > 3 {
			t.Errorf("h = %v: deviation from flat space %.2f of the bound per bin, %.2e of the disk fraction", h, worst, ed)
		}
	}
}

// TestLampProfileIntegral checks that the profile integrated over the disk
// gives the disk fraction: the binned photons times their areas exactly
// (bookkeeping), and the interpolated profile integrated by Gauss–Legendre
// quadrature in ln r (an independent integration) to 2e-3.
func TestLampProfileIntegral(t *testing.T) {
	for _, c := range []struct{ a, h float64 }{{0, 3}, {0.998, 2}, {0.9, 6}, {-0.5, 20}} {
		inner := raytrace.ISCO(c.a)
		il := lit(t, c.a, c.h, 2, inner, 400)
		sum := 0.0
		for i, n := range il.Photons {
			sum += n * math.Pi * (il.Edges[i+1]*il.Edges[i+1] - il.Edges[i]*il.Edges[i])
		}
		f := func(u float64) float64 { r := math.Exp(u); return il.interp(il.Photons, r) * 2 * math.Pi * r * r }
		q := 0.0
		lin, lout := math.Log(il.Inner), math.Log(il.Outer)
		const panels = 400
		for k := range panels {
			u0 := lin + (lout-lin)*float64(k)/panels
			q += quad.Fixed(f, u0, u0+(lout-lin)/panels, 8, quad.Legendre{}, 0)
		}
		t.Logf("a = %v h = %v: disk %.6f escape %.6f horizon %.6f (disk/escape %.4f); ∑ %.2e, ∫ %.2e off; %d photons",
			c.a, c.h, il.Disk, il.Escape, il.Horizon, il.Reflection(), sum/il.Disk-1, q/il.Disk-1, il.Traced)
		if math.Abs(sum/il.Disk-1) > 1e-12 {
			t.Errorf("a = %v h = %v: binned profile sums to %v, disk fraction %v", c.a, c.h, sum, il.Disk)
		}
		if math.Abs(q/il.Disk-1) > 2e-3 {
			t.Errorf("a = %v h = %v: interpolated profile integrates to %v, disk fraction %v", c.a, c.h, q, il.Disk)
		}
		if s := il.Disk + il.Escape + il.Horizon; math.Abs(s-1) > 1e-14 {
			t.Errorf("fractions sum to %v", s)
		}
	}
}

// TestLampScene checks the lamp emissivity through Resolve: the keys'
// errors name them, At follows the bins, and the physical units of
// flux.go work for it: AreaIntegral (quadrature of At) matches the bins'
// own sum ∑ ε_i (r²_{i+1} − r²_i)/2 to 2e-3 (measured 1e-3: log-linear
// interpolation between bin centres is not the bin average).
func TestLampScene(t *testing.T) {
	s := Default()
	s.Emission.Emissivity = "lamp"
	var fe *FieldError
	if _, err := s.Resolve(); !errors.As(err, &fe) || fe.Key != "emission.lamp_height" {
		t.Fatalf("no lamp height: got %v, want an error naming emission.lamp_height", err)
	}
	for _, bad := range []struct {
		key  string
		h, g float64
	}{{"emission.lamp_height", 1.2, 2}, {"emission.lamp_height", 2e5, 2}, {"emission.photon_index", 5, -1}, {"emission.photon_index", 5, 7}} {
		s := s
		h, g := bad.h, bad.g
		s.Emission.LampHeight, s.Emission.PhotonIndex = &h, &g
		if _, err := s.Resolve(); !errors.As(err, &fe) || fe.Key != bad.key {
			t.Errorf("h = %v Γ = %v: got %v, want an error naming %s", h, g, err, bad.key)
		}
	}
	h := 4.0
	mass, dist, lum := 1e7, 1e4, 1e42
	s.Emission.LampHeight = &h
	s.Hole.MassSolar, s.Hole.DistanceKpc = &mass, &dist
	s.Emission.LineLuminosityErgS = &lum
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	il := r.Emissivity.Illumination
	if il == nil || r.Emissivity.PhotonIndex != DefaultPhotonIndex || !r.Physical() {
		t.Fatalf("lamp not resolved: %+v", r.Emissivity)
	}
	bins := 0.0
	for i, e := range il.Emission {
		bins += e * (il.Edges[i+1]*il.Edges[i+1] - il.Edges[i]*il.Edges[i]) / 2
		if c := il.Centre(i); math.Abs(r.Emissivity.At(c)/e-1) > 1e-12 {
			t.Errorf("At(%v) = %v, bin %v", c, r.Emissivity.At(c), e)
		}
	}
	ai := r.Emissivity.AreaIntegral(r.Inner, r.Disk.OuterRadius, r.ISCO)
	if math.Abs(ai/bins-1) > 2e-3 {
		t.Errorf("AreaIntegral %v, bins %v", ai, bins)
	}
	t.Logf("AreaIntegral %.8g, bins %.8g (%.1e)", ai, bins, ai/bins-1)
}

// TestLampPhotonCount checks the emissivity at Γ = 1, where g^(Γ−1) = 1 and
// every landing photon counts once: the emissivity equals the photons per
// area bin by bin, and 2π ∫ ε r dr over the disk (AreaIntegral, the
// normalisation of the physical units) is the disk fraction, the share of
// the lamp's photons the disk reflects, to the 2e-3 of the interpolation.
func TestLampPhotonCount(t *testing.T) {
	s := Default()
	h, g := 3.0, 1.0
	s.Emission.Emissivity = "lamp"
	s.Emission.LampHeight, s.Emission.PhotonIndex = &h, &g
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	il := r.Emissivity.Illumination
	for i := range il.Photons {
		if il.Emission[i] != il.Photons[i] {
			t.Fatalf("bin %d: emissivity %v, photons %v", i, il.Emission[i], il.Photons[i])
		}
	}
	got := 2 * math.Pi * r.Emissivity.AreaIntegral(r.Inner, r.Disk.OuterRadius, r.ISCO)
	t.Logf("2π ∫ε r dr = %.8f, disk fraction %.8f (%.1e)", got, il.Disk, got/il.Disk-1)
	if math.Abs(got/il.Disk-1) > 2e-3 {
		t.Errorf("2π ∫ε r dr = %v, disk fraction %v", got, il.Disk)
	}
}

// TestLampSamplingConverges checks that the profile has converged in the
// sampling of emission angles: a grid four times finer and a step in ln r
// four times smaller change no bin's photons by more than 1e-4 (relative)
// and the fractions by 1e-12 (their edges are bisected to 1e-13 in cos ψ).
func TestLampSamplingConverges(t *testing.T) {
	for _, c := range []struct{ a, h float64 }{{0.998, 2}, {0, 6}, {-0.9, 30}} {
		gas, _ := NewGas(c.a)
		in := raytrace.ISCO(c.a)
		coarse, err := illuminate(gas, c.h, 2, in, 500, lampGrid, lampStep)
		if err != nil {
			t.Fatal(err)
		}
		fine, err := illuminate(gas, c.h, 2, in, 500, 4*lampGrid, lampStep/4)
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for i := range coarse.Photons {
			worst = math.Max(worst, math.Abs(coarse.Photons[i]/fine.Photons[i]-1))
		}
		df := math.Max(math.Abs(coarse.Disk-fine.Disk), math.Max(math.Abs(coarse.Escape-fine.Escape), math.Abs(coarse.Horizon-fine.Horizon)))
		t.Logf("a = %v h = %v: worst bin %.1e, fractions %.1e; %d and %d photons", c.a, c.h, worst, df, coarse.Traced, fine.Traced)
		if worst > 1e-4 || df > 1e-12 {
			t.Errorf("a = %v h = %v: finer sampling moves a bin by %.2e, the fractions by %.2e", c.a, c.h, worst, df)
		}
	}
}
