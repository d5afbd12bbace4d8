package figure

import (
	"image"
	"image/color"
	"slices"
	"testing"
)

// TestArrowDrawn draws a horizontal arrow over a black map and checks the
// figure: white along the shaft, nothing beyond its ends, and a head at
// the last point that is wider than the shaft.
func TestArrowDrawn(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 40, 40))
	for k := 3; k < len(img.Pix); k += 4 {
		img.Pix[k] = 255 // opaque black
	}
	p := Panel{Image: img, X: Axis{Min: -1, Max: 1}, Y: Axis{Min: -1, Max: 1},
		Arrows: []Arrow{{Points: [][2]float64{{-0.5, 0}, {0.5, 0}}, Label: "axis", LabelAt: [2]float64{0, 0.7}}}}
	out, r, err := drawPanel(p, 20)
	if err != nil {
		t.Fatal(err)
	}
	at := func(x, y float64) (int, int) { // data → figure pixel
		return r.Min.X + int((x+1)/2*float64(r.Dx())), r.Min.Y + int((1-y)/2*float64(r.Dy()))
	}
	light := func(c color.RGBA) bool { return c.R > 200 && c.G > 200 && c.B > 200 }
	// The white extent of the column through data x, around y = 0.
	extent := func(x float64) int {
		i, j0 := at(x, 0)
		n := 0
		for j := j0 - 40; j <= j0+40; j++ {
			if light(out.RGBAAt(i, j)) {
				n++
			}
		}
		return n
	}
	for _, x := range []float64{-0.4, -0.2, 0, 0.2} {
		if extent(x) == 0 {
			t.Errorf("no white shaft at x = %v", x)
		}
	}
	if n := extent(-0.7); n != 0 {
		t.Errorf("white beyond the arrow's tail at x = -0.7: %d pixels", n)
	}
	if n := extent(0.7); n != 0 {
		t.Errorf("white beyond the arrow's head at x = 0.7: %d pixels", n)
	}
	if shaft, head := extent(0), extent(0.44); !(head > shaft+2) {
		t.Errorf("head %d pixels tall just behind the tip, shaft %d: no arrow head", head, shaft)
	}
	// The label box is light.
	if i, j := at(0, 0.7); !light(out.RGBAAt(i, j)) {
		t.Errorf("no label box at the label point: %v", out.RGBAAt(i, j))
	}
}

// TestDrawGrid checks the grid layout: the grid as wide as the panels'
// Size, each cell an equal share of it drawn as DrawPanel draws the panel
// at that width, the caption under the cells, and clear errors for bad
// input.
func TestDrawGrid(t *testing.T) {
	panel := func(w, h int) Panel {
		return Panel{Image: testMap(w, h), X: Axis{Min: -1, Max: 1, Label: "α [M]"}, Y: Axis{Min: -1, Max: 1, Label: "β [M]"}, Title: "n"}
	}
	ps := []Panel{panel(30, 30), panel(30, 30), panel(30, 30)}
	cell := ps[0]
	cell.Size = Size{WidthMM: SingleColumnMM / 2}
	one, err := DrawPanel(cell, 0)
	if err != nil {
		t.Fatal(err)
	}
	g, err := DrawGrid("title", "subtitle", ps, 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	w, h := one.Bounds().Dx(), one.Bounds().Dy()
	if gw, gh := g.Bounds().Dx(), g.Bounds().Dy(); gw != (Size{}).Pixels() || w > gw/2 || gh <= 2*h || gh > 2*h+200 {
		t.Errorf("grid %d×%d for 2×2 cells of %d×%d", gw, gh, w, h)
	}
	// The first cell is the first panel, pixel for pixel.
	for y := 0; y < h; y++ {
		if !slices.Equal(one.Pix[y*one.Stride:y*one.Stride+4*w], g.Pix[y*g.Stride:y*g.Stride+4*w]) {
			t.Fatalf("row %d of the first cell differs from the panel", y)
		}
	}
	again, _ := DrawGrid("title", "subtitle", ps, 2, 0)
	if !slices.Equal(g.Pix, again.Pix) {
		t.Error("the grid is not deterministic")
	}
	for _, c := range []struct {
		name   string
		panels []Panel
		cols   int
	}{{"no panels", nil, 2}, {"no columns", ps, 0}, {"no image", []Panel{{}}, 1}, {"bad panel", []Panel{{Image: testMap(4, 4)}}, 1}} {
		if img, err := DrawGrid("t", "", c.panels, c.cols, 0); err == nil || img != nil {
			t.Errorf("%s: got an image %v, error %v", c.name, img != nil, err)
		}
	}
}
