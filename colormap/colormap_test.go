package colormap

import (
	"bytes"
	"image"
	"image/color"
	"image/gif"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"testing"

	colorful "github.com/lucasb-eyer/go-colorful"
)

// lab returns CIE L*a*b* (D65) of c in the usual units (L* in [0, 100]),
// as computed by go-colorful.
func lab(c color.RGBA) (l, a, b float64) {
	cc, _ := colorful.MakeColor(c)
	l, a, b = cc.Lab()
	return 100 * l, 100 * a, 100 * b
}

// hue returns the CIE L*C*h° hue angle of c in degrees, in [0, 360).
func hue(c color.RGBA) float64 {
	_, a, b := lab(c)
	return math.Mod(math.Atan2(b, a)*180/math.Pi+360, 360)
}

// distance is the CIEDE2000 colour difference between two colours from
// go-colorful, in L* units.
func distance(a, b color.RGBA) float64 {
	ca, _ := colorful.MakeColor(a)
	cb, _ := colorful.MakeColor(b)
	return 100 * ca.DistanceCIEDE2000(cb)
}

// allMaps is every scale known to ByName.
func allMaps() []Map {
	return slices.Clone(maps)
}

// CIE L* from go-colorful; strictly monotonic lightness is common practice
// for sequential maps, so that the order of values survives grey-scale
// printing and colour-vision deficiencies. Checked on the 8-bit colours a
// renderer actually gets.
func TestSequentialLightnessStrictlyIncreasing(t *testing.T) {
	tab := Sequential.Table(256)
	prev := math.Inf(-1)
	for i, c := range tab {
		l, _, _ := lab(c)
		if l <= prev {
			t.Fatalf("L* not increasing at sample %d: %.3f after %.3f", i, l, prev)
		}
		prev = l
	}
	first, _, _ := lab(tab[0])
	last, _, _ := lab(tab[255])
	// A wide lightness range is what gives a sequential map its contrast.
	if first > 20 || last < 90 {
		t.Errorf("L* range [%.1f, %.1f], want from below 20 to above 90", first, last)
	}
}

// CIE L* from go-colorful; a diverging map should weigh both sides equally,
// so lightness is symmetric about the centre, lightest there and monotonic
// on each side. 257 samples put one exactly on t = 0.5.
func TestDivergingLightness(t *testing.T) {
	const n = 257
	tab := Redshift.Table(n)
	ls := make([]float64, n)
	for i, c := range tab {
		ls[i], _, _ = lab(c)
	}
	mid := n / 2
	for i := 0; i < mid; i++ {
		if ls[i+1] <= ls[i] {
			t.Errorf("low side: L* not increasing at sample %d (%.3f -> %.3f)", i, ls[i], ls[i+1])
		}
		j := n - 1 - i
		if ls[j-1] <= ls[j] {
			t.Errorf("high side: L* not decreasing at sample %d (%.3f -> %.3f)", j, ls[j-1], ls[j])
		}
		// Half an L* unit is below what 8-bit rounding of unrelated hues
		// can guarantee to match, and far below a visible difference.
		if d := math.Abs(ls[i] - ls[j]); d > 0.5 {
			t.Errorf("L* asymmetric: t=%.3f has %.2f, t=%.3f has %.2f",
				float64(i)/(n-1), ls[i], float64(j)/(n-1), ls[j])
		}
	}
	if ls[mid] != slices.Max(ls) {
		t.Errorf("centre L* %.2f is not the maximum %.2f", ls[mid], slices.Max(ls))
	}
	// "Light neutral": high lightness and (almost) no chroma at the centre.
	l, a, b := lab(Redshift.At(0.5))
	if l < 90 || math.Hypot(a, b) > 2 {
		t.Errorf("centre L*=%.1f C*=%.1f, want a light neutral", l, math.Hypot(a, b))
	}
}

// CIELAB hue angles from go-colorful: reds and oranges lie between about
// -30° and 90° (magenta-red through amber), blues between about 190° and
// 310°. Redshift (g < 1, t < 0.5) must read warm, blueshift cool. Samples
// very close to the neutral centre are skipped, where hue is meaningless.
func TestDivergingHues(t *testing.T) {
	for i := 0; i <= 100; i++ {
		tt := float64(i) / 100
		if math.Abs(tt-0.5) < 0.03 {
			continue
		}
		c := Redshift.At(tt)
		h := hue(c)
		if tt < 0.5 {
			if !(h >= 330 || h <= 90) {
				t.Errorf("t=%.2f: hue %.0f° is not red/orange (%v)", tt, h, c)
			}
		} else if h < 190 || h > 310 {
			t.Errorf("t=%.2f: hue %.0f° is not blue (%v)", tt, h, c)
		}
	}
	// The plain sRGB channels agree: red dominates the low end, blue the
	// high end.
	lo, hi := Redshift.At(0.1), Redshift.At(0.9)
	if lo.R <= lo.B || hi.B <= hi.R {
		t.Errorf("low end %v should be reddish, high end %v bluish", lo, hi)
	}
}

// go-colorful's Color.IsValid is the sRGB gamut test. The designed path is
// brought into gamut by lowering chroma only, so before 8-bit rounding
// every colour must be valid and free of NaN, and after rounding its L*
// must still be the designed one.
func TestGamutAndLightnessKept(t *testing.T) {
	for _, m := range allMaps() {
		for i := 0; i <= 1000; i++ {
			tt := float64(i) / 1000
			l, c, h := m.lch(tt)
			col := inGamut(l, c, h)
			if math.IsNaN(col.R) || math.IsNaN(col.G) || math.IsNaN(col.B) || !col.IsValid() {
				t.Fatalf("%s t=%.3f: colour %+v out of gamut or NaN", m.Name, tt, col)
			}
			got, _, _ := lab(m.At(tt))
			// 8-bit rounding moves L* by well under one unit.
			if math.Abs(got-100*l) > 0.6 {
				t.Errorf("%s t=%.3f: L* %.2f, designed %.2f", m.Name, tt, got, 100*l)
			}
		}
		for _, tt := range []float64{-1, 2, math.Inf(1), math.Inf(-1), math.Copysign(0, -1), 1e-300, math.MaxFloat64} {
			if c := m.At(tt); c.A != 255 {
				t.Errorf("%s At(%v) = %v, want opaque", m.Name, tt, c)
			}
		}
		if m.At(-3) != m.At(0) || m.At(math.Inf(1)) != m.At(1) {
			t.Errorf("%s: t outside [0, 1] is not clamped", m.Name)
		}
	}
}

// CIEDE2000 from go-colorful; a smooth, roughly perceptually even scale
// has no jumps, so no step between neighbouring samples is much larger than
// the typical step. The designed colours are compared before 8-bit rounding,
// which would otherwise add its own noise to such small steps.
func TestSmooth(t *testing.T) {
	const n = 128
	for _, m := range allMaps() {
		steps := make([]float64, n-1)
		prev := inGamut(m.lch(0))
		for i := range steps {
			next := inGamut(m.lch(float64(i+1) / (n - 1)))
			steps[i] = 100 * prev.DistanceCIEDE2000(next)
			prev = next
		}
		sorted := slices.Clone(steps)
		sort.Float64s(sorted)
		median := sorted[len(sorted)/2]
		for i, d := range steps {
			if d > 2.5*median || d < median/2.5 {
				t.Errorf("%s: step %d has ΔE00 %.2f, median %.2f", m.Name, i, d, median)
			}
		}
	}
}

// CIEDE2000 via go-colorful's DistanceCIEDE2000; a difference of 20 is
// clearly distinguishable side by side, which image orders need.
func TestOrderDistinct(t *testing.T) {
	if len(orderColors) != OrderCount || OrderCount < 6 {
		t.Fatalf("OrderCount %d, %d colours; want at least 6", OrderCount, len(orderColors))
	}
	for i := 0; i < OrderCount; i++ {
		for j := i + 1; j < OrderCount; j++ {
			if d := distance(Order(i), Order(j)); d < 20 {
				t.Errorf("orders %d and %d: ΔE00 %.1f < 20", i, j, d)
			}
		}
		if d := distance(Order(i), NoHit); d < 20 {
			t.Errorf("order %d vs NoHit: ΔE00 %.1f < 20", i, d)
		}
		if d := distance(Order(i), Shadow); d < 20 {
			t.Errorf("order %d vs Shadow: ΔE00 %.1f < 20", i, d)
		}
	}
	// CIE L*: neighbouring orders also differ in lightness, so that they
	// stay apart in grey-scale print.
	for i := 0; i < OrderCount; i++ {
		a, _, _ := lab(Order(i))
		b, _, _ := lab(Order((i + 1) % OrderCount))
		if math.Abs(a-b) < 10 {
			t.Errorf("orders %d and %d: L* %.1f and %.1f", i, (i+1)%OrderCount, a, b)
		}
	}
	if Order(OrderCount+2) != Order(2) {
		t.Error("orders beyond OrderCount do not cycle")
	}
	if Order(-1) != NoHit || Order(math.MinInt) != NoHit {
		t.Error("negative order is not NoHit")
	}
	_ = Order(math.MaxInt)
}

// CIEDE2000 via go-colorful; the reserved colours must not be mistaken for
// data, so NoHit stays well away from every scale, and Shadow is darker
// (CIE L*) than the dark end of every scale.
func TestReservedColoursOutsideMaps(t *testing.T) {
	if d := distance(NoHit, Shadow); d < 20 {
		t.Errorf("NoHit vs Shadow: ΔE00 %.1f", d)
	}
	l, a, b := lab(NoHit)
	if l < 40 || l > 60 || math.Hypot(a, b) > 1 {
		t.Errorf("NoHit L*=%.1f C*=%.1f, want a mid grey", l, math.Hypot(a, b))
	}
	shadowL, _, _ := lab(Shadow)
	if shadowL > 5 {
		t.Errorf("Shadow L*=%.1f, want near-black", shadowL)
	}
	for _, m := range allMaps() {
		minNoHit, minL := math.Inf(1), math.Inf(1)
		for _, c := range m.Table(1024) {
			minNoHit = math.Min(minNoHit, distance(c, NoHit))
			l, _, _ := lab(c)
			minL = math.Min(minL, l)
		}
		if minNoHit < 10 {
			t.Errorf("%s comes within ΔE00 %.1f of NoHit", m.Name, minNoHit)
		}
		if minL-shadowL < 8 {
			t.Errorf("%s reaches L*=%.1f, too close to Shadow's %.1f", m.Name, minL, shadowL)
		}
	}
}

// image/gif encodes paletted frames of at most 256 colours; the reserved
// entries must sit at their documented indices and every entry must be a
// different colour, or indices would alias.
func TestPalette(t *testing.T) {
	for _, m := range allMaps() {
		p := Palette(m)
		if len(p) != 256 {
			t.Fatalf("%s: palette has %d entries", m.Name, len(p))
		}
		if p[NoHitIndex] != NoHit || p[ShadowIndex] != Shadow {
			t.Errorf("%s: reserved entries %v %v", m.Name, p[NoHitIndex], p[ShadowIndex])
		}
		seen := map[color.Color]int{}
		for i, c := range p {
			if j, ok := seen[c]; ok {
				t.Errorf("%s: entries %d and %d are both %v", m.Name, j, i, c)
			}
			seen[c] = i
		}
		for _, tt := range []float64{0, 0.25, 0.5, 0.77, 1} {
			got := p[PaletteIndex(tt)].(color.RGBA)
			// The nearest of 254 levels is within half a step of t.
			if d := distance(got, m.At(tt)); d > 1 {
				t.Errorf("%s: palette entry for t=%v is ΔE00 %.2f from At", m.Name, tt, d)
			}
		}
	}
	cases := map[float64]uint8{
		math.NaN(): NoHitIndex, 0: 2, 1: 255, -4: 2, 9: 255,
		math.Inf(1): 255, math.Inf(-1): 2,
	}
	for in, want := range cases {
		if got := PaletteIndex(in); got != want {
			t.Errorf("PaletteIndex(%v) = %d, want %d", in, got, want)
		}
	}
}

// The standard library's image/gif must accept the palette as is and give
// back the reserved colours at their indices.
func TestPaletteEncodesAsGIF(t *testing.T) {
	p := Palette(Redshift)
	anim := &gif.GIF{}
	for f := range 2 {
		img := image.NewPaletted(image.Rect(0, 0, 8, 8), p)
		for i := range img.Pix {
			img.Pix[i] = PaletteIndex(float64(i+f) / 64)
		}
		img.Pix[0] = NoHitIndex
		img.Pix[1] = ShadowIndex
		anim.Image = append(anim.Image, img)
		anim.Delay = append(anim.Delay, 5)
	}
	var buf bytes.Buffer
	if err := gif.EncodeAll(&buf, anim); err != nil {
		t.Fatal(err)
	}
	back, err := gif.DecodeAll(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if len(back.Image) != 2 {
		t.Fatalf("decoded %d frames", len(back.Image))
	}
	fr := back.Image[1]
	if !sameColor(fr.At(0, 0), NoHit) || !sameColor(fr.At(1, 0), Shadow) {
		t.Errorf("reserved pixels came back as %v %v", fr.At(0, 0), fr.At(1, 0))
	}
}

// sameColor compares two colours by their 16-bit RGBA values.
func sameColor(a, b color.Color) bool {
	ar, ag, ab, aa := a.RGBA()
	br, bg, bb, ba := b.RGBA()
	return ar == br && ag == bg && ab == bb && aa == ba
}

// ByName backs a command-line flag: every listed name resolves, case and
// spaces are forgiven, and an unknown name is an error naming the valid
// choices.
func TestByName(t *testing.T) {
	names := Names()
	if len(names) != len(maps) {
		t.Fatalf("Names() = %v", names)
	}
	for _, n := range names {
		m, err := ByName(n)
		if err != nil || m.Name != n {
			t.Errorf("ByName(%q) = %q, %v", n, m.Name, err)
		}
		if m2, err := ByName("  " + strings.ToUpper(n) + " "); err != nil || m2.Name != n {
			t.Errorf("ByName is case or space sensitive for %q", n)
		}
	}
	for _, bad := range []string{"", "nope", "doppler2", "\x00"} {
		_, err := ByName(bad)
		if err == nil {
			t.Errorf("ByName(%q) gave no error", bad)
			continue
		}
		for _, n := range names {
			if !strings.Contains(err.Error(), n) {
				t.Errorf("error %q does not list %q", err, n)
			}
		}
	}
}

// NaN marks a pixel without a value; it must come out as NoHit, as must
// anything asked of a Map without stops.
func TestNaNAndZeroMap(t *testing.T) {
	for _, m := range allMaps() {
		if m.At(math.NaN()) != NoHit {
			t.Errorf("%s.At(NaN) = %v", m.Name, m.At(math.NaN()))
		}
	}
	var z Map
	if z.At(0.3) != NoHit || z.At(math.NaN()) != NoHit {
		t.Error("zero Map does not give NoHit")
	}
	for _, c := range z.Table(3) {
		if c != NoHit {
			t.Error("zero Map table is not NoHit")
		}
	}
	if len(Palette(z)) != 256 {
		t.Error("palette of zero Map is not 256 entries")
	}
}

// Table sizes at and beyond the edges must neither panic nor allocate
// without bound.
func TestTableSizes(t *testing.T) {
	if got := Sequential.Table(0); len(got) != 0 {
		t.Errorf("Table(0) has %d entries", len(got))
	}
	if got := Sequential.Table(-7); len(got) != 0 {
		t.Errorf("Table(-7) has %d entries", len(got))
	}
	if got := Sequential.Table(1); len(got) != 1 || got[0] != Sequential.At(0.5) {
		t.Errorf("Table(1) = %v", got)
	}
	two := Redshift.Table(2)
	if two[0] != Redshift.At(0) || two[1] != Redshift.At(1) {
		t.Errorf("Table(2) = %v", two)
	}
	if got := Redshift.Table(math.MaxInt); len(got) != maxTable {
		t.Errorf("Table(MaxInt) has %d entries, want %d", len(got), maxTable)
	}
}

// Figures must be reproducible: the same inputs give the same colours.
func TestDeterministic(t *testing.T) {
	for _, m := range allMaps() {
		if !slices.Equal(m.Table(300), m.Table(300)) {
			t.Errorf("%s: tables differ between calls", m.Name)
		}
		again, _ := ByName(m.Name)
		if !slices.Equal(again.Table(300), m.Table(300)) {
			t.Errorf("%s: ByName copy differs", m.Name)
		}
		if !slices.Equal(Palette(m), Palette(m)) {
			t.Errorf("%s: palettes differ between calls", m.Name)
		}
	}
}

// The mapping helpers: endpoints, clamping, direction, and NaN for
// anything that has no sensible value.
func TestScaleHelpers(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	type tc struct {
		name string
		got  float64
		want float64
	}
	cases := []tc{
		{"Linear lo", Linear(2, 2, 6), 0},
		{"Linear hi", Linear(6, 2, 6), 1},
		{"Linear mid", Linear(3, 2, 6), 0.25},
		{"Linear below", Linear(-9, 2, 6), 0},
		{"Linear above", Linear(99, 2, 6), 1},
		{"Linear +Inf", Linear(inf, 2, 6), 1},
		{"Linear -Inf", Linear(-inf, 2, 6), 0},
		{"Linear reversed", Linear(3, 6, 2), 0.75},
		{"Linear degenerate", Linear(3, 2, 2), 0.5},
		{"Linear NaN", Linear(nan, 0, 1), nan},
		{"Linear NaN bound", Linear(0.5, nan, 1), nan},
		{"Linear Inf bound", Linear(0.5, 0, inf), nan},
		{"Log lo", Log(1, 1, 100), 0},
		{"Log mid", Log(10, 1, 100), 0.5},
		{"Log hi", Log(100, 1, 100), 1},
		{"Log zero", Log(0, 1, 100), 0},
		{"Log negative", Log(-5, 1, 100), 0},
		{"Log +Inf", Log(inf, 1, 100), 1},
		{"Log reversed", Log(10, 100, 1), 0.5},
		{"Log degenerate", Log(3, 2, 2), 0.5},
		{"Log bad bound", Log(3, 0, 2), nan},
		{"Log negative bound", Log(3, -1, 2), nan},
		{"Log NaN", Log(nan, 1, 2), nan},
		{"LogRatio one", LogRatio(1, 2), 0.5},
		{"LogRatio max", LogRatio(2, 2), 1},
		{"LogRatio min", LogRatio(0.5, 2), 0},
		{"LogRatio sqrt", LogRatio(math.Sqrt2, 2), 0.75},
		{"LogRatio inverted gmax", LogRatio(math.Sqrt2, 0.5), 0.75},
		{"LogRatio zero", LogRatio(0, 2), 0},
		{"LogRatio +Inf", LogRatio(inf, 2), 1},
		{"LogRatio beyond", LogRatio(10, 2), 1},
		{"LogRatio negative", LogRatio(-1, 2), nan},
		{"LogRatio NaN", LogRatio(nan, 2), nan},
		{"LogRatio gmax 1", LogRatio(1.2, 1), nan},
		{"LogRatio gmax 0", LogRatio(1.2, 0), nan},
		{"LogRatio gmax Inf", LogRatio(1.2, inf), nan},
	}
	for _, c := range cases {
		if math.IsNaN(c.want) {
			if !math.IsNaN(c.got) {
				t.Errorf("%s = %v, want NaN", c.name, c.got)
			}
			continue
		}
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("%s = %v, want %v", c.name, c.got, c.want)
		}
	}
	// A ratio and its reciprocal sit symmetrically about the centre.
	for _, g := range []float64{1.01, 1.3, 1.9} {
		if s := LogRatio(g, 2) + LogRatio(1/g, 2); math.Abs(s-1) > 1e-12 {
			t.Errorf("LogRatio(%v) and LogRatio(1/%v) sum to %v", g, g, s)
		}
	}
}

// Writes each scale as a 256×24 strip, plus the categorical colours and
// the reserved ones, as PNG (image/png) for a person to look at; the files
// stay in the test's temporary directory, or are kept in the directory
// named by COLORMAP_STRIPS when that is set.
func TestStripsPNG(t *testing.T) {
	dir := t.TempDir()
	if d := os.Getenv("COLORMAP_STRIPS"); d != "" {
		dir = d
	}
	const w, h = 256, 24
	write := func(name string, at func(x int) color.RGBA) {
		img := image.NewRGBA(image.Rect(0, 0, w, h))
		for x := range w {
			c := at(x)
			for y := range h {
				img.SetRGBA(x, y, c)
			}
		}
		path := filepath.Join(dir, name+".png")
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		if err := png.Encode(f, img); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
		// Read it back: the file is a valid PNG with the colours drawn.
		f, err = os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		back, err := png.Decode(f)
		if err != nil {
			t.Fatal(err)
		}
		for _, x := range []int{0, w / 2, w - 1} {
			if !sameColor(back.At(x, h/2), at(x)) {
				t.Errorf("%s: pixel %d is %v, want %v", name, x, back.At(x, h/2), at(x))
			}
		}
	}
	for _, m := range allMaps() {
		tab := m.Table(w)
		write(m.Name, func(x int) color.RGBA { return tab[x] })
	}
	const cells = OrderCount + 2
	write("order", func(x int) color.RGBA {
		switch i := x * cells / w; {
		case i < OrderCount:
			return Order(i)
		case i == OrderCount:
			return NoHit
		default:
			return Shadow
		}
	})
}

// LogScale is Log with the bounds' logarithms taken once: the same bits
// for every value, bound and special case.
func TestLogScaleEqualsLog(t *testing.T) {
	bounds := [][2]float64{{1, 30}, {30, 1}, {2.3e-5, 0.23}, {1, 1}, {0, 1}, {-1, 2}, {1, math.Inf(1)}, {math.NaN(), 1}}
	vals := []float64{0, -1, 1e-300, 1e-5, 0.5, 1, 2.3e-5, 0.23, 3, 30, 31, 1e300, math.Inf(1), math.Inf(-1), math.NaN()}
	for v := 1e-6; v < 100; v *= 1.0137 {
		vals = append(vals, v)
	}
	for _, b := range bounds {
		f := LogScale(b[0], b[1])
		for _, v := range vals {
			want, got := Log(v, b[0], b[1]), f(v)
			if math.Float64bits(want) != math.Float64bits(got) && !(math.IsNaN(want) && math.IsNaN(got)) {
				t.Errorf("LogScale(%v, %v)(%v) = %v, Log gives %v", b[0], b[1], v, got, want)
			}
		}
	}
}

// clamp01 is math.Max(0, math.Min(1, v)) bit for bit, signed zeros,
// infinities and NaN included.
func TestClamp01(t *testing.T) {
	for _, v := range []float64{math.NaN(), math.Inf(-1), -2, -1e-300, math.Copysign(0, -1), 0, 5e-324, 0.3, 1 - 1e-16, 1, 1 + 1e-15, 7, math.Inf(1)} {
		want := math.Max(0, math.Min(1, v))
		if got := clamp01(v); math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
			t.Errorf("clamp01(%v) = %v, want %v", v, got, want)
		}
	}
}
