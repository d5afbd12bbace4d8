package outputs

import (
	"context"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// TestMemoryEstimateCoversLiveData checks MemoryEstimate against the
// renderer's own allocations: from a one-pixel image to a larger one, the
// estimate must grow by at least the bytes of the frame's records, counted
// from the slices themselves, plus any pixel data the FITS images hold
// (none: they are streamed row by row).
func TestMemoryEstimateCoversLiveData(t *testing.T) {
	live := func(w, h, n int) (int64, int64) {
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height, s.Disk.Orders = w, h, n
			s.Output.Formats = []string{"fits"}
		})
		f, err := pixels.Render(context.Background(), r, nil)
		if err != nil {
			t.Fatal(err)
		}
		b := int64(len(f.Fate) + len(f.First))
		for o := 0; o < f.Orders; o++ {
			b += 4 * int64(len(f.R[o])+len(f.G[o])+len(f.Line[o])+len(f.Bol[o]))
		}
		for _, im := range fitsImages(f) {
			b += 4 * int64(len(im.Data))
		}
		return b, MemoryEstimate(r, Set{Manifest: true}, 2)
	}
	for _, c := range [][3]int{{40, 30, 1}, {64, 64, 3}, {33, 17, 8}, {16, 16, scene.MaxOrders}} {
		l0, e0 := live(1, 1, c[2])
		l1, e1 := live(c[0], c[1], c[2])
		if e1-e0 < l1-l0 {
			t.Errorf("%v: estimate grows by %d bytes, the live data by %d", c, e1-e0, l1-l0)
		}
	}
}

// TestMemoryEstimateCoversRings checks the estimate of a run that draws
// the rings figure: from a one-pixel image to a larger one it must grow by
// at least the frame's records, counted from the slices (with the hidden
// crossings of an opaque disk, Frame.Behind), plus the figure's image of
// every order (4 bytes per pixel each). A transparent disk keeps no
// hidden crossings, and the estimate says so: 4 bytes per pixel and order
// less.
func TestMemoryEstimateCoversRings(t *testing.T) {
	live := func(w, h, n int, opaque bool) (int64, int64) {
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height, s.Disk.Orders, s.Disk.Opaque = w, h, n, opaque
			s.Output.Formats, s.Output.Maps = []string{"png"}, []string{"rings"}
		})
		arts := Artifacts(r.Output, Set{Manifest: true})
		f, err := pixels.Render(context.Background(), r, nil, Needs(arts))
		if err != nil {
			t.Fatal(err)
		}
		b := int64(len(f.Fate)+len(f.First)) + 4*int64(n)*int64(w*h) // order images
		for _, q := range [][][]float32{f.R, f.G, f.Line, f.Bol, f.Behind} {
			for _, v := range q {
				b += 4 * int64(len(v))
			}
		}
		if opaque != (f.Behind != nil) {
			t.Fatalf("opaque %v: Behind kept: %v", opaque, f.Behind != nil)
		}
		return b, MemoryEstimate(r, Set{Manifest: true}, 2)
	}
	for _, c := range [][3]int{{40, 30, 1}, {64, 64, 3}, {33, 17, 8}} {
		for _, opaque := range []bool{true, false} {
			l0, e0 := live(1, 1, c[2], opaque)
			l1, e1 := live(c[0], c[1], c[2], opaque)
			if e1-e0 < l1-l0 {
				t.Errorf("%v opaque %v: estimate grows by %d bytes, the live data by %d", c, opaque, e1-e0, l1-l0)
			}
		}
		_, eo := live(c[0], c[1], c[2], true)
		_, et := live(c[0], c[1], c[2], false)
		if want := 4 * int64(c[0]*c[1]*c[2]); eo-et != want {
			t.Errorf("%v: opaque disk estimated %d bytes above the transparent one, want %d", c, eo-et, want)
		}
	}
}
