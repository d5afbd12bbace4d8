package figure

import (
	"errors"
	"fmt"
	"image"
	"io"
	"math"
	"slices"
)

// minCellMM is the narrowest grid cell: a map with its axes and 8 pt
// labels needs about this much width to stay legible.
const minCellMM = 40.0

// DrawGrid draws panels side by side, up to cols to a row (row-major,
// left to right), above one caption made of title and subtitle. The grid
// is as wide as the first panel's Size; each panel is drawn in a cell of
// an equal share of that width (at least minCellMM, fewer columns when
// needed) with its own axes, colour bar and caption (its Title as the
// lead). With scale > 0 each map is instead magnified by scale and the
// grid grows to fit.
func DrawGrid(title, subtitle string, panels []Panel, cols int, scale float64) (*image.RGBA, error) {
	d, err := layoutGrid(title, subtitle, panels, cols, scale)
	if err != nil {
		return nil, err
	}
	return d.raster(), nil
}

// GridSVG writes the grid of DrawGrid (scale 0) as an SVG document.
func GridSVG(w io.Writer, title, subtitle string, panels []Panel, cols int) error {
	d, err := layoutGrid(title, subtitle, panels, cols, 0)
	if err != nil {
		return err
	}
	return d.svg(w)
}

func layoutGrid(title, subtitle string, panels []Panel, cols int, scale float64) (drawing, error) {
	if len(panels) == 0 {
		return drawing{}, errors.New("figure: grid has no panels")
	}
	if cols < 1 {
		return drawing{}, fmt.Errorf("figure: grid of %d columns", cols)
	}
	for i, p := range panels {
		if p.Image == nil {
			return drawing{}, fmt.Errorf("figure: grid panel %d has no image", i)
		}
	}
	size := panels[0].Size
	if err := size.Validate(); err != nil {
		return drawing{}, err
	}
	full := size.resolved()
	cols = min(cols, len(panels), max(1, int(full.WidthMM/minCellMM)))
	rows := (len(panels) + cols - 1) / cols
	cell := Size{WidthMM: full.WidthMM / float64(cols), DPI: full.DPI, px: size.Pixels() / cols}
	ds := make([]drawing, len(panels))
	release := func() {
		for _, d := range ds {
			if d.done != nil {
				d.done()
			}
		}
	}
	// The flat colours are explained once, in the grid's caption.
	var fills []Swatch
	for _, p := range panels {
		for _, f := range p.Fills {
			if !slices.Contains(fills, f) {
				fills = append(fills, f)
			}
		}
	}
	cw, ch := 0, 0
	for i, p := range panels {
		p.Size = cell
		p.Fills = nil
		d, _, err := layoutPanel(p, scale)
		if err != nil {
			release()
			return drawing{}, fmt.Errorf("grid panel %d: %w", i, err)
		}
		ds[i] = d
		cw, ch = max(cw, d.w), max(ch, d.h)
	}
	em := size.em()
	st, err := getStyles(em)
	if err != nil {
		release()
		return drawing{}, err
	}
	fw := max(cols*cw, size.Pixels())
	if scale > 0 {
		fw = cols * cw
	}
	capn := caption{lead: title, text: subtitle}
	for _, f := range fills {
		capn.keys = append(capn.keys, keyEntry{sample: &keySample{color: f.Color}, label: f.Label})
	}
	capW := float64(fw) - 2*st.pad
	capH := 0.0
	if !capn.empty() {
		capH = captionHeight(st, capn, capW) + st.pad
	}
	fh := rows*ch + int(math.Ceil(capH))
	if fw > maxSide || fh > maxSide {
		putStyles(em, st)
		release()
		return drawing{}, fmt.Errorf("figure: grid of %d×%d pixels is too large", fw, fh)
	}
	x0 := (fw - cols*cw) / 2
	draw := func(dc canvas) {
		for i, d := range ds {
			dc.Push()
			dc.Translate(float64(x0+(i%cols)*cw+(cw-d.w)/2), float64((i/cols)*ch))
			d.draw(dc)
			dc.Pop()
		}
		if !capn.empty() {
			drawCaption(dc, st, capn, st.pad, float64(rows*ch), capW)
		}
	}
	done := func() {
		putStyles(em, st)
		release()
	}
	return drawing{w: fw, h: fh, dpi: full.DPI, draw: draw, done: done}, nil
}
