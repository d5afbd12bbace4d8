package outputs

import (
	"bytes"
	"context"
	"math"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// photonFlux renders the scene and returns the photon flux at the
// observer, photons cm⁻² s⁻¹: the spectrum summed over all bins and past
// both ends, times SpectrumPerUnit.
func photonFlux(t *testing.T, r scene.Resolved) float64 {
	t.Helper()
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	s := f.Spectrum()
	return (s.Sum() + s.Below + s.Above) * r.SpectrumPerUnit()
}

func physical(s *scene.Scene) {
	mass, dist, lum := 10.0, 5.0, 1e36
	s.Hole.MassSolar, s.Hole.DistanceKpc = &mass, &dist
	s.Emission.LineLuminosityErgS = &lum
}

func TestFluxFlatSpaceLimit(t *testing.T) {
	// A face-on, isotropically emitting flat disk of photon rate Ṅ (both
	// faces) has intensity Ṅ/(2π A) per face and subtends A/D², so
	// F = Ṅ / (2π D²) (common practice). Far from the hole (500–1000 M)
	// gravity changes this at O(M/r): g³ ≈ 1 − 4.5 M/r (redshift of
	// circular orbits, Cunningham 1975) against a larger lensed image,
	// a few 1e-3 in all (−0.7 % here), and the pixel grid adds less.
	in := 500.0
	r := resolve(t, func(s *scene.Scene) {
		physical(s)
		s.Hole.Spin, s.Observer.InclinationDeg = 0, 0
		s.Disk.InnerRadius, s.Disk.OuterRadius, s.Disk.Orders = &in, 1000, 1
		s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 200, 200, 2050
	})
	got := photonFlux(t, r)
	want := r.PhotonRate / (2 * math.Pi * r.DistanceCm * r.DistanceCm)
	t.Logf("F = %.6g, flat-space Ṅ/(2πD²) = %.6g, ratio %.5f", got, want, got/want)
	if math.Abs(got/want-1) > 0.01 {
		t.Errorf("face-on far disk: F = %v photons/cm²/s, want Ṅ/(2πD²) = %v within 1%%", got, want)
	}
}

func TestFluxConservesPhotons(t *testing.T) {
	// Every photon the disk emits reaches infinity or the horizon; from
	// 200–400 M the hole captures about 1e-4 of them (its capture cone,
	// 27 M²/(4 r²) of the sky at r; Bardeen 1973). So the flux over the
	// whole sphere, 2 · 2π ∫₀¹ F(cos i) D² d(cos i) (the two hemispheres
	// are mirror images), equals Ṅ: Gauss–Legendre in cos i over eight
	// renders.
	x := make([]float64, 8)
	w := make([]float64, 8)
	quad.Legendre{}.FixedLocations(x, w, 0, 1)
	in := 200.0
	total, ndot := 0.0, 0.0
	for k, mu := range x {
		const half = 420.0 // M: the disk and its lensed light
		const px = 2.0     // M per pixel
		height := 2 * int(math.Ceil((400*mu+30)/px))
		r := resolve(t, func(s *scene.Scene) {
			physical(s)
			s.Hole.Spin, s.Observer.InclinationDeg = 0.9, math.Acos(mu)*180/math.Pi
			s.Disk.InnerRadius, s.Disk.OuterRadius, s.Disk.Orders, s.Disk.Opaque = &in, 400, 3, false
			s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = int(2*half/px), height, 2*half
		})
		f := photonFlux(t, r)
		total += w[k] * f * r.DistanceCm * r.DistanceCm
		ndot = r.PhotonRate
	}
	total *= 4 * math.Pi
	t.Logf("4π ∫ F D² dcos i = %.6g, Ṅ = %.6g, ratio %.5f", total, ndot, total/ndot)
	if math.Abs(total/ndot-1) > 0.01 {
		t.Errorf("photons over the sphere %v, emitted Ṅ = %v: not within 1%%", total, ndot)
	}
}

func TestPhysicalUnitsInOutputs(t *testing.T) {
	rel := resolve(t, func(s *scene.Scene) { s.Screen.Width, s.Screen.Height = 24, 24 })
	phys := resolve(t, func(s *scene.Scene) { s.Screen.Width, s.Screen.Height = 24, 24; physical(s) })
	f, err := pixels.Render(context.Background(), rel, nil)
	if err != nil {
		t.Fatal(err)
	}
	spec := f.Spectrum()
	// The spectrum table: the same numbers times SpectrumPerUnit, and
	// headers that say which units.
	var a, b bytes.Buffer
	if err := WriteCSV(&a, &spec, "t", rel); err != nil {
		t.Fatal(err)
	}
	if err := WriteCSV(&b, &spec, "t", phys); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(a.String(), "relative units") || strings.Contains(a.String(), "photons cm^-2") {
		t.Errorf("relative table header:\n%s", a.String())
	}
	if !strings.Contains(b.String(), "photons cm^-2 s^-1 keV^-1") || !strings.Contains(b.String(), "pixel solid angle") {
		t.Errorf("physical table header:\n%s", b.String())
	}
	peak := func(text string) float64 {
		best := 0.0
		for _, line := range strings.Split(text, "\n") {
			if line == "" || line[0] == '#' || line[0] == 'e' {
				continue
			}
			v, err := strconv.ParseFloat(strings.Split(line, ",")[3], 64)
			if err != nil {
				t.Fatal(err)
			}
			best = math.Max(best, v)
		}
		return best
	}
	if ra, pb := peak(a.String()), peak(b.String()); math.Abs(pb/(ra*phys.SpectrumPerUnit())-1) > 1e-8 {
		t.Errorf("physical peak %v, relative %v × %v", pb, ra, phys.SpectrumPerUnit())
	}
	// A luminosity too large for float32 maps is refused before writing.
	tiny, huge, near := 1e-10, 1e60, 1e-12
	big := resolve(t, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height = 24, 24
		s.Hole.MassSolar, s.Hole.DistanceKpc, s.Emission.LineLuminosityErgS = &tiny, &near, &huge
	})
	fb, err := pixels.Render(context.Background(), big, nil)
	if err != nil {
		t.Fatal(err)
	}
	var c bytes.Buffer
	if err := writeFITS(&c, fb, "test"); err == nil || !strings.Contains(err.Error(), "emission.line_luminosity_erg_s") || c.Len() != 0 {
		t.Errorf("overflowing intensities: error %v, %d bytes written", err, c.Len())
	}
}
