package outputs

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io/fs"
	"maps"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"kerrscope/scene"
)

// Two runs into one directory with different file sets: B replaces some
// of A's files, retires others and adds one.
func sceneA(t *testing.T, dir string) scene.Resolved {
	return resolve(t, func(s *scene.Scene) {
		s.Output.Directory = dir
		s.Screen.Width, s.Screen.Height = 24, 20
		s.Hole.Spin = 0.5
		s.Output.Maps = []string{"intensity", "order"}
		s.Output.Formats = []string{"bare", "fits", "csv"}
	})
}

func sceneB(t *testing.T, dir string) scene.Resolved {
	return resolve(t, func(s *scene.Scene) {
		s.Output.Directory = dir
		s.Screen.Width, s.Screen.Height = 24, 20
		s.Hole.Spin = 0.9
		s.Output.Maps = []string{"order", "redshift"}
		s.Output.Formats = []string{"bare", "csv"}
	})
}

func mustRunScene(t *testing.T, r scene.Resolved) {
	t.Helper()
	if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
}

// view returns the visible files of dir and their contents, with the
// directory's path written as DIR (kerrscope-run.toml records it); folders
// are listed as NAME/.
func view(t *testing.T, dir string) map[string]string {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]string{}
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") {
			continue
		}
		if e.IsDir() {
			out[e.Name()+"/"] = ""
			continue
		}
		data, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		out[e.Name()] = string(bytes.ReplaceAll(data, []byte(dir), []byte("DIR")))
	}
	return out
}

// leftovers lists the staging folders and journals in dir.
func leftovers(t *testing.T, dir string) []string {
	t.Helper()
	ents, _ := os.ReadDir(dir)
	var out []string
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), stagePrefix) || strings.HasPrefix(e.Name(), journalPrefix) {
			out = append(out, e.Name())
		}
	}
	return out
}

// sameView reports whether two views hold the same files with the same
// bytes, and if not, names one difference.
func sameView(got, want map[string]string) (bool, string) {
	for _, n := range slices.Sorted(maps.Keys(want)) {
		g, ok := got[n]
		if !ok {
			return false, n + " is missing"
		}
		if g != want[n] {
			return false, n + " differs"
		}
	}
	for _, n := range slices.Sorted(maps.Keys(got)) {
		if _, ok := want[n]; !ok {
			return false, n + " should not be there"
		}
	}
	return true, ""
}

// reference returns the views of runs A and B into a fresh directory
// each, with the directory written as DIR.
func reference(t *testing.T) (a, b map[string]string) {
	da, db := t.TempDir(), t.TempDir()
	mustRunScene(t, sceneA(t, da))
	mustRunScene(t, sceneB(t, db))
	a, b = view(t, da), view(t, db)
	if len(a) != 5 || len(b) != 4 {
		t.Fatalf("A wrote %v, B wrote %v", slices.Sorted(maps.Keys(a)), slices.Sorted(maps.Keys(b)))
	}
	return a, b
}

var errKilled = errors.New("killed by the test")

// runKilled runs B into dir and stops it dead (a panic, which skips
// every cleanup but the deferred unlocks) after the k-th rename of its
// commit. It reports whether the run got that far.
func runKilled(t *testing.T, dir string, k int) (killed bool) {
	t.Helper()
	hookRenamed = func(n int) {
		if n == k {
			panic(errKilled)
		}
	}
	defer func() {
		hookRenamed = nil
		if r := recover(); r != nil {
			if r != errKilled {
				panic(r)
			}
			killed = true
		}
	}()
	mustRunScene(t, sceneB(t, dir))
	return false
}

// recoverDir takes and releases the directory's lock, as the next run
// does first.
func recoverDir(t *testing.T, dir string) {
	t.Helper()
	lk, err := Lock(dir)
	if err != nil {
		t.Fatal(err)
	}
	lk.Unlock()
}

// dropStaged removes one staged file of the interrupted commit, if any
// is left, so that the commit cannot be completed.
func dropStaged(t *testing.T, dir string) bool {
	t.Helper()
	left, _ := filepath.Glob(filepath.Join(dir, stagePrefix+"*", "new", "*"))
	if len(left) == 0 {
		return false
	}
	if err := os.Remove(left[len(left)-1]); err != nil {
		t.Fatal(err)
	}
	return true
}

// Bookkeeping: a run stopped after any number of renames of its commit
// leaves, once the next run has recovered the directory, exactly the new
// run's files (the staged files are intact) or exactly the old run's
// (a staged file is lost), never a mix; no staging folder or journal
// stays.
func TestCommitStoppedAtEveryRename(t *testing.T) {
	refA, refB := reference(t)
	// Count the renames of B's commit over A.
	dir := t.TempDir()
	mustRunScene(t, sceneA(t, dir))
	total := 0
	hookRenamed = func(n int) { total = n }
	mustRunScene(t, sceneB(t, dir))
	hookRenamed = nil
	// 4 files replaced (2 renames each, the record included), 1 new, 2 retired.
	if total != 11 {
		t.Fatalf("B's commit over A made %d renames, want 11", total)
	}
	mixed, backs := 0, 0
	for k := 1; k <= total; k++ {
		for _, lose := range []bool{false, true} {
			dir := t.TempDir()
			mustRunScene(t, sceneA(t, dir))
			if !runKilled(t, dir, k) {
				t.Fatalf("k = %d: the commit was not stopped", k)
			}
			v := view(t, dir)
			okA, _ := sameView(v, refA)
			okB, _ := sameView(v, refB)
			if !okA && !okB {
				mixed++
			}
			want, which := refB, "B"
			if lose {
				if !dropStaged(t, dir) {
					continue
				}
				want, which = refA, "A"
				backs++
			}
			recoverDir(t, dir)
			if ok, diff := sameView(view(t, dir), want); !ok {
				t.Errorf("stopped after %d of %d renames (staged file lost: %v): want exactly run %s's files, but %s", k, total, lose, which, diff)
			}
			if l := leftovers(t, dir); len(l) != 0 {
				t.Errorf("k = %d: left %v", k, l)
			}
		}
	}
	t.Logf("%d stops showed a mix before recovery; %d recoveries rolled back", mixed, backs)
	if mixed < total/2 || backs < total/2 {
		t.Errorf("only %d mixed states and %d roll-backs: the test does not reach the middle of the commit", mixed, backs)
	}
	// After a recovery the set is whole again: the next run of A retires
	// every file of B.
	dir = t.TempDir()
	mustRunScene(t, sceneA(t, dir))
	runKilled(t, dir, 6)
	mustRunScene(t, sceneA(t, dir))
	if ok, diff := sameView(view(t, dir), refA); !ok {
		t.Errorf("run A after a stopped run B and its recovery: %s", diff)
	}
}

// TestCommitChildProcess runs B into the directory given in the
// environment and blocks after the given number of renames, for
// TestCommitKilled to kill.
func TestCommitChildProcess(t *testing.T) {
	env := os.Getenv("KERRSCOPE_COMMIT_CHILD")
	if env == "" {
		t.Skip("only run as a child process")
	}
	parts := strings.Split(env, "\x1f")
	k, _ := strconv.Atoi(parts[1])
	hookRenamed = func(n int) {
		if n == k {
			os.WriteFile(parts[2], nil, 0o644)
			time.Sleep(time.Hour)
		}
	}
	mustRunScene(t, sceneB(t, parts[0]))
}

// startChild runs the test binary's test name with env set and waits
// for it to create the file ready.
func startChild(t *testing.T, name, env, ready string) *exec.Cmd {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^"+name+"$")
	cmd.Env = append(os.Environ(), env)
	cmd.Stderr = os.Stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(2 * time.Minute)
	for time.Now().Before(deadline) {
		if _, err := os.Stat(ready); err == nil {
			return cmd
		}
		time.Sleep(5 * time.Millisecond)
	}
	cmd.Process.Kill()
	cmd.Wait()
	t.Fatalf("%s never got ready", name)
	return nil
}

// Bookkeeping: a process killed outright (SIGKILL) in the middle of its
// commit; the next run recovers the directory to exactly one run's files.
func TestCommitKilled(t *testing.T) {
	if testing.Short() {
		t.Skip("starts child processes")
	}
	refA, refB := reference(t)
	for _, c := range []struct {
		k    int
		lose bool
	}{{1, false}, {5, false}, {5, true}, {10, true}} {
		root := t.TempDir()
		dir, ready := filepath.Join(root, "out"), filepath.Join(root, "ready")
		mustRunScene(t, sceneA(t, dir))
		cmd := startChild(t, "TestCommitChildProcess", "KERRSCOPE_COMMIT_CHILD="+strings.Join([]string{dir, strconv.Itoa(c.k), ready}, "\x1f"), ready)
		cmd.Process.Kill()
		cmd.Wait()
		want, which := refB, "B"
		if c.lose {
			if !dropStaged(t, dir) {
				t.Fatalf("k = %d: nothing left to lose", c.k)
			}
			want, which = refA, "A"
		}
		// The killed process held the lock; its death released it.
		recoverDir(t, dir)
		if ok, diff := sameView(view(t, dir), want); !ok {
			t.Errorf("killed after %d renames (staged file lost: %v): want exactly run %s's files, but %s", c.k, c.lose, which, diff)
		}
		if l := leftovers(t, dir); len(l) != 0 {
			t.Errorf("k = %d: left %v", c.k, l)
		}
	}
}

// Bookkeeping: a folder with the name of an output file stops the commit
// before anything moves; the error names it and the old files stay. A
// rename that fails in the middle of the commit puts the old files back.
func TestCommitBlocked(t *testing.T) {
	dir := t.TempDir()
	withMaps := func(spin float64, maps ...string) scene.Resolved {
		return resolve(t, func(s *scene.Scene) {
			s.Output.Directory = dir
			s.Screen.Width, s.Screen.Height = 24, 20
			s.Hole.Spin = spin
			s.Output.Maps = maps
			s.Output.Formats = []string{"png", "fits", "csv"}
		})
	}
	mustRunScene(t, withMaps(0.5, "intensity"))
	if err := os.MkdirAll(filepath.Join(dir, "redshift.png", "keep"), 0o755); err != nil {
		t.Fatal(err)
	}
	before := view(t, dir)
	_, err := Run(context.Background(), withMaps(0.7, "intensity", "redshift"), Options{Version: "test"})
	if err == nil || !strings.Contains(err.Error(), "redshift.png") || !strings.Contains(err.Error(), "folder") {
		t.Errorf("want an error naming the folder redshift.png, got %v", err)
	}
	if ok, diff := sameView(view(t, dir), before); !ok {
		t.Errorf("a refused commit changed the directory: %s", diff)
	}
	if _, err := os.Stat(filepath.Join(dir, "redshift.png", "keep")); err != nil {
		t.Errorf("the folder in the way: %v", err)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("left %v", l)
	}

	// A folder that appears during the renames (after the check).
	dir = t.TempDir()
	mustRunScene(t, sceneA(t, dir))
	before = view(t, dir)
	hookRenamed = func(n int) {
		if n == 1 {
			os.Mkdir(filepath.Join(dir, "redshift-bare.png"), 0o755)
		}
	}
	_, err = Run(context.Background(), sceneB(t, dir), Options{Version: "test"})
	hookRenamed = nil
	if err == nil || !strings.Contains(err.Error(), "back in place") {
		t.Fatalf("want an error saying the old files are back, got %v", err)
	}
	before["redshift-bare.png/"] = ""
	if ok, diff := sameView(view(t, dir), before); !ok {
		t.Errorf("a failed commit left a mix: %s", diff)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("left %v", l)
	}
}

// TestLockChildProcess holds the lock of the directory given in the
// environment until killed.
func TestLockChildProcess(t *testing.T) {
	env := os.Getenv("KERRSCOPE_LOCK_CHILD")
	if env == "" {
		t.Skip("only run as a child process")
	}
	dir, ready, _ := strings.Cut(env, "\x1f")
	lk, err := Lock(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer lk.Unlock()
	os.WriteFile(ready, nil, 0o644)
	time.Sleep(time.Hour)
}

// Bookkeeping: a second writer is refused with an error naming the
// directory and the holder's pid, in another process and in this one;
// sweep shards share the lock, but not with a render; a killed holder's
// lock is gone with it.
func TestSecondWriterRefused(t *testing.T) {
	root := t.TempDir()
	dir, ready := filepath.Join(root, "out"), filepath.Join(root, "ready")
	busy := func(err error, pid int) {
		t.Helper()
		var be *BusyError
		if !errors.As(err, &be) || be.PID != pid || !strings.Contains(err.Error(), dir) || !strings.Contains(err.Error(), strconv.Itoa(pid)) {
			t.Errorf("want the busy error of %s held by pid %d, got %v", dir, pid, err)
		}
	}
	if !testing.Short() {
		cmd := startChild(t, "TestLockChildProcess", "KERRSCOPE_LOCK_CHILD="+dir+"\x1f"+ready, ready)
		_, err := Run(context.Background(), sceneB(t, dir), Options{})
		busy(err, cmd.Process.Pid)
		cmd.Process.Kill()
		cmd.Wait()
		if ents, _ := os.ReadDir(dir); len(ents) > 2 {
			t.Errorf("a refused run wrote into %s", dir)
		}
	}
	mustRunScene(t, sceneB(t, dir))

	lk, err := Lock(dir)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Run(context.Background(), sceneA(t, dir), Options{})
	busy(err, os.Getpid())
	_, err = LockShared(dir)
	busy(err, os.Getpid())
	lk.Unlock()

	s1, err := LockShared(dir)
	if err != nil {
		t.Fatal(err)
	}
	s2, err := LockShared(dir)
	if err != nil {
		t.Errorf("a second shard was refused: %v", err)
	}
	_, err = Lock(dir)
	busy(err, os.Getpid())
	s1.Unlock()
	s2.Unlock()
	mustRunScene(t, sceneB(t, dir))
}

// Bookkeeping: staging folders of processes that are gone are removed by
// the next run; those of live processes and of other hosts stay.
func TestStaleStagingRemoved(t *testing.T) {
	dead := exec.Command("true")
	if err := dead.Run(); err != nil {
		t.Skip("no true command:", err)
	}
	live := exec.Command("sleep", "60")
	if err := live.Start(); err != nil {
		t.Skip("no sleep command:", err)
	}
	defer func() { live.Process.Kill(); live.Wait() }()
	dir := t.TempDir()
	d, l := dead.Process.Pid, live.Process.Pid
	gone := []string{fmt.Sprintf(".kerrscope-partial-%d-4711", d), fmt.Sprintf(".kerrscope-partial-%d-%s-4712", d, hostTag())}
	kept := []string{fmt.Sprintf(".kerrscope-partial-%d-4713", l), fmt.Sprintf(".kerrscope-partial-%d-otherhost-4714", d)}
	for _, n := range append(slices.Clone(gone), kept...) {
		if err := os.MkdirAll(filepath.Join(dir, n, "new"), 0o755); err != nil {
			t.Fatal(err)
		}
		os.WriteFile(filepath.Join(dir, n, "new", "redshift.png"), []byte("half"), 0o644)
	}
	mustRunScene(t, sceneB(t, dir))
	for _, n := range gone {
		if _, err := os.Stat(filepath.Join(dir, n)); !errors.Is(err, fs.ErrNotExist) {
			t.Errorf("%s (pid %d is gone) was not removed", n, d)
		}
	}
	for _, n := range kept {
		if _, err := os.Stat(filepath.Join(dir, n)); err != nil {
			t.Errorf("%s: %v", n, err)
		}
	}
}

// cancelWhenStaged is a context that reports cancellation once a staged
// file exists in dir, that is, during the writing stage.
type cancelWhenStaged struct {
	context.Context
	dir string
}

func (c cancelWhenStaged) Err() error {
	staged := 0
	filepath.WalkDir(c.dir, func(p string, e fs.DirEntry, err error) error {
		if err == nil && e.Type().IsRegular() && strings.Contains(p, stagePrefix) {
			staged++
		}
		return nil
	})
	if staged > 0 {
		return context.Canceled
	}
	return nil
}

// Bookkeeping: cancelling while the files are written stops before the
// next file; the previous run's files stay and nothing staged is left.
func TestCancelWhileWriting(t *testing.T) {
	dir := t.TempDir()
	mustRunScene(t, sceneA(t, dir))
	before := view(t, dir)
	_, err := Run(cancelWhenStaged{context.Background(), dir}, sceneB(t, dir), Options{Version: "test"})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("want the cancellation, got %v", err)
	}
	if ok, diff := sameView(view(t, dir), before); !ok {
		t.Errorf("a run cancelled while writing changed the directory: %s", diff)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("left %v", l)
	}
}

// Bookkeeping: a run removes the files of the last run that it does not
// write again, but only those it recorded and that are unchanged; other
// files stay.
func TestOnlyRecordedFilesRetired(t *testing.T) {
	dir := t.TempDir()
	mustRunScene(t, sceneA(t, dir))
	user := map[string]string{"notes.txt": "mine", "maps-old.fits": "also mine"}
	for n, c := range user {
		os.WriteFile(filepath.Join(dir, n), []byte(c), 0o644)
	}
	// A file of ours that the user changed since.
	os.WriteFile(filepath.Join(dir, "intensity-bare.png"), []byte("edited"), 0o644)
	mustRunScene(t, sceneB(t, dir))
	_, refB := reference(t)
	want := maps.Clone(refB)
	maps.Copy(want, user)
	want["intensity-bare.png"] = "edited"
	if ok, diff := sameView(view(t, dir), want); !ok {
		t.Errorf("after run B over run A: %s", diff)
	}
}
