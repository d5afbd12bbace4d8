package colormap

import (
	"image/color"
	"math"
)

// Fixed indices of the reserved colours in a palette built by Palette.
const (
	// NoHitIndex is the palette index of NoHit.
	NoHitIndex = 0
	// ShadowIndex is the palette index of Shadow.
	ShadowIndex = 1
	// PaletteLevels is the number of scale samples in a palette built by
	// Palette, at indices 2 to 255.
	PaletteLevels = 254
)

// paletteFirst is the palette index of a scale's t = 0 entry.
const paletteFirst = 256 - PaletteLevels

// Palette returns a 256-entry palette for image/gif frames: index
// NoHitIndex (0) holds NoHit, index ShadowIndex (1) holds Shadow, and
// indices 2 to 255 hold PaletteLevels samples of m from t = 0 to t = 1.
// Use PaletteIndex to pick entries directly instead of searching for the
// nearest colour.
func Palette(m Map) color.Palette {
	p := make(color.Palette, 0, 256)
	p = append(p, NoHit, Shadow)
	for _, c := range m.Table(PaletteLevels) {
		p = append(p, c)
	}
	return p
}

// PaletteIndex returns the index, in a palette built by Palette, of the
// entry nearest to t: NaN gives NoHitIndex, and t is clamped to [0, 1].
func PaletteIndex(t float64) uint8 {
	if math.IsNaN(t) {
		return NoHitIndex
	}
	return uint8(paletteFirst + int(math.Round(clamp01(t)*(PaletteLevels-1))))
}
