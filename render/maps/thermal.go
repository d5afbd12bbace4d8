package maps

import (
	"math"
	"strconv"

	"kerrscope/colormap"
	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
)

// pixelRow gives a per-pixel quantity of the frame along row j.
func pixelRow(at func(f *pixels.Frame, k int) float32) func(*pixels.Frame, int, []float32) {
	return func(f *pixels.Frame, j int, row []float32) {
		k0 := j * f.W
		for i := range row {
			row[i] = at(f, k0+i)
		}
	}
}

// temperatureAt and colorTemperatureAt are the quantities of the
// temperature maps (pixels.Frame.TemperatureAt, ColorTemperatureAt).
func temperatureAt(f *pixels.Frame, k int) float32      { return f.TemperatureAt(k) }
func colorTemperatureAt(f *pixels.Frame, k int) float32 { return f.ColorTemperatureAt(k) }

// frameRange returns the smallest and largest positive value of at over
// the frame; (1, 10) when there is none, and a decade around a single
// value.
func frameRange(f *pixels.Frame, at func(*pixels.Frame, int) float32) (lo, hi float64) {
	lo, hi = math.Inf(1), 0
	for k := 0; k < f.W*f.H; k++ {
		if v := float64(at(f, k)); v > 0 {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	switch {
	case hi == 0:
		return 1, 10
	case !(hi > lo*(1+1e-6)):
		return lo / math.Sqrt(10), hi * math.Sqrt(10)
	}
	return lo, hi
}

// logPosition places a temperature map's values on a log scale over the
// frame's range.
func logPosition(at func(*pixels.Frame, int) float32) func(*pixels.Frame, Scales) func(float64) float64 {
	return func(f *pixels.Frame, _ Scales) func(float64) float64 {
		return colormap.LogScale(frameRange(f, at))
	}
}

// logBar returns the decoration of a map on logPosition: a colour bar
// with log ticks over the frame's range.
func logBar(at func(*pixels.Frame, int) float32, label string) func(*pixels.Frame, Scales, *figure.Panel) {
	return func(f *pixels.Frame, _ Scales, p *figure.Panel) {
		lo, hi := frameRange(f, at)
		bar := &figure.ColorBar{Colors: colormap.Sequential.Table(256), Label: label}
		for _, v := range logTicks(lo, hi) {
			bar.Ticks = append(bar.Ticks, figure.Tick{T: colormap.Log(v, lo, hi), Label: strconv.FormatFloat(v, 'g', 3, 64)})
		}
		p.Bar = bar
	}
}
