package scene

// The memory model of one render (kerrscope render, demo, locate). Its
// terms follow what the renderer allocates; the constants below them were
// fitted to the peak resident memory measured with /usr/bin/time -v
// (README.md, "Memory").
const (
	// memBase is the resident memory of the program before it renders:
	// code, runtime, goroutine stacks (kerrscope version).
	memBase = 7 << 20
	// memCanvas is the heap of drawing one decorated figure: the figure's
	// RGBA canvas (maps are drawn 600–800 pixels across whatever their
	// size), the rasteriser's buffers and the fonts.
	memCanvas = 24 << 20
	// memPerOrderGC and memOtherGC turn live bytes into peak resident
	// bytes. The Go collector lets the heap grow to twice the live heap
	// before it collects (GOGC=100): the data of every order (records
	// and FITS images), held in large blocks to the end of the FITS
	// file, reach that (fitted: 2.1). The per-pixel maps built and
	// dropped one after another are mostly collected and their memory
	// reused before the heap peaks (fitted: 0.8).
	memPerOrderGC = 2.1
	memOtherGC    = 0.8
)

// Sizes of the renderer's records, in bytes.
const (
	// recordFixed and recordPerOrder are the bytes per pixel of the
	// records: fate and first order (1 byte each), and per order r, g,
	// line and bolometric intensity (float32 each).
	recordFixed, recordPerOrder = 2, 16
	// refinePointBytes is one refinement sample: fate, first order and
	// MaxOrders hits of four float32 and a flag (20 bytes each).
	refinePointBytes = 4 + 20*MaxOrders
	// refineChunk is the number of pixel rows refined at once.
	refineChunk = 32
)

// MemoryEstimate returns the expected peak resident memory, in bytes, of
// rendering r and writing its outputs with the Go collector's default
// setting (GOGC=100). It is the program's base plus the largest of three
// phases of a run, each the bytes live then, weighted by memPerOrderGC
// (data that grows with the orders) and memOtherGC (the rest):
//
//   - tracing: the records (2 + 16 n bytes per pixel for n orders) and,
//     with refinement, the corner samples of refineChunk+1 rows and one
//     spectrum per row of the chunk;
//   - the FITS file, when asked for: the records, the 6 + 3 n images
//     built for it (4 bytes per pixel each), the fate and order maps and
//     one map before it is flipped (12 bytes per pixel);
//   - the figures and pixel-exact PNGs, one map at a time: the records,
//     the map's values, classes, colour positions and RGBA image (17
//     bytes per pixel), the radius contour field (12 bytes per pixel) and
//     one figure canvas;
//
// and the spectra (bins × n float64, three copies). It depends only on
// the scene, never on the machine.
func MemoryEstimate(r Resolved) int64 {
	px := float64(r.Screen.Width) * float64(r.Screen.Height)
	n := float64(r.Disk.Orders)
	bins := float64(r.Spectrum.Bins)
	// Each phase as (bytes that grow with the orders, other bytes).
	perOrder := px * recordPerOrder * n
	other := px*recordFixed + 3*bins*n*8
	if r.Refine.Depth > 0 {
		other += (refineChunk+1)*float64(r.Screen.Width+1)*refinePointBytes + refineChunk*bins*n*8
	}
	peak := memPerOrderGC*perOrder + memOtherGC*other
	phase := func(perOrderExtra, otherExtra float64) {
		peak = max(peak, memPerOrderGC*(px*recordPerOrder*n+perOrderExtra)+memOtherGC*(px*recordFixed+3*bins*n*8+otherExtra))
	}
	if r.Output.Has("fits") {
		phase(px*4*3*n, px*(4*6+12))
	}
	png, bare := r.Output.Has("png"), r.Output.Has("bare")
	if (png || bare) && len(r.Output.Maps) > 0 {
		perMap := 17.0
		canvas := 0.0
		if png {
			canvas = memCanvas
			for _, m := range r.Output.Maps {
				if m == "radius" {
					perMap += 12
				}
			}
		}
		phase(0, px*perMap+canvas)
	} else if png && r.Output.Has("csv") {
		phase(0, memCanvas) // the spectrum plot alone
	}
	return int64(memBase + peak)
}
