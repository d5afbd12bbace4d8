package sweep

import (
	"context"
	"errors"
	stdmaps "maps"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"kerrscope/render/maps"
)

// userFiles are files a user keeps beside a sweep, some named like
// sweep files.
var userFiles = map[string]string{
	"frame-1-holiday.png":    "a photo",
	"sweep-budget.csv":       "cpu hours\n",
	"frame-0002-spectrum.ps": "a plot of my own",
	"notes.txt":              "spin sweep for the paper",
}

func addUserFiles(t *testing.T, dir string) {
	t.Helper()
	for n, c := range userFiles {
		if err := os.WriteFile(filepath.Join(dir, n), []byte(c), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func checkUserFiles(t *testing.T, dir string) {
	t.Helper()
	for n, c := range userFiles {
		if got, err := os.ReadFile(filepath.Join(dir, n)); err != nil || string(got) != c {
			t.Errorf("user file %s: %q, %v", n, got, err)
		}
	}
}

// Bookkeeping: --restart removes the files the manifests record (frames,
// merged files) and the manifests, and nothing else: neither user files
// named like sweep files nor recorded files changed since.
func TestRestartRemovesOnlyRecordedFiles(t *testing.T) {
	dir := t.TempDir()
	specs := []string{"inclination=30:75:3"}
	mustRun(t, testPlan(t, dir, specs, nil, maps.Scales{}), Options{})
	if _, err := Merge(context.Background(), dir, MergeOptions{}); err != nil {
		t.Fatal(err)
	}
	addUserFiles(t, dir)
	// A recorded file the user has since replaced.
	edited := filepath.Join(dir, "frame-0002-spectrum.csv")
	os.WriteFile(edited, []byte("my own numbers\n"), 0o644)

	rep := mustRun(t, testPlan(t, dir, []string{"spin=0.1:0.9:2"}, nil, maps.Scales{}), Options{Restart: true})
	// 3 frames of 5 files, less the edited one; 3 merged files; 1 manifest.
	if rep.Removed != 3*5-1+3+1 {
		t.Errorf("removed %d files, want 18", rep.Removed)
	}
	checkUserFiles(t, dir)
	if got, _ := os.ReadFile(edited); string(got) != "my own numbers\n" {
		t.Errorf("an edited file was removed or changed: %q", got)
	}
	want := append(slices.Sorted(stdmaps.Keys(userFiles)), "frame-0002-spectrum.csv", "sweep-shard-1-of-1.json")
	for _, k := range []int{0, 1} {
		want = append(want, testPlan(t, dir, []string{"spin=0.1:0.9:2"}, nil, maps.Scales{}).fileNames(k)...)
	}
	slices.Sort(want)
	if got := slices.Sorted(stdmaps.Keys(dirFiles(t, dir, ""))); !slices.Equal(got, want) {
		t.Errorf("after the restart:\n got %v\nwant %v", got, want)
	}
}

// Bookkeeping: --restart works when a manifest is cut short or is not a
// manifest at all: those are set aside (renamed, kept for inspection),
// the whole file records left in a cut manifest still count, and user
// files stay. Without --restart such a manifest is refused with a hint.
func TestRestartWithBrokenManifest(t *testing.T) {
	dir := t.TempDir()
	specs := []string{"inclination=30:75:3"}
	mustRun(t, testPlan(t, dir, specs, nil, maps.Scales{}), Options{})
	addUserFiles(t, dir)
	path := filepath.Join(dir, "sweep-shard-1-of-1.json")
	whole, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	// Cut in the middle of frame 2's records (as a full disk would).
	cut := whole[:strings.Index(string(whole), `"frame-0002-intensity-bare.png"`)+10]
	os.WriteFile(path, cut, 0o644)
	garbage := filepath.Join(dir, "sweep-shard-2-of-2.json")
	os.WriteFile(garbage, []byte("not a manifest\n"), 0o644)

	p := testPlan(t, dir, specs, nil, maps.Scales{})
	if _, err := Run(context.Background(), p, Options{}); err == nil || !strings.Contains(err.Error(), "--restart") {
		t.Fatalf("a cut manifest without --restart: %v", err)
	}
	rep, err := Run(context.Background(), p, Options{Restart: true})
	if err != nil {
		t.Fatalf("--restart with a cut manifest: %v", err)
	}
	if len(rep.SetAside) != 2 || !slices.Equal(rep.Rendered, []int{0, 1, 2}) {
		t.Fatalf("report %+v", rep)
	}
	for i, want := range [][]byte{cut, []byte("not a manifest\n")} {
		got, err := os.ReadFile(rep.SetAside[i])
		if err != nil || string(got) != string(want) || !strings.Contains(rep.SetAside[i], ".corrupt-") {
			t.Errorf("set aside as %s: %v", rep.SetAside[i], err)
		}
	}
	// Frames 0 and 1 (whole records in the cut text) were removed and
	// rendered again: 10 files.
	if rep.Removed != 10 {
		t.Errorf("removed %d files, want the 10 of frames 0 and 1", rep.Removed)
	}
	checkUserFiles(t, dir)
	if _, err := os.Stat(garbage); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("%s still in the way: %v", garbage, err)
	}
	m := readManifest(t, path)
	if len(m.Frames) != 3 {
		t.Errorf("the new manifest records %d frames", len(m.Frames))
	}
	if _, err := Merge(context.Background(), dir, MergeOptions{}); err != nil {
		t.Errorf("merge after the restart: %v", err)
	}
}

// Bookkeeping: a merge stopped by its context writes nothing.
func TestMergeCancelled(t *testing.T) {
	dir := t.TempDir()
	mustRun(t, testPlan(t, dir, []string{"spin=0.2:0.8:2"}, nil, maps.Scales{}), Options{})
	before := dirFiles(t, dir, "")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Merge(ctx, dir, MergeOptions{}); !errors.Is(err, context.Canceled) {
		t.Errorf("want the cancellation, got %v", err)
	}
	if after := dirFiles(t, dir, ""); len(after) != len(before) {
		t.Errorf("a cancelled merge wrote %v", slices.Sorted(stdmaps.Keys(after)))
	}
}

// Bookkeeping: a temporary manifest left by a killed run of the shard
// is removed by its next run; another shard's is not its business.
func TestLeftoverManifestTempRemoved(t *testing.T) {
	dir := t.TempDir()
	mine := filepath.Join(dir, ".sweep-shard-1-of-2.json.tmp-4711")
	other := filepath.Join(dir, ".sweep-shard-2-of-2.json.tmp-4712")
	for _, p := range []string{mine, other} {
		os.WriteFile(p, []byte(`{"format": "kerrscope sweep`), 0o644)
	}
	mustRun(t, testPlan(t, dir, []string{"spin=0.2:0.8:2"}, nil, maps.Scales{}), Options{Shard: Shard{K: 1, N: 2}})
	if _, err := os.Stat(mine); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("%s stays: %v", mine, err)
	}
	if _, err := os.Stat(other); err != nil {
		t.Errorf("another shard's file: %v", err)
	}
}
