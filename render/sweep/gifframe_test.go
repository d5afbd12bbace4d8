package sweep

import (
	"bytes"
	"context"
	"image"
	"image/color"
	"image/gif"
	"math"
	"path/filepath"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/scene"
)

// The merged GIF's frames are the maps with a strip below: the map part
// is the frame's palette image exactly; the strip's first line (the swept
// value) differs from frame to frame; the colour bar below it is the
// same on every frame and runs through the scale's palette entries in
// order. The spectra plot names its colour bar in words.
func TestGIFFramesCarryValueAndBar(t *testing.T) {
	dir := t.TempDir()
	const w, h = 96, 40
	p := testPlan(t, dir, []string{"spin=0.5:0.99:3"}, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height = w, h
		s.Output.Maps = []string{"redshift", "order"}
		s.Output.Formats = []string{"csv"}
	}, maps.Scales{})
	mustRun(t, p, Options{})
	if _, err := Merge(context.Background(), dir, MergeOptions{GIFs: []string{"redshift", "order"}}); err != nil {
		t.Fatal(err)
	}
	files := dirFiles(t, dir, "frame-")
	em := stripEm(w)
	pad := math.Round(0.5 * em)
	barTop := int(math.Round(pad + 1.5*em))
	barBottom := barTop + int(math.Round(0.9*em))
	for _, name := range []string{"redshift", "order"} {
		g, err := gif.DecodeAll(bytes.NewReader(mustRead(t, filepath.Join(dir, "sweep-"+name+".gif"))))
		if err != nil {
			t.Fatal(err)
		}
		if g.Config.Width != w || g.Config.Height != h+stripHeight(w) || len(g.Image) != 3 {
			t.Fatalf("%s GIF %d×%d, %d frames; want %d×%d, 3", name, g.Config.Width, g.Config.Height, len(g.Image), w, h+stripHeight(w))
		}
		region := func(im *image.Paletted, y0, y1 int) []byte { return im.Pix[y0*im.Stride : y1*im.Stride] }
		for k, im := range g.Image {
			src := decodePNG(t, files[p.framePrefix(k)+"-"+name+"-indexed.png"]).(*image.Paletted)
			if !bytes.Equal(region(im, 0, h), src.Pix) {
				t.Errorf("%s frame %d: the map part differs from its palette image", name, k)
			}
			if k == 0 {
				continue
			}
			prev := g.Image[k-1]
			if bytes.Equal(region(im, h, h+barTop), region(prev, h, h+barTop)) {
				t.Errorf("%s frames %d and %d: the same label line", name, k-1, k)
			}
			if !bytes.Equal(region(im, h+barTop, h+barBottom), region(prev, h+barTop, h+barBottom)) {
				t.Errorf("%s frames %d and %d: different colour bars", name, k-1, k)
			}
		}
		im := g.Image[0]
		row := im.Pix[(h+(barTop+barBottom)/2)*im.Stride:][:w]
		switch name {
		case "redshift":
			// Inside the outline, the scale from its first entry to its last.
			in := row[int(pad)+1 : w-int(pad)-1]
			for i := 1; i < len(in); i++ {
				if in[i] < in[i-1] {
					t.Fatalf("redshift bar not in scale order at column %d: %v", i, in)
				}
			}
			// The outline is one pixel in from each end: a column is
			// 1/76 of the scale's 254 entries.
			if in[0] < 2 || in[0] > 10 || in[len(in)-1] < 247 {
				t.Errorf("redshift bar runs from palette entry %d to %d, want about 2 to 255", in[0], in[len(in)-1])
			}
		case "order":
			seen := map[uint8]bool{}
			for _, c := range row {
				seen[c] = true
			}
			for o := 0; o < 3; o++ {
				if !seen[uint8(2+o)] {
					t.Errorf("order key lacks the swatch of n = %d (palette entry %d)", o, 2+o)
				}
			}
			n := len(orderPalette(t))
			if !sameColor(im.Palette[n], whiteColor) || !sameColor(im.Palette[n+1], color.RGBA{0, 0, 0, 0xff}) {
				t.Errorf("order GIF palette continues with %v, %v; want white, black for the strip", im.Palette[n], im.Palette[n+1])
			}
		}
	}
	plots, err := p.spectraPlots(maps.Scales{FluxMax: 1})
	if err != nil {
		t.Fatal(err)
	}
	if got := plots[0].plot.Bar.Label; got != "spin a" {
		t.Errorf("spectra colour bar %q, want %q", got, "spin a")
	}
	if got := p.valueLabel([]float64{0.99}); got != "a = 0.99" {
		t.Errorf("frame label %q", got)
	}
}

var whiteColor = color.RGBA{0xff, 0xff, 0xff, 0xff}
