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
}

// Run renders the scene and writes every requested output into its
// directory: figures, pixel-exact PNGs, a FITS file of all maps, the
// spectrum (CSV and plot) and manifest.toml (the effective scene). It
// returns the paths written. On any error nothing new is left behind.
func Run(ctx context.Context, r scene.Resolved, opt Options) ([]string, error) {
	bar := NewProgress(opt.Progress, r.Screen.Height, "tracing rows")
	f, err := Render(ctx, r, bar.Set)
	bar.Done()
	if err != nil {
		return nil, err
	}
	out, err := NewOutputs(r.Output.Directory)
	if err != nil {
		return nil, err
	}
	if err := f.writeAll(out, opt); err != nil {
		out.Abort()
		return nil, err
	}
	return out.Commit()
}

// writeAll stages every output of the frame.
func (f *Frame) writeAll(out *Outputs, opt Options) error {
	version := opt.Version
	o := f.Res.Output
	spec := f.Spectrum()
	if o.Has("fits") {
		if err := out.Write("maps.fits", func(w io.Writer) error { return f.WriteFITS(w, version) }); err != nil {
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
	return out.Write("manifest.toml", func(w io.Writer) error { return WriteManifest(w, f.Res.Scene, version) })
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
