package maps

import (
	"math"
	"strconv"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
)

// The delay map shows, for the first image order seen in each pixel, how
// much earlier (in Boyer–Lindquist t) its light left the disk than the
// light of the pixel that left last: t_o − t (raytrace.Timing) minus its
// smallest value on the frame (or Scales.TMin). Only such differences
// are physical; the regularisation of t_o − t cancels in them.

// delayRow gives the first-seen delays along row j (NaN where none is
// seen, or everywhere if the frame has no timing).
func delayRow(f *pixels.Frame, j int, row []float32) {
	if f.T == nil {
		for i := range row {
			row[i] = float32(math.NaN())
		}
		return
	}
	firstSeenRow(func(f *pixels.Frame) [][]float32 { return f.T })(f, j, row)
}

// delayRange returns the smallest and largest first-seen delay of the
// frame (0, 0 if none).
func delayRange(f *pixels.Frame) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	if f.T == nil { // no timing: no delays, nothing to gather
		return 0, 0
	}
	for k := 0; k < f.W*f.H; k++ {
		if x := float64(f.FirstSeenAt(f.T, k)); !math.IsNaN(x) && !math.IsInf(x, 0) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	if lo > hi {
		return 0, 0
	}
	return lo, hi
}

func delayPosition(_ *pixels.Frame, sc Scales) func(float64) float64 {
	return func(x float64) float64 { return colormap.Linear(x, sc.TMin, sc.TMax) }
}

// delayBar labels the colour bar in M after the earliest-leaving light.
func delayBar(_ *pixels.Frame, sc Scales, p *figure.Panel) {
	bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: "arrival delay Δ*{t} [M]", Note: "after the earliest light"}
	span := sc.TMax - sc.TMin
	bar.Ticks = endTicks(0, span)
	for _, v := range linearTicks(span) {
		bar.Ticks = append(bar.Ticks, figure.Tick{T: v / span, Label: strconv.FormatFloat(v, 'g', 3, 64)})
	}
	p.Bar = bar
}

// linearTicks returns round values from 0 to span, 3 to 7 of them.
func linearTicks(span float64) []float64 {
	if !(span > 0) || math.IsInf(span, 0) {
		return []float64{0}
	}
	step := math.Pow(10, math.Floor(math.Log10(span)))
	for _, f := range []float64{1, 2, 5, 10} {
		if span/(step*f) <= 6 {
			step *= f
			break
		}
	}
	var out []float64
	for k := 0; k <= 12 && float64(k)*step <= span*(1+1e-9); k++ {
		out = append(out, float64(k)*step)
	}
	return out
}
