package outputs

import (
	"fmt"
	"io"

	"kerrscope/render/internal/fits"
	"kerrscope/render/pixels"
)

// ClipNote is the one-line statement of what a clipped window misses
// (pixels.Clip): the estimated line flux outside the window, absolute
// (in the spectrum's units) and as a fraction of the whole disk image's.
// The command prints it as a warning; the spectrum CSV and the run record
// carry it as a comment.
func ClipNote(c pixels.Clip) string {
	return fmt.Sprintf("the disk image touches the window's border: about %.3g %% of its line flux (%.3g in the spectrum's units) lies outside the window and is missing from the spectrum (estimated on %.3g × %.3g M cells, %d photons); screen.field_of_view = 0 (--fov 0) frames the whole disk",
		100*c.Fraction, c.Outside, c.CellAlpha, c.CellBeta, c.Samples)
}

// writeClipComment writes the frame's ClipNote as a "#" comment line,
// if the window clips the disk.
func writeClipComment(w io.Writer, f *pixels.Frame) error {
	if f.Clip == nil {
		return nil
	}
	_, err := fmt.Fprintf(w, "# %s\n", ClipNote(*f.Clip))
	return err
}

// clipCards are the FITS primary header cards of a clipped window: the
// estimated fraction and amount of line flux outside it.
func clipCards(f *pixels.Frame) []fits.Card {
	if f.Clip == nil {
		return nil
	}
	return []fits.Card{
		{Key: "CLIPFRAC", Value: f.Clip.Fraction, Comment: "est. fraction of line flux outside the window"},
		{Key: "CLIPFLUX", Value: f.Clip.Outside, Comment: "est. line flux outside window [spectrum units]"},
	}
}
