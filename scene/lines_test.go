package scene

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// parseScene reads TOML scene text, failing the test on an error.
func parseScene(t *testing.T, text string) Scene {
	t.Helper()
	s, err := Parse("lines.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

const ironLines = `
[[lines]]
energy_kev = 6.40
weight = 2

[[lines]]
energy_kev = 6.70

[[lines]]
energy_kev = 6.97
weight = 1
emissivity = "broken"
index_inner = 5
`

// TestLineListResolved reads a list of three lines: the fractions are the
// weights over their sum, the mean energy is their weighted mean, the
// third line has its own law (its keys over [emission]'s) and the
// default energy range spans 0.2 × the lowest to 1.8 × the highest line.
func TestLineListResolved(t *testing.T) {
	r, err := parseScene(t, ironLines).Resolve()
	if err != nil {
		t.Fatal(err)
	}
	ls := r.RestLines
	if !ls.List || len(ls.Lines) != 3 || !ls.Own() {
		t.Fatalf("lines %+v", ls)
	}
	want := []float64{0.5, 0.25, 0.25}
	for i, l := range ls.Lines {
		if math.Abs(l.Fraction-want[i]) > 1e-15 {
			t.Errorf("line %d: fraction %v, want %v", i+1, l.Fraction, want[i])
		}
	}
	if mean := 0.5*6.4 + 0.25*6.7 + 0.25*6.97; math.Abs(ls.MeanKeV-mean) > 1e-12 {
		t.Errorf("mean energy %v, want %v", ls.MeanKeV, mean)
	}
	own := ls.Lines[2]
	if own.Emissivity.Kind != BrokenPowerLaw || own.Emissivity.QIn != 5 || own.Emissivity.QOut != r.Emission.IndexOuter || own.Emissivity.RBreak != r.Emission.BreakRad || !own.Own {
		t.Errorf("line 3 law %+v", own.Emissivity)
	}
	if ls.Lines[0].Own || ls.Lines[0].Emissivity != r.Emissivity {
		t.Errorf("line 1 should shine with [emission]'s law: %+v", ls.Lines[0])
	}
	if math.Abs(r.MinKeV-0.2*6.4) > 1e-12 || math.Abs(r.MaxKeV-1.8*6.97) > 1e-12 {
		t.Errorf("energy range %v–%v keV", r.MinKeV, r.MaxKeV)
	}
}

// TestLineSharesArePhotonFractions checks the normalisation of the lines'
// emissivities (RestLines): the disk-area integral of each line's
// ε_l r dr, done here by an independent trapezoid rule in ln r, is its
// fraction of the integral of [emission]'s law, whatever the line's law;
// and the shares (Parts) at a radius sum to 1.
func TestLineSharesArePhotonFractions(t *testing.T) {
	r, err := parseScene(t, ironLines).Resolve()
	if err != nil {
		t.Fatal(err)
	}
	ls := r.RestLines
	integral := func(f func(float64) float64) float64 { // ∫ f r dr, trapezoids in ln r
		const n = 200000
		u0, u1 := math.Log(r.Inner), math.Log(r.Disk.OuterRadius)
		h := (u1 - u0) / n
		sum := 0.0
		for i := 0; i <= n; i++ {
			x := math.Exp(u0 + float64(i)*h)
			w := 1.0
			if i == 0 || i == n {
				w = 0.5
			}
			sum += w * f(x) * x * x
		}
		return sum * h
	}
	main := integral(r.Emissivity.At)
	total := 0.0
	for i, l := range ls.Lines {
		li := integral(func(x float64) float64 { return l.scale * l.Emissivity.At(x) })
		total += li
		if got := li / main; math.Abs(got-l.Fraction) > 1e-6 {
			t.Errorf("line %d: photon share %v, want its fraction %v", i+1, got, l.Fraction)
		}
	}
	if got := integral(ls.At) / main; math.Abs(got-1) > 1e-6 {
		t.Errorf("all lines: %v of [emission]'s photons, want 1", got)
	}
	parts := make([]float64, 3)
	for _, x := range []float64{r.Inner, 5, 17, r.Disk.OuterRadius} {
		ls.Parts(x, parts)
		if s := parts[0] + parts[1] + parts[2]; math.Abs(s-1) > 1e-14 {
			t.Errorf("r = %v: shares sum to %v", x, s)
		}
	}
}

// TestNoListIsTheOneLine: without [[lines]] the one line is
// emission.line_kev with [emission]'s law, its photon emissivity that
// law exactly, and PhotonRate L / E_line.
func TestNoListIsTheOneLine(t *testing.T) {
	s := Default()
	s.Hole.MassSolar, s.Hole.DistanceKpc = ptr(10), ptr(8)
	s.Emission.LineLuminosityErgS = ptr(1e37)
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	ls := r.RestLines
	if ls.List || ls.Own() || len(ls.Lines) != 1 || ls.Lines[0].EnergyKeV != 6.4 || ls.Lines[0].Fraction != 1 || ls.MeanKeV != 6.4 {
		t.Fatalf("lines %+v", ls)
	}
	for _, x := range []float64{2.5, 7, 29} {
		if ls.At(x) != r.Emissivity.At(x) || ls.EnergyAt(x) != r.Emissivity.At(x) {
			t.Errorf("r = %v: %v, %v, want %v", x, ls.At(x), ls.EnergyAt(x), r.Emissivity.At(x))
		}
	}
	l, e := 1e37, 6.4 // variables: the run-time float64 arithmetic of Resolve
	if want := l / (e * ErgPerKeV); r.PhotonRate != want {
		t.Errorf("photon rate %v, want %v", r.PhotonRate, want)
	}
}

// TestListLuminosityIsTotal: with a line list the line luminosity is the
// total over the lines, so the photon rate is L over the mean energy.
func TestListLuminosityIsTotal(t *testing.T) {
	s := parseScene(t, ironLines+`
[black_hole]
mass_msun = 10
distance_kpc = 8
[emission]
line_luminosity_erg_s = 1e37
`)
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	sum := 0.0
	for _, l := range r.RestLines.Lines {
		sum += l.Fraction * r.PhotonRate * l.EnergyKeV * ErgPerKeV
	}
	if math.Abs(sum/1e37-1) > 1e-14 {
		t.Errorf("luminosity summed over the lines %v erg/s, want 1e37", sum)
	}
}

// TestLineListRefused checks that bad line lists are *FieldErrors naming
// the key of the line.
func TestLineListRefused(t *testing.T) {
	many := ""
	for i := 0; i <= MaxLines; i++ {
		many += "[[lines]]\nenergy_kev = " + string(rune('1'+i%9)) + "." + string(rune('0'+i/9)) + "\n"
	}
	cases := []struct{ name, text, key string }{
		{"no energy", "[[lines]]\nweight = 1\n", "lines.1.energy_kev"},
		{"energy too high", "[[lines]]\nenergy_kev = 6.4\n[[lines]]\nenergy_kev = 2e6\n", "lines.2.energy_kev"},
		{"same energy", "[[lines]]\nenergy_kev = 6.4\n[[lines]]\nenergy_kev = 6.7\n[[lines]]\nenergy_kev = 6.4\n", "lines.3.energy_kev"},
		{"negative weight", "[[lines]]\nenergy_kev = 6.4\n[[lines]]\nenergy_kev = 6.7\nweight = -1\n", "lines.2.weight"},
		{"all weights 0", "[[lines]]\nenergy_kev = 6.4\nweight = 0\n[[lines]]\nenergy_kev = 6.7\nweight = 0\n", "lines.1.weight"},
		{"unknown law", "[[lines]]\nenergy_kev = 6.4\nemissivity = \"flat\"\n", "lines.1.emissivity"},
		{"steep index", "[[lines]]\nenergy_kev = 6.4\n[[lines]]\nenergy_kev = 6.7\nindex = -40\n", "lines.2.index"},
		{"break below 1 M", "[[lines]]\nenergy_kev = 6.4\nemissivity = \"broken\"\nbreak_radius = 0.5\n", "lines.1.break_radius"},
		{"both line_kev and list", "[emission]\nline_kev = 6.4\n[[lines]]\nenergy_kev = 6.7\n", "emission.line_kev"},
		{"too many", many, "lines"},
	}
	for _, c := range cases {
		s, err := Parse("bad.toml", []byte(c.text))
		if err == nil {
			_, err = s.Resolve()
		}
		var fe *FieldError
		if !errors.As(err, &fe) {
			t.Errorf("%s: error %v, want a *FieldError", c.name, err)
			continue
		}
		if fe.Key != c.key || fe.Allowed == "" {
			t.Errorf("%s: key %q (%v), want %q", c.name, fe.Key, fe, c.key)
		}
	}
	// An unknown key inside [[lines]] lists the keys a line takes.
	_, err := Parse("bad.toml", []byte("[[lines]]\nenergy_kev = 6.4\nwidth = 3\n"))
	var pe *ParseError
	if !errors.As(err, &pe) || !strings.Contains(pe.Problem, "energy_kev, weight, emissivity") {
		t.Errorf("unknown key in [[lines]]: %v", err)
	}
	// A list of numbers instead of an array of tables.
	_, err = Parse("bad.toml", []byte("lines = [6.4, 6.7]\n"))
	if !errors.As(err, &pe) || pe.Key != "lines" {
		t.Errorf("lines as numbers: %v", err)
	}
}

// TestLineFieldSetsCopies: the sweep keys lines.N.weight and
// lines.N.energy_kev set line N of a copy of the list, refuse a line the
// scene does not have and are not fields for other keys.
func TestLineFieldSetsCopies(t *testing.T) {
	base := parseScene(t, ironLines)
	f, ok := LineField("lines.2.weight")
	if !ok {
		t.Fatal("lines.2.weight is not a field")
	}
	s := base
	if err := f.Set(&s, "0.75"); err != nil {
		t.Fatal(err)
	}
	if *s.Lines[1].Weight != 0.75 || base.Lines[1].Weight != nil {
		t.Errorf("weights %v, base %v", s.Lines[1].Weight, base.Lines[1].Weight)
	}
	e, _ := LineField("lines.1.energy_kev")
	if err := e.Set(&s, "6.5"); err != nil || s.Lines[0].EnergyKeV != 6.5 || base.Lines[0].EnergyKeV != 6.4 {
		t.Errorf("energy: %v, %v, base %v", err, s.Lines[0].EnergyKeV, base.Lines[0].EnergyKeV)
	}
	f4, _ := LineField("lines.4.weight")
	var fe *FieldError
	if err := f4.Set(&s, "1"); !errors.As(err, &fe) || fe.Key != "lines.4.weight" {
		t.Errorf("line 4 of 3: %v", err)
	}
	for _, k := range []string{"lines.0.weight", "lines.17.weight", "lines.02.weight", "lines.1.index", "lines.x.weight", "emission.index"} {
		if _, ok := LineField(k); ok {
			t.Errorf("%s should not be a line field", k)
		}
	}
	if q := QuantityOf("lines.2.weight"); q.Symbol != "w_2" {
		t.Errorf("quantity %+v", q)
	}
}

// TestLineListManifestRoundTrip: the scene's TOML holds the list and
// reads back to the same lines.
func TestLineListManifestRoundTrip(t *testing.T) {
	s := parseScene(t, ironLines)
	text, err := s.TOML()
	if err != nil {
		t.Fatal(err)
	}
	back := parseScene(t, string(text))
	r1, err1 := s.Resolve()
	r2, err2 := back.Resolve()
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	if len(r2.RestLines.Lines) != 3 {
		t.Fatalf("read back %d lines", len(r2.RestLines.Lines))
	}
	for i := range r1.RestLines.Lines {
		if r1.RestLines.Lines[i] != r2.RestLines.Lines[i] {
			t.Errorf("line %d: %+v, read back %+v", i+1, r1.RestLines.Lines[i], r2.RestLines.Lines[i])
		}
	}
}

// TestAtBoth checks that the paired evaluation equals At and EnergyAt,
// with and without a line of its own law.
func TestAtBoth(t *testing.T) {
	own, err := parseScene(t, ironLines).Resolve()
	if err != nil {
		t.Fatal(err)
	}
	plain, err := Default().Resolve()
	if err != nil {
		t.Fatal(err)
	}
	for _, ls := range []RestLines{own.RestLines, plain.RestLines} {
		for _, r := range []float64{1.5, 3, 7.25, 30, 400} {
			p, e := ls.AtBoth(r)
			if p != ls.At(r) || e != ls.EnergyAt(r) {
				t.Errorf("own=%v r=%v: AtBoth %v, %v; At %v, EnergyAt %v", ls.Own(), r, p, e, ls.At(r), ls.EnergyAt(r))
			}
		}
	}
}
