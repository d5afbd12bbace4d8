package maps

import (
	"fmt"
	"image/color"
	"math"

	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// The polarisation map is the line intensity (as the intensity map) with
// a tick per cell of a coarse grid over it: along the electric vector of
// the cell's summed Stokes Q and U, its length the cell's linear
// polarisation fraction sqrt(Q² + U²)/I times the cell side (a fully
// polarised cell's tick spans the cell). Cells whose light is below
// tickFloor of the brightest cell get no tick.
const (
	// tickCells is the number of grid cells across the map's longer side.
	tickCells = 28
	// tickFloor is the smallest cell intensity, relative to the brightest
	// cell, that gets a tick.
	tickFloor = 1e-3
)

// tickColor is the colour of the polarisation ticks, and tickEdge the
// darker line drawn under each, so they read over bright and dark pixels.
var (
	tickColor = color.RGBA{0xf4, 0xfa, 0xff, 0xff}
	tickEdge  = color.RGBA{0x10, 0x24, 0x40, 0xff}
)

// PolarisationTick is one tick of the polarisation map: its centre in
// (α, β) M, its unit direction on the screen, and the cell's fraction.
type PolarisationTick struct {
	Alpha, Beta float64
	DAlpha      float64 // direction of the electric vector on the screen (unit)
	DBeta       float64
	Fraction    float64
	Side        float64 // cell side in M
}

// PolarisationTicks returns the ticks of the frame's polarisation map.
// The electric vector's position angle χ = ½ atan2(U, Q) (north through
// east) is turned back to the screen with the position angle PA of +β
// (inverse of scene.SkyOffset): (dα, dβ) = (sin(χ − PA)·(−1), cos(χ − PA)).
// The frame must hold Line, Q and U; a frame without Stokes gives none.
func PolarisationTicks(f *pixels.Frame) []PolarisationTick {
	if f.Q == nil || f.Line == nil {
		return nil
	}
	n := max(1, max(f.W, f.H)/tickCells)
	type cell struct{ i, q, u float64 }
	cw, ch := (f.W+n-1)/n, (f.H+n-1)/n
	cells := make([]cell, cw*ch)
	for k := range f.Fate {
		i, q, u := f.StokesAt(k)
		if math.IsNaN(i) {
			continue
		}
		c := &cells[(k/f.W)/n*cw+(k%f.W)/n]
		c.i += i
		if !math.IsNaN(q) {
			c.q += q
			c.u += u
		}
	}
	top := 0.0
	for _, c := range cells {
		top = math.Max(top, c.i)
	}
	side := float64(n) * f.Res.PixelSize
	pa := f.Res.Observer.PositionAngleDeg * math.Pi / 180
	var out []PolarisationTick
	for ci, c := range cells {
		if !(c.i > tickFloor*top) || !(top > 0) {
			continue
		}
		frac := math.Hypot(c.q, c.u) / c.i
		if !(frac > 0) {
			continue
		}
		chi := math.Atan2(c.u, c.q) / 2
		s, co := math.Sincos(chi - pa)
		x, y := ci%cw, ci/cw
		// Centre of the cell's pixels (the last cells may be narrower).
		i0, i1 := x*n, min(f.W, (x+1)*n)
		j0, j1 := y*n, min(f.H, (y+1)*n)
		a := pixels.PixelAlpha(f.Res, 0) + (float64(i0+i1-1)/2)*f.Res.PixelSize
		b := pixels.PixelBeta(f.Res, 0) - (float64(j0+j1-1)/2)*f.Res.PixelSize
		out = append(out, PolarisationTick{Alpha: a, Beta: b, DAlpha: -s, DBeta: co, Fraction: math.Min(frac, 1), Side: side})
	}
	return out
}

// polarisationDecoration adds the intensity colour bar, the ticks and a
// line with the net polarisation and β₂.
func polarisationDecoration(f *pixels.Frame, sc Scales, p *figure.Panel) {
	intensityBar(f, sc, p)
	ticks := PolarisationTicks(f)
	for _, layer := range []struct {
		c color.RGBA
		w float64
	}{{tickEdge, 3.2}, {tickColor, 1.6}} {
		for _, t := range ticks {
			h := t.Fraction * t.Side / 2
			p.Lines = append(p.Lines, figure.Polyline{
				Points: [][2]float64{{t.Alpha - h*t.DAlpha, t.Beta - h*t.DBeta}, {t.Alpha + h*t.DAlpha, t.Beta + h*t.DBeta}},
				Color:  layer.c, Width: layer.w})
		}
	}
	if f.Q != nil {
		n := f.Net()
		p.Subtitle += fmt.Sprintf(" · %s · net m = %.3g at EVPA %.1f° · β₂ = %.3g at %.0f°",
			fieldWords(f.Res.Polar), n.Fraction, n.Angle*180/math.Pi, cmplxAbs(n.Beta2), cmplxArg(n.Beta2)*180/math.Pi)
	}
}

// fieldWords names the field direction shortly, e.g. "B (r, φ, z) = (0, 1, 0)".
func fieldWords(m scene.PolarisationModel) string {
	return fmt.Sprintf("B (r, φ, z) = (%.2g, %.2g, %.2g)", m.B[0], m.B[1], m.B[2])
}

func cmplxAbs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }
func cmplxArg(z complex128) float64 { return math.Atan2(imag(z), real(z)) }
