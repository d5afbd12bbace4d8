package pixels

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"kerrscope/scene"
)

func f64(v float64) *float64 { return &v }

// thermal sets a 10-solar-mass hole at 8 kpc accreting at a tenth of
// the Eddington rate.
func thermal(s *scene.Scene) {
	s.Hole.MassSolar, s.Hole.DistanceKpc = f64(10), f64(8)
	s.Thermal.EddingtonRatio = f64(0.1)
}

// logIntegral is ∫ y dE over energies equally spaced in ln E
// (trapezoid in ln E: ∫ y E d ln E).
func logIntegral(e, y []float64) float64 {
	sum := 0.0
	for k := 1; k < len(e); k++ {
		sum += 0.5 * (y[k]*e[k] + y[k-1]*e[k-1]) * math.Log(e[k]/e[k-1])
	}
	return sum
}

// TestContinuumConservesEnergy: the light the observers at every
// direction receive from a transparent disk, 4π D² ∫₀¹ F(cos i) d cos i
// (both hemispheres alike by the disk's mirror symmetry), equals the
// luminosity the disk emits, (scene.ThermalDisk.EmittedLuminosity;
// Page & Thorne 1974) less what falls into the hole, which is neglected:
// the disk lies from 100 to 1000 M, where a static emitter loses at most
// 27/(4 r²) ≈ 7e-4 of its light to the hole (the capture cone of the
// photon sphere, Schwarzschild; common practice). The sweep in cos i is
// 12-point Gauss–Legendre; each image is framed to the disk with pixels
// of 7 M. The limb law is Laor's, so the limb factor read back from the
// line intensity is exercised too.
func TestContinuumConservesEnergy(t *testing.T) {
	const rIn, rOut = 100.0, 1000.0
	nodes := 12
	if testing.Short() {
		nodes = 8
	}
	mu, wt := make([]float64, nodes), make([]float64, nodes)
	quad.Legendre{}.FixedLocations(mu, wt, 0, 1)
	var emitted, dist2, sum float64
	for k := range mu {
		inc := math.Acos(mu[k]) * 180 / math.Pi
		const width = 300
		field := 2 * (rOut + 60)
		pix := field / width
		height := int(math.Ceil(2 * (rOut*mu[k] + 60) / pix))
		r := resolve(t, func(s *scene.Scene) {
			thermal(s)
			s.Hole.Spin = 0.5
			s.Observer.InclinationDeg = inc
			s.Disk.InnerRadius, s.Disk.OuterRadius = f64(rIn), rOut
			s.Disk.Opaque, s.Disk.Orders = false, 3
			s.Emission.Limb = "laor"
			s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = width, height, field
		})
		f := render(t, r)
		c, err := f.Continuum()
		if err != nil {
			t.Fatal(err)
		}
		emitted, dist2 = r.Thermal.EmittedLuminosity(), r.DistanceCm*r.DistanceCm
		sum += wt[k] * c.BolometricTotal()
		// The spectrum holds the bolometric flux: its energy integral over
		// the default range (a twentieth of the coolest ring's colour
		// temperature to 30 times the hottest) misses little of it.
		e := c.EnergyKeV
		tot := c.Total()
		ef := make([]float64, len(e))
		for b := range e {
			ef[b] = tot[b] * e[b] * scene.ErgPerKeV
		}
		if got, want := logIntegral(e, ef), c.BolometricTotal(); math.Abs(got/want-1) > 2e-3 {
			t.Errorf("cos i = %.4f: ∫ E N_E dE = %.6g erg cm⁻² s⁻¹, the bolometric sum %.6g", mu[k], got, want)
		}
	}
	seen := 4 * math.Pi * dist2 * sum
	rel := seen/emitted - 1
	if math.Abs(rel) > 3e-3 {
		t.Errorf("received over all directions %.6g erg/s, emitted %.6g erg/s: relative difference %.3g", seen, emitted, rel)
	}
	t.Logf("received %.6g erg/s, emitted %.6g erg/s, relative difference %.3g", seen, emitted, rel)
}

// TestContinuumPeakScalesWithMass: at a fixed Eddington ratio the disk's
// temperature, and with it the energy of the peak of E² N_E, scales as
// M^{-1/4} (common practice: σT⁴ ∝ Ṁ/M² with Ṁ ∝ M). The two spectra
// share the energies; the peak is placed by a parabola through the
// largest value and its neighbours in log–log.
func TestContinuumPeakScalesWithMass(t *testing.T) {
	peak := func(mass float64) float64 {
		r := resolve(t, func(s *scene.Scene) {
			thermal(s)
			s.Hole.MassSolar = f64(mass)
			s.Thermal.MinKeV, s.Thermal.MaxKeV, s.Thermal.Bins = f64(1e-3), f64(100), 600
		})
		c, err := render(t, r).Continuum()
		if err != nil {
			t.Fatal(err)
		}
		tot, e := c.Total(), c.EnergyKeV
		best := 0
		for k := range tot {
			if tot[k]*e[k]*e[k] > tot[best]*e[best]*e[best] {
				best = k
			}
		}
		if best == 0 || best == len(e)-1 {
			t.Fatalf("M = %g: the peak is at the end of the energies", mass)
		}
		y := func(k int) float64 { return math.Log(tot[k] * e[k] * e[k]) }
		y0, y1, y2 := y(best-1), y(best), y(best+1)
		step := math.Log(e[best+1] / e[best])
		shift := 0.5 * (y0 - y2) / (y0 - 2*y1 + y2)
		return e[best] * math.Exp(shift*step)
	}
	lo, hi := peak(10), peak(1e6)
	want := math.Pow(1e5, -0.25)
	if math.Abs(hi/lo/want-1) > 2e-3 {
		t.Errorf("peak of E² N_E: %.5g keV at 10 M_sun, %.5g keV at 1e6 M_sun; ratio %.5g, want 1e5^(-1/4) = %.5g", lo, hi, hi/lo, want)
	}
	t.Logf("peaks %.5g keV and %.5g keV, ratio %.6g (want %.6g)", lo, hi, hi/lo, want)
}

// TestContinuumNeedsThermal: a scene without an accretion rate has no
// continuum.
func TestContinuumNeedsThermal(t *testing.T) {
	f := render(t, resolve(t, func(s *scene.Scene) {}))
	if _, err := f.Continuum(); !errors.Is(err, ErrNoThermal) {
		t.Errorf("error %v, want ErrNoThermal", err)
	}
}
