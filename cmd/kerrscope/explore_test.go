package main

import (
	"bytes"
	"context"
	"io"
	"net/http"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// Bad explore flags are refused in one line naming the flag, with exit
// status 2, before anything listens.
func TestExploreFlagsRefused(t *testing.T) {
	out := filepath.Join(t.TempDir(), "views")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--listen", "0.0.0.0"}, "--listen 0.0.0.0: the view listens on this machine only"},
		{[]string{"--listen", "192.168.1.4"}, "--listen 192.168.1.4"},
		{[]string{"--port", "70000"}, "--port 70000"},
		{[]string{"--view", "5"}, "--view 5 is outside the allowed range"},
		{[]string{"--spin", "1"}, "black_hole.spin = 1: must be in -1 < spin < 1"},
		{[]string{"--maps", "redshift"}, "flag provided but not defined: --maps"},
	} {
		var stdout, stderr bytes.Buffer
		code := run(append([]string{"explore", "--out", out}, c.args...), &stdout, &stderr)
		if code != 2 || !strings.Contains(stderr.String(), c.want) || strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%v: status %d, stderr %q; want 2 and %q", c.args, code, stderr.String(), c.want)
		}
	}
}

// The command prints its address, serves the page there and stops when
// its context ends.
func TestExploreServesUntilStopped(t *testing.T) {
	out := filepath.Join(t.TempDir(), "views")
	ctx, cancel := context.WithCancel(context.Background())
	pr, pw := io.Pipe()
	done := make(chan error, 1)
	go func() {
		done <- runExplore(ctx, []string{"--out", out, "--width", "64", "--height", "64"}, pw, io.Discard)
		pw.Close()
	}()
	line := make([]byte, 512)
	n, err := pr.Read(line)
	if err != nil {
		t.Fatal(err)
	}
	go io.Copy(io.Discard, pr)
	text := string(line[:n])
	i := strings.Index(text, "http://127.0.0.1:")
	if i < 0 {
		t.Fatalf("start line %q has no loopback address", text)
	}
	url := strings.Fields(text[i:])[0]
	resp, err := http.Get(url)
	if err != nil {
		t.Fatal(err)
	}
	body, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	if resp.StatusCode != http.StatusOK || !strings.Contains(string(body), "<title>kerrscope explore</title>") {
		t.Fatalf("GET %s: status %d", url, resp.StatusCode)
	}
	if strings.Contains(string(body), "http://") || strings.Contains(string(body), "https://") {
		t.Error("the page refers to a remote resource")
	}
	cancel()
	select {
	case <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("explore did not stop")
	}
}
