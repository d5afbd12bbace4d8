package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"golang.org/x/term"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/scene"
)

// sceneFlag adapts a scene.Field to the flag package; values are applied
// after the scene file is loaded. A value that cannot be read is kept in
// failed (the flag package keeps only its text) for flags.parse to report.
type sceneFlag struct {
	field  scene.Field
	vals   *[]pending
	failed *error
}

type pending struct {
	field scene.Field
	value string
}

func (s sceneFlag) String() string   { return "" }
func (s sceneFlag) IsBoolFlag() bool { return s.field.Bool }
func (s sceneFlag) Set(v string) error {
	// Check the value now so the error names the flag.
	probe := scene.Default()
	if err := s.field.Set(&probe, v); err != nil {
		*s.failed = fmt.Errorf("--%s: %w", s.field.Flag, err)
		return err
	}
	*s.vals = append(*s.vals, pending{s.field, v})
	return nil
}

// sceneFlags registers --scene and one flag per scene value that
// keep accepts (nil: every one). base is the scene the command starts from
// when no --scene is given; --help shows its values as the defaults.
func sceneFlags(f *flags, base scene.Scene, keep func(scene.Field) bool) (path *string, vals *[]pending) {
	vals = &[]pending{}
	f.base = &base
	path = f.fs.String("scene", "", "TOML scene file (flags below override its values)")
	for _, fl := range scene.Fields() {
		if keep == nil || keep(fl) {
			f.fs.Var(sceneFlag{fl, vals, &f.failed}, fl.Flag, fl.Usage+" ["+fl.Key+"]")
		}
	}
	return path, vals
}

// without keeps the scene fields whose keys start with none of prefixes.
func without(prefixes ...string) func(scene.Field) bool {
	return func(fl scene.Field) bool {
		for _, p := range prefixes {
			if strings.HasPrefix(fl.Key, p) {
				return false
			}
		}
		return true
	}
}

// locateOnly are the scene values only the locate command reads.
const locateOnly = "band."

// scaleDefaults states in --help what each command chooses for the
// colour scales left to it: a render from its own image, a sweep from its
// pre-pass.
func scaleDefaults(f *flags, sweep bool) {
	notes := map[string]string{
		"g-min": "from the image", "g-max": "from the image", "intensity-max": "from the image",
		"intensity-decades": "4", "radius-min": "the disk's inner edge", "radius-max": "the disk's outer edge",
		"flux-max": "from the spectrum", "scale-percentile": "0, the whole range",
	}
	if sweep {
		for _, k := range []string{"g-min", "g-max", "intensity-max", "flux-max"} {
			notes[k] = "from a pre-pass"
		}
		notes["radius-min"], notes["radius-max"] = "the smallest inner edge of the frames", "the largest outer edge"
		notes["scale-percentile"] = strconv.FormatFloat(scene.DefaultSweepPercentile, 'g', -1, 64) + ", in the pre-pass"
	}
	for name, note := range notes {
		if fl := f.fs.Lookup(name); fl != nil {
			sep := ": "
			if _, err := strconv.ParseFloat(strings.SplitN(note, ",", 2)[0], 64); err == nil {
				sep = " "
			}
			// Before the scene key, which ends the usage (sceneFlags).
			i := strings.LastIndex(fl.Usage, " [")
			fl.Usage = fl.Usage[:i] + " (default" + sep + note + ")" + fl.Usage[i:]
		}
	}
}

// scalesKeys are the colour scales of maps and spectra, which the spot
// movie does not read (it has its own intensity scale).
const scalesKeys = "scales."

// locateBase is the scene locate starts from: the built-in one, refined,
// because the bands it looks for are thin.
func locateBase() scene.Scene {
	base := scene.Default()
	base.Refine.Depth = 3
	return base
}

// loadScene reads the scene file (or starts from base) and applies the
// flags given on the command line.
func loadScene(path string, base scene.Scene, vals []pending) (scene.Scene, error) {
	s := base
	if path != "" {
		var err error
		if s, err = scene.Load(path); err != nil {
			return s, usagef("--scene: %w", err)
		}
	}
	for _, p := range vals {
		if err := p.field.Set(&s, p.value); err != nil {
			return s, usagef("--%s: %w", p.field.Flag, err)
		}
	}
	return s, nil
}

// buildScene is loadScene followed by validation.
func buildScene(path string, base scene.Scene, vals []pending) (scene.Resolved, error) {
	s, err := loadScene(path, base, vals)
	if err != nil {
		return scene.Resolved{}, err
	}
	r, err := s.Resolve()
	if err != nil {
		return r, flagError(err, vals)
	}
	if o := r.Output.SpectrumOverlay; o != "" {
		// The comparison spectrum is user input too: refuse a bad file
		// before any work.
		if _, err := outputs.ReadOverlay(o); err != nil {
			return r, usagef("%w", err)
		}
	}
	return r, nil
}

// flagError is a usage error of a refused scene value; a colour scale
// given as a flag is named by its flag too, as its range depends on the
// other scale values.
func flagError(err error, vals []pending) error {
	var fe *scene.FieldError
	if errors.As(err, &fe) && strings.HasPrefix(fe.Key, "scales.") {
		for _, p := range vals {
			if p.field.Key == fe.Key {
				return usagef("--%s: %w", p.field.Flag, err)
			}
		}
	}
	return usagef("%w", err)
}

func progressWriter(quiet bool, stderr io.Writer) io.Writer {
	if quiet {
		return nil
	}
	if f, ok := stderr.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		return stderr
	}
	return nil
}

func runRender(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("render", stdout)
	base := scene.Default()
	path, vals := sceneFlags(f, base, without(locateOnly))
	scaleDefaults(f, false)
	quiet := f.fs.Bool("quiet", false, "no progress bar")
	if err := f.parse(args); err != nil {
		return err
	}
	r, err := buildScene(*path, base, *vals)
	if err != nil {
		return err
	}
	return renderAndReport(ctx, r, false, *quiet, stdout, stderr)
}

func runLocate(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("locate", stdout)
	base := locateBase()
	path, vals := sceneFlags(f, base, without("spot."))
	scaleDefaults(f, false)
	quiet := f.fs.Bool("quiet", false, "no progress bar")
	if err := f.parse(args); err != nil {
		return err
	}
	r, err := buildScene(*path, base, *vals)
	if err != nil {
		return err
	}
	return renderAndReport(ctx, r, true, *quiet, stdout, stderr)
}

func runDemo(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	demo, err := scene.Demo()
	if err != nil {
		return err
	}
	f := newFlags("demo", stdout)
	path, vals := sceneFlags(f, demo, without(locateOnly))
	scaleDefaults(f, false)
	f.hide("scene") // the demo's scene is built in
	quiet := f.fs.Bool("quiet", false, "no progress bar")
	if err := f.parse(args); err != nil {
		return err
	}
	if *path != "" {
		return usagef("--scene: the demo uses its built-in scene (use kerrscope render --scene)")
	}
	r, err := buildScene("", demo, *vals)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "demo: an invented black hole, %s\n", r.Caption())
	return renderAndReport(ctx, r, false, *quiet, stdout, stderr)
}

func renderAndReport(ctx context.Context, r scene.Resolved, band, quiet bool, stdout, stderr io.Writer) error {
	if err := checkMemory(r, outputs.Set{Band: band, Manifest: true}); err != nil {
		return err
	}
	bar := newProgress(progressWriter(quiet, stderr), "tracing rows")
	rows := r.Screen.Height
	sum, err := outputs.Run(ctx, r, outputs.Options{Version: version, Progress: func(n int) { bar.set(n, rows) }, Band: band, Scales: maps.FromScene(r.Scales)})
	bar.done()
	if err != nil {
		return interrupted(ctx, err, "no file in "+r.Output.Directory+" was changed")
	}
	if sum.Clip != nil {
		fmt.Fprintf(stderr, "kerrscope: warning: %s\n", outputs.ClipNote(*sum.Clip))
	}
	if sum.Band != nil {
		if err := outputs.WriteBandText(stdout, *sum.Band); err != nil {
			return err
		}
		fmt.Fprintln(stdout)
	}
	for _, w := range sum.Rings {
		fmt.Fprintf(stdout, "photon ring n = %d: %s\n", w.Order, w.Caption(r.MicroArcsecPerM))
	}
	if il := r.Emissivity.Illumination; il != nil {
		fmt.Fprintln(stdout, lampLine(il))
	}
	fmt.Fprintf(stdout, "traced %d photons; wrote %d files:\n", sum.Photons, len(sum.Files))
	for _, p := range sum.Files {
		fmt.Fprintf(stdout, "  %s\n", p)
	}
	return nil
}

var _ flag.Value = sceneFlag{}
