package colormap

import (
	"image/color"
	"math"
	"testing"

	colorful "github.com/lucasb-eyer/go-colorful"
)

// machadoDeuteranopia is the matrix of Machado, Oliveira & Fernandes
// 2009 (IEEE TVCG 15, 1291; their Table 1, deuteranomaly at severity
// 1.0, i.e. deuteranopia) that maps linear RGB to the linear RGB a
// deuteranope perceives alike. The values are quoted from memory of the
// paper's table; TestMachadoMatrix checks two properties the published
// matrix has.
var machadoDeuteranopia = [3][3]float64{
	{0.367322, 0.860646, -0.227968},
	{0.280085, 0.672501, 0.047413},
	{-0.011820, 0.042940, 0.968881},
}

// deuteranope simulates how c looks to a deuteranope: the matrix applied
// to the linear-light sRGB components (as Machado et al. apply it),
// clipped to the gamut.
func deuteranope(c color.RGBA) colorful.Color {
	cc, _ := colorful.MakeColor(c)
	r, g, b := cc.LinearRgb()
	in := [3]float64{r, g, b}
	var out [3]float64
	for i, row := range machadoDeuteranopia {
		for j, m := range row {
			out[i] += m * in[j]
		}
		out[i] = math.Max(0, math.Min(1, out[i]))
	}
	return colorful.LinearRgb(out[0], out[1], out[2])
}

// simDistance is the CIEDE2000 difference (go-colorful, L* units) of a
// and b as a deuteranope sees them.
func simDistance(a, b color.RGBA) float64 {
	return 100 * deuteranope(a).DistanceCIEDE2000(deuteranope(b))
}

// Machado et al. 2009 build each matrix so that achromatic colours stay
// achromatic (every row sums to 1), and deuteranopia collapses the
// red–green axis while keeping blue–yellow: pure sRGB red and green end up
// far closer than they were, blue and yellow stay apart.
func TestMachadoMatrix(t *testing.T) {
	for i, row := range machadoDeuteranopia {
		if s := row[0] + row[1] + row[2]; math.Abs(s-1) > 1e-5 {
			t.Errorf("row %d sums to %v, want 1", i, s)
		}
	}
	for _, g := range []uint8{0, 60, 119, 200, 255} {
		c := color.RGBA{g, g, g, 255}
		if d := 100 * deuteranope(c).DistanceCIEDE2000(mustColor(c)); d > 0.5 {
			t.Errorf("grey %d changes by ΔE00 %.2f", g, d)
		}
	}
	red, green := color.RGBA{255, 0, 0, 255}, color.RGBA{0, 255, 0, 255}
	blue, yellow := color.RGBA{0, 0, 255, 255}, color.RGBA{255, 255, 0, 255}
	if d, d0 := simDistance(red, green), distance(red, green); d > 0.6*d0 {
		t.Errorf("red–green ΔE00 %.1f simulated, %.1f seen: not collapsed", d, d0)
	}
	if d, d0 := simDistance(blue, yellow), distance(blue, yellow); d < 0.8*d0 {
		t.Errorf("blue–yellow ΔE00 %.1f simulated, %.1f seen: should stay apart", d, d0)
	}
}

func mustColor(c color.RGBA) colorful.Color {
	cc, _ := colorful.MakeColor(c)
	return cc
}

// For a deuteranope (simulated as above) the continuous scales must still
// read in order: 32 even steps along each scale stay at least ΔE00 1.5
// apart (about the just-noticeable difference of side-by-side patches,
// common practice), and the sequential scale's simulated lightness still
// rises strictly.
func TestScalesDeuteranopeSteps(t *testing.T) {
	const n = 32
	for _, m := range allMaps() {
		prevL := math.Inf(-1)
		for i := 0; i < n; i++ {
			a, b := m.At(float64(i)/n), m.At(float64(i+1)/n)
			if d := simDistance(a, b); d < 1.5 {
				t.Errorf("%s: t = %.3f → %.3f: simulated ΔE00 %.2f < 1.5", m.Name, float64(i)/n, float64(i+1)/n, d)
			}
			if m.Name == Sequential.Name {
				l, _, _ := deuteranope(a).Lab()
				if l <= prevL {
					t.Errorf("%s: simulated L* falls at t = %.3f", m.Name, float64(i)/n)
				}
				prevL = l
			}
		}
	}
}

// The two halves of the diverging scale must not be confused by a
// deuteranope: a redshift and the blueshift at the same distance from the
// centre stay ΔE00 ≥ 10 apart (a clearly visible difference, common
// practice) once they are 0.1 or more from the centre.
func TestRedshiftHalvesDeuteranope(t *testing.T) {
	for d := 0.1; d <= 0.5; d += 0.02 {
		lo, hi := Redshift.At(0.5-d), Redshift.At(0.5+d)
		if s := simDistance(lo, hi); s < 10 {
			t.Errorf("t = 0.5 ∓ %.2f: simulated ΔE00 %.1f < 10", d, s)
		}
	}
}

// Image orders must stay apart for a deuteranope too: every pair of the
// eight category colours at least ΔE00 10 apart in the simulation, and
// against the reserved no-disk grey.
func TestOrderDeuteranope(t *testing.T) {
	for i := 0; i < OrderCount; i++ {
		for j := i + 1; j < OrderCount; j++ {
			if d := simDistance(Order(i), Order(j)); d < 10 {
				t.Errorf("orders %d and %d: simulated ΔE00 %.1f < 10", i, j, d)
			}
		}
		if d := simDistance(Order(i), NoHit); d < 10 {
			t.Errorf("order %d vs NoHit: simulated ΔE00 %.1f < 10", i, d)
		}
	}
}
