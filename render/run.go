package render

import (
	"context"
	"fmt"
	"io"
	"strings"

	"kerrscope/scene"
)

// Options control a render run.
type Options struct {
	Version  string    // program version recorded in the outputs
	Progress io.Writer // progress bar destination; nil = none
	Scales   Scales    // fixed colour scales; zero = chosen per frame
	Band     bool      // also locate the scene's band of source radii
}

// Summary is what a run did.
type Summary struct {
	Files   []string    // paths written, sorted
	Photons int64       // photons traced
	Band    *BandReport // when Options.Band
}

// RenderScene renders the scene's frame: one photon per pixel centre, or with
// adaptive refinement when the scene asks for it.
func RenderScene(ctx context.Context, r scene.Resolved, progress func(rows int)) (*Frame, error) {
	if r.Refine.Depth > 0 {
		f, _, _, err := RenderRefined(ctx, r, Refinement{Depth: r.Refine.Depth, TolR: r.Refine.TolR, TolG: r.Refine.TolG}, true, progress)
		return f, err
	}
	return Render(ctx, r, progress)
}

// Run renders the scene and writes every requested output into its
// directory: figures, pixel-exact PNGs, a FITS file of all maps, the
// spectrum (CSV and plot), the band report and masks (Options.Band) and
// manifest.toml (the effective scene). On any error nothing new is left
// behind.
func Run(ctx context.Context, r scene.Resolved, opt Options) (Summary, error) {
	bar := NewProgress(opt.Progress, r.Screen.Height, "tracing rows")
	f, err := RenderScene(ctx, r, bar.Set)
	bar.Done()
	if err == nil {
		err = CheckFinite(f)
	}
	if err != nil {
		return Summary{}, err
	}
	out, err := NewOutputs(r.Output.Directory)
	if err != nil {
		return Summary{}, err
	}
	sum := Summary{Photons: f.Photons}
	if err := f.writeAll(out, opt, &sum); err != nil {
		out.Abort()
		return Summary{}, err
	}
	sum.Files, err = out.Commit()
	return sum, err
}

// writeAll stages every output of the frame.
func (f *Frame) writeAll(out *Outputs, opt Options, sum *Summary) error {
	o := f.Res.Output
	spec := f.Spectrum()
	if o.Has("fits") {
		if err := out.Write("maps.fits", func(w io.Writer) error { return f.WriteFITS(w, opt.Version) }); err != nil {
			return err
		}
	}
	if o.Has("csv") {
		if err := out.Write("spectrum.csv", func(w io.Writer) error { return spec.WriteCSV(w, f.Res.Caption()) }); err != nil {
			return err
		}
	}
	if err := f.writeFigures(out, &spec, opt.Scales); err != nil {
		return err
	}
	if opt.Band {
		rep, mask := f.LocateBand(f.Res.BandMin, f.Res.BandMax)
		sum.Band = &rep
		if err := f.writeBand(out, rep, mask, opt.Version); err != nil {
			return err
		}
	}
	return out.Write("manifest.toml", func(w io.Writer) error { return WriteManifest(w, f.Res.Scene, opt.Version) })
}

// WriteManifest writes the effective scene as TOML, headed by the program
// version, so that `kerrscope render --scene manifest.toml` reproduces
// the outputs exactly.
func WriteManifest(w io.Writer, s scene.Scene, version string) error {
	text, err := s.TOML()
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "# kerrscope %s — effective scene of this run; render it again with\n#   kerrscope render --scene manifest.toml\n\n%s", version, strings.TrimLeft(string(text), "\n"))
	return err
}
