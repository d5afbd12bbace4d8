package outputs

import (
	"math"
	"testing"

	"kerrscope/scene"
)

func estimateOf(t *testing.T, edit func(s *scene.Scene)) int64 {
	t.Helper()
	s := scene.Default()
	edit(&s)
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return MemoryEstimate(r, Set{Manifest: true}, 2)
}

// TestMemoryEstimateProperties checks the shape of the memory model: it
// grows with every size it depends on, is linear in the pixel count and
// in the orders once the image dominates, charges refinement by the
// image width (its corner rows), and never counts less than the records
// the renderer must hold.
func TestMemoryEstimateProperties(t *testing.T) {
	size := func(w, h, n int) func(s *scene.Scene) {
		return func(s *scene.Scene) { s.Screen.Width, s.Screen.Height, s.Disk.Orders = w, h, n }
	}
	// Monotone in width, height, orders, bins and refinement depth.
	prev := int64(0)
	for _, w := range []int{1, 8, 64, 512, 4096, scene.MaxPixels} {
		e := estimateOf(t, size(w, 64, 3))
		if e < prev {
			t.Errorf("width %d: estimate %d below the smaller width's %d", w, e, prev)
		}
		prev = e
	}
	for _, axis := range []struct {
		name string
		edit func(s *scene.Scene, v int)
		vals []int
	}{
		{"height", func(s *scene.Scene, v int) { s.Screen.Height = v }, []int{1, 100, 1000, scene.MaxPixels}},
		{"orders", func(s *scene.Scene, v int) { s.Disk.Orders = v }, []int{1, 2, 3, 8, scene.MaxOrders}},
		{"bins", func(s *scene.Scene, v int) { s.Spectrum.Bins = v }, []int{1, 240, 1 << 14, scene.MaxBins}},
		{"depth", func(s *scene.Scene, v int) { s.Refine.Depth = v }, []int{0, 1, 4, scene.MaxDepth}},
	} {
		prev := int64(0)
		for _, v := range axis.vals {
			e := estimateOf(t, func(s *scene.Scene) { axis.edit(s, v) })
			if e < prev {
				t.Errorf("%s %d: estimate %d below the smaller value's %d", axis.name, v, e, prev)
			}
			prev = e
		}
	}
	// Linear in the pixel count and in the orders for large images:
	// equal steps of pixels (or orders) add equal memory.
	e1, e2, e4 := estimateOf(t, size(2048, 1024, 3)), estimateOf(t, size(2048, 2048, 3)), estimateOf(t, size(2048, 4096, 3))
	if d1, d2 := float64(e2-e1), float64(e4-e2); math.Abs(d2-2*d1) > 1e-9*d2+16 {
		t.Errorf("not linear in pixels: steps %v and %v", d1, d2)
	}
	o1, o2, o3 := estimateOf(t, size(2048, 2048, 1)), estimateOf(t, size(2048, 2048, 2)), estimateOf(t, size(2048, 2048, 3))
	if d1, d2 := float64(o2-o1), float64(o3-o2); math.Abs(d2-d1) > 1e-9*d2+16 {
		t.Errorf("not linear in orders: steps %v and %v", d1, d2)
	}
	// Refinement keeps corner rows across the image width: what it adds
	// does not depend on the height.
	refine := func(h int) int64 {
		edit := func(s *scene.Scene) { size(4096, h, 3)(s); s.Output.Formats = []string{"csv"} }
		on := estimateOf(t, func(s *scene.Scene) { edit(s); s.Refine.Depth = 2 })
		return on - estimateOf(t, edit)
	}
	if a, b := refine(1), refine(5); a <= 0 || a != b {
		t.Errorf("refinement adds %d bytes at height 1 and %d at height 5", a, b)
	}
	// Fewer outputs never need more memory.
	all := estimateOf(t, size(1024, 1024, 3))
	csv := estimateOf(t, func(s *scene.Scene) { size(1024, 1024, 3)(s); s.Output.Formats = []string{"csv"} })
	if csv > all {
		t.Errorf("csv only %d > all outputs %d", csv, all)
	}
	// At least the records: fate and first order (1 byte each) and four
	// float32 per order and pixel, as Frame holds them with every output,
	// for the largest scene too (no overflow).
	for _, c := range [][3]int{{1, 1, 1}, {720, 420, 3}, {scene.MaxPixels, scene.MaxPixels, scene.MaxOrders}} {
		px := int64(c[0]) * int64(c[1])
		if e, rec := estimateOf(t, size(c[0], c[1], c[2])), px*(2+16*int64(c[2])); !(e > rec) {
			t.Errorf("%v: estimate %d, below the records' %d bytes", c, e, rec)
		}
	}
}

// TestMemoryEstimateFollowsRecords checks that the estimate charges the
// records the artifacts read (Needs) and no others: a spectrum-only run
// keeps g and the line intensity (8 bytes per pixel and order), FITS all
// four records (16); the spectra add three copies of bins float64 per
// order.
func TestMemoryEstimateFollowsRecords(t *testing.T) {
	est := func(formats ...string) int64 {
		return estimateOf(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height, s.Disk.Orders = 1000, 1000, 1
			s.Output.Formats = formats
		}) - estimateOf(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height, s.Disk.Orders = 1000, 1000, 2
			s.Output.Formats = formats
		})
	}
	spectra := int64(3 * 8 * scene.Default().Spectrum.Bins)
	if d := -est("csv"); d != 8*1000*1000+spectra {
		t.Errorf("csv: one more order costs %d bytes, want 8 per pixel", d)
	}
	if d := -est("fits"); d != 16*1000*1000+spectra {
		t.Errorf("fits: one more order costs %d bytes, want 16 per pixel", d)
	}
}
