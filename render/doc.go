// Package render is the renderer's pipeline; its stages are the
// subpackages, and their names show the order the data flows in:
//
//	render/pixels   compute: photons → per-pixel records, refinement, the
//	                line spectrum, band location (no files, colours or terminal)
//	render/maps     the table of maps: per-pixel records → colour classes,
//	                images, palettes and decorated figure panels
//	render/outputs  the one list of a run's files and their writers
//	                (PNG figures, FITS, CSV, band reports, manifest),
//	                staged so that a failed run leaves nothing behind
//	render/sweep    many scenes over a grid of values: plans, shards,
//	                resumable manifests, merged animations
//	render/live     the local page of kerrscope explore: the view
//	                re-rendered live, probes, save and render
//
// Helpers that are not an API live under render/internal: figure (drawing
// with gg), fits (the FITS writer, hand-written: no Go FITS module is
// available to us) and workers (the one worker pool).
package render
