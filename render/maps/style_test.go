package maps

import (
	"math"
	"testing"

	"kerrscope/render/internal/figure"
)

// The linear redshift scale is linear in g with one stretch on both sides
// of g = 1 (so t(1 − x) + t(1 + x) = 1 and equal steps in g are equal
// steps in t), and its bar is labelled at both ends with 1 ∓ D; the split
// scale reaches GMin and GMax at the ends, log g on each side.
func TestRedshiftScales(t *testing.T) {
	sc := Scales{GMin: 0.17, GMax: 1.24}
	lin := sc
	lin.GLinear = true
	d := 0.83 // the larger distance from 1
	for _, x := range []float64{0, 0.1, 0.2, 0.5, 0.83} {
		if s := lin.GPosition(1-x) + lin.GPosition(1+x); math.Abs(s-1) > 1e-12 && 1+x <= 1+d {
			t.Errorf("linear: t(1−%v) + t(1+%v) = %v", x, x, s)
		}
		if got, want := lin.GPosition(1+x), 0.5+0.5*x/d; math.Abs(got-want) > 1e-12 {
			t.Errorf("linear: t(%v) = %v, want %v", 1+x, got, want)
		}
	}
	// Split: the ends, and log g on each side (a ratio halfway in log
	// sits halfway along its half).
	if a, b := sc.GPosition(0.17), sc.GPosition(1.24); a != 0 || math.Abs(b-1) > 1e-12 {
		t.Errorf("split ends at %v and %v", a, b)
	}
	if got := sc.GPosition(math.Sqrt(0.17)); math.Abs(got-0.25) > 1e-12 {
		t.Errorf("split: t(√0.17) = %v, want 0.25", got)
	}
	if got := sc.GPosition(math.Sqrt(1.24)); math.Abs(got-0.75) > 1e-12 {
		t.Errorf("split: t(√1.24) = %v, want 0.75", got)
	}
	if !math.IsNaN(lin.GPosition(math.NaN())) || !math.IsNaN(sc.GPosition(math.NaN())) {
		t.Error("NaN g is not kept NaN")
	}
	for _, c := range []struct {
		sc       Scales
		lo, hi   string
		noteWord string
	}{{sc, "0.17", "1.24", "log"}, {lin, "0.17", "1.83", "linear"}} {
		var p figure.Panel
		redshiftBar(nil, c.sc, &p)
		first, last := p.Bar.Ticks[0], p.Bar.Ticks[1]
		if first.T != 0 || first.Label != c.lo || last.T != 1 || last.Label != c.hi {
			t.Errorf("bar ends %+v, %+v; want %s at 0 and %s at 1", first, last, c.lo, c.hi)
		}
		if len(p.Bar.Note) < len(c.noteWord) || p.Bar.Note[:len(c.noteWord)] != c.noteWord {
			t.Errorf("bar note %q does not say the scale is %s", p.Bar.Note, c.noteWord)
		}
	}
}

func TestBarNumbers(t *testing.T) {
	for v, want := range map[float64]string{7.73e-6: "7.73×10^{−6}", 0.0773: "0.0773", -2: "−2", 1.5e12: "1.5×10^{12}"} {
		if got := barNumber(v); got != want {
			t.Errorf("barNumber(%v) = %q, want %q", v, got, want)
		}
	}
	for v, want := range map[float64]string{1e-4: "10^{−4}", 1: "1", 10: "10", 1e3: "10^{3}"} {
		if got := decadeLabel(v); got != want {
			t.Errorf("decadeLabel(%v) = %q, want %q", v, got, want)
		}
	}
}
