package main

import (
	"context"
	"fmt"
	"io"

	"kerrscope/render/spot"
	"kerrscope/scene"
)

// runSpot traces the scene once and writes the movie of its orbiting
// spot: frames, GIF, light curve, centroid track, line profile vs time.
func runSpot(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("spot", stdout)
	path, quiet, vals := sceneFlags(f)
	if err := f.parse(args); err != nil {
		return err
	}
	r, err := buildScene(*path, scene.Default(), *vals)
	if err != nil {
		return err
	}
	sp, err := scene.ResolveSpot(r)
	if err != nil {
		return usagef("%w", err)
	}
	bar := newProgress(progressWriter(*quiet, stderr), "tracing rows")
	rows := r.Screen.Height
	sum, err := spot.Run(ctx, r, sp, spot.Options{Version: version, Progress: func(n int) { bar.set(n, rows) }})
	bar.done()
	if err != nil {
		return interrupted(ctx, err, "no file in "+r.Output.Directory+" was changed")
	}
	fmt.Fprintf(stdout, "spot orbit period %.6g M; flux from %.6g to %.6g\n", sum.Period, sum.FluxMin, sum.FluxMax)
	fmt.Fprintf(stdout, "traced %d photons once for %d frames; wrote %d files in %s\n", sum.Photons, r.Spot.Frames, len(sum.Files), r.Output.Directory)
	return nil
}
