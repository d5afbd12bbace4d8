package main

import (
	"context"
	"fmt"
	"io"

	"kerrscope/render/maps"
	"kerrscope/render/spot"
	"kerrscope/render/sweep"
	"kerrscope/scene"
)

// runSpot traces the scene once and writes the movie of its orbiting
// spot: frames, GIF, light curve, centroid track, line profile vs time.
// With --shard or --restart the frames go through the sweep machinery
// (manifest, resume, shards) and sweep-merge writes the rest.
func runSpot(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("spot", stdout)
	base := scene.Default()
	path, vals := sceneFlags(f, base, without(locateOnly, scalesKeys))
	quiet := f.fs.Bool("quiet", false, "no progress bar")
	var sh sweep.Shard
	f.fs.Var(shardFlag{&sh}, "shard", "render only the frames with index mod N = K−1, resumably, recorded in a sweep manifest; when every share is done, kerrscope sweep-merge --out DIR writes the GIF, light curve, centroid and line profile (1/1: one resumable process)")
	restart := f.fs.Bool("restart", false, "with --shard: start over, removing the files the output directory's sweep manifests record (unchanged ones only) and the manifests")
	var sc maps.Scales
	f.float(&sc.IMax, "intensity-max", 0, "with --shard: intensity colour scale maximum, > 0 (default: the brightest pixel of any frame)")
	if err := f.parse(args); err != nil {
		return err
	}
	if f.given("intensity-max") && !(sc.IMax > 0) {
		return usagef("--intensity-max %s: must be positive", f.fs.Lookup("intensity-max").Value)
	}
	sharded := f.given("shard")
	for _, name := range []string{"restart", "intensity-max"} {
		if f.given(name) && !sharded {
			return usagef("--%s applies to a movie made in shares: give --shard K/N (1/1 for one resumable process)", name)
		}
	}
	s, err := loadScene(*path, base, *vals)
	if err != nil {
		return err
	}
	r, err := s.Resolve()
	if err != nil {
		return usagef("%w", err)
	}
	sp, err := scene.ResolveSpot(r)
	if err != nil {
		return usagef("%w", err)
	}
	if sharded {
		return runSpotShard(ctx, s, sh, *restart, sc, *quiet, stdout, stderr)
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

// runSpotShard renders the frames of share sh of the movie through
// sweep.Run.
func runSpotShard(ctx context.Context, s scene.Scene, sh sweep.Shard, restart bool, sc maps.Scales, quiet bool, stdout, stderr io.Writer) error {
	plan, err := sweep.NewSpotPlan(s, sc)
	if err != nil {
		return usagef("%w", err)
	}
	rep, err := runPlan(ctx, "spot", plan, sh, restart, quiet, stderr)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "spot movie of %d frames in %s, intensity max %g\n", len(plan.Points), plan.Dir(), rep.Scales.IMax)
	if restart {
		fmt.Fprintf(stdout, "restart: removed %d files that the old run wrote and recorded\n", rep.Removed)
	}
	fmt.Fprintf(stdout, "shard %s: %d frames, %d already finished, %d rendered now\n", rep.Shard, rep.Frames, rep.Skipped, len(rep.Rendered))
	fmt.Fprintf(stdout, "manifest: %s\nwhen every shard is done: kerrscope sweep-merge --out %s\n", rep.Manifest, plan.Dir())
	return nil
}
