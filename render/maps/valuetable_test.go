package maps

import (
	"bytes"
	"context"
	"image/png"
	"math"
	"math/rand/v2"
	"testing"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// The colour table by the value's bits gives, wherever it answers, the
// colour the scale gives directly (colormap.Map.At of the position):
// checked for log, split-log and linear positions over values spread
// through the float32 range, the table's edges and every cell boundary
// of a sample of cells.
func TestValueTableIsTheDirectColour(t *testing.T) {
	cases := []struct {
		name  string
		scale colormap.Map
		pos   func(float64) float64
		table bool // a table is expected
	}{
		{"log 4 decades", colormap.Sequential, colormap.LogScale(2.5e-4, 2.5), true},
		{"log 30 decades", colormap.Sequential, colormap.LogScale(1e-30, 1), true},
		{"log radius", colormap.Sequential, colormap.LogScale(1.24, 30), true},
		{"split log g", colormap.Redshift, Scales{GMin: 0.17, GMax: 1.24}.gPositioner(), true},
		{"split log g narrow", colormap.Redshift, Scales{GMin: 0.95, GMax: 1.05}.gPositioner(), true},
		{"linear g", colormap.Redshift, Scales{GMin: 0.4, GMax: 1.3, GLinear: true}.gPositioner(), true},
		{"linear from 1", colormap.Sequential, func(x float64) float64 { return colormap.Linear(x, 1, 7) }, true},
		{"linear from 0", colormap.Sequential, func(x float64) float64 { return colormap.Linear(x, 0, 3) }, true},
		{"bad bounds", colormap.Sequential, colormap.LogScale(-1, 1), false},
	}
	r := rand.New(rand.NewPCG(7, 7))
	for _, c := range cases {
		vt, ok := newValueTable(c.scale, c.pos)
		if ok != c.table {
			t.Errorf("%s: table made %v, want %v", c.name, ok, c.table)
		}
		if !ok {
			continue
		}
		values := []uint32{1, vt.lo - 1, vt.lo, vt.lo + 1, vt.hi - 1, vt.hi, vt.hi + 1, maxFinite32}
		for range 200000 {
			values = append(values, r.Uint32N(maxFinite32)+1, vt.lo+r.Uint32N(vt.hi-vt.lo+1))
		}
		for i := 0; i < vt.n; i += 1 + vt.n/4000 {
			e := vt.lo + uint32(i)<<vt.shift
			values = append(values, e-1, e, e+1)
		}
		answered := 0
		for _, b := range values {
			v := math.Float32frombits(b)
			got, ok := vt.colour(v)
			if !ok {
				continue
			}
			answered++
			if want := c.scale.At(c.pos(float64(v))); got != want {
				t.Fatalf("%s: value %g (bits %#x): table %v, direct %v", c.name, v, b, got, want)
			}
		}
		if answered < len(values)*9/10 {
			t.Errorf("%s: the table answered %d of %d values", c.name, answered, len(values))
		}
	}
}

// The pixel-exact PNG of a map drawn with the colour table is the direct
// evaluation of every pixel (Classify, then the scale's At or the class's
// colour) within 1 level per channel, over several maps and scales (log
// and linear intensity, split and linear redshift, fixed and automatic
// ranges). The PNG is decoded with image/png, an independent reader.
func TestBareMapIsTheDirectColour(t *testing.T) {
	n := 512 // large enough for the table (tableMinPixels)
	f := renderDefault(t, func(s *scene.Scene) {
		s.Hole.Spin, s.Observer.InclinationDeg = 0.94, 63
		s.Screen.Width, s.Screen.Height = n, n
	})
	if f.W*f.H < tableMinPixels {
		t.Fatalf("a %d² frame is drawn without the table", n)
	}
	auto := AutoScales(f)
	fixed := Scales{GMin: 0.3, GMax: 1.2, IMax: auto.IMax / 3, IDecades: 2, RMin: 2, RMax: 12}
	linear := f.Res
	linear.Output.IntensityScale = "linear"
	fl := *f
	fl.Res = linear
	frames := []struct {
		name string
		f    *pixels.Frame
	}{{"log intensity", f}, {"linear intensity", &fl}}
	for _, fr := range frames {
		for _, sc := range []struct {
			name string
			sc   Scales
		}{{"auto", Scales{}}, {"fixed", fixed}, {"linear g", Scales{GLinear: true}}, {"fixed linear g", func() Scales { x := fixed; x.GLinear = true; return x }()}} {
			for _, name := range []string{"redshift", "intensity", "radius", "order", "shadow"} {
				m, err := Lookup(name)
				if err != nil {
					t.Fatal(err)
				}
				var buf bytes.Buffer
				if err := figure.EncodePNG(&buf, m.Image(fr.f, sc.sc)); err != nil {
					t.Fatal(err)
				}
				img, err := png.Decode(&buf)
				if err != nil {
					t.Fatal(err)
				}
				class, pos := m.Classify(fr.f, sc.sc)
				worst, moved := 0, 0
				for k := range class {
					want := m.colour(class[k], pos[k])
					r, g, b, _ := img.At(k%fr.f.W, k/fr.f.W).RGBA()
					d := max(absDiff(r>>8, uint32(want.R)), absDiff(g>>8, uint32(want.G)), absDiff(b>>8, uint32(want.B)))
					if d > 0 {
						moved++
					}
					worst = max(worst, int(d))
				}
				if worst > 1 {
					t.Errorf("%s, %s scales, %s: a pixel is %d levels from the direct colour (%d pixels differ)", fr.name, sc.name, name, worst, moved)
				}
				if moved > 0 {
					t.Logf("%s, %s scales, %s: %d pixels within 1 level of the direct colour", fr.name, sc.name, name, moved)
				}
			}
		}
	}
}

// renderDefault renders the default scene as changed by edit, failing the
// test on an error.
func renderDefault(t *testing.T, edit func(*scene.Scene)) *pixels.Frame {
	t.Helper()
	s := scene.Default()
	edit(&s)
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	return f
}
