package figure

import (
	"errors"
	"fmt"
	"image"
	"image/draw"
	"math"

	"github.com/fogleman/gg"
)

// DrawGrid draws panels side by side, cols to a row (row-major, left to
// right), under a common title and subtitle. Each panel is drawn as by
// DrawPanel with the same magnification scale (≤ 0: one that makes each
// map 300–450 pixels across) and keeps its own axes, title lines and
// colour bar; every cell of the grid is as large as the largest panel,
// and each panel sits at the top of its cell, centred across it.
func DrawGrid(title, subtitle string, panels []Panel, cols int, scale float64) (*image.RGBA, error) {
	if len(panels) == 0 {
		return nil, errors.New("figure: grid has no panels")
	}
	if cols < 1 {
		return nil, fmt.Errorf("figure: grid of %d columns", cols)
	}
	cols = min(cols, len(panels))
	rows := (len(panels) + cols - 1) / cols
	side := 0
	for i, p := range panels {
		if p.Image == nil {
			return nil, fmt.Errorf("figure: grid panel %d has no image", i)
		}
		b := p.Image.Bounds()
		side = max(side, b.Dx(), b.Dy())
	}
	if scale <= 0 {
		scale = gridScale(side)
	}
	imgs := make([]*image.RGBA, len(panels))
	cw, ch := 0, 0
	for i, p := range panels {
		img, err := DrawPanel(p, scale)
		if err != nil {
			return nil, fmt.Errorf("grid panel %d: %w", i, err)
		}
		imgs[i] = img
		cw, ch = max(cw, img.Bounds().Dx()), max(ch, img.Bounds().Dy())
	}
	em := 0.022 * math.Max(1, math.Round(float64(side)*scale)) * math.Min(2, float64(cols))
	st, err := getStyles(em)
	if err != nil {
		return nil, err
	}
	defer putStyles(em, st)
	titleH := math.Ceil(titleHeight(st, title, subtitle))
	if titleH > 0 {
		titleH += st.pad
	}
	fw := cols * cw
	fw = max(fw, int(math.Ceil(math.Max(width(st.title, title), width(st.subtitle, subtitle))+2*st.pad)))
	fh := int(titleH) + rows*ch
	if fw > maxSide || fh > maxSide {
		return nil, fmt.Errorf("figure: grid of %d×%d pixels is too large", fw, fh)
	}
	out := image.NewRGBA(image.Rect(0, 0, fw, fh))
	dc := gg.NewContextForRGBA(out)
	dc.SetColor(white)
	dc.Clear()
	x0 := (fw - cols*cw) / 2
	for i, img := range imgs {
		at := image.Pt(x0+(i%cols)*cw+(cw-img.Bounds().Dx())/2, int(titleH)+(i/cols)*ch)
		draw.Draw(out, img.Bounds().Add(at), img, image.Point{}, draw.Src)
	}
	drawTitle(dc, st, title, subtitle, float64(fw)/2, st.pad)
	return out, nil
}

// gridScale is DrawGrid's magnification for maps of the given largest
// side: a whole number that makes them 300–450 pixels across when there
// is one, otherwise the factor that makes them 400 across.
func gridScale(side int) float64 {
	m := float64(side)
	if m <= 450 {
		if s := math.Floor(450 / m); s*m >= 300 {
			return s
		}
	}
	return 400 / m
}
