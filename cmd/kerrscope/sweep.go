package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/render/sweep"
	"kerrscope/scene"
)

// axesFlag collects the --vary specifications.
type axesFlag struct{ axes *[]sweep.Axis }

func (a axesFlag) String() string { return "" }
func (a axesFlag) Set(v string) error {
	ax, err := sweep.ParseAxis(v)
	if err != nil {
		return err
	}
	*a.axes = append(*a.axes, ax)
	return nil
}

// shardFlag reads --shard K/N.
type shardFlag struct{ s *sweep.Shard }

func (s shardFlag) String() string { return "" }
func (s shardFlag) Set(v string) error {
	sh, err := sweep.ParseShard(v)
	if err == nil {
		*s.s = sh
	}
	return err
}

func runSweep(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("sweep", stdout)
	base := scene.Default()
	path, vals := sceneFlags(f, base, without(locateOnly))
	scaleDefaults(f, true)
	quiet := f.fs.Bool("quiet", false, "no progress bar")
	var axes []sweep.Axis
	f.fs.Var(axesFlag{&axes}, "vary", "swept value KEY=FROM:TO:COUNT[:SPACING], SPACING linear (default), log or log1m (1 − v log-spaced); KEY a flag or scene key, e.g. spin=0.5:0.999999:60:log1m; give it twice for a grid (required)")
	var sh sweep.Shard
	f.fs.Var(shardFlag{&sh}, "shard", "render only share K of N (frames with index mod N = K−1), e.g. --shard $SLURM_ARRAY_TASK_ID/8 (default 1/1)")
	restart := f.fs.Bool("restart", false, "start over: remove the files the output directory's sweep manifests record (unchanged ones only) and the manifests; unreadable manifests are renamed NAME.corrupt-TIME")
	if err := f.parse(args); err != nil {
		return err
	}
	switch {
	case len(axes) == 0:
		return usagef("--vary is required: KEY=FROM:TO:COUNT[:SPACING], e.g. --vary spin=0.5:0.999999:60:log1m")
	case len(axes) > sweep.MaxAxes:
		return usagef("--vary is given %d times; a sweep varies at most %d values", len(axes), sweep.MaxAxes)
	case len(axes) == 2 && axes[0].Key == axes[1].Key:
		return usagef("--vary: %s is varied twice", axes[0].Key)
	}
	base, err := loadScene(*path, base, *vals)
	if err != nil {
		return err
	}
	if err := base.Scales.Check(); err != nil {
		return flagError(err, *vals)
	}
	plan, err := sweep.NewPlan(base, axes, maps.FromScene(base.Scales))
	var pe *sweep.PointError
	switch {
	case errors.As(err, &pe):
		return usagef("--vary: %w", err)
	case err != nil:
		return usagef("%w", err)
	}
	frame := outputs.Set{Indexed: true}
	estimate := func(r scene.Resolved) int64 { return outputs.MemoryEstimate(r, frame, runtime.GOMAXPROCS(0)) }
	biggest := plan.Points[0].Scene
	for _, pt := range plan.Points {
		if estimate(pt.Scene) > estimate(biggest) {
			biggest = pt.Scene
		}
	}
	if err := checkMemory(biggest, frame); err != nil {
		return err
	}
	rep, err := runPlan(ctx, "sweep", plan, sh, *restart, *quiet, stderr)
	if err != nil {
		return err
	}
	var swept []string
	for _, a := range axes {
		swept = append(swept, a.String())
	}
	s := rep.Scales
	fmt.Fprintf(stdout, "sweep of %d frames (%s) in %s\n", len(plan.Points), strings.Join(swept, " × "), plan.Dir())
	if *restart {
		fmt.Fprintf(stdout, "restart: removed %d files that the old sweep wrote and recorded\n", rep.Removed)
	}
	fmt.Fprintf(stdout, "shard %s: %d frames, %d already finished, %d rendered now\n", rep.Shard, rep.Frames, rep.Skipped, len(rep.Rendered))
	fmt.Fprintf(stdout, "scales: g %g–%g, intensity max %g (%g decades), radius %g–%g M, flux max %g per keV (pre-pass percentile %g)\n",
		s.GMin, s.GMax, s.IMax, s.IDecades, s.RMin, s.RMax, s.FluxMax, plan.Percentile())
	fmt.Fprintf(stdout, "manifest: %s\nwhen every shard is done: kerrscope sweep-merge --out %s\n", rep.Manifest, plan.Dir())
	return nil
}

// mapsFlag reads a comma-separated list of map names.
type mapsFlag struct{ maps *[]string }

func (m mapsFlag) String() string { return "" }
func (m mapsFlag) Set(v string) error {
	out := []string{}
	if strings.TrimSpace(v) != "none" {
		for _, x := range strings.Split(v, ",") {
			x = strings.TrimSpace(x)
			ok := false
			for _, n := range scene.MapNames {
				ok = ok || x == n
			}
			if !ok {
				return fmt.Errorf("unknown map %q (valid: %s, or none)", x, strings.Join(scene.MapNames, ", "))
			}
			out = append(out, x)
		}
	}
	*m.maps = out
	return nil
}

func runSweepMerge(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("sweep-merge", stdout)
	dir := f.fs.String("out", "", "the sweep's output directory (required)")
	var maps []string
	f.fs.Var(mapsFlag{&maps}, "gif", "comma-separated maps to animate, or none (default: the sweep's first map)")
	delay := f.fs.Int("delay-ms", 100, "time each GIF frame is shown, in ms: a multiple of 10 from 10 to 655350")
	bare := f.fs.Bool("bare-gif", false, "GIF frames as the maps alone, without the strip below each with its swept values and colour bar")
	if err := f.parse(args); err != nil {
		return err
	}
	if strings.TrimSpace(*dir) == "" {
		return usagef("--out is required: the directory of the sweep")
	}
	if d := *delay; d < 10 || d > 655350 || d%10 != 0 {
		return usagef("--delay-ms %d: must be a multiple of 10 from 10 to 655350 (GIF timing is in steps of 10 ms)", d)
	}
	if st, err := os.Stat(*dir); err != nil || !st.IsDir() {
		return usagef("--out %s: not a directory", *dir)
	}
	if !f.given("gif") {
		maps = nil
	}
	files, err := sweep.Merge(ctx, *dir, sweep.MergeOptions{GIFs: maps, DelayMS: *delay, Bare: *bare})
	if err != nil {
		return interrupted(ctx, err, "nothing was written")
	}
	fmt.Fprintf(stdout, "wrote %d files:\n", len(files))
	for _, p := range files {
		fmt.Fprintf(stdout, "  %s\n", p)
	}
	return nil
}

// runPlan runs the frames of a sweep plan (sweep or spot, the command's
// name) that belong to shard sh, with a progress bar, and turns its
// errors into the command's: a changed definition is a usage error, an
// interrupt says how far it got.
func runPlan(ctx context.Context, name string, plan *sweep.Plan, sh sweep.Shard, restart, quiet bool, stderr io.Writer) (sweep.Report, error) {
	if sh == (sweep.Shard{}) {
		sh = sweep.Shard{K: 1, N: 1}
	}
	bar := newProgress(progressWriter(quiet, stderr), fmt.Sprintf("%s %s: frames", name, sh))
	rep, err := sweep.Run(ctx, plan, sweep.Options{Shard: sh, Restart: restart, Version: version, Progress: bar.set})
	bar.done()
	for _, p := range rep.SetAside {
		fmt.Fprintf(stderr, "kerrscope %s: set aside an unreadable manifest as %s\n", name, p)
	}
	if len(rep.Clipped) > 0 {
		worst := rep.Clipped[0]
		for _, c := range rep.Clipped[1:] {
			if c.Clip.Fraction > worst.Clip.Fraction {
				worst = c
			}
		}
		fmt.Fprintf(stderr, "kerrscope %s: warning: %d frames clip the disk image; the most, frame %d: %s\n", name, len(rep.Clipped), worst.Index, outputs.ClipNote(worst.Clip))
	}
	switch {
	case errors.Is(err, sweep.ErrDefinitionChanged):
		return rep, usagef("--out %s: %v", plan.Dir(), err)
	case errors.Is(err, context.Canceled):
		return rep, interrupted(ctx, err, fmt.Sprintf("%d frames rendered and recorded in %s; run the same command again to finish", len(rep.Rendered), rep.Manifest))
	}
	return rep, err
}
