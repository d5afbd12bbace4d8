package pixels

import (
	"context"
	"fmt"
	"math"
	"testing"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// lineFlux is the frame's line flux: the sum over the bins of its
// spectrum and the flux outside its energy range (Cunningham 1975: the
// sum of I ΔΩ over the image).
func lineFlux(f *Frame) float64 {
	s := f.Spectrum()
	return s.Sum() + s.Below + s.Above
}

// widened returns r's window grown by k whole pixels on every side: the
// same pixel size and the same pixel centres inside r's window, so that
// a render of it holds r's render exactly and only adds pixels around it.
func widened(r scene.Resolved, k int) scene.Resolved {
	r.Screen.Width, r.Screen.Height = r.Screen.Width+2*k, r.Screen.Height+2*k
	return r.WithWindow(r.PixelSize*float64(r.Screen.Width), r.Screen.CenterAlpha, r.Screen.CenterBeta)
}

// diskExtent returns the fraction of the window's width and of its
// height that the frame's disk pixels span.
func diskExtent(f *Frame) (fw, fh float64) {
	i0, i1, j0, j1 := f.W, -1, f.H, -1
	for k, o := range f.First {
		if o >= 0 {
			i, j := k%f.W, k/f.W
			i0, i1, j0, j1 = min(i0, i), max(i1, i), min(j0, j), max(j1, j)
		}
	}
	return float64(i1-i0+1) / float64(f.W), float64(j1-j0+1) / float64(f.H)
}

func TestAutoWindowHoldsTheWholeDisk(t *testing.T) {
	spins := []float64{-0.9, 0, 0.5, 0.9, 0.998}
	incls := []float64{5, 30, 60, 80, 89}
	n := 0
	for _, a := range spins {
		for _, inc := range incls {
			n++
			if testing.Short() && n%9 != 1 {
				continue
			}
			opaque := n%2 == 0 // both faces of a transparent disk, too
			t.Run(fmt.Sprintf("a=%g,i=%g,opaque=%v", a, inc, opaque), func(t *testing.T) {
				r := resolve(t, func(s *scene.Scene) {
					s.Hole.Spin, s.Observer.InclinationDeg, s.Disk.Opaque = a, inc, opaque
					s.Screen.Width, s.Screen.Height = 96, 96
				})
				if !r.AutoField || !r.AutoCenter {
					t.Fatalf("default scene: AutoField %v, AutoCenter %v", r.AutoField, r.AutoCenter)
				}
				fr, err := FrameWindow(context.Background(), r)
				if err != nil {
					t.Fatal(err)
				}
				if fr.AutoField || !(fr.Screen.FieldOfView > 0) || fr.PixelSize != fr.Screen.FieldOfView/96 {
					t.Fatalf("framed window: auto %v, field %v, pixel %v", fr.AutoField, fr.Screen.FieldOfView, fr.PixelSize)
				}
				f := render(t, fr)
				if f.TouchesBorder() {
					t.Errorf("field %v centre (%v, %v): disk pixels on the window's border", fr.Screen.FieldOfView, fr.Screen.CenterAlpha, fr.Screen.CenterBeta)
				}
				// Tight: the disk spans most of the window along its
				// longer side (the margin is a few per cent and cells).
				if fw, fh := diskExtent(f); math.Max(fw, fh) < 0.8 {
					t.Errorf("field %v: the disk spans only %.2f × %.2f of the window", fr.Screen.FieldOfView, fw, fh)
				}
				// A render twice as wide on the same pixel grid holds
				// the same photons inside the window and adds the
				// pixels around it: no disk light there means the line
				// flux agrees to the rounding of the sums (1e-9).
				wide := render(t, widened(fr, 48))
				if got, want := lineFlux(f), lineFlux(wide); !(math.Abs(got-want) <= 1e-9*want) || !(want > 0) {
					t.Errorf("line flux %v in the automatic window, %v in one twice as wide", got, want)
				}
			})
		}
	}
}

func TestAutoWindowKeepsAGivenCentre(t *testing.T) {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 64, 48
	if err := fieldByKey("screen.center_alpha").Set(&s, "-4"); err != nil {
		t.Fatal(err)
	}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if !r.AutoField || r.AutoCenter {
		t.Fatalf("centre given: AutoField %v, AutoCenter %v", r.AutoField, r.AutoCenter)
	}
	fr, err := FrameWindow(context.Background(), r)
	if err != nil {
		t.Fatal(err)
	}
	if fr.Screen.CenterAlpha != -4 || fr.Screen.CenterBeta != 0 {
		t.Errorf("centre moved to (%v, %v)", fr.Screen.CenterAlpha, fr.Screen.CenterBeta)
	}
	f := render(t, fr)
	if f.TouchesBorder() {
		t.Errorf("field %v around (-4, 0): disk pixels on the border", fr.Screen.FieldOfView)
	}
	if got, want := lineFlux(f), lineFlux(render(t, widened(fr, 32))); !(math.Abs(got-want) <= 1e-9*want) {
		t.Errorf("line flux %v in the window, %v in a wider one", got, want)
	}
}

func fieldByKey(key string) scene.Field {
	for _, f := range scene.Fields() {
		if f.Key == key {
			return f
		}
	}
	panic("no scene key " + key)
}

func TestClipEstimateMatchesWideRender(t *testing.T) {
	for _, c := range []struct {
		name          string
		w, h          int
		field, ca, cb float64
	}{
		// The default disk at a = 0.95, i = 75° in a 40 M window: the
		// far ends of the disk are cut off.
		{"wings cut", 120, 120, 40, 0, 0},
		// A zoom on the approaching side: much of the bright inner
		// disk is outside.
		{"zoom", 48, 36, 12, 3, 1},
	} {
		t.Run(c.name, func(t *testing.T) {
			if testing.Short() && c.name == "zoom" {
				t.Skip("slow")
			}
			r := resolve(t, func(s *scene.Scene) {
				s.Hole.Spin, s.Observer.InclinationDeg = 0.95, 75
				s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = c.w, c.h, c.field
				s.Screen.CenterAlpha, s.Screen.CenterBeta = c.ca, c.cb
			})
			f := render(t, r)
			if !f.TouchesBorder() {
				t.Fatal("the window does not clip the disk")
			}
			est, err := EstimateClip(context.Background(), f)
			if err != nil {
				t.Fatal(err)
			}
			// The reference: a render on the same pixel grid wide
			// enough to hold ImageBox; what it sees beyond the clipped
			// window is exactly the flux the clipped render misses, at
			// the render's resolution rather than the estimate's.
			k := int(math.Ceil((r.ImageBox()+math.Max(math.Abs(c.ca), math.Abs(c.cb)))/r.PixelSize)) - min(c.w, c.h)/2 + 2
			wide := render(t, widened(r, k))
			if wide.TouchesBorder() {
				t.Fatal("the reference render clips the disk")
			}
			all, in := lineFlux(wide), lineFlux(f)
			missing := all - in
			t.Logf("missing %.5g of %.5g (%.3f %%); estimate %.5g (%.3f %%) on %.3g × %.3g M cells",
				missing, all, 100*missing/all, est.Outside, 100*est.Fraction, est.CellAlpha, est.CellBeta)
			if !(math.Abs(est.Outside-missing) <= 0.02*missing) {
				t.Errorf("estimated outside flux %v, the wide render misses %v", est.Outside, missing)
			}
			if frac := missing / all; !(math.Abs(est.Fraction-frac) <= 0.02*frac) {
				t.Errorf("estimated fraction %v, the wide render's %v", est.Fraction, frac)
			}
		})
	}
}

func TestAlignedCellsDoNotStraddleTheWindow(t *testing.T) {
	for _, c := range []struct{ lo, hi, from, to, cell float64 }{
		{-20, 20, -44.5, 44.5, 0.278},
		{-3, 9, -44.5, 44.5, 0.278},
		{1e-6, 2e-6, -44.5, 44.5, 0.278}, // a window narrower than a cell
		{-100, 100, -44.5, 44.5, 0.278},  // wider than the box
		{60, 70, -44.5, 44.5, 0.278},     // beside the box
	} {
		cells := alignedCells(c.lo, c.hi, c.from, c.to, c.cell)
		covered := 0.0
		for i, x := range cells {
			a, b := x.mid-x.size/2, x.mid+x.size/2
			inside := a >= c.lo-1e-9*c.cell && b <= c.hi+1e-9*c.cell
			outside := b <= c.lo+1e-9*c.cell || a >= c.hi-1e-9*c.cell
			if x.inside != inside || inside == outside {
				t.Errorf("%v: cell %d [%v, %v] inside=%v straddles or is misfiled", c, i, a, b, x.inside)
			}
			if i > 0 {
				prev := cells[i-1]
				if d := a - (prev.mid + prev.size/2); math.Abs(d) > 1e-9*c.cell {
					t.Errorf("%v: gap %v before cell %d", c, d, i)
				}
			}
			covered += x.size
			if x.size > 2.5*c.cell && !(x.inside && c.hi-c.lo < c.cell) {
				t.Errorf("%v: cell %d is %v wide", c, i, x.size)
			}
		}
		first, last := cells[0], cells[len(cells)-1]
		if first.mid-first.size/2 > c.from || last.mid+last.size/2 < c.to {
			t.Errorf("%v: cells span %v to %v, not the box", c, first.mid-first.size/2, last.mid+last.size/2)
		}
	}
}

// diskBoxEverySample is diskBox tracing every coarse sample, as it did
// before it traced each row only from its ends inwards.
func diskBoxEverySample(t *testing.T, r scene.Resolved, side int) (Box, bool) {
	t.Helper()
	m, err := NewModel(r)
	if err != nil {
		t.Fatal(err)
	}
	m.Timing = false
	half := r.ImageBox()
	cell := 2 * half / float64(side)
	at := func(k int) float64 { return -half + (float64(k)+0.5)*cell }
	i0, i1, j0, j1 := side, -1, side, -1
	p := raytrace.Path{Crossings: make([]raytrace.Crossing, 0, m.Orders)}
	var s Sample
	for j := 0; j < side; j++ {
		for i := 0; i < side; i++ {
			m.Shade(at(i), at(j), &p, &s)
			if s.First >= 0 {
				i0, i1, j0, j1 = min(i0, i), max(i1, i), min(j0, j), max(j1, j)
			}
		}
	}
	if i1 < 0 {
		return Box{}, false
	}
	b := Box{at(i0), at(i1), at(j0), at(j1)}
	pad := framingMarginFrac*math.Max(b.A1-b.A0, b.B1-b.B0) + framingMarginCells*cell
	return Box{b.A0 - pad, b.A1 + pad, b.B0 - pad, b.B1 + pad}, true
}

// The framing pass traces each row from its ends inwards only: its box
// must be, to the last bit, the box of every sample, for disks seen from
// face-on to edge-on, opaque and transparent, with and without the
// higher orders, and for a disk too thin for any sample; and it must
// trace fewer photons.
func TestDiskBoxFromRowEnds(t *testing.T) {
	const side = 120
	cases := []func(s *scene.Scene){
		func(s *scene.Scene) {},
		func(s *scene.Scene) { s.Observer.InclinationDeg = 3 },
		func(s *scene.Scene) { s.Observer.InclinationDeg, s.Disk.Opaque = 89.5, false },
		func(s *scene.Scene) { s.Hole.Spin, s.Observer.InclinationDeg, s.Disk.Orders = -0.9, 75, 1 },
		func(s *scene.Scene) { s.Hole.Spin, s.Disk.Opaque, s.Disk.Orders = 0.998, false, 5 },
		func(s *scene.Scene) { s.Observer.InclinationDeg = 90 }, // a zero-thickness disk edge-on
	}
	for k, edit := range cases {
		r := resolve(t, edit)
		want, wantOK := diskBoxEverySample(t, r, side)
		got, ok, traced, err := diskBox(context.Background(), r, side)
		if err != nil {
			t.Fatal(err)
		}
		if ok != wantOK || got != want {
			t.Errorf("case %d: box %+v (%v), every sample gives %+v (%v)", k, got, ok, want, wantOK)
		}
		if traced <= 0 || traced > side*side || (ok && traced >= side*side) {
			t.Errorf("case %d: %d photons traced of %d samples", k, traced, side*side)
		}
	}
}
