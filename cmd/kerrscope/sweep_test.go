package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// Bookkeeping: bad sweep input is one line naming the flag, exit status 2.
func TestSweepRejects(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	small := []string{"--width", "16", "--height", "16", "--out", out, "--quiet"}
	cases := []struct {
		args []string
		flag string
	}{
		{[]string{}, "--vary"},
		{[]string{"--vary", "spin"}, "--vary"},
		{[]string{"--vary", "spin=0.5:0.9"}, "--vary"},
		{[]string{"--vary", "colour=1:2:3"}, "--vary"},
		{[]string{"--vary", "width=16:32:2"}, "--vary"},
		{[]string{"--vary", "spin=x:0.9:3"}, "--vary"},
		{[]string{"--vary", "spin=0.5:0.9:0"}, "--vary"},
		{[]string{"--vary", "spin=0.5:0.9:99999999"}, "--vary"},
		{[]string{"--vary", "spin=0:0.9:3:log"}, "--vary"},
		{[]string{"--vary", "spin=0.5:1:3:log1m"}, "--vary"},
		{[]string{"--vary", "spin=0.5:0.9:3:spiral"}, "--vary"},
		{[]string{"--vary", "spin=0.5:1.2:8"}, "--vary"},
		{[]string{"--vary", "inclination=0:200:5"}, "--vary"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--vary", "spin=0.3:0.4:2"}, "--vary"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--vary", "index=2:3:2", "--vary", "line=6:7:2"}, "--vary"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--shard", "0/4"}, "--shard"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--shard", "5/4"}, "--shard"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--shard", "two"}, "--shard"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--g-min", "1.5"}, "--g-min"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--g-max", "0.9"}, "--g-max"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--g-max", "NaN"}, "--g-max"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--intensity-max", "-1"}, "--intensity-max"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--intensity-decades", "40"}, "--intensity-decades"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--radius-min", "8", "--radius-max", "4"}, "--radius-max"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--flux-max", "0"}, "--flux-max"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--orders", "x"}, "--orders"},
		{[]string{"--vary", "spin=0.1:0.2:2", "--outer", "1"}, "outer_radius"},
	}
	for _, c := range cases {
		code, stdout, stderr := runCLI(append(append([]string{"sweep"}, c.args...), small...)...)
		if code != 2 || stdout != "" || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, c.flag) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", c.args, code, stdout, stderr)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("refused sweeps created %s", out)
	}
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{}, "--out"},
		{[]string{"--out", filepath.Join(dir, "none")}, "--out"},
		{[]string{"--out", dir, "--delay-ms", "15"}, "--delay-ms"},
		{[]string{"--out", dir, "--delay-ms", "0"}, "--delay-ms"},
		{[]string{"--out", dir, "--gif", "sky"}, "--gif"},
	} {
		code, stdout, stderr := runCLI(append([]string{"sweep-merge"}, c.args...)...)
		if code != 2 || stdout != "" || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, c.flag) {
			t.Errorf("merge %v: exit %d, stdout %q, stderr %q", c.args, code, stdout, stderr)
		}
	}
}

// Bookkeeping: a two-shard sweep, a re-run, a refused change and a merge
// through the command line.
func TestSweepCommand(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "sweep")
	args := []string{"sweep", "--vary", "spin=0.6:0.99:3:log1m", "--width", "24", "--height", "20",
		"--maps", "redshift", "--formats", "bare,csv", "--out", dir, "--quiet"}
	for _, sh := range []string{"1/2", "2/2"} {
		code, out, errs := runCLI(append(args, "--shard", sh)...)
		if code != 0 || !strings.Contains(out, "shard "+sh) || errs != "" {
			t.Fatalf("shard %s: exit %d\n%s%s", sh, code, out, errs)
		}
	}
	code, out, _ := runCLI(args...)
	if code != 0 || !strings.Contains(out, "3 frames, 3 already finished, 0 rendered now") {
		t.Errorf("re-run: exit %d\n%s", code, out)
	}
	code, _, errs := runCLI(append(args, "--g-max", "3")...)
	if code != 2 || !strings.Contains(errs, "--restart") {
		t.Errorf("changed sweep: exit %d, %q", code, errs)
	}
	code, out, errs = runCLI("sweep-merge", "--out", dir, "--delay-ms", "40")
	if code != 0 || !strings.Contains(out, "sweep-redshift.gif") || !strings.Contains(out, "sweep-spectra.png") {
		t.Fatalf("merge: exit %d\n%s%s", code, out, errs)
	}
}

// TestSweepChildProcess runs the command line given in the environment;
// TestSweepKilled starts it as a separate process.
func TestSweepChildProcess(t *testing.T) {
	args := os.Getenv("KERRSCOPE_SWEEP_CHILD")
	if args == "" {
		t.Skip("only run as a child process")
	}
	os.Exit(run(strings.Split(args, "\x1f"), os.Stdout, os.Stderr))
}

// Bookkeeping: a sweep killed outright (SIGKILL, as a job scheduler's
// hard limit does) leaves only complete files in view and a readable
// manifest whose frames are all intact; the same command then finishes
// the sweep with the same files as an uninterrupted run.
func TestSweepKilled(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a child process")
	}
	root := t.TempDir()
	dir, ref := filepath.Join(root, "killed"), filepath.Join(root, "ref")
	args := func(out string) []string {
		return []string{"sweep", "--vary", "inclination=10:80:30", "--width", "48", "--height", "40",
			"--maps", "redshift,intensity", "--formats", "bare,csv", "--out", out, "--quiet"}
	}
	cmd := exec.Command(os.Args[0], "-test.run=^TestSweepChildProcess$")
	cmd.Env = append(os.Environ(), "KERRSCOPE_SWEEP_CHILD="+strings.Join(args(dir), "\x1f"))
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	manifest := filepath.Join(dir, "sweep-shard-1-of-1.json")
	recorded := func() int {
		data, err := os.ReadFile(manifest)
		if err != nil {
			return 0
		}
		var m struct{ Frames []json.RawMessage }
		if err := json.Unmarshal(data, &m); err != nil {
			t.Fatalf("manifest unreadable while the sweep runs: %v", err)
		}
		return len(m.Frames)
	}
	deadline := time.Now().Add(60 * time.Second)
	for recorded() < 3 && time.Now().Before(deadline) {
		time.Sleep(2 * time.Millisecond)
	}
	cmd.Process.Kill()
	cmd.Wait()
	n := recorded()
	t.Logf("killed with %d of 30 frames recorded", n)
	if n < 3 || n == 30 {
		t.Fatalf("killed after %d of 30 frames; the test needs a sweep in progress", n)
	}
	if code, _, errs := runCLI(args(ref)...); code != 0 {
		t.Fatalf("reference sweep: %s", errs)
	}
	refFiles := map[string][]byte{}
	ents, _ := os.ReadDir(ref)
	for _, e := range ents {
		refFiles[e.Name()], _ = os.ReadFile(filepath.Join(ref, e.Name()))
	}
	ents, _ = os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") || !strings.HasPrefix(e.Name(), "frame-") {
			continue
		}
		data, _ := os.ReadFile(filepath.Join(dir, e.Name()))
		if !bytes.Equal(data, refFiles[e.Name()]) {
			t.Errorf("%s is visible but incomplete or different after the kill", e.Name())
		}
	}
	code, out, errs := runCLI(args(dir)...)
	if code != 0 || !strings.Contains(out, "already finished") {
		t.Fatalf("resume: exit %d\n%s%s", code, out, errs)
	}
	var skipped, rendered int
	for _, line := range strings.Split(out, "\n") {
		if strings.HasPrefix(line, "shard 1/1:") {
			var frames int
			if _, err := fmt.Sscanf(line, "shard 1/1: %d frames, %d already finished, %d rendered now", &frames, &skipped, &rendered); err != nil {
				t.Fatalf("%q: %v", line, err)
			}
		}
	}
	if skipped != n || skipped+rendered != 30 {
		t.Errorf("resume skipped %d and rendered %d; the manifest recorded %d", skipped, rendered, n)
	}
	for name, want := range refFiles {
		if !strings.HasPrefix(name, "frame-") {
			continue
		}
		if got, _ := os.ReadFile(filepath.Join(dir, name)); !bytes.Equal(got, want) {
			t.Errorf("%s differs from the uninterrupted sweep", name)
		}
	}
}
