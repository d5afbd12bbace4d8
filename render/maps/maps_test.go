package maps

import (
	"context"
	"slices"
	"testing"

	"kerrscope/colormap"
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
		continuous := name == "redshift" || name == "intensity" || name == "radius" || name == "delay"
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
