package main

import (
	"bytes"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// startCLI runs the command line in a child process (TestSweepChildProcess).
func startCLI(t *testing.T, args ...string) (*exec.Cmd, *bytes.Buffer) {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestSweepChildProcess$")
	cmd.Env = append(os.Environ(), "KERRSCOPE_SWEEP_CHILD="+strings.Join(args, "\x1f"))
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	return cmd, &stderr
}

// cpuSeconds returns the processor time a process has used so far, from
// /proc/PID/stat (utime and stime, in the kernel's fixed 100 ticks per
// second, proc(5)).
func cpuSeconds(pid int) float64 {
	data, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return 0
	}
	f := strings.Fields(string(data[bytes.LastIndexByte(data, ')')+1:]))
	if len(f) < 13 {
		return 0
	}
	u, _ := strconv.Atoi(f[11])
	s, _ := strconv.Atoi(f[12])
	return float64(u+s) / 100
}

// waitUntil polls cond every millisecond for up to two minutes.
func waitUntil(t *testing.T, what string, cond func() bool) {
	t.Helper()
	deadline := time.Now().Add(2 * time.Minute)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatalf("timed out waiting until %s", what)
		}
		time.Sleep(time.Millisecond)
	}
}

// hidden lists the staging folders, journals and other partial files
// (everything hidden but the lock files and the record) in dir.
func hidden(dir string) []string {
	ents, _ := os.ReadDir(dir)
	var out []string
	for _, e := range ents {
		n := e.Name()
		if strings.HasPrefix(n, ".") && n != ".kerrscope-lock" && n != ".kerrscope-commit-lock" && !strings.HasPrefix(n, ".kerrscope-record-") {
			out = append(out, n)
		}
	}
	return out
}

func visible(t *testing.T, dir string) map[string]string {
	t.Helper()
	ents, _ := os.ReadDir(dir)
	out := map[string]string{}
	for _, e := range ents {
		if !strings.HasPrefix(e.Name(), ".") {
			data, _ := os.ReadFile(filepath.Join(dir, e.Name()))
			out[e.Name()] = string(data)
		}
	}
	return out
}

// Bookkeeping: SIGTERM (a batch scheduler's stop) and SIGINT (Ctrl-C)
// stop render, sweep and lensing with "interrupted" on stderr and the
// shell's status for the signal, 128 + its number (common practice):
// 143 and 130; also while the files are written; no partial file and no
// staging folder is left and the previous run's files stay.
func TestSignalsStopCommands(t *testing.T) {
	if testing.Short() {
		t.Skip("starts child processes")
	}
	root := t.TempDir()
	stopped := func(cmd *exec.Cmd, stderr *bytes.Buffer, sig syscall.Signal, what string) {
		t.Helper()
		if err := cmd.Process.Signal(sig); err != nil {
			t.Fatal(err)
		}
		cmd.Wait()
		want := 128 + int(sig)
		name := map[syscall.Signal]string{syscall.SIGINT: "SIGINT", syscall.SIGTERM: "SIGTERM"}[sig]
		if code := cmd.ProcessState.ExitCode(); code != want || !strings.Contains(stderr.String(), "interrupted by "+name) {
			t.Errorf("%s, %s: %v (exit %d), stderr %q; want exit %d and \"interrupted by %s\"", what, name, cmd.ProcessState, code, stderr.String(), want, name)
		}
	}
	big := []string{"--width", "800", "--height", "800", "--quiet"}

	// Render, while tracing.
	for _, sig := range []syscall.Signal{syscall.SIGTERM, syscall.SIGINT} {
		dir := filepath.Join(root, "render-"+strconv.Itoa(int(sig)))
		cmd, stderr := startCLI(t, append([]string{"render", "--out", dir}, big...)...)
		waitUntil(t, "the render is tracing", func() bool { return cpuSeconds(cmd.Process.Pid) >= 0.3 })
		stopped(cmd, stderr, sig, "render while tracing")
		if v, h := visible(t, dir), hidden(dir); len(v) != 0 || len(h) != 0 {
			t.Errorf("a render stopped while tracing left %d files and %v", len(v), h)
		}
	}

	// Render over an earlier run, while writing its files.
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		dir := filepath.Join(root, "rewrite-"+strconv.Itoa(int(sig)))
		if code, _, errs := runCLI("render", "--width", "24", "--height", "20", "--out", dir, "--quiet"); code != 0 {
			t.Fatal(errs)
		}
		before := visible(t, dir)
		cmd, stderr := startCLI(t, append([]string{"render", "--out", dir, "--spin", "0.3"}, big...)...)
		waitUntil(t, "the render writes its files", func() bool {
			staged := false
			filepath.WalkDir(dir, func(p string, e fs.DirEntry, err error) error {
				staged = staged || (err == nil && e.Type().IsRegular() && strings.Contains(p, ".kerrscope-partial-"))
				return nil
			})
			return staged
		})
		stopped(cmd, stderr, sig, "render while writing")
		after := visible(t, dir)
		same := len(after) == len(before)
		for n, c := range before {
			same = same && after[n] == c
		}
		if !same {
			t.Errorf("a render stopped while writing changed the earlier run's files")
		}
		if h := hidden(dir); len(h) != 0 {
			t.Errorf("a render stopped while writing left %v", h)
		}
	}

	// Sweep, between and within frames.
	dir := filepath.Join(root, "sweep")
	sweep := []string{"sweep", "--vary", "inclination=10:80:30", "--width", "48", "--height", "40",
		"--maps", "redshift", "--formats", "bare,csv", "--out", dir, "--quiet"}
	cmd, stderr := startCLI(t, sweep...)
	waitUntil(t, "the sweep has recorded a frame", func() bool {
		data, _ := os.ReadFile(filepath.Join(dir, "sweep-shard-1-of-1.json"))
		return bytes.Contains(data, []byte(`"index": 0`))
	})
	stopped(cmd, stderr, syscall.SIGTERM, "sweep")
	if !strings.Contains(stderr.String(), "run the same command again") {
		t.Errorf("sweep: stderr %q does not say how to finish", stderr.String())
	}
	if h := hidden(dir); len(h) != 0 {
		t.Errorf("a stopped sweep left %v", h)
	}
	if code, out, errs := runCLI(sweep...); code != 0 || !strings.Contains(out, "already finished") {
		t.Errorf("resumed sweep: exit %d\n%s%s", code, out, errs)
	}

	// Lensing over many directions.
	var dirs []string
	for d := 0; d < 20000; d++ {
		dirs = append(dirs, strconv.Itoa(d%360))
	}
	cmd, stderr = startCLI(t, "lensing", "--orders", "8", "--directions", strings.Join(dirs, ","))
	waitUntil(t, "lensing is measuring", func() bool { return cpuSeconds(cmd.Process.Pid) >= 0.2 })
	stopped(cmd, stderr, syscall.SIGTERM, "lensing")
}
