// Package outputs writes what a run makes: the decorated figures and
// pixel-exact PNGs of the maps (render/maps), the FITS file of every map,
// the spectrum as CSV and figure, the band report, masks and figures, and
// kerrscope-run.toml. Artifacts is the one list of a run's files; Write makes
// them; Outputs stages them so that a failed run leaves nothing behind;
// Run ties a render (render/pixels) to its files.
package outputs

import (
	"context"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Options control a render run.
type Options struct {
	Version string // program version recorded in the outputs
	// Progress, if not nil, is called with the number of rows traced.
	Progress func(rows int)
	Scales   maps.Scales // fixed colour scales; zero = chosen per frame
	Band     bool        // also locate the scene's band of source radii
}

// Summary is what a run did.
type Summary struct {
	Files   []string           // paths written, sorted
	Photons int64              // photons traced, framing and clip estimate included
	Band    *pixels.BandReport // when Options.Band
	// Rings are the measured widths of the photon rings, orders 1 and
	// up (maps.RingWidths), when the scene asks for the rings map.
	Rings []maps.RingWidth
	// Scene is the scene rendered, with its window concrete
	// (pixels.FrameWindow).
	Scene scene.Resolved
	// Clip estimates the line flux outside the window when the disk
	// image touches its border (pixels.EstimateClip); nil otherwise.
	Clip *pixels.Clip
}

// Run renders the scene and writes every requested output into its
// directory: figures, pixel-exact PNGs, a FITS file of all maps, the
// spectrum (CSV and plot), the band report and masks (Options.Band) and
// kerrscope-run.toml (the effective scene). An automatic window is framed
// first (pixels.FrameWindow), and the files record the concrete one. When
// the disk image touches the window's border, the line flux outside it
// is estimated (pixels.EstimateClip) and recorded in the spectrum CSV,
// the FITS header, the run record and Summary.Clip. The directory is locked for the
// whole run (a second writer gets a *BusyError), and the files of the
// last run into it that this one does not write again are removed with
// the commit; on any error the last run's files are left as they were.
func Run(ctx context.Context, r scene.Resolved, opt Options) (Summary, error) {
	if err := ctx.Err(); err != nil {
		return Summary{}, err
	}
	lk, err := Lock(r.Output.Directory)
	if err != nil {
		return Summary{}, err
	}
	defer lk.Unlock()
	arts := Artifacts(r.Output, SceneSet(r, Set{Band: opt.Band, Manifest: true}))
	if err := CheckInputs(r, arts); err != nil {
		return Summary{}, err
	}
	framed, framing, err := pixels.FrameWindowTraced(ctx, r)
	if err != nil {
		return Summary{}, err
	}
	r = framed
	f, err := pixels.RenderChecked(ctx, r, opt.Progress, Needs(arts))
	if err != nil {
		return Summary{}, err
	}
	if f.Clip != nil {
		framing += f.Clip.Samples
	}
	out, err := NewOutputs(ctx, lk, "render")
	if err != nil {
		return Summary{}, err
	}
	sum := Summary{Photons: f.Photons + framing, Scene: r, Clip: f.Clip}
	if slices.Contains(r.Output.Maps, "rings") {
		sum.Rings = maps.RingWidths(f)
	}
	job := Job{Frame: f, Scales: opt.Scales, Version: opt.Version}
	if opt.Band {
		rep, err := f.LocateBand()
		if err != nil {
			out.Abort()
			return Summary{}, err
		}
		sum.Band = &rep
		job.Band = &Band{Report: rep, Mask: f.Band}
	}
	if err := Write(ctx, arts, job, out.Write); err != nil {
		out.Abort()
		return Summary{}, err
	}
	sum.Files, err = out.Commit()
	return sum, err
}

// WriteManifest writes the effective scene as TOML, headed by the program
// version, so that `kerrscope render --scene kerrscope-run.toml` reproduces
// the outputs exactly.
func WriteManifest(w io.Writer, s scene.Scene, version string) error {
	return writeManifestNote(w, s, version, "")
}

// writeManifest writes the frame's effective scene (WriteManifest), with
// the ClipNote as a comment when the window clips the disk and the colour
// scales sc used, as comments in the scene's keys (ScalesNote).
func writeManifest(w io.Writer, f *pixels.Frame, version string, sc maps.Scales) error {
	note := ""
	if f.Clip != nil {
		note = "# " + ClipNote(*f.Clip) + "\n"
	}
	return writeManifestNote(w, f.Res.Scene, version, note+ScalesNote(f.Res.Scales, sc))
}

// ScalesNote returns the colour scales sc of a run as TOML comments:
// the [scales] keys with the values used, which the scene (fixed) either
// gave or left to the program. A run of the same scene chooses the same
// values again; copied into [scales] they fix them for another scene.
func ScalesNote(fixed scene.Scales, sc maps.Scales) string {
	p := 0.0
	if fixed.Percentile != nil {
		p = *fixed.Percentile
	}
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	var b strings.Builder
	fmt.Fprintf(&b, "# colour scales used (percentile %s); to fix them for another scene, copy into [scales]:\n", num(p))
	for _, kv := range []struct {
		key string
		v   float64
	}{{"g_min", sc.GMin}, {"g_max", sc.GMax}, {"intensity_max", sc.IMax}, {"intensity_decades", sc.IDecades},
		{"radius_min", sc.RMin}, {"radius_max", sc.RMax}, {"flux_max", sc.FluxMax}} {
		if kv.v > 0 {
			fmt.Fprintf(&b, "#   %s = %s\n", kv.key, num(kv.v))
		}
	}
	return b.String()
}

func writeManifestNote(w io.Writer, s scene.Scene, version, note string) error {
	text, err := s.TOML()
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "# kerrscope %s — effective scene of this run; render it again with\n#   kerrscope render --scene kerrscope-run.toml\n%s\n%s", version, note, strings.TrimLeft(string(text), "\n"))
	return err
}
