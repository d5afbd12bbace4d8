package sweep

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/render/spot"
	"kerrscope/scene"
)

// spotFrames is the number of frames of the test movies.
const spotFrames = 6

// spotScene is a small movie of a lone spot seen at 60°.
func spotScene(dir string) scene.Scene {
	s := scene.Default()
	s.Hole.Spin = 0.9
	s.Observer.InclinationDeg = 60
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 32, 32, 30
	s.Disk.Orders = 2
	s.Spot.Radius, s.Spot.Size, s.Spot.Alone = 7, 0.7, true
	s.Spot.Frames = spotFrames
	s.Output.Directory = dir
	return s
}

func spotPlan(t *testing.T, dir string) *Plan {
	t.Helper()
	p, err := NewSpotPlan(spotScene(dir), maps.Scales{})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// oneShot writes the movie of spotScene into dir with spot.Run, the
// command's single-process path, and returns its files.
func oneShot(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	r, err := spotScene(dir).Resolve()
	if err != nil {
		t.Fatal(err)
	}
	sp, err := scene.ResolveSpot(r)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := spot.Run(context.Background(), r, sp, spot.Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	return dirFiles(t, dir, "spot")
}

// The frames of a spot movie rendered by two shards one after the other,
// each tracing the screen once, are byte for byte those of one process
// and those spot.Run writes in one go; the merge then writes the GIF, the
// light curve, the centroid track, the line profile and the scene, again
// byte for byte those of spot.Run (an independent path through the same
// trace: it samples every frame in one pass).
func TestSpotShardsMatchOneProcess(t *testing.T) {
	ref := t.TempDir()
	want := oneShot(t, ref)
	if len(want) != spotFrames+8 {
		t.Fatalf("spot.Run wrote %d files, want %d", len(want), spotFrames+8)
	}

	one := t.TempDir()
	p := spotPlan(t, one)
	rep := mustRun(t, p, Options{Version: "test"})
	if p.spot.traces != 1 || len(rep.Rendered) != spotFrames {
		t.Fatalf("one process: %d traces for %d frames, want 1 for %d", p.spot.traces, len(rep.Rendered), spotFrames)
	}

	sharded := t.TempDir()
	for k := 1; k <= 2; k++ {
		p := spotPlan(t, sharded) // a process of its own
		rep := mustRun(t, p, Options{Shard: Shard{K: k, N: 2}, Version: "test"})
		wantIdx := []int{k - 1, k + 1, k + 3}
		if !slices.Equal(rep.Rendered, wantIdx) {
			t.Errorf("shard %d/2 rendered %v, want %v", k, rep.Rendered, wantIdx)
		}
		if p.spot.traces != 1 {
			t.Errorf("shard %d/2 traced %d times, want once", k, p.spot.traces)
		}
		if k == 1 {
			if _, err := Merge(context.Background(), sharded, MergeOptions{}); err == nil || !strings.Contains(err.Error(), "3 of 6 frames are not finished") {
				t.Errorf("merge with one shard missing: %v, want 3 of 6 frames not finished", err)
			}
		}
	}
	for _, dir := range []string{one, sharded} {
		got := dirFiles(t, dir, "spot-frame-")
		if len(got) != spotFrames {
			t.Errorf("%d frames in %s, want %d", len(got), dir, spotFrames)
		}
		for n, b := range got {
			if !bytes.Equal(b, want[n]) {
				t.Errorf("%s in %s differs from spot.Run's", n, dir)
			}
		}
	}
	files, err := Merge(context.Background(), sharded, MergeOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != 9 {
		t.Errorf("merge wrote %d files, want 9 (8 of the movie and the frame table): %v", len(files), files)
	}
	table := string(dirFiles(t, sharded, "sweep-frames.csv")["sweep-frames.csv"])
	if !strings.Contains(table, "\nframe,prefix,spot.time\n0,spot-frame-0000,0\n1,spot-frame-0001,") {
		t.Errorf("frame table does not list the spot frames and their times:\n%s", table)
	}
	got := dirFiles(t, sharded, "spot")
	// The effective scene names its output directory.
	want["spot.toml"] = bytes.ReplaceAll(want["spot.toml"], []byte(ref), []byte(sharded))
	for n, b := range want {
		if !bytes.Equal(b, got[n]) {
			t.Errorf("%s after the merge differs from spot.Run's (%d and %d bytes)", n, len(got[n]), len(b))
		}
	}
}

// A resume re-renders exactly the frames whose files are gone, with the
// scales the manifest records, and one that finds every frame intact does
// not trace at all.
func TestSpotResume(t *testing.T) {
	dir := t.TempDir()
	mustRun(t, spotPlan(t, dir), Options{})
	before := dirFiles(t, dir, "spot-frame-")
	lost := filepath.Join(dir, "spot-frame-0003.png")
	if err := os.Remove(lost); err != nil {
		t.Fatal(err)
	}
	p := spotPlan(t, dir)
	rep := mustRun(t, p, Options{})
	if !slices.Equal(rep.Rendered, []int{3}) || rep.Skipped != spotFrames-1 || p.spot.traces != 1 {
		t.Errorf("resume rendered %v, skipped %d, traced %d times; want [3], %d, once", rep.Rendered, rep.Skipped, p.spot.traces, spotFrames-1)
	}
	if after := dirFiles(t, dir, "spot-frame-"); !bytes.Equal(after["spot-frame-0003.png"], before["spot-frame-0003.png"]) {
		t.Error("the re-rendered frame differs from the first rendering")
	}
	p = spotPlan(t, dir)
	rep = mustRun(t, p, Options{})
	if len(rep.Rendered) != 0 || p.spot.traces != 0 {
		t.Errorf("a finished movie: rendered %v and traced %d times, want nothing", rep.Rendered, p.spot.traces)
	}
}

// A run stopped after some frames (a killed process) leaves them
// recorded; the next run renders the rest, and the frames are those of an
// uninterrupted run.
func TestSpotInterruptedRun(t *testing.T) {
	want := dirFiles(t, func() string { d := t.TempDir(); mustRun(t, spotPlan(t, d), Options{}); return d }(), "spot-frame-")
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	hookStaged = func(index int, _ string) {
		if index == 2 {
			cancel()
		}
	}
	_, err := Run(ctx, spotPlan(t, dir), Options{})
	hookStaged = nil
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("stopped run: %v, want context.Canceled", err)
	}
	if got := dirFiles(t, dir, "spot-frame-"); len(got) != 2 {
		t.Errorf("stopped run left %d frames, want 2 (frame 2 was not committed)", len(got))
	}
	rep := mustRun(t, spotPlan(t, dir), Options{})
	if !slices.Equal(rep.Rendered, []int{2, 3, 4, 5}) {
		t.Errorf("resume rendered %v, want [2 3 4 5]", rep.Rendered)
	}
	got := dirFiles(t, dir, "spot-frame-")
	for n, b := range want {
		if !bytes.Equal(b, got[n]) {
			t.Errorf("%s differs from the uninterrupted run's", n)
		}
	}
}

// Plans of a spot movie that cannot be made are refused with the reason.
func TestSpotPlanErrors(t *testing.T) {
	dir := t.TempDir()
	good := spotPlan(t, dir).Axes[0]
	noSpot := spotScene(dir)
	noSpot.Spot.Size = 0
	bent := good
	bent.Count++
	spin, err := ParseAxis("spin=0.1:0.9:2")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name  string
		make  func() (*Plan, error)
		wants string
	}{
		{"no valid spot", func() (*Plan, error) { return NewSpotPlan(noSpot, maps.Scales{}) }, "spot.size"},
		{"fixed redshift scale", func() (*Plan, error) { return NewSpotPlan(spotScene(dir), maps.Scales{GMin: 0.5}) }, "cannot be fixed"},
		{"axis not the scene's", func() (*Plan, error) { return NewPlan(spotScene(dir), []Axis{bent}, maps.Scales{}) }, "is not the scene's"},
		{"with a second axis", func() (*Plan, error) { return NewPlan(spotScene(dir), []Axis{spin, good}, maps.Scales{}) }, "swept alone"},
		{"no directory", func() (*Plan, error) { return NewSpotPlan(spotScene(""), maps.Scales{}) }, "output.directory"},
	}
	for _, c := range cases {
		if _, err := c.make(); err == nil || !strings.Contains(err.Error(), c.wants) {
			t.Errorf("%s: %v, want an error naming %q", c.name, err, c.wants)
		}
	}
	if _, err := ParseAxis("spot.time=0:10:4"); err == nil {
		t.Error("--vary spot.time was accepted; the time axis is made from the scene's spot")
	}
}
