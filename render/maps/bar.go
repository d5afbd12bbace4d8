package maps

import (
	"image"

	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
)

// Bar returns the colour bar (or key of categories) of the map's figure
// for the frame and the scales sc, completed from the frame where zero;
// nil for a map whose figure has none. Animation frames draw it with
// their own layout.
func (m Map) Bar(f *pixels.Frame, sc Scales) *figure.ColorBar {
	var p figure.Panel
	m.decorate(f, sc.Fill(f), &p)
	return p.Bar
}

// NotedFigure is Figure with note (e.g. a sweep frame's swept values)
// after the scene's caption in the subtitle; a map of one panel per
// image order (rings) keeps its panels' own subtitles.
func (m Map) NotedFigure(f *pixels.Frame, sc Scales, img image.Image, note string) (image.Image, error) {
	if note == "" || m.grid != nil {
		return m.Figure(f, sc, img)
	}
	p := m.Decorate(f, sc, img)
	p.Subtitle += "; " + note
	return figure.DrawPanel(p, 0)
}
