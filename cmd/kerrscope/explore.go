package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"net/http"
	"time"

	"kerrscope/render/live"
	"kerrscope/scene"
)

func runExplore(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("explore", stdout)
	base := scene.Default()
	path, vals := sceneFlags(f, base, without(locateOnly, "spot.", "output."))
	out := f.fs.String("out", "kerrscope-explore", "the folder the page may write into: saved scenes and renders (created if missing)")
	host := f.fs.String("listen", "127.0.0.1", "address to listen on: 127.0.0.1, ::1 or localhost (this machine only)")
	port := f.fs.Int("port", 0, "port to listen on (0: a free one, printed at start)")
	size := f.fs.Int("view", live.DefaultSize, fmt.Sprintf("view size in pixels along its larger side, %d to %d", live.MinSize, live.MaxSize))
	if err := f.parse(args); err != nil {
		return err
	}
	s, err := loadScene(*path, base, *vals)
	if err != nil {
		return err
	}
	if _, err := s.Resolve(); err != nil {
		return usagef("%w", err)
	}
	if *size < live.MinSize || *size > live.MaxSize {
		return usagef("--view %d is outside the allowed range %d to %d pixels", *size, live.MinSize, live.MaxSize)
	}
	srv, err := live.New(live.Config{Base: s, OutDir: *out, Version: version, Size: *size})
	if err != nil {
		return usagef("--out: %w", err)
	}
	ln, err := live.Listener(*host, *port)
	var pe *live.ParamError
	if errors.As(err, &pe) {
		return usagef("--%s %s: %s", pe.Param, pe.Value, pe.Allowed)
	}
	if err != nil {
		return err
	}
	srv.SetContext(ctx)
	hs := srv.HTTPServer()
	fmt.Fprintf(stdout, "kerrscope explore: http://%s/   (writes only into %s; Ctrl-C stops)\n", ln.Addr(), srv.OutDir())
	done := make(chan error, 1)
	go func() { done <- hs.Serve(ln) }()
	select {
	case err := <-done:
		return err
	case <-ctx.Done():
	}
	shut, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	if err := hs.Shutdown(shut); err != nil && !errors.Is(err, http.ErrServerClosed) {
		return err
	}
	srv.Wait(shut)
	return ctx.Err()
}
