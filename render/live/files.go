package live

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"time"

	"kerrscope/render/outputs"
	"kerrscope/scene"
)

// validName is a name the page may give a scene file or a render folder:
// one path element of letters, digits, '.', '_' and '-', not starting
// with a dot.
var validName = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$`)

// PathError is a name refused for writing: outside the output folder,
// not a plain name, or an existing entry that is not of the kind written.
type PathError struct {
	Name   string
	Reason string
}

func (e *PathError) Error() string { return fmt.Sprintf("name %q: %s", e.Name, e.Reason) }

// inside returns the path of name in the output folder, refusing
// anything that is not one plain element there, and an existing entry
// that is a symbolic link or not of the kind asked (dir: a folder, else a
// regular file).
func (s *Server) inside(name string, dir bool) (string, error) {
	if !validName.MatchString(name) || strings.Contains(name, "..") {
		return "", &PathError{Name: scene.Cut(name), Reason: "must be 1 to 64 letters, digits, '.', '_' or '-', starting with a letter or digit, without \"..\" (a name inside the output folder)"}
	}
	p := filepath.Join(s.out, name)
	if rel, err := filepath.Rel(s.out, p); err != nil || rel != name {
		return "", &PathError{Name: name, Reason: "is not inside the output folder"}
	}
	fi, err := os.Lstat(p)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return p, nil
	case err != nil:
		return "", err
	case fi.Mode()&fs.ModeSymlink != 0:
		return "", &PathError{Name: name, Reason: "is a symbolic link; the view writes only real files inside the output folder"}
	case dir && !fi.IsDir():
		return "", &PathError{Name: name, Reason: "exists and is not a folder"}
	case !dir && !fi.Mode().IsRegular():
		return "", &PathError{Name: name, Reason: "exists and is not a regular file"}
	}
	return p, nil
}

// FileRequest names what to write: the view's scene values and a name in
// the output folder (a scene file gets ".toml" added when missing).
type FileRequest struct {
	Params map[string]string `json:"params"`
	Name   string            `json:"name"`
}

// viewScene is the scene of a save or render: the starting scene with the
// page's values, validated, writing its outputs to folder.
func (s *Server) viewScene(params map[string]string, folder string) (scene.Scene, scene.Resolved, error) {
	sc, err := applyParams(s.cfg.Base, params)
	if err != nil {
		return sc, scene.Resolved{}, err
	}
	sc.Output.Directory = folder
	r, err := sc.Resolve()
	if err != nil {
		return sc, r, paramErr(err)
	}
	return sc, r, nil
}

// sceneText is a saved scene: a comment line and the scene's TOML.
func sceneText(sc scene.Scene, version string) ([]byte, error) {
	text, err := sc.TOML()
	if err != nil {
		return nil, err
	}
	head := fmt.Sprintf("# kerrscope %s — scene saved from the interactive view; render it with\n#   kerrscope render --scene FILE\n\n", version)
	return append([]byte(head), text...), nil
}

// writeAtomic writes data to path through a temporary file in the same
// folder, renamed into place, so that a reader never sees half a file.
func writeAtomic(path string, data []byte) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), ".kerrscope-view-*")
	if err != nil {
		return err
	}
	_, err = tmp.Write(data)
	if err == nil {
		err = tmp.Sync()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp.Name(), 0o644)
	}
	if err == nil {
		err = os.Rename(tmp.Name(), path)
	}
	if err != nil {
		os.Remove(tmp.Name())
	}
	return err
}

// savedFile is the answer to a save.
type savedFile struct {
	Path string `json:"path"`
	Name string `json:"name"`
}

func (s *Server) save(w http.ResponseWriter, r *http.Request) {
	var req FileRequest
	if err := readJSON(r, &req); err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	name := req.Name
	if !strings.HasSuffix(name, ".toml") {
		name += ".toml"
	}
	p, err := s.inside(name, false)
	if err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	folder := filepath.Join(s.out, strings.TrimSuffix(name, ".toml"))
	_, rs, err := s.viewScene(req.Params, folder)
	if err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	// The file records the window the view shows, as the run record of a
	// render does: an automatic window framed, so that the scene loads
	// to the same view wherever it is rendered.
	framed, err := s.frames.frame(r.Context(), rs)
	if err != nil {
		writeError(w, http.StatusInternalServerError, err)
		return
	}
	text, err := sceneText(framed.Scene, s.cfg.Version)
	if err == nil {
		err = writeAtomic(p, text)
	}
	if err != nil {
		writeError(w, http.StatusInternalServerError, err)
		return
	}
	writeJSON(w, http.StatusOK, savedFile{Path: p, Name: name})
}

// jobs is the one render from the page that may run at a time.
type jobs struct {
	mu  sync.Mutex
	cur *JobStatus
}

// JobStatus is the progress of a render started from the page.
type JobStatus struct {
	State   string   `json:"state"` // "idle", "running", "done", "failed"
	Name    string   `json:"name,omitempty"`
	Folder  string   `json:"folder,omitempty"`
	Rows    int      `json:"rows"`
	Total   int      `json:"total"`
	Files   []string `json:"files,omitempty"` // relative to the folder
	Photons int64    `json:"photons,omitempty"`
	Seconds float64  `json:"seconds,omitempty"`
	Error   string   `json:"error,omitempty"`
}

func (j *jobs) status() JobStatus {
	j.mu.Lock()
	defer j.mu.Unlock()
	if j.cur == nil {
		return JobStatus{State: "idle"}
	}
	st := *j.cur
	st.Files = append([]string(nil), j.cur.Files...)
	return st
}

// Wait blocks until no render from the page runs, or ctx ends.
func (s *Server) Wait(ctx context.Context) error {
	for {
		if st := s.job.status(); st.State != "running" {
			return nil
		}
		select {
		case <-ctx.Done():
			return ctx.Err()
		case <-time.After(20 * time.Millisecond):
		}
	}
}

// Render runs in the background under ctx; Serve sets it.
func (s *Server) renderContext() context.Context {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.bg == nil {
		return context.Background()
	}
	return s.bg
}

// SetContext sets the context that renders started from the page run
// under: cancelling it stops them (their folders are left as they were).
func (s *Server) SetContext(ctx context.Context) {
	s.mu.Lock()
	s.bg = ctx
	s.mu.Unlock()
}

func (s *Server) startRender(w http.ResponseWriter, r *http.Request) {
	var req FileRequest
	if err := readJSON(r, &req); err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	dir, err := s.inside(req.Name, true)
	if err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	_, rs, err := s.viewScene(req.Params, dir)
	if err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	if n := rs.Screen.Width * rs.Screen.Height; n > s.cfg.RenderPixels {
		writeError(w, http.StatusBadRequest, &ParamError{Param: "width", Key: "screen.width", Value: fmt.Sprintf("%d × %d", rs.Screen.Width, rs.Screen.Height),
			Allowed: fmt.Sprintf("a render from the view has at most %d pixels (the render command has no such bound)", s.cfg.RenderPixels)})
		return
	}
	if rs.Refine.Depth > s.cfg.RenderDepth {
		writeError(w, http.StatusBadRequest, &ParamError{Param: "refine-depth", Key: "refine.depth", Value: fmt.Sprint(rs.Refine.Depth),
			Allowed: fmt.Sprintf("a render from the view refines at most %d levels", s.cfg.RenderDepth)})
		return
	}
	s.job.mu.Lock()
	if s.job.cur != nil && s.job.cur.State == "running" {
		s.job.mu.Unlock()
		writeError(w, http.StatusConflict, errors.New("a render is running; wait for it to finish"))
		return
	}
	st := &JobStatus{State: "running", Name: req.Name, Folder: dir, Total: rs.Screen.Height}
	s.job.cur = st
	s.job.mu.Unlock()
	go s.runJob(st, rs)
	writeJSON(w, http.StatusAccepted, s.job.status())
}

// runJob renders the scene with outputs.Run and records its progress.
func (s *Server) runJob(st *JobStatus, rs scene.Resolved) {
	t0 := time.Now()
	sum, err := outputs.Run(s.renderContext(), rs, outputs.Options{Version: s.cfg.Version, Progress: func(n int) {
		s.job.mu.Lock()
		st.Rows = n
		s.job.mu.Unlock()
	}})
	s.job.mu.Lock()
	defer s.job.mu.Unlock()
	st.Seconds = time.Since(t0).Seconds()
	if err != nil {
		st.State, st.Error = "failed", err.Error()
		return
	}
	st.State, st.Rows, st.Photons = "done", st.Total, sum.Photons
	for _, f := range sum.Files {
		if rel, err := filepath.Rel(st.Folder, f); err == nil {
			f = rel
		}
		st.Files = append(st.Files, f)
	}
}

func (s *Server) renderStatus(w http.ResponseWriter, r *http.Request) {
	w.Header().Set("Cache-Control", "no-store")
	writeJSON(w, http.StatusOK, s.job.status())
}
