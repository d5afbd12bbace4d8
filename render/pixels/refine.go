package pixels

import (
	"context"
	"math"
	"sync/atomic"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// Refinement controls adaptive sampling. Every pixel is first sampled at
// its four corners; a cell whose corner samples differ in fate or image
// order, or whose source radius or redshift differ by more than the
// tolerances, is split into four, recursively, down to Depth levels.
// When a band of source radii is measured (KeepBand), a cell is also split
// where its corners differ in lying in the band, or where the band lies
// between their radii.
type Refinement struct {
	Depth int     // subdivision levels below the pixel (0: corners only)
	TolR  float64 // relative spread of r that splits a cell
	TolG  float64 // absolute spread of g that splits a cell
}

// point is one photon's record in compact form.
type point struct {
	fate  raytrace.Fate
	first int8
	hits  [scene.MaxOrders]hit32
}

type hit32 struct {
	r, g, line, bol float32
	seen, behind    bool // Hit.Seen, Hit.Behind
}

// pixelAcc gathers the area-weighted samples of one pixel.
type pixelAcc struct {
	area, captured float64
	firstArea      [scene.MaxOrders + 1]float64 // index first+1
	w, r, g        [scene.MaxOrders]float64
	line, bol      [scene.MaxOrders]float64
	behind         [scene.MaxOrders]float64 // area-weighted line of hidden crossings
	behindArea     [scene.MaxOrders]float64
	// With a band (refiner.band): the area whose crossing of each order
	// lies in it, and the row's tally of those samples.
	band  [scene.MaxOrders]float64
	tally *bandTally
}

type refiner struct {
	m       *Model
	res     scene.Resolved
	ref     Refinement
	a0, b0  float64    // α of the left edge, β of the top edge
	h       float64    // pixel size
	band    *bandRange // band of source radii to tally in the leaves, if any
	photons atomic.Int64
}

func (rf *refiner) sample(x, y float64, p *raytrace.Path, s *Sample) point {
	rf.m.Shade(rf.a0+x*rf.h, rf.b0-y*rf.h, p, s)
	pt := point{fate: s.Fate, first: int8(s.First)}
	for o := 0; o < rf.m.Orders; o++ {
		hh := s.Hits[o]
		pt.hits[o] = hit32{float32(hh.R), float32(hh.G), float32(hh.Line), float32(hh.Bol), hh.Seen, hh.Behind}
	}
	rf.photons.Add(1)
	return pt
}

// agree reports whether four corner samples describe a smooth cell.
func (rf *refiner) agree(c *[4]point) bool {
	for k := 1; k < 4; k++ {
		if c[k].fate != c[0].fate || c[k].first != c[0].first {
			return false
		}
	}
	for o := 0; o < rf.m.Orders; o++ {
		s := c[0].hits[o].seen
		rmin, rmax := math.Inf(1), math.Inf(-1)
		gmin, gmax := math.Inf(1), math.Inf(-1)
		for k := 0; k < 4; k++ {
			hh := c[k].hits[o]
			if hh.seen != s {
				return false
			}
			if s {
				rmin, rmax = math.Min(rmin, float64(hh.r)), math.Max(rmax, float64(hh.r))
				gmin, gmax = math.Min(gmin, float64(hh.g)), math.Max(gmax, float64(hh.g))
			}
		}
		if s && (rmax > rmin*(1+rf.ref.TolR) || gmax-gmin > rf.ref.TolG) {
			return false
		}
		if s && rf.band != nil && rf.band.splits(rmin, rmax) {
			return false
		}
	}
	return true
}

// cell refines the square of side size (in pixels) with top-left corner
// (x, y) and corners c = top-left, top-right, bottom-left, bottom-right.
func (rf *refiner) cell(x, y, size float64, c [4]point, depth int, p *raytrace.Path, s *Sample, acc *pixelAcc, spec *Spectrum) {
	if depth >= rf.ref.Depth || rf.agree(&c) {
		rf.leaf(x, y, size, &c, acc, spec)
		return
	}
	hs := size / 2
	top := rf.sample(x+hs, y, p, s)
	left := rf.sample(x, y+hs, p, s)
	mid := rf.sample(x+hs, y+hs, p, s)
	right := rf.sample(x+size, y+hs, p, s)
	bottom := rf.sample(x+hs, y+size, p, s)
	rf.cell(x, y, hs, [4]point{c[0], top, left, mid}, depth+1, p, s, acc, spec)
	rf.cell(x+hs, y, hs, [4]point{top, c[1], mid, right}, depth+1, p, s, acc, spec)
	rf.cell(x, y+hs, hs, [4]point{left, mid, c[2], bottom}, depth+1, p, s, acc, spec)
	rf.cell(x+hs, y+hs, hs, [4]point{mid, right, bottom, c[3]}, depth+1, p, s, acc, spec)
}

// leaf adds the final cell of side size (pixels) with top-left corner
// (x, y): each corner stands for the quarter of it that it touches. Where
// all four corners see an order, its flux goes into the spectrum spread
// over the cell's bilinear g range; otherwise each corner's quarter goes
// in at its own g. With a band, each quarter whose crossing lies in it
// counts, with its area, flux, box and g, for the band.
func (rf *refiner) leaf(x, y, size float64, c *[4]point, acc *pixelAcc, spec *Spectrum) {
	area := size * size
	w := area / 4
	acc.area += area
	dOmega := area * rf.h * rf.h
	for k := 0; k < 4; k++ {
		if c[k].fate == raytrace.Captured {
			acc.captured += w
		}
		acc.firstArea[int(c[k].first)+1] += w
	}
	for o := 0; o < rf.m.Orders; o++ {
		n := 0
		line, g := 0.0, 0.0
		for k := 0; k < 4; k++ {
			hh := c[k].hits[o]
			if hh.behind {
				acc.behind[o] += w * float64(hh.line)
				acc.behindArea[o] += w
			}
			if !hh.seen {
				continue
			}
			n++
			acc.w[o] += w
			acc.r[o] += w * float64(hh.r)
			acc.g[o] += w * float64(hh.g)
			acc.line[o] += w * float64(hh.line)
			acc.bol[o] += w * float64(hh.bol)
			line += float64(hh.line)
			g += float64(hh.g)
			if rf.band != nil {
				acc.tally.total += w * float64(hh.line)
				if rf.band.holds(hh.r) {
					acc.band[o] += w
					qx, qy := x+float64(k&1)*size/2, y+float64(k>>1)*size/2
					a0, b1 := rf.a0+qx*rf.h, rf.b0-qy*rf.h
					acc.tally.add(o, c[k].fate, w, float64(hh.line), float64(hh.g), a0, a0+size/2*rf.h, b1-size/2*rf.h, b1)
				}
			}
		}
		if spec == nil || n == 0 {
			continue
		}
		if spec.Line != nil {
			rf.leafLines(o, n, c, dOmega, spec)
			continue
		}
		if n == 4 {
			h := c[0].hits[o].g
			gx := (float64(c[1].hits[o].g-h) + float64(c[3].hits[o].g-c[2].hits[o].g)) / 2
			gy := (float64(c[2].hits[o].g-h) + float64(c[3].hits[o].g-c[1].hits[o].g)) / 2
			spec.AddSpread(o, g/4, gx, gy, line/4*dOmega)
			continue
		}
		for k := 0; k < 4; k++ {
			if hh := c[k].hits[o]; hh.seen {
				spec.Add(o, float64(hh.g), float64(hh.line)*dOmega/4)
			}
		}
	}
}

// leafLines is leaf's spectrum of order o for a line list, whose n corners
// see the order: each corner's light is shared among the lines by their
// emissivities at its source radius (scene.RestLines.Parts), and where
// all four see it each line's light is spread over the cell's bilinear g
// range, as for one line.
func (rf *refiner) leafLines(o, n int, c *[4]point, dOmega float64, spec *Spectrum) {
	ls := &rf.m.Lines
	nl := len(ls.Lines)
	var parts, flux [scene.MaxLines]float64
	ls.Parts(math.NaN(), parts[:nl]) // the fractions, unless a line has its own law
	if n == 4 {
		g := 0.0
		for k := 0; k < 4; k++ {
			hh := c[k].hits[o]
			g += float64(hh.g)
			if ls.Own() {
				ls.Parts(float64(hh.r), parts[:nl])
			}
			for l := range nl {
				flux[l] += parts[l] * float64(hh.line)
			}
		}
		for l := range nl {
			flux[l] = flux[l] / 4 * dOmega
		}
		h := c[0].hits[o].g
		gx := (float64(c[1].hits[o].g-h) + float64(c[3].hits[o].g-c[2].hits[o].g)) / 2
		gy := (float64(c[2].hits[o].g-h) + float64(c[3].hits[o].g-c[1].hits[o].g)) / 2
		spec.AddLines(o, g/4, gx, gy, flux[:nl])
		return
	}
	for k := 0; k < 4; k++ {
		hh := c[k].hits[o]
		if !hh.seen {
			continue
		}
		if ls.Own() {
			ls.Parts(float64(hh.r), parts[:nl])
		}
		for l := range nl {
			flux[l] = parts[l] * float64(hh.line) * dOmega / 4
		}
		spec.AddLines(o, float64(hh.g), 0, 0, flux[:nl])
	}
}

// RefineStats summarises a refined render.
type RefineStats struct {
	Photons      int64   // photons traced
	CapturedArea float64 // screen area whose photons come from the horizon, M²
}

// RenderRefined renders the scene with adaptive refinement. It returns the
// frame of area-weighted pixel means (nil unless keepMaps), the spectrum
// collapsed from the samples with their areas (before any instrument
// broadening) and the photon count. Deterministic: rows are summed in order.
func RenderRefined(ctx context.Context, r scene.Resolved, ref Refinement, keepMaps bool, progress func(rows int)) (*Frame, Spectrum, RefineStats, error) {
	return renderRefined(ctx, r, ref, KeepAll, keepMaps, progress)
}

// renderRefined is RenderRefined keeping the records in keep.
func renderRefined(ctx context.Context, r scene.Resolved, ref Refinement, keep Keep, keepMaps bool, progress func(rows int)) (*Frame, Spectrum, RefineStats, error) {
	m, err := NewModel(r)
	if err != nil {
		return nil, Spectrum{}, RefineStats{}, err
	}
	w, h, n := r.Screen.Width, r.Screen.Height, r.Disk.Orders
	m.Behind = m.Opaque && keepMaps && keep&KeepBehind != 0
	a0, _, _, b1 := (&Frame{Res: r, W: w, H: h}).Window()
	rf := &refiner{m: &m, res: r, ref: ref, a0: a0, b0: b1, h: r.PixelSize}
	total := NewSceneSpectrum(r, n)
	var f *Frame
	if keepMaps {
		f = newFrame(r, m, keep)
		if f.Band != nil {
			rf.band = &f.band
		}
	}
	const chunk = 32
	corners := make([][]point, chunk+1)
	for i := range corners {
		corners[i] = make([]point, w+1)
	}
	rowCaptured := make([]float64, chunk)
	rowBand := make([]bandTally, chunk)
	rowSpec := make([]Spectrum, chunk)
	for i := range rowSpec {
		rowSpec[i] = NewSceneSpectrum(r, n)
	}
	captured := 0.0
	for j0 := 0; j0 < h; j0 += chunk {
		rows := min(chunk, h-j0)
		// Corner rows j0 … j0+rows (row j0 is carried over from the last chunk).
		start := 0
		if j0 > 0 {
			corners[0], corners[chunk] = corners[chunk], corners[0]
			start = 1
		}
		parallel(ctx, rows+1-start, n, func(i int, p *raytrace.Path, s *Sample) {
			row := corners[i+start]
			for x := 0; x <= w; x++ {
				row[x] = rf.sample(float64(x), float64(j0+i+start), p, s)
			}
		})
		parallel(ctx, rows, n, func(i int, p *raytrace.Path, s *Sample) {
			j := j0 + i
			spec := &rowSpec[i]
			spec.clear()
			rowCaptured[i] = 0
			rowBand[i] = bandTally{}
			for x := 0; x < w; x++ {
				acc := pixelAcc{tally: &rowBand[i]}
				c := [4]point{corners[i][x], corners[i][x+1], corners[i+1][x], corners[i+1][x+1]}
				rf.cell(float64(x), float64(j), 1, c, 0, p, s, &acc, spec)
				rowCaptured[i] += acc.captured
				if f != nil {
					f.storeAcc(j*w+x, &acc)
				}
			}
		})
		if err := ctx.Err(); err != nil {
			return nil, Spectrum{}, RefineStats{}, err
		}
		for i := 0; i < rows; i++ {
			total.Merge(&rowSpec[i])
			captured += rowCaptured[i]
			if rf.band != nil {
				f.bandSums.merge(&rowBand[i])
			}
		}
		if progress != nil {
			progress(j0 + rows)
		}
	}
	st := RefineStats{Photons: rf.photons.Load(), CapturedArea: captured * rf.h * rf.h}
	if f != nil {
		f.Photons = st.Photons
		f.refined = &total
	}
	return f, total, st, nil
}

// storeAcc turns a pixel's accumulated samples into its records.
func (f *Frame) storeAcc(k int, a *pixelAcc) {
	nan := float32(math.NaN())
	if a.captured > a.area/2 {
		f.Fate[k] = raytrace.Captured
	} else {
		f.Fate[k] = raytrace.Escaped
	}
	best, bestArea := -1, a.firstArea[0]
	for o := 0; o < f.Orders; o++ {
		if a.firstArea[o+1] > bestArea {
			best, bestArea = o, a.firstArea[o+1]
		}
	}
	f.First[k] = int8(best)
	if f.Band != nil {
		for o := 0; o < f.Orders; o++ {
			f.Band[o][k] = float32(a.band[o] / a.area)
		}
	}
	for o := 0; o < f.Orders; o++ {
		if a.w[o] == 0 {
			f.put(o, k, nan, nan, nan, nan)
			continue
		}
		f.put(o, k, float32(a.r[o]/a.w[o]), float32(a.g[o]/a.w[o]), float32(a.line[o]/a.area), float32(a.bol[o]/a.area))
	}
	if f.Behind != nil {
		for o := 0; o < f.Orders; o++ {
			if a.behindArea[o] > 0 {
				f.Behind[o][k] = float32(a.behind[o] / a.area)
			}
		}
	}
}
