// Package spot makes movies of an orbiting hot spot in observer time: it
// traces the screen once with time delays and azimuths
// (raytrace.TraceTimed), keeps every crossing that can shine, and then
// makes each frame by sampling the spot where it was when each photon
// left the disk. From the frames come the light curve, the image
// centroid track and the line profile against time.
package spot

import (
	"context"
	"math"

	"kerrscope/raytrace"
	"kerrscope/render/internal/workers"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// crossing is one traced disk crossing that can shine.
type crossing struct {
	pix   int32
	order int32
	r, g  float64
	w     float64 // g³ × limb: observed line intensity per unit emissivity
	phi   float64 // φ − φ_o of the crossing, radians (raytrace.Timing)
	delay float64 // t_o − t, M (raytrace.Timing, regularised)
	disk  float64 // the steady disk's g³ ε(r) limb here (0 when the spot is alone)
}

// Table is the traced screen: every crossing of every pixel that lands
// where the disk or the spot can shine, with its time delay and azimuth.
// It is made once per movie; frames are cheap samplings of it.
type Table struct {
	Res  scene.Resolved
	Spot scene.SpotEmission
	W, H int
	// Fate is each pixel's photon fate; Lit says whether any of its
	// crossings can shine.
	Fate  []raytrace.Fate
	Lit   []bool
	cross []crossing // every crossing, by pixel, then order
	spot  []crossing // the crossings within the spot's radii
	// static holds the steady disk's light: its image, and its sums
	// (Flux, Bol, and the centroid moments in Alpha, Beta).
	static    Snapshot
	staticImg []float64
	alpha     []float64 // α of each column
	beta      []float64 // β of each row
	Photons   int64
}

// Trace traces the photon of every pixel centre once, with timing, on all
// cores; the result does not depend on scheduling. progress, if not nil,
// gets the number of finished rows (from one goroutine at a time, in no
// fixed order of rows).
func Trace(ctx context.Context, r scene.Resolved, sp scene.SpotEmission, progress func(rows int)) (*Table, error) {
	m, err := pixels.NewModel(r)
	if err != nil {
		return nil, err
	}
	m.Timing = true
	if sp.Alone {
		// Only the spot shines, and it is optically thin.
		m.Inner, m.Outer, m.Opaque = sp.Inner, sp.Outer, false
	}
	w, h, n := r.Screen.Width, r.Screen.Height, r.Disk.Orders
	t := &Table{Res: r, Spot: sp, W: w, H: h, Fate: make([]raytrace.Fate, w*h), Lit: make([]bool, w*h),
		alpha: make([]float64, w), beta: make([]float64, h), Photons: int64(w) * int64(h)}
	for i := range t.alpha {
		t.alpha[i] = pixels.PixelAlpha(r, i)
	}
	for j := range t.beta {
		t.beta[j] = pixels.PixelBeta(r, j)
	}
	rows := make([][]crossing, h)
	type scratch struct {
		tp raytrace.TimedPath
		s  pixels.Sample
	}
	finished := workers.Counter(progress)
	workers.Each(ctx, h, func() *scratch {
		return &scratch{tp: raytrace.TimedPath{Path: raytrace.Path{Crossings: make([]raytrace.Crossing, 0, n)}, Times: make([]raytrace.Timing, 0, n)}}
	}, func(j int, sc *scratch) {
		var row []crossing
		for i := 0; i < w; i++ {
			k := j*w + i
			m.ShadeTimed(t.alpha[i], t.beta[j], &sc.tp, &sc.s)
			t.Fate[k] = sc.s.Fate
			for o := 0; o < n; o++ {
				hit := sc.s.Hits[o]
				if !hit.Seen || math.IsNaN(hit.T) || math.IsInf(hit.T, 0) || math.IsInf(hit.Phi, 0) {
					continue
				}
				limb := m.Limb.At(scene.EmissionCosine(hit.G, hit.R, sc.tp.Eta))
				c := crossing{pix: int32(k), order: int32(o), r: hit.R, g: hit.G, w: hit.G * hit.G * hit.G * limb, phi: hit.Phi, delay: hit.T}
				if !sp.Alone {
					c.disk = hit.Line
				}
				row = append(row, c)
				t.Lit[k] = true
			}
		}
		rows[j] = row
		finished()
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, row := range rows {
		t.cross = append(t.cross, row...)
	}
	t.staticImg = make([]float64, w*h)
	da := t.PixelArea()
	for _, c := range t.cross {
		if c.r >= sp.Inner && c.r <= sp.Outer {
			t.spot = append(t.spot, c)
		}
		t.staticImg[c.pix] += c.disk
		t.static.Flux += c.disk * da
		t.static.Bol += c.disk * c.g * da
		t.static.Alpha += c.disk * da * t.alpha[int(c.pix)%w]
		t.static.Beta += c.disk * da * t.beta[int(c.pix)/w]
	}
	return t, nil
}

// Crossings returns the number of crossings kept.
func (t *Table) Crossings() int { return len(t.cross) }

// PixelArea is the solid angle of one pixel in M² (for an observer at
// distance D = 1 M; scale by (M/D)²).
func (t *Table) PixelArea() float64 { return t.Res.PixelSize * t.Res.PixelSize }

// Snapshot is what the observer receives at one observer time.
type Snapshot struct {
	T float64 // observer time t_obs, M (same regularisation as raytrace.Timing)
	// Flux is the line photon flux Σ g³ ε limb dΩ over the screen, dΩ the
	// pixel area in M² (units of the spectrum CSV); SpotFlux the spot's
	// part of it, Bol the bolometric Σ g⁴ ε limb dΩ.
	Flux, SpotFlux, Bol float64
	// Alpha, Beta are the centroid of the image, weighted by the line
	// intensity, in M (NaN when the image is dark).
	Alpha, Beta float64
}

// At samples the movie at observer time tobs: each crossing shows the
// spot where it was when the photon left, t_emit = t_obs − delay, at
// azimuth φ_s(t_emit) = φ_0 + Ω t_emit, compared with the crossing's
// azimuth φ − φ_o (the observer sits at φ_o = 0 of the spot's
// azimuths). If img is not nil (W×H values, row 0 at the top) it receives
// each pixel's line intensity summed over orders; if spec is not nil the
// light is binned by energy into it (SpotOnly: only the spot's light).
// Sums run in a fixed order, so the result is reproducible to the bit.
func (t *Table) At(tobs float64, img []float64, spec *pixels.Spectrum, spotOnly bool) Snapshot {
	if img != nil {
		copy(img, t.staticImg)
	}
	sp := t.Spot
	da := t.PixelArea()
	if spec != nil && !spotOnly && !sp.Alone {
		for _, c := range t.cross {
			spec.Add(int(c.order), c.g, c.disk*da)
		}
	}
	s := t.static
	s.T = tobs
	sa, sb := s.Alpha, s.Beta
	for _, c := range t.spot {
		dphi := c.phi - sp.Azimuth(tobs-c.delay)
		spot := c.w * sp.At(c.r, dphi)
		if spot == 0 {
			continue
		}
		if img != nil {
			img[c.pix] += spot
		}
		if spec != nil {
			spec.Add(int(c.order), c.g, spot*da)
		}
		s.Flux += spot * da
		s.SpotFlux += spot * da
		s.Bol += spot * c.g * da
		i, j := int(c.pix)%t.W, int(c.pix)/t.W
		sa += spot * da * t.alpha[i]
		sb += spot * da * t.beta[j]
	}
	s.Alpha, s.Beta = math.NaN(), math.NaN()
	if s.Flux > 0 {
		s.Alpha, s.Beta = sa/s.Flux, sb/s.Flux
	}
	return s
}

// Times returns the frame times of the scene (FrameTimes).
func (t *Table) Times() []float64 { return FrameTimes(t.Res, t.Spot) }

// FrameTimes returns the observer times of the frames of a movie of
// scene r: spot.frames frames over spot.periods orbital periods,
// t_k = k P periods / n, so that one period in n frames loops.
func FrameTimes(r scene.Resolved, sp scene.SpotEmission) []float64 {
	n := r.Spot.Frames
	dt := sp.Period() * r.Spot.Periods / float64(n)
	out := make([]float64, n)
	for k := range out {
		out[k] = float64(k) * dt
	}
	return out
}

// FrameWindow returns r with a concrete window for the movie of spot sp:
// r as it is when its field of view is given, else the automatic window
// of pixels.FrameWindow, which holds the whole disk image (every frame
// of the movie shares it). When the spot shines alone, the window holds
// the image of the annulus where it can shine (sp.Inner to sp.Outer)
// instead.
func FrameWindow(ctx context.Context, r scene.Resolved, sp scene.SpotEmission) (scene.Resolved, error) {
	if !r.AutoField {
		return r, nil
	}
	fr := r
	if sp.Alone {
		fr.Inner, fr.Disk.OuterRadius, fr.Disk.Opaque = sp.Inner, sp.Outer, false
	}
	w, err := pixels.FrameWindow(ctx, fr)
	if err != nil {
		return r, err
	}
	return r.WithWindow(w.Screen.FieldOfView, w.Screen.CenterAlpha, w.Screen.CenterBeta), nil
}
