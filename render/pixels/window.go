package pixels

import (
	"context"
	"math"
	"strconv"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// framingSide is the number of coarse samples along each side of the
// square scene.Resolved.ImageBox that FrameWindow and EstimateClip trace:
// about 100 000 photons, a quarter of a 512 × 512 render.
const framingSide = 320

// Framing margins: the automatic window holds the box of every coarse
// sample that lands on the disk, widened on every side by
// framingMarginFrac of the box's larger side and framingMarginCells
// coarse cells (the disk's edge lies within about one cell of the
// outermost sample that lands; thin slivers seen edge-on can end a few
// cells further out, which the fraction covers).
const (
	framingMarginFrac  = 0.03
	framingMarginCells = 3
)

// FrameWindow returns r with a concrete window. A scene whose field of
// view is given is returned as it is. An automatic one
// (scene.Resolved.AutoField) gets the window that holds the whole disk
// image, every order and both faces, with a margin:
//
// A coarse pass traces framingSide × framingSide photons, one per cell
// centre, over the square of half-size r.ImageBox() around the hole,
// which holds every image of the disk, with the model of the main render
// (same orders, opacity, edges and gas); the samples that land on the
// disk give a bounding box, widened by framingMarginFrac of its larger
// side and framingMarginCells cells. The centre is the box's centre
// (rounded to a thousandth of the decade of its larger side; kept when the scene
// gives it), the field the smallest that holds the box with square pixels
// of the scene's width × height, rounded up to three significant digits,
// at most scene.MaxAutoField. If no sample lands (a disk thinner than a
// cell), the provisional window of Resolve, the whole ImageBox, is kept.
// The result depends only on r: every process computes the same window.
func FrameWindow(ctx context.Context, r scene.Resolved) (scene.Resolved, error) {
	fr, _, err := FrameWindowTraced(ctx, r)
	return fr, err
}

// FrameWindowTraced is FrameWindow that also returns the number of
// photons its coarse pass traced (0 for a scene with a field of view).
func FrameWindowTraced(ctx context.Context, r scene.Resolved) (scene.Resolved, int64, error) {
	return frameWindowAt(ctx, r, framingSide)
}

// FrameWindowAt is FrameWindow with side × side coarse samples instead of
// framingSide × framingSide: a cheaper, coarser framing for interactive
// views (side ≥ 16; the margin grows with the coarser cells).
func FrameWindowAt(ctx context.Context, r scene.Resolved, side int) (scene.Resolved, error) {
	fr, _, err := frameWindowAt(ctx, r, side)
	return fr, err
}

// frameWindowAt is FrameWindowAt, also returning the photons traced.
func frameWindowAt(ctx context.Context, r scene.Resolved, side int) (scene.Resolved, int64, error) {
	if !r.AutoField {
		return r, 0, nil
	}
	box, ok, traced, err := diskBox(ctx, r, max(side, 16))
	if err != nil {
		return r, traced, err
	}
	if !ok {
		return r.WithWindow(r.Screen.FieldOfView, r.Screen.CenterAlpha, r.Screen.CenterBeta), traced, nil
	}
	field, ca, cb := box.Window(r)
	return r.WithWindow(field, ca, cb), traced, nil
}

// Box is a rectangle of the screen, α from A0 to A1 and β from B0 to B1, M.
type Box struct{ A0, A1, B0, B1 float64 }

// Union returns the smallest box holding b and c.
func (b Box) Union(c Box) Box {
	return Box{math.Min(b.A0, c.A0), math.Max(b.A1, c.A1), math.Min(b.B0, c.B0), math.Max(b.B1, c.B1)}
}

// DiskBox traces the coarse pass of FrameWindow and returns the box of
// the samples that land on the disk, with FrameWindow's margin, and
// whether any sample landed. Sweeps take the union of their frames'
// boxes (Box.Union, Box.Window).
func DiskBox(ctx context.Context, r scene.Resolved) (Box, bool, error) {
	b, ok, _, err := diskBox(ctx, r, framingSide)
	return b, ok, err
}

// diskBox is DiskBox on side × side coarse samples; it also returns the
// number of photons traced. The box needs of each row only its first and
// last sample that lands, so a row is traced from its left end up to the
// first that lands and from its right end back to the last: the same box
// as every sample would give, for the samples outside the disk image and
// a few more (a third to a half of them, for an automatic window that
// fits the disk).
func diskBox(ctx context.Context, r scene.Resolved, side int) (Box, bool, int64, error) {
	m, err := NewModel(r)
	if err != nil {
		return Box{}, false, 0, err
	}
	m.Timing = false
	half := r.ImageBox()
	cell := 2 * half / float64(side)
	at := func(k int) float64 { return -half + (float64(k)+0.5)*cell }
	type rowBox struct {
		i0, i1 int // first and last column that lands, -1 none
	}
	rows := make([]rowBox, side)
	traced := make([]int32, side)
	parallel(ctx, side, m.Orders, func(j int, p *raytrace.Path, s *Sample) {
		rb := rowBox{-1, -1}
		beta := at(j)
		lands := func(i int) bool {
			traced[j]++
			m.Shade(at(i), beta, p, s)
			return s.First >= 0
		}
		for i := 0; i < side; i++ {
			if lands(i) {
				rb.i0, rb.i1 = i, i
				break
			}
		}
		for i := side - 1; rb.i0 >= 0 && i > rb.i0; i-- {
			if lands(i) {
				rb.i1 = i
				break
			}
		}
		rows[j] = rb
	})
	var n int64
	for _, k := range traced {
		n += int64(k)
	}
	if err := ctx.Err(); err != nil {
		return Box{}, false, n, err
	}
	i0, i1, j0, j1 := side, -1, side, -1
	for j, rb := range rows {
		if rb.i0 < 0 {
			continue
		}
		i0, i1 = min(i0, rb.i0), max(i1, rb.i1)
		j0, j1 = min(j0, j), max(j1, j)
	}
	if i1 < 0 {
		return Box{}, false, n, nil
	}
	b := Box{at(i0), at(i1), at(j0), at(j1)}
	pad := framingMarginFrac*math.Max(b.A1-b.A0, b.B1-b.B0) + framingMarginCells*cell
	return Box{b.A0 - pad, b.A1 + pad, b.B0 - pad, b.B1 + pad}, true, n, nil
}

// Window returns the field and centre of the window of r's pixels that
// holds b, as FrameWindow chooses them: centred on b (rounded) when
// r.AutoCenter, else on r's centre.
func (b Box) Window(r scene.Resolved) (field, ca, cb float64) {
	w, h := float64(r.Screen.Width), float64(r.Screen.Height)
	ca, cb = r.Screen.CenterAlpha, r.Screen.CenterBeta
	if r.AutoCenter {
		e := int(math.Floor(math.Log10(math.Max(b.A1-b.A0, b.B1-b.B0)))) - 3
		step := math.Pow(10, float64(e))
		ca = decimal(math.Round((b.A0+b.A1)/2/step), e)
		cb = decimal(math.Round((b.B0+b.B1)/2/step), e)
	}
	hw := math.Max(b.A1-ca, ca-b.A0)
	hh := math.Max(b.B1-cb, cb-b.B0)
	field = math.Max(2*hw, 2*hh*w/h)
	e := int(math.Floor(math.Log10(field))) - 2
	field = decimal(math.Ceil(field/math.Pow(10, float64(e))-1e-9), e)
	return math.Min(field, scene.MaxAutoField), ca, cb
}

// decimal returns the double nearest to k·10^e (k a whole number), as
// its decimal text reads back, so that a window written to TOML and read
// again is the same double.
func decimal(k float64, e int) float64 {
	if k == 0 {
		return 0 // not -0
	}
	v, _ := strconv.ParseFloat(strconv.FormatFloat(k, 'f', 0, 64)+"e"+strconv.Itoa(e), 64)
	return v
}

// TouchesBorder reports whether any pixel of the first or last row or
// column sees the disk: the window may clip the disk image.
func (f *Frame) TouchesBorder() bool {
	hit := func(i, j int) bool { return f.First[j*f.W+i] >= 0 }
	for i := 0; i < f.W; i++ {
		if hit(i, 0) || hit(i, f.H-1) {
			return true
		}
	}
	for j := 0; j < f.H; j++ {
		if hit(0, j) || hit(f.W-1, j) {
			return true
		}
	}
	return false
}

// Clip is an estimate of the line flux a window misses (EstimateClip).
// Fluxes are in the spectrum's units (Spectrum: M² of screen area times
// g³ ε L, for an observer at D = 1 M), over all energies.
type Clip struct {
	Outside float64 // line flux of the disk image outside the window
	// Total is the line flux of the whole disk image: the window's, from
	// the frame (Frame.LineFlux; from the coarse grid when the frame
	// keeps no line intensity), plus Outside.
	Total    float64
	Fraction float64 // Outside / Total (0 when Total is 0)
	// CellAlpha, CellBeta are the sides of the sample cells outside the
	// window, M; Samples is the number of photons traced.
	CellAlpha, CellBeta float64
	Samples             int64
}

// EstimateClip estimates the line flux of the disk image outside the
// window of the frame f. Method: the midpoint rule on a grid aligned with the window's
// edges. Along α the window's width is split into nx = round(width / c)
// cells (at least 1), c = 2 ImageBox / framingSide (about 0.28 M for the
// default 30 M disk); outside the window the cells continue outward from
// each edge with the same width, or a whole multiple of it near c when
// the window is narrower than c, until they cover the ImageBox square,
// which holds every image of the disk. β likewise. So every cell lies
// wholly inside or wholly outside the window and none straddles its
// border. Each cell within the ImageBox contributes its centre photon's
// line intensity (summed over the image orders seen) times the cell's
// area; Outside sums the cells outside the window. The window's own
// flux comes from the frame, which samples it more finely (the cells
// inside the window are traced too, and stand in when the frame keeps no
// line intensity). At most about framingSide² photons. The error is that
// of the midpoint rule at the disk's edges and the shadow's edge outside
// the window, of order one cell along them, a fraction of a per cent of
// the missing flux for the default disk; it shrinks with the cell.
func EstimateClip(ctx context.Context, f *Frame) (Clip, error) {
	r := f.Res
	m, err := NewModel(r)
	if err != nil {
		return Clip{}, err
	}
	m.Timing = false
	half := r.ImageBox()
	c := 2 * half / framingSide
	hw, hh := float64(r.Screen.Width)*r.PixelSize/2, float64(r.Screen.Height)*r.PixelSize/2
	xs := alignedCells(r.Screen.CenterAlpha-hw, r.Screen.CenterAlpha+hw, -half, half, c)
	ys := alignedCells(r.Screen.CenterBeta-hh, r.Screen.CenterBeta+hh, -half, half, c)
	type rowSum struct{ in, out float64 }
	rows := make([]rowSum, len(ys))
	parallel(ctx, len(ys), m.Orders, func(j int, p *raytrace.Path, s *Sample) {
		y := ys[j]
		var rs rowSum
		for _, x := range xs {
			m.Shade(x.mid, y.mid, p, s)
			if s.First < 0 {
				continue
			}
			line := 0.0
			for o := s.First; o < m.Orders; o++ {
				if s.Hits[o].Seen {
					line += s.Hits[o].Line
				}
			}
			if fl := line * x.size * y.size; x.inside && y.inside {
				rs.in += fl
			} else {
				rs.out += fl
			}
		}
		rows[j] = rs
	})
	if err := ctx.Err(); err != nil {
		return Clip{}, err
	}
	var cl Clip
	coarseIn := 0.0
	for _, rs := range rows {
		cl.Outside += rs.out
		coarseIn += rs.in
	}
	in, ok := f.LineFlux()
	if !ok {
		in = coarseIn
	}
	cl.Total = in + cl.Outside
	if cl.Total > 0 {
		cl.Fraction = cl.Outside / cl.Total
	}
	for _, x := range xs {
		if !x.inside {
			cl.CellAlpha = x.size
		}
	}
	for _, y := range ys {
		if !y.inside {
			cl.CellBeta = y.size
		}
	}
	cl.Samples = int64(len(xs)) * int64(len(ys))
	return cl, nil
}

// cell is one interval of an aligned axis: its midpoint and width, and
// whether it lies inside the window.
type cell struct {
	mid, size float64
	inside    bool
}

// alignedCells splits the axis over [lo, hi], the window, into about
// (hi−lo)/c cells and continues outward from both ends with cells of
// that width (a whole multiple of it near c when the window is narrower
// than c), keeping the cells that overlap [from, to].
func alignedCells(lo, hi, from, to, c float64) []cell {
	n := max(1, math.Round((hi-lo)/c))
	in := (hi - lo) / n
	out := in * max(1, math.Round(c/in))
	var cells []cell
	// Outside, below lo: from the far end inward, so cells come in order.
	if lo > from {
		k := math.Ceil((lo - from) / out)
		for ; k >= 1; k-- {
			a := lo - k*out
			cells = append(cells, cell{mid: a + out/2, size: out})
		}
	}
	// Inside: only the cells overlapping [from, to].
	k0 := math.Max(0, math.Floor((from-lo)/in))
	k1 := math.Min(n, math.Ceil((to-lo)/in))
	for k := k0; k < k1; k++ {
		cells = append(cells, cell{mid: lo + (k+0.5)*in, size: in, inside: true})
	}
	if hi < to {
		kn := math.Ceil((to - hi) / out)
		for k := 0.0; k < kn; k++ {
			cells = append(cells, cell{mid: hi + (k+0.5)*out, size: out})
		}
	}
	return cells
}

// LineFlux returns the frame's line flux over all energies, in the
// spectrum's units: the sum of the line intensity of every seen crossing
// times its pixel's area (or, refined, its sample's area), the total the
// spectrum bins. ok is false when the frame keeps no line intensity.
func (f *Frame) LineFlux() (flux float64, ok bool) {
	if f.refined != nil {
		return f.refined.Sum() + f.refined.Below + f.refined.Above, true
	}
	if f.Line == nil {
		return 0, false
	}
	for k := range f.First {
		if v := f.TotalAt(f.Line, k); !math.IsNaN(float64(v)) {
			flux += float64(v)
		}
	}
	return flux * f.Res.PixelSize * f.Res.PixelSize, true
}

// RenderChecked is RenderScene followed by CheckFinite's check of the
// records, with f.Clip set by EstimateClip when the disk image touches
// the window's border: the render of a run or sweep frame. Without
// refinement the records are checked pixel by pixel as the render's
// workers store them. The spectrum is left to CheckedSpectrum, which
// the outputs run beside their other work.
func RenderChecked(ctx context.Context, r scene.Resolved, progress func(rows int), keep Keep) (*Frame, error) {
	var f *Frame
	var err error
	if r.Refine.Depth > 0 {
		if f, err = RenderScene(ctx, r, progress, keep); err == nil {
			err = checkRecords(f)
		}
	} else {
		f, err = renderRows(ctx, r, progress, keepOf([]Keep{keep}), true)
	}
	if err != nil {
		return nil, err
	}
	if f.TouchesBorder() {
		c, err := EstimateClip(ctx, f)
		if err != nil {
			return nil, err
		}
		f.Clip = &c
	}
	return f, nil
}
