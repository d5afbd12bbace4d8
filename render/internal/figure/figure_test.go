package figure

import (
	"bytes"
	"image"
	"image/color"
	"math"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"kerrscope/colormap"
)

// parseLabel reads a tick label back as a number.
func parseLabel(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(strings.ReplaceAll(s, "−", "-"), 64)
	if err != nil {
		t.Fatalf("label %q does not parse: %v", s, err)
	}
	return v
}

func TestNiceTicks(t *testing.T) {
	ranges := [][2]float64{
		{-15, 15}, {0, 1}, {0.3, 0.7}, {-1, 1e-3}, {1, 1.5}, {2.04, 40},
		{-2.0705000005, -2.0704999995}, {1e6, 3e6}, {-7e-8, -2e-8},
		{-3e12, 5e12}, {0.999, 1.001}, {123456, 123457}, {-1e-5, 1e-5},
		{3, 8}, {0, 35.7},
	}
	for _, r := range ranges {
		lo, hi := r[0], r[1]
		ts := niceTicks(lo, hi, 10)
		n := len(ts.values)
		if n < 4 || n > 10 {
			t.Errorf("[%g, %g]: %d ticks, want 4–10", lo, hi, n)
		}
		if ts.mant != 1 && ts.mant != 2 && ts.mant != 5 {
			t.Errorf("[%g, %g]: step mantissa %d", lo, hi, ts.mant)
		}
		want := float64(ts.mant) * math.Pow10(ts.exp)
		if math.Abs(ts.step-want) > 1e-12*want {
			t.Errorf("[%g, %g]: step %g is not %d×10^%d", lo, hi, ts.step, ts.mant, ts.exp)
		}
		// The ticks lie in the range, are evenly spaced and leave less
		// than a step uncovered at either end.
		tol := 1e-6 * ts.step
		if ts.values[0] < lo-tol || ts.values[n-1] > hi+tol {
			t.Errorf("[%g, %g]: ticks %v leave the range", lo, hi, ts.values)
		}
		if ts.values[0]-lo >= ts.step || hi-ts.values[n-1] >= ts.step {
			t.Errorf("[%g, %g]: ticks %v do not cover the range with step %g", lo, hi, ts.values, ts.step)
		}
		for i := 1; i < n; i++ {
			if d := ts.values[i] - ts.values[i-1]; math.Abs(d-ts.step) > 1e-6*ts.step {
				t.Errorf("[%g, %g]: spacing %g, want %g", lo, hi, d, ts.step)
			}
		}
		// Labels round-trip to the tick values and are distinct.
		f := chooseFormat(lo, hi, ts)
		seen := map[string]bool{}
		for _, v := range ts.values {
			s := f.label(v)
			got := parseLabel(t, s)*math.Pow10(f.exp) + f.offset
			if math.Abs(got-v) > 1e-6*ts.step {
				t.Errorf("[%g, %g]: label %q of %v reads back as %v", lo, hi, s, v, got)
			}
			if seen[s] {
				t.Errorf("[%g, %g]: duplicate label %q", lo, hi, s)
			}
			seen[s] = true
			if utf8.RuneCountInString(s) > 8 {
				t.Errorf("[%g, %g]: label %q longer than 8 characters", lo, hi, s)
			}
		}
	}
}

func TestNiceTicksPreferSix(t *testing.T) {
	// ±15 is best shown in fives: seven ticks.
	ts := niceTicks(-15, 15, 10)
	if ts.mant != 5 || ts.exp != 0 || len(ts.values) != 7 {
		t.Errorf("±15: step %d×10^%d with %d ticks, want 5 with 7", ts.mant, ts.exp, len(ts.values))
	}
	// A limit below four ticks still gives something usable.
	if ts := niceTicks(0, 1, 2); len(ts.values) == 0 || len(ts.values) > 2 {
		t.Errorf("max 2 ticks on [0, 1]: got %v", ts.values)
	}
}

func TestOffsetNotation(t *testing.T) {
	for _, c := range []struct {
		centre, width float64
	}{{-2.0705, 1e-9}, {-2.07, 1e-9}, {-2.0705, 1e-6}, {1e4, 1e-3}} {
		lo, hi := c.centre-c.width/2, c.centre+c.width/2
		ts := niceTicks(lo, hi, 10)
		f := chooseFormat(lo, hi, ts)
		if f.offset == 0 {
			t.Fatalf("window %g at %g: no offset (format %+v)", c.width, c.centre, f)
		}
		if math.Abs(f.offset-c.centre) > c.width {
			t.Errorf("window %g at %g: offset %v far from the window", c.width, c.centre, f.offset)
		}
		for _, v := range ts.values {
			if s := f.label(v); utf8.RuneCountInString(s) > 8 {
				t.Errorf("window %g at %g: label %q too long", c.width, c.centre, s)
			}
		}
	}
	sc := linearScale(-2.0705000005, -2.0704999995, 10, "α [M]", false)
	if want := "α + 2.0705 [10⁻¹⁰ M]"; sc.label != want {
		t.Errorf("axis label %q, want %q", sc.label, want)
	}
	for _, tk := range sc.ticks {
		if utf8.RuneCountInString(tk.label) > 8 {
			t.Errorf("tick label %q too long", tk.label)
		}
	}
	// Ordinary ranges stay plain; large and small ones get a multiplier.
	if sc := linearScale(-15, 15, 10, "α [M]", false); sc.label != "α [M]" || sc.ticks[0].label != "−15" {
		t.Errorf("±15: label %q, first tick %q", sc.label, sc.ticks[0].label)
	}
	if sc := linearScale(0, 3e6, 10, "r [cm]", false); sc.label != "r [10⁶ cm]" {
		t.Errorf("0–3e6: label %q", sc.label)
	}
	if sc := linearScale(-4e-5, -1e-5, 10, "x", false); sc.label != "x [10⁻⁵]" {
		t.Errorf("−4e-5…−1e-5: label %q", sc.label)
	}
}

func TestMarchingSquaresCircle(t *testing.T) {
	const n = 41
	const cx, cy, radius = 20.3, 19.7, 10.0
	field := make([]float32, n*n)
	for j := range n {
		for i := range n {
			field[j*n+i] = float32(math.Hypot(float64(i)+0.5-cx, float64(j)+0.5-cy))
		}
	}
	segs := contourSegments(field, n, n, radius)
	if len(segs) < 40 {
		t.Fatalf("%d segments for a circle of radius 10", len(segs))
	}
	for _, s := range segs {
		for _, p := range []point{s.a, s.b} {
			if d := math.Abs(math.Hypot(p.x-cx, p.y-cy) - radius); d > 0.5 {
				t.Errorf("endpoint (%.3f, %.3f) is %.3f px off the circle", p.x, p.y, d)
			}
		}
	}
	paths := chainSegments(segs)
	if len(paths) != 1 || !paths[0].closed {
		t.Errorf("circle chained into %d paths (first closed: %v), want one closed path", len(paths), len(paths) > 0 && paths[0].closed)
	}
	if l := pathLength(append(paths[0].pts, paths[0].pts[0])); math.Abs(l-2*math.Pi*radius) > 0.5 {
		t.Errorf("contour length %.3f, want %.3f", l, 2*math.Pi*radius)
	}

	// NaN cells are skipped: blank out the right half.
	for j := range n {
		for i := n / 2; i < n; i++ {
			field[j*n+i] = float32(math.NaN())
		}
	}
	for _, s := range contourSegments(field, n, n, radius) {
		if s.a.x > float64(n/2)+0.5 || s.b.x > float64(n/2)+0.5 {
			t.Fatalf("segment %+v reaches into the NaN half", s)
		}
	}
}

func TestMarchingSquaresSaddle(t *testing.T) {
	// Diagonal corners above the level; the mean of the corners decides
	// which pair the contour separates from the rest.
	for _, c := range []struct {
		field    []float32 // top left, top right, bottom left, bottom right
		isolated [2]point  // the corners cut off by the two segments
	}{
		{[]float32{1, 0, 0, 1}, [2]point{{1.5, 0.5}, {0.5, 1.5}}},      // mean 0.5 counts as above
		{[]float32{1, 0.2, -0.5, 1}, [2]point{{0.5, 0.5}, {1.5, 1.5}}}, // mean below
		{[]float32{0, 1, 1, 0}, [2]point{{0.5, 0.5}, {1.5, 1.5}}},
	} {
		segs := contourSegments(c.field, 2, 2, 0.5)
		if len(segs) != 2 {
			t.Fatalf("%v: %d segments, want 2", c.field, len(segs))
		}
		for k, s := range segs {
			mid := point{(s.a.x + s.b.x) / 2, (s.a.y + s.b.y) / 2}
			near := func(q point) bool { return math.Hypot(mid.x-q.x, mid.y-q.y) < 0.5 }
			if !near(c.isolated[0]) && !near(c.isolated[1]) {
				t.Errorf("%v: segment %d (%v) cuts off neither %v", c.field, k, s, c.isolated)
			}
		}
	}
}

// testMap is a deterministic w×h image in the diverging scale.
func testMap(w, h int) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	for j := range h {
		for i := range w {
			img.SetRGBA(i, j, colormap.Redshift.At(float64((i*7+j*13)%w)/float64(w)))
		}
	}
	img.SetRGBA(0, 0, colormap.Shadow)
	img.SetRGBA(w-1, h-1, colormap.NoHit)
	return img
}

// fullPanel is a panel that uses every decoration.
func fullPanel() Panel {
	const n = 40
	field := make([]float32, n*n)
	for j := range n {
		for i := range n {
			field[j*n+i] = float32(math.Hypot(float64(i)-19.5, float64(j)-19.5))
		}
	}
	field[5] = float32(math.NaN())
	var circle [][2]float64
	for k := range 64 {
		phi := 2 * math.Pi * float64(k) / 64
		circle = append(circle, [2]float64{5.196 * math.Cos(phi), 5.196 * math.Sin(phi)})
	}
	return Panel{
		Image:    testMap(n, n),
		X:        Axis{Min: -15, Max: 15, Label: "α [M]", Secondary: &SecondaryScale{Factor: 3.8, Label: "α [µas]"}},
		Y:        Axis{Min: -15, Max: 15, Label: "β [M]", Secondary: &SecondaryScale{Factor: -3.8, Label: "β [µas]"}},
		Title:    "redshift factor g",
		Subtitle: "a = 0.94, i = 63°",
		Bar: &ColorBar{Colors: colormap.Redshift.Table(64), Label: "g",
			Ticks: []Tick{{0, "0.5"}, {0.5, "1"}, {1, "2"}}},
		Lines:    []Polyline{{Points: circle, Dashed: true, Closed: true}, {Points: [][2]float64{{0, 0}, {math.NaN(), 1}, {3, 3}, {4, 1}}}},
		Contours: []Contour{{Field: field, W: n, H: n, Level: 10, Label: "r = 10"}},
		Legend:   []LegendEntry{{Label: "shadow edge", Dashed: true}},
	}
}

func TestDrawPanelMapPixels(t *testing.T) {
	for _, scale := range []float64{1, 3, 2.5, 0} {
		p := Panel{
			Image: testMap(37, 23),
			X:     Axis{Min: -15, Max: 15, Label: "α [M]"},
			Y:     Axis{Min: -10, Max: 10, Label: "β [M]"},
			Title: "t", Bar: &ColorBar{Colors: colormap.Sequential.Table(16)},
		}
		img, r, err := drawPanel(p, scale)
		if err != nil {
			t.Fatal(err)
		}
		if img.Bounds().Dx() <= r.Dx() || img.Bounds().Dy() <= r.Dy() || !r.In(img.Bounds()) {
			t.Fatalf("scale %v: figure %v does not surround the map %v", scale, img.Bounds(), r)
		}
		s := scale
		if s <= 0 {
			// The fixed canvas: the figure is the default width and the
			// map keeps its aspect.
			if w := img.Bounds().Dx(); w != (Size{}).Pixels() {
				t.Errorf("figure %d px wide, want the single-column %d", w, (Size{}).Pixels())
			}
			s = float64(r.Dx()) / 37
			if math.Abs(float64(r.Dy())-23*s) > 1 {
				t.Errorf("map drawn %v, not the aspect of 37×23", r.Size())
			}
		} else if r.Dx() != int(math.Round(37*s)) || r.Dy() != int(math.Round(23*s)) {
			t.Errorf("scale %v: map drawn %v", s, r.Size())
		}
		src := p.Image.(*image.RGBA)
		for y := r.Min.Y; y < r.Max.Y; y++ {
			for x := r.Min.X; x < r.Max.X; x++ {
				sx := int((float64(x-r.Min.X) + 0.5) * 37 / float64(r.Dx()))
				sy := int((float64(y-r.Min.Y) + 0.5) * 23 / float64(r.Dy()))
				if got, want := img.RGBAAt(x, y), src.RGBAAt(sx, sy); got != want {
					t.Fatalf("scale %v: figure pixel (%d, %d) = %v, want map pixel (%d, %d) = %v", s, x, y, got, sx, sy, want)
				}
			}
		}
		// The frame is drawn just outside the map.
		if c := img.RGBAAt(r.Min.X-1, r.Min.Y+r.Dy()/2); c != black {
			t.Errorf("scale %v: pixel left of the map is %v, want the black frame", s, c)
		}
		if c := img.RGBAAt(0, 0); c != white {
			t.Errorf("scale %v: background %v", s, c)
		}
	}
}

func TestDeterministic(t *testing.T) {
	a, err := DrawPanel(fullPanel(), 6)
	if err != nil {
		t.Fatal(err)
	}
	b, err := DrawPanel(fullPanel(), 6)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Pix, b.Pix) || a.Bounds() != b.Bounds() {
		t.Error("two drawings of the same panel differ")
	}
	var pa, pb bytes.Buffer
	if err := EncodePNG(&pa, a); err != nil {
		t.Fatal(err)
	}
	if err := EncodePNG(&pb, b); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(pa.Bytes(), pb.Bytes()) {
		t.Error("PNG bytes differ")
	}

	p := testPlot()
	c, err := DrawPlot(p)
	if err != nil {
		t.Fatal(err)
	}
	d, err := DrawPlot(testPlot())
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(c.Pix, d.Pix) {
		t.Error("two drawings of the same plot differ")
	}
	// The default canvas: a single column wide, the plot 0.7 times as
	// tall, the caption below.
	if w, h := c.Bounds().Dx(), c.Bounds().Dy(); w != (Size{}).Pixels() || h <= int(plotAspect*float64(w)) {
		t.Errorf("default plot size %v", c.Bounds())
	}
}

// testPlot is a plot with several series, a marker and a legend.
func testPlot() Plot {
	var s []Series
	for k := range 3 {
		var x, y []float64
		for i := range 200 {
			e := 3 + 5*float64(i)/199
			x = append(x, e)
			y = append(y, math.Exp(-(e-6.4)*(e-6.4)*float64(k+1)))
		}
		y[50] = math.NaN()
		s = append(s, Series{X: x, Y: y, Label: "series " + strconv.Itoa(k), Color: colormap.Order(k), Dashed: k == 1})
	}
	return Plot{
		Title: "line", XLabel: "E [keV]", YLabel: "F_E [arbitrary units]",
		Series: s, Legend: true,
		VLines: []VLine{{X: 6.4, Label: "6.4 keV rest", Dashed: true}},
	}
}

func TestDrawPlotVariants(t *testing.T) {
	p := testPlot()
	p.LogY = true
	if _, err := DrawPlot(p); err != nil {
		t.Errorf("log y: %v", err)
	}
	p = testPlot()
	p.Legend = false
	p.Bar = &ColorBar{Colors: colormap.Sequential.Table(32), Ticks: []Tick{{0, "0°"}, {1, "90°"}}, Label: "i"}
	p.Width, p.Height = 640, 400
	img, err := DrawPlot(p)
	if err != nil {
		t.Fatalf("with bar: %v", err)
	}
	if img.Bounds().Dx() != 640 || img.Bounds().Dy() <= 400 || img.Bounds().Dy() > 640 {
		t.Errorf("size %v, want 640 wide, 400 above the bar and caption", img.Bounds())
	}
	p.Title, p.Bar = "", nil
	if img, err = DrawPlot(p); err != nil || img.Bounds().Dy() != 400 {
		t.Errorf("without a bar and a caption: %v, %v; want 640×400", err, img.Bounds())
	}
	p = testPlot()
	p.XMin, p.XMax, p.YMin, p.YMax = 5, 7, -0.5, 1.5
	if _, err := DrawPlot(p); err != nil {
		t.Errorf("explicit ranges: %v", err)
	}
}

func TestDrawPanelFull(t *testing.T) {
	img, err := DrawPanel(fullPanel(), 0)
	if err != nil {
		t.Fatal(err)
	}
	if img.Bounds().Dx() < 600 {
		t.Errorf("figure %v too small", img.Bounds())
	}
	p := fullPanel()
	p.Bar = &ColorBar{Label: "order", Swatches: []Swatch{{colormap.Order(0), "0"}, {colormap.NoHit, "no hit"}}}
	if _, err := DrawPanel(p, 2); err != nil {
		t.Errorf("swatches: %v", err)
	}
	// A tiny map at scale 1 and a long title still fit.
	p = Panel{
		Image: testMap(3, 2),
		X:     Axis{Min: -2.0705000005, Max: -2.0704999995, Label: "α [M]"},
		Y:     Axis{Min: 1e6, Max: 3e6, Label: "β [M]"},
		Title: "a title that is much wider than the map it sits on",
	}
	if _, err := DrawPanel(p, 1); err != nil {
		t.Errorf("tiny map: %v", err)
	}
}

func TestBadInput(t *testing.T) {
	good := func() Panel {
		return Panel{Image: testMap(8, 8), X: Axis{Min: -1, Max: 1}, Y: Axis{Min: -1, Max: 1}}
	}
	if _, err := DrawPanel(good(), 1); err != nil {
		t.Fatalf("good panel: %v", err)
	}
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name   string
		mutate func(p *Panel)
		scale  float64
	}{
		{"nil image", func(p *Panel) { p.Image = nil }, 1},
		{"empty image", func(p *Panel) { p.Image = image.NewRGBA(image.Rect(0, 0, 0, 5)) }, 1},
		{"min = max", func(p *Panel) { p.X.Max = p.X.Min }, 1},
		{"min > max", func(p *Panel) { p.Y.Min, p.Y.Max = 2, 1 }, 1},
		{"NaN min", func(p *Panel) { p.X.Min = nan }, 1},
		{"Inf max", func(p *Panel) { p.Y.Max = inf }, 1},
		{"overflowing span", func(p *Panel) { p.X.Min, p.X.Max = -1.7e308, 1.7e308 }, 1},
		{"too narrow", func(p *Panel) { p.X.Min, p.X.Max = 1, 1+1e-15 }, 1},
		{"zero factor", func(p *Panel) { p.X.Secondary = &SecondaryScale{} }, 1},
		{"NaN factor", func(p *Panel) { p.Y.Secondary = &SecondaryScale{Factor: nan} }, 1},
		{"short contour field", func(p *Panel) { p.Contours = []Contour{{Field: make([]float32, 63), W: 8, H: 8}} }, 1},
		{"zero contour width", func(p *Panel) { p.Contours = []Contour{{W: 0, H: 8}} }, 1},
		{"NaN contour level", func(p *Panel) { p.Contours = []Contour{{Field: make([]float32, 64), W: 8, H: 8, Level: nan}} }, 1},
		{"empty bar", func(p *Panel) { p.Bar = &ColorBar{} }, 1},
		{"bar tick outside", func(p *Panel) { p.Bar = &ColorBar{Colors: []color.RGBA{white}, Ticks: []Tick{{T: 1.5}}} }, 1},
		{"bar tick NaN", func(p *Panel) { p.Bar = &ColorBar{Colors: []color.RGBA{white}, Ticks: []Tick{{T: nan}}} }, 1},
		{"bar both kinds", func(p *Panel) { p.Bar = &ColorBar{Colors: []color.RGBA{white}, Swatches: []Swatch{{}}} }, 1},
		{"arrow of one point", func(p *Panel) { p.Arrows = []Arrow{{Points: [][2]float64{{0, 0}}}} }, 1},
		{"arrow NaN point", func(p *Panel) { p.Arrows = []Arrow{{Points: [][2]float64{{0, 0}, {nan, 1}}}} }, 1},
		{"arrow infinite label", func(p *Panel) {
			p.Arrows = []Arrow{{Points: [][2]float64{{0, 0}, {0, 1}}, LabelAt: [2]float64{inf, 0}}}
		}, 1},
		{"arrow without direction", func(p *Panel) { p.Arrows = []Arrow{{Points: [][2]float64{{0, 0}, {1, 1}, {1, 1}}}} }, 1},
		{"huge scale", func(p *Panel) {}, 1e6},
		{"NaN scale", func(p *Panel) {}, nan},
		{"infinite scale", func(p *Panel) {}, inf},
	}
	for _, c := range cases {
		p := good()
		c.mutate(&p)
		img, err := DrawPanel(p, c.scale)
		if err == nil || img != nil {
			t.Errorf("%s: got image %v, error %v; want an error", c.name, img != nil, err)
		}
	}

	goodPlot := func() Plot {
		return Plot{Series: []Series{{X: []float64{1, 2, 3}, Y: []float64{1, 4, 2}}}}
	}
	if _, err := DrawPlot(goodPlot()); err != nil {
		t.Fatalf("good plot: %v", err)
	}
	plotCases := map[string]func(p *Plot){
		"no data":        func(p *Plot) { p.Series = nil },
		"all NaN":        func(p *Plot) { p.Series[0].Y = []float64{nan, nan, nan} },
		"length":         func(p *Plot) { p.Series[0].Y = p.Series[0].Y[:2] },
		"x min > max":    func(p *Plot) { p.XMin, p.XMax = 3, 1 },
		"y NaN":          func(p *Plot) { p.YMin, p.YMax = nan, 1 },
		"log y negative": func(p *Plot) { p.LogY, p.YMin, p.YMax = true, -1, 10 },
		"log y no data":  func(p *Plot) { p.LogY, p.Series[0].Y = true, []float64{0, -1, 0} },
		"negative size":  func(p *Plot) { p.Width, p.Height = -5, 600 },
		"tiny size":      func(p *Plot) { p.Width, p.Height = 20, 20 },
		"vline NaN":      func(p *Plot) { p.VLines = []VLine{{X: nan}} },
		"bad bar":        func(p *Plot) { p.Bar = &ColorBar{} },
	}
	for name, mutate := range plotCases {
		p := goodPlot()
		mutate(&p)
		img, err := DrawPlot(p)
		if err == nil || img != nil {
			t.Errorf("plot %s: got image %v, error %v; want an error", name, img != nil, err)
		}
	}
}

func TestTextHelpers(t *testing.T) {
	if got := powerOfTen(-10); got != "10⁻¹⁰" {
		t.Errorf("powerOfTen(-10) = %q", got)
	}
	if got := formatMagnitude(-2.0705, -8); got != "2.0705" {
		t.Errorf("formatMagnitude = %q", got)
	}
	if got := formatMagnitude(1.2345e12, 8); got != "1.2345×10¹²" {
		t.Errorf("formatMagnitude large = %q", got)
	}
	if err := loadFonts(); err != nil {
		t.Fatal(err)
	}
	for _, r := range "αβµθ°⁻²−×–" {
		if fonts[faceRegular].Index(r) == 0 {
			t.Errorf("Go Regular has no glyph for %q", r)
		}
	}
	if got := decade(1000); got != 3 {
		t.Errorf("decade(1000) = %d", got)
	}
	if got := decade(0.001); got != -3 {
		t.Errorf("decade(0.001) = %d", got)
	}
}

func TestExtremeRangesDoNotPanic(t *testing.T) {
	ranges := [][2]float64{
		{-8e307, 8e307}, {1e307, 1.7e308}, {-1e-290, 1e-290}, {1e-300, 3e-300},
		{1e15, 1e15 + 1}, {-1e15 - 1, -1e15}, {0, 1e-299}, {-5, -4.999999999},
		{123456789, 123456790}, {-1, 1e300},
	}
	for _, r := range ranges {
		p := Panel{Image: testMap(4, 4), X: Axis{Min: r[0], Max: r[1], Label: "x [u]"}, Y: Axis{Min: r[0], Max: r[1]}}
		img, err := DrawPanel(p, 10)
		if err == nil && img == nil {
			t.Errorf("%v: no image and no error", r)
		}
		if err != nil {
			continue
		}
		ts := niceTicks(r[0], r[1], 10)
		if len(ts.values) == 0 {
			t.Errorf("%v: drawn without ticks", r)
		}
		pl := Plot{Series: []Series{{X: []float64{r[0], r[1]}, Y: []float64{r[0], r[1]}}}, LogY: r[0] > 0}
		if _, err := DrawPlot(pl); err != nil {
			t.Logf("%v: plot: %v", r, err)
		}
	}
}
