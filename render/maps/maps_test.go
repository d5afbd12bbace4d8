package maps

import (
	"context"
	"image"
	"math"
	"slices"
	"testing"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// The table of maps and the scene's list of map names are the same list.
func TestTableMatchesSceneNames(t *testing.T) {
	if got := Names(); !slices.Equal(got, scene.MapNames) {
		t.Fatalf("maps table %v, scene.MapNames %v", got, scene.MapNames)
	}
	if _, err := Lookup("no-such-map"); err == nil {
		t.Error("Lookup of an unknown name succeeded")
	}
}

func sameColor(a, b interface{ RGBA() (r, g, b, a uint32) }) bool {
	r1, g1, b1, a1 := a.RGBA()
	r2, g2, b2, a2 := b.RGBA()
	return r1 == r2 && g1 == g2 && b1 == b2 && a1 == a2
}

// Bookkeeping: the palette images show what the pixel-exact images show:
// the same reserved colours exactly, the same categorical colours
// exactly, and continuous colours up to the palette's 254 levels.
func TestIndexedMatchesBare(t *testing.T) {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 48, 40, 40
	s.Observer.InclinationDeg = 75
	mass, dist, edd := 10.0, 8.0, 0.1 // a thermal disk, for the temperature maps
	s.Hole.MassSolar, s.Hole.DistanceKpc, s.Thermal.EddingtonRatio = &mass, &dist, &edd
	s.Output.Maps = scene.MapNames
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	f, err := pixels.RenderScene(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	sc := AutoScales(f)
	sc.FluxMax = 1
	for _, name := range scene.MapNames {
		m, err := Lookup(name)
		if err != nil {
			t.Fatal(err)
		}
		bare := m.Image(f, sc)
		idx := m.Indexed(f, sc)
		continuous := name == "redshift" || name == "intensity" || name == "radius" || name == "delay" || name == "temperature" || name == "color-temperature" || name == scene.PolarisationMap
		seen := map[uint8]bool{}
		for k := 0; k < f.W*f.H; k++ {
			x, y := k%f.W, k/f.W
			i := idx.ColorIndexAt(x, y)
			seen[i] = true
			want, got := bare.RGBAAt(x, y), idx.Palette[i]
			reserved := i == colormap.NoHitIndex || i == colormap.ShadowIndex
			if !continuous || reserved {
				if !sameColor(want, got) {
					t.Fatalf("%s pixel %d: palette colour %v (index %d), bare %v", name, k, got, i, want)
				}
				continue
			}
			if want == colormap.NoHit || want == colormap.Shadow {
				t.Fatalf("%s pixel %d: bare is reserved %v, palette index %d", name, k, want, i)
			}
			r1, g1, b1, _ := got.RGBA()
			d := max(absDiff(r1>>8, uint32(want.R)), absDiff(g1>>8, uint32(want.G)), absDiff(b1>>8, uint32(want.B)))
			if d > 10 {
				t.Fatalf("%s pixel %d: palette colour %v, bare %v", name, k, got, want)
			}
		}
		if len(seen) < 3 {
			t.Errorf("%s: only %d palette entries used", name, len(seen))
		}
	}
}

func absDiff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}

// gPositioner is GPosition with the logarithms of the bounds taken once:
// the same bits for every g.
func TestGPositionerEqualsGPosition(t *testing.T) {
	for _, sc := range []Scales{{GMin: 0.3, GMax: 1.7}, {GMin: 0.95, GMax: 1.05}, {GMin: 1 / 1.5, GMax: 1.5}} {
		pos := sc.gPositioner()
		for g := 0.01; g < 5; g *= 1.0071 {
			if a, b := sc.GPosition(g), pos(g); math.Float64bits(a) != math.Float64bits(b) {
				t.Fatalf("%+v: g = %v: gPositioner %v, GPosition %v", sc, g, b, a)
			}
		}
	}
}

// A map reads only the records it says it needs: from a frame that keeps
// only those, its image and figure are the same as from a frame that
// keeps every record (with the crossings an opaque disk hides).
func TestMapNeedsAreEnough(t *testing.T) {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 40, 36
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	full, err := pixels.Render(context.Background(), r, nil, pixels.KeepAll|pixels.KeepBehind|pixels.KeepStokes)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range scene.MapNames {
		m, _ := Lookup(name)
		part, err := pixels.Render(context.Background(), r, nil, m.Needs())
		if err != nil {
			t.Fatal(err)
		}
		if part.Has(pixels.KeepAll) {
			t.Fatalf("%s: the frame kept every record although only %b was asked for", name, m.Needs())
		}
		if a, b := m.Image(full, Scales{}), m.Image(part, Scales{}); !slices.Equal(a.Pix, b.Pix) {
			t.Errorf("%s: images differ", name)
		}
		a, err := figure.DrawPanel(m.Panel(full, Scales{}), 0)
		if err != nil {
			t.Fatal(err)
		}
		b, err := figure.DrawPanel(m.Panel(part, Scales{}), 0)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(a.Pix, b.Pix) {
			t.Errorf("%s: figures differ", name)
		}
		fa, err := m.Figure(full, Scales{}, m.Image(full, Scales{}))
		if err != nil {
			t.Fatal(err)
		}
		fb, err := m.Figure(part, Scales{}, m.Image(part, Scales{}))
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(fa.(*image.RGBA).Pix, fb.(*image.RGBA).Pix) {
			t.Errorf("%s: drawn figures differ", name)
		}
	}
}
