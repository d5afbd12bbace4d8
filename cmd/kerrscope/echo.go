package main

import (
	"context"
	"errors"
	"fmt"
	"io"

	"kerrscope/render/echo"
	"kerrscope/scene"
)

// echoBase is the scene the echo command starts from: the built-in one
// lit by a lamp 5 M above the hole.
func echoBase() scene.Scene {
	base := scene.Default()
	h := 5.0
	base.Emission.Emissivity = "lamp"
	base.Emission.LampHeight = &h
	return base
}

// runEcho traces the scene once with time delays and writes the disk's
// echo of a flash of its lamp: the lamp's profile and fractions, ψ(E, t)
// as FITS and figure, the lag–frequency and lag–energy spectra.
func runEcho(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("echo", stdout)
	base := echoBase()
	path, vals := sceneFlags(f, base, without(locateOnly))
	quiet := f.fs.Bool("quiet", false, "no progress bar")
	var opt echo.Options
	f.float(&opt.Duration, "duration", 0, "time range of the echo after the flash seen directly, M (default: automatic, the latest echo)")
	f.fs.IntVar(&opt.TimeBins, "time-bins", echo.DefaultTimeBins, "time bins of the echo")
	f.float(&opt.Frequency, "lag-frequency", 0, "frequency of the lag–energy spectrum in c³/GM (default: automatic, 1/(8 × mean lag))")
	if err := f.parse(args); err != nil {
		return err
	}
	if err := opt.Check(); err != nil {
		return usagef("--%w", err)
	}
	r, err := buildScene(*path, base, *vals)
	if err != nil {
		return err
	}
	bar := newProgress(progressWriter(*quiet, stderr), "tracing rows")
	rows := r.Screen.Height
	opt.Version = version
	opt.Progress = func(n int) { bar.set(n, rows) }
	sum, err := echo.Run(ctx, r, opt)
	bar.done()
	if err != nil {
		var fe *scene.FieldError
		if errors.As(err, &fe) {
			return usagef("%w", err)
		}
		return interrupted(ctx, err, "no file in "+r.Output.Directory+" was changed")
	}
	il := sum.Illum
	fmt.Fprintln(stdout, lampLine(il))
	fmt.Fprintf(stdout, "echo: first %.4g M, mean lag %.4g M after the direct flash; lag–energy at %.4g c³/GM\n", sum.First, sum.Mean, sum.Frequency)
	fmt.Fprintf(stdout, "traced %d lamp photons and %d screen photons; wrote %d files in %s\n", il.Traced, sum.Photons, len(sum.Files), r.Output.Directory)
	return nil
}

// lampLine reports where the lamp's photons go.
func lampLine(il *scene.Illumination) string {
	return fmt.Sprintf("lamp at %g M: photons to the disk %.6f, to infinity %.6f, into the hole %.6f (disk/infinity %.4g)", il.Height, il.Disk, il.Escape, il.Horizon, il.Reflection())
}
