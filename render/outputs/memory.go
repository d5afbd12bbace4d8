package outputs

import (
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// The memory model of one run (Run, or one sweep frame). Its terms follow
// what the renderer allocates; the constants were fitted to the peak
// resident memory measured with /usr/bin/time (README.md, "Memory").
const (
	// memBase is the resident memory of the program before it renders:
	// code, runtime, goroutine stacks.
	memBase = 10 << 20
	// memFigures is what drawing decorated figures adds once: the
	// figure canvases (about 900 pixels across whatever the map size),
	// the rasteriser's buffers and the cached glyphs of the fonts.
	memFigures = 33 << 20
	// memImagePerWorker is the map image each drawing worker reuses
	// (RGBA, 4 bytes per pixel).
	memImagePerWorker = 4
	// memContour is the radius figure's contour field (float32 per pixel).
	memContour = 4
	// memEncoded is the encoded PNGs held until they are written in
	// order (bytes per pixel, all image files together; measured: the
	// fast encoder's output of our maps is well below 1 byte per pixel
	// per file).
	memEncoded = 4
	// refinePointBytes is one refinement corner sample: fate, first
	// order and scene.MaxOrders hits of four float32 and a flag;
	// refineChunk is the number of pixel rows refined at once.
	refinePointBytes = 4 + 20*scene.MaxOrders
	refineChunk      = 32
	// memRingsOrder is the rings figure's image of one order (RGBA,
	// bytes per pixel); all orders are held until the grid is drawn.
	memRingsOrder = 4
	// memRingsPanel is one panel of the rings figure, drawn with maps
	// 300–450 pixels across (figure.DrawGrid): its canvas and its copy
	// in the grid; memRingsFigure is what the rings figure adds once
	// (fonts and rasteriser buffers of its smaller canvases, in place of
	// memFigures when it is the only figure).
	memRingsPanel  = 2 << 20
	memRingsFigure = 1 << 20
	// memCanvasPixel is a figure canvas's bytes per pixel (RGBA and
	// gg's clip mask); canvases are at most canvasAspect times as tall as
	// wide, and memFigures covers those up to memCanvasBase bytes (about
	// 900 × 700 pixels). Wider figures (output.column, width_mm, dpi) add
	// the rest for each figure drawn at once.
	memCanvasPixel = 5
	canvasAspect   = 1.5
	memCanvasBase  = 900 * 700 * memCanvasPixel
)

// MemoryEstimate returns the expected peak resident memory, in bytes, of
// rendering r and writing the artifacts of set s, drawing images on up to
// workers goroutines (GOMAXPROCS in the command). It is the sum of
//
//   - the program (memBase);
//   - the records the artifacts need (Needs): 2 bytes per pixel for the
//     fate and first order, 4 per kept record, image order and pixel
//     (the hidden crossings of KeepBehind only on an opaque disk; Q and
//     U of KeepStokes are two records), and
//     8 more per order and pixel for the time delays and azimuths of a
//     delay map;
//   - with refinement, the corner samples of refineChunk + 1 rows;
//   - when images are drawn: one reused map image per drawing worker, the
//     radius contour field, the encoded PNGs, and the figure canvases;
//   - for the rings figure, one image and one panel per order and its
//     fonts and buffers;
//   - for figures wider than about 900 pixels, their larger canvases;
//   - the spectra (bins × orders float64, and bins × lines for a line
//     list, three copies).
//
// FITS and CSV are streamed row by row and add nothing that grows with
// the image. It depends only on its arguments, never on the machine.
func MemoryEstimate(r scene.Resolved, s Set, workers int) int64 {
	s = SceneSet(r, s)
	arts := Artifacts(r.Output, s)
	px := int64(r.Screen.Width) * int64(r.Screen.Height)
	n := int64(r.Disk.Orders)
	need := Needs(arts)
	if !r.Disk.Opaque {
		need &^= pixels.KeepBehind // a transparent disk's Line holds it
	}
	records := need.Records()
	spectra := n
	if r.RestLines.List {
		spectra += int64(len(r.RestLines.Lines)) // one more per line of a list
	}
	b := int64(memBase) + px*(2+4*records*n) + 3*8*int64(r.Spectrum.Bins)*spectra
	if r.NeedsTiming() {
		b += px * 8 * n
	}
	if r.Refine.Depth > 0 {
		b += (refineChunk + 1) * int64(r.Screen.Width+1) * refinePointBytes
	}
	drawn := map[string]bool{}
	figures, contour, rings := false, false, false
	for _, a := range arts {
		switch a.Kind {
		case MapFigure, MapBare, MapIndexed, MapSVG:
			drawn[a.Map] = true
			contour = contour || (a.Kind == MapFigure && a.Map == "radius")
			rings = rings || (a.Kind == MapFigure && a.Map == "rings")
		case BandBare, BandFigure, BandRedshift, BandSVG, BandRedshiftSVG:
			drawn["band"] = true
		}
		if (a.Kind == MapFigure && a.Map != "rings") || a.Kind == SpectrumFigure || a.Kind == BandFigure || a.Kind == BandRedshift || a.Kind == MapSVG || a.Kind == SpectrumSVG || a.Kind == BandSVG || a.Kind == BandRedshiftSVG {
			figures = true
		}
	}
	if len(drawn) > 0 {
		b += px * (memImagePerWorker*int64(max(1, min(workers, len(drawn)))) + memEncoded)
	}
	if contour {
		b += px * memContour
	}
	if figures {
		b += memFigures
	}
	if figures || rings {
		w := float64(maps.FigureSize(r.Output).Pixels())
		if extra := int64(memCanvasPixel*canvasAspect*w*w) - memCanvasBase; extra > 0 {
			b += extra * int64(max(1, min(workers, len(arts))))
		}
	}
	if rings {
		b += memRingsFigure + n*(px*memRingsOrder+memRingsPanel)
	}
	return b
}
