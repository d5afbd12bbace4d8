package figure

import (
	"testing"

	"golang.org/x/image/font"
)

// TestUprightTextIsGgText checks the raster canvas's direct path for
// upright text against gg's own DrawString (which resamples every glyph
// through its transform): the same labels, with scripts and italics, at
// whole and fractional positions and under a whole-pixel Translate, give
// images that differ by at most one level per channel.
func TestUprightTextIsGgText(t *testing.T) {
	st, err := newStyles(22)
	if err != nil {
		t.Fatal(err)
	}
	labels := []string{"*{β} [µas]", "g = E_{obs}/E_{emit}", "photons cm⁻² s⁻¹ keV⁻¹", "Redshift factor *{g}. a = 0.94"}
	for _, shift := range [][2]float64{{0, 0}, {17, 40}} {
		fast, slow := newRaster(640, 240), newRaster(640, 240)
		for _, c := range []*rasterCanvas{fast, slow} {
			c.Push()
			c.Translate(shift[0], shift[1])
		}
		for i, l := range labels {
			x, y := 10.3+float64(i)*3.7, 40+float64(i)*45.5
			runs := st.text.runs(l)
			fast.text(st.text, runs, x, y, 0)
			if _, _, ok := fast.shift(); !ok {
				t.Fatal("a whole-pixel Translate is not seen as a shift")
			}
			// gg's path, as the canvas draws turned text.
			slow.Context.Push()
			slow.SetColor(st.text.color)
			for _, r := range runs {
				f := st.text.runFace(r)
				slow.SetFontFace(f)
				slow.DrawString(r.s, x, y-shiftPx(st.text, r))
				x += float64(font.MeasureString(f, r.s)) / 64
			}
			slow.Context.Pop()
		}
		worst, inked := 0, 0
		for k := range fast.img.Pix {
			d := int(fast.img.Pix[k]) - int(slow.img.Pix[k])
			worst = max(worst, d, -d)
			if slow.img.Pix[k] != 255 {
				inked++
			}
		}
		if inked < 1000 {
			t.Fatalf("shift %v: only %d inked bytes: nothing drawn?", shift, inked)
		}
		if worst > 1 {
			t.Errorf("shift %v: direct and gg text differ by up to %d levels, want ≤ 1", shift, worst)
		}
	}
}
