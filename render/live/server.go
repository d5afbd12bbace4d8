// Package live serves kerrscope's interactive view: one local web page
// (embedded, no remote resources) whose controls set scene values, a map
// re-rendered progressively as they change (a coarse pass, then the full
// view; a newer update cancels an older one), a readout of the photon
// under the pointer (raytrace/survey.Probe), the critical curve and the
// band of source radii as overlays, the view's line profile, and buttons
// that save the view as a scene file and render it with render/outputs
// into the one folder the server may write.
//
// Every value is checked as the scene layer checks it (scene.Field.Set,
// scene.Resolve); a refused one comes back as a JSON error naming the
// parameter, its scene key, the value and what is allowed.
package live

import (
	"context"
	"embed"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"mime"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/goregular"

	"kerrscope/raytrace/survey"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

//go:embed page
var page embed.FS

// Limits of the server.
const (
	// MaxBody bounds a request body: the page sends a few dozen short
	// values.
	MaxBody = 64 << 10
	// UpdateTimeout bounds one view update.
	UpdateTimeout = 30 * time.Second
	// DefaultRenderPixels bounds the screen of a render started from the
	// page (width × height), DefaultRenderDepth its refinement.
	DefaultRenderPixels = 2048 * 2048
	DefaultRenderDepth  = 4
	// MaxProbes bounds the probes traced at once; more wait.
	MaxProbes = 8
	// MaxProbeOrders bounds the crossings a probe lists (as the probe command).
	MaxProbeOrders = 64
)

// Config is how the server is set up.
type Config struct {
	// Base is the scene the page starts from; request values override it.
	Base scene.Scene
	// OutDir is the only folder the server writes into: scene files and
	// render folders, by names the page gives. It is created if missing.
	OutDir string
	// Version is the program version recorded in rendered outputs.
	Version string
	// Size is the default view's larger side in pixels (0: DefaultSize).
	Size int
	// Updates bounds the view updates traced at once (0: 2); more wait.
	Updates int
	// RenderPixels and RenderDepth bound a render started from the page
	// (0: DefaultRenderPixels, DefaultRenderDepth).
	RenderPixels int
	RenderDepth  int
}

// Server is the interactive view. Its Handler is safe for concurrent use.
type Server struct {
	cfg    Config
	out    string // OutDir, absolute with symlinks resolved
	frames frameCache
	slots  chan struct{}
	probes chan struct{} // probes traced at once (MaxProbes)

	mu      sync.Mutex
	running map[string]*update // latest update per page (client id)
	windows map[string]shown   // last full view per page
	seq     uint64

	job jobs
	bg  context.Context // renders from the page run under it (SetContext)

	// beforePass, if not nil, is called before each pass of an update
	// with the page's client id and the pass ("coarse", "full").
	beforePass func(client, pass string)
}

// shown is the window of a page's last full view and its screen.
type shown struct {
	w, h int
	win  Window
}

// lastWindow returns the window of the page's last full view, if its
// screen had the shape of r's.
func (s *Server) lastWindow(client string, r scene.Resolved) (Window, bool) {
	if client == "" {
		return Window{}, false
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	sh, ok := s.windows[client]
	return sh.win, ok && sh.w == r.Screen.Width && sh.h == r.Screen.Height
}

func (s *Server) remember(client string, r scene.Resolved) {
	if client == "" {
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.windows == nil || len(s.windows) > 1024 {
		s.windows = map[string]shown{}
	}
	s.windows[client] = shown{r.Screen.Width, r.Screen.Height, Window{Field: r.Screen.FieldOfView, Alpha: r.Screen.CenterAlpha, Beta: r.Screen.CenterBeta}}
}

// update is an update in flight, cancelled by a newer one of its page.
type update struct {
	id     uint64
	cancel context.CancelCauseFunc
}

// ErrSuperseded is the cause of an update cancelled by a newer one from the
// same page.
var ErrSuperseded = errors.New("a newer view replaced this one")

// New checks the configuration and makes the output folder.
func New(cfg Config) (*Server, error) {
	if cfg.OutDir == "" {
		return nil, errors.New("live: no output folder")
	}
	if cfg.Size == 0 {
		cfg.Size = DefaultSize
	}
	if cfg.Size < MinSize || cfg.Size > MaxSize {
		return nil, fmt.Errorf("view size %d: must be from %d to %d pixels", cfg.Size, MinSize, MaxSize)
	}
	if cfg.Updates <= 0 {
		cfg.Updates = 2
	}
	if cfg.RenderPixels <= 0 {
		cfg.RenderPixels = DefaultRenderPixels
	}
	if cfg.RenderDepth <= 0 {
		cfg.RenderDepth = DefaultRenderDepth
	}
	if _, err := cfg.Base.Resolve(); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(cfg.OutDir, 0o755); err != nil {
		return nil, fmt.Errorf("output folder: %w", err)
	}
	abs, err := filepath.Abs(cfg.OutDir)
	if err == nil {
		abs, err = filepath.EvalSymlinks(abs)
	}
	if err != nil {
		return nil, fmt.Errorf("output folder: %w", err)
	}
	return &Server{cfg: cfg, out: abs, slots: make(chan struct{}, cfg.Updates), probes: make(chan struct{}, MaxProbes), running: map[string]*update{}}, nil
}

// OutDir returns the folder the server writes into (absolute).
func (s *Server) OutDir() string { return s.out }

// Handler returns the page and its API:
//
//	GET  /                 the page (and /page/… its script and style, /font/… the Go fonts)
//	GET  /api/start        starting values of the controls, maps, limits
//	POST /api/view         a view update: NDJSON stream of Stage, coarse then full
//	POST /api/probe        survey.ProbeReport of one screen point (as probe --json)
//	POST /api/save         write the view as a scene file in the output folder
//	POST /api/render       start a render of the view into a folder of the output folder
//	GET  /api/render       the render's progress
func (s *Server) Handler() http.Handler {
	mux := http.NewServeMux()
	sub, _ := fs.Sub(page, "page")
	mux.Handle("GET /page/", http.StripPrefix("/page/", http.FileServerFS(sub)))
	mux.HandleFunc("GET /{$}", func(w http.ResponseWriter, r *http.Request) {
		b, err := page.ReadFile("page/index.html")
		if err != nil {
			http.Error(w, err.Error(), http.StatusInternalServerError)
			return
		}
		w.Header().Set("Content-Type", "text/html; charset=utf-8")
		w.Write(b)
	})
	fonts := map[string][]byte{"regular.ttf": goregular.TTF, "bold.ttf": gobold.TTF, "mono.ttf": gomono.TTF}
	mux.HandleFunc("GET /font/{name}", func(w http.ResponseWriter, r *http.Request) {
		b, ok := fonts[r.PathValue("name")]
		if !ok {
			http.NotFound(w, r)
			return
		}
		w.Header().Set("Content-Type", "font/ttf")
		w.Header().Set("Cache-Control", "max-age=86400")
		w.Write(b)
	})
	mux.HandleFunc("GET /api/start", s.start)
	mux.HandleFunc("POST /api/view", s.view)
	mux.HandleFunc("POST /api/probe", s.probe)
	mux.HandleFunc("POST /api/save", s.save)
	mux.HandleFunc("POST /api/render", s.startRender)
	mux.HandleFunc("GET /api/render", s.renderStatus)
	return guard(mux)
}

// guard refuses requests that do not come from a page of this server: a
// Host header that is not a loopback name (a page elsewhere reaching the
// server through a rebound name), and a POST that is not JSON (a form
// another site submits). It bounds every body to MaxBody and sets the
// page's security headers: nothing loads from anywhere else.
func guard(h http.Handler) http.Handler {
	if m := mime.TypeByExtension(".js"); m == "" {
		_ = mime.AddExtensionType(".js", "text/javascript")
	}
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if !loopbackHost(r.Host) {
			writeError(w, http.StatusForbidden, &ParamError{Param: "Host", Value: scene.Cut(r.Host), Allowed: "the view answers only to 127.0.0.1, [::1] or localhost"})
			return
		}
		if r.Method == http.MethodPost {
			if ct, _, _ := mime.ParseMediaType(r.Header.Get("Content-Type")); ct != "application/json" {
				writeError(w, http.StatusUnsupportedMediaType, &ParamError{Param: "Content-Type", Value: scene.Cut(r.Header.Get("Content-Type")), Allowed: "must be application/json"})
				return
			}
		}
		r.Body = http.MaxBytesReader(w, r.Body, MaxBody)
		w.Header().Set("Content-Security-Policy", "default-src 'self'; img-src 'self' data:; style-src 'self'; script-src 'self'; font-src 'self'; connect-src 'self'; frame-ancestors 'none'")
		w.Header().Set("X-Content-Type-Options", "nosniff")
		w.Header().Set("Referrer-Policy", "no-referrer")
		h.ServeHTTP(w, r)
	})
}

// loopbackHost reports whether a Host header names this machine.
func loopbackHost(host string) bool {
	h, _, err := net.SplitHostPort(host)
	if err != nil {
		h = host
	}
	h = strings.Trim(h, "[]")
	if strings.EqualFold(h, "localhost") {
		return true
	}
	ip := net.ParseIP(h)
	return ip != nil && ip.IsLoopback()
}

// Listener opens a listening socket for the server: on a loopback address
// only (127.0.0.1, ::1 or localhost), at port (0: a free one).
func Listener(host string, port int) (net.Listener, error) {
	if host == "" {
		host = "127.0.0.1"
	}
	if !loopbackHost(host) {
		return nil, &ParamError{Param: "listen", Value: scene.Cut(host), Allowed: "the view listens on this machine only: 127.0.0.1, ::1 or localhost"}
	}
	if port < 0 || port > 65535 {
		return nil, &ParamError{Param: "port", Value: fmt.Sprint(port), Allowed: "must be from 0 (a free port) to 65535"}
	}
	return net.Listen("tcp", net.JoinHostPort(strings.Trim(host, "[]"), fmt.Sprint(port)))
}

// HTTPServer returns an http.Server for the handler with the timeouts of
// a local page.
func (s *Server) HTTPServer() *http.Server {
	return &http.Server{
		Handler:           s.Handler(),
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       10 * time.Second,
		WriteTimeout:      UpdateTimeout + 10*time.Second,
		IdleTimeout:       2 * time.Minute,
		MaxHeaderBytes:    16 << 10,
	}
}

// errorBody is the JSON of a refused request.
type errorBody struct {
	Error string      `json:"error"`
	Field *ParamError `json:"field,omitempty"`
}

func writeError(w http.ResponseWriter, code int, err error) {
	body := errorBody{Error: err.Error()}
	var pe *ParamError
	if errors.As(err, &pe) {
		body.Field = pe
	}
	writeJSON(w, code, body)
}

func writeJSON(w http.ResponseWriter, code int, v any) {
	w.Header().Set("Content-Type", "application/json")
	w.WriteHeader(code)
	json.NewEncoder(w).Encode(v)
}

// readJSON decodes a request body into v: one JSON object, no unknown
// fields, at most MaxBody bytes.
func readJSON(r *http.Request, v any) error {
	dec := json.NewDecoder(r.Body)
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		var mb *http.MaxBytesError
		if errors.As(err, &mb) {
			return &ParamError{Param: "body", Allowed: fmt.Sprintf("larger than %d bytes", MaxBody)}
		}
		return &ParamError{Param: "body", Value: scene.Cut(err.Error()), Allowed: "must be one JSON object of the page's request"}
	}
	if _, err := dec.Token(); err != io.EOF {
		return &ParamError{Param: "body", Allowed: "must hold one JSON object only"}
	}
	return nil
}

// startInfo is what the page starts from.
type startInfo struct {
	Params       []Initial `json:"params"`
	Maps         []string  `json:"maps"`
	Size         int       `json:"size"`
	MaxSize      int       `json:"max_size"`
	OutDir       string    `json:"out_dir"`
	MaxOrders    int       `json:"max_orders"`
	RenderPixels int       `json:"render_pixels"`
}

func (s *Server) start(w http.ResponseWriter, r *http.Request) {
	writeJSON(w, http.StatusOK, startInfo{Params: initials(s.cfg.Base), Maps: mapNames(), Size: s.cfg.Size,
		MaxSize: MaxSize, OutDir: s.out, MaxOrders: scene.MaxOrders, RenderPixels: s.cfg.RenderPixels})
}

// ViewRequest is a view update.
type ViewRequest struct {
	// Client identifies the page: a newer update of the same client
	// cancels the older one.
	Client   string            `json:"client"`
	Params   map[string]string `json:"params"`
	Settings Settings          `json:"settings"`
}

// prepare validates an update and frames its window.
func (s *Server) prepare(ctx context.Context, req ViewRequest) (*view, error) {
	client := req.Client
	v := &view{size: req.Settings.Size}
	if v.size == 0 {
		v.size = s.cfg.Size
	}
	if v.size < MinSize || v.size > MaxSize {
		return nil, &ParamError{Param: "size", Value: fmt.Sprint(v.size), Allowed: fmt.Sprintf("must be from %d to %d pixels", MinSize, MaxSize)}
	}
	var err error
	if v.mp, err = req.Settings.mapOf(); err != nil {
		return nil, err
	}
	if v.scales, err = req.Settings.scales(); err != nil {
		return nil, err
	}
	v.band = req.Settings.Band
	base := s.cfg.Base
	// The map shown decides what the model traces (the delay map
	// needs time delays).
	base.Output.Maps = []string{v.mp.Name}
	rs, err := resolve(base, req.Params)
	if err != nil {
		return nil, err
	}
	if v.order, err = req.Settings.order(rs.Disk.Orders); err != nil {
		return nil, err
	}
	if f, ok := s.frames.cached(rs); ok {
		v.scene = f
		return v, nil
	}
	if w, ok := s.lastWindow(client, rs); ok {
		// Framing traces more photons than the view: the coarse pass
		// shows the page's last window meanwhile.
		v.scene, v.unframed = rs.WithWindow(w.Field, w.Alpha, w.Beta), &rs
		return v, nil
	}
	if v.scene, err = s.frames.frame(ctx, rs); err != nil {
		return nil, err
	}
	return v, nil
}

// begin registers an update of a page, cancelling its older one.
func (s *Server) begin(ctx context.Context, client string) (context.Context, func()) {
	ctx, cancel := context.WithCancelCause(ctx)
	if client == "" {
		return ctx, func() { cancel(nil) }
	}
	s.mu.Lock()
	s.seq++
	u := &update{id: s.seq, cancel: cancel}
	if old := s.running[client]; old != nil {
		old.cancel(ErrSuperseded)
	}
	if len(s.running) > 1024 {
		clear(s.running) // stale pages; their updates end on their own
	}
	s.running[client] = u
	s.mu.Unlock()
	return ctx, func() {
		s.mu.Lock()
		if s.running[client] == u {
			delete(s.running, client)
		}
		s.mu.Unlock()
		cancel(nil)
	}
}

// view answers an update with a stream of NDJSON lines: the coarse pass,
// then the full one; or, when a newer update of the page or the client
// cancels it, a last line {"stage": "cancelled"}.
func (s *Server) view(w http.ResponseWriter, r *http.Request) {
	var req ViewRequest
	if err := readJSON(r, &req); err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	if len(req.Client) > 64 {
		writeError(w, http.StatusBadRequest, &ParamError{Param: "client", Allowed: "at most 64 characters"})
		return
	}
	ctx, cancelTimeout := context.WithTimeout(r.Context(), UpdateTimeout)
	defer cancelTimeout()
	ctx, end := s.begin(ctx, req.Client)
	defer end()
	v, err := s.prepare(ctx, req)
	if err != nil {
		if ctx.Err() != nil {
			s.cancelled(w, ctx, false)
			return
		}
		writeError(w, http.StatusBadRequest, err)
		return
	}
	select {
	case s.slots <- struct{}{}:
		defer func() { <-s.slots }()
	case <-ctx.Done():
		s.cancelled(w, ctx, false)
		return
	}
	w.Header().Set("Content-Type", "application/x-ndjson")
	w.Header().Set("Cache-Control", "no-store")
	enc := json.NewEncoder(w)
	flush := func() {
		if f, ok := w.(http.Flusher); ok {
			f.Flush()
		}
	}
	coarse := max(MinSize/2, v.size/coarseDivisor)
	for _, pass := range []struct {
		size int
		full bool
	}{{coarse, false}, {v.size, true}} {
		if s.beforePass != nil {
			s.beforePass(req.Client, map[bool]string{false: "coarse", true: "full"}[pass.full])
		}
		t0 := time.Now()
		if pass.full && v.unframed != nil {
			framed, err := s.frames.frame(ctx, *v.unframed)
			if ctx.Err() != nil {
				s.cancelled(w, ctx, true)
				return
			}
			if err != nil {
				enc.Encode(map[string]string{"stage": "error", "error": err.Error()})
				return
			}
			v.scene, v.unframed = framed, nil
		}
		st, err := v.render(ctx, pass.size, pass.full)
		if ctx.Err() != nil {
			s.cancelled(w, ctx, true)
			return
		}
		if err != nil {
			enc.Encode(map[string]string{"stage": "error", "error": err.Error()})
			return
		}
		st.Millis = float64(time.Since(t0).Microseconds()) / 1000
		enc.Encode(st)
		flush()
		if pass.full {
			s.remember(req.Client, v.scene)
		}
	}
}

// cancelled ends an update that was cancelled.
func (s *Server) cancelled(w http.ResponseWriter, ctx context.Context, streaming bool) {
	reason := "cancelled"
	if c := context.Cause(ctx); c != nil {
		reason = c.Error()
	}
	if !streaming {
		w.Header().Set("Content-Type", "application/x-ndjson")
	}
	json.NewEncoder(w).Encode(map[string]string{"stage": "cancelled", "reason": reason})
}

// ProbeRequest asks for the photon of one screen point.
type ProbeRequest struct {
	Params map[string]string `json:"params"`
	Alpha  *float64          `json:"alpha"`
	Beta   *float64          `json:"beta"`
	// Orders is the number of crossings to list, 1 to MaxProbeOrders
	// (0: 3, as the probe command).
	Orders int `json:"orders"`
}

// probeReport is the probe of the command line (kerrscope probe): the
// scene values of params, image orders raised to the crossings asked for,
// survey.Probe with the model's redshift.
func probeReport(base scene.Scene, req ProbeRequest) (survey.ProbeReport, error) {
	if req.Alpha == nil || req.Beta == nil {
		return survey.ProbeReport{}, &ParamError{Param: "alpha", Allowed: "alpha and beta are required (screen coordinates in M)"}
	}
	orders := req.Orders
	if orders == 0 {
		orders = 3
	}
	if orders < 1 || orders > MaxProbeOrders {
		return survey.ProbeReport{}, &ParamError{Param: "orders", Value: fmt.Sprint(orders), Allowed: fmt.Sprintf("must be from 1 to %d", MaxProbeOrders)}
	}
	s, err := applyParams(base, req.Params)
	if err != nil {
		return survey.ProbeReport{}, err
	}
	s.Disk.Orders = min(orders, scene.MaxOrders)
	rs, err := s.Resolve()
	if err != nil {
		return survey.ProbeReport{}, paramErr(err)
	}
	m, err := pixels.NewModel(rs)
	if err != nil {
		return survey.ProbeReport{}, err
	}
	a, b := *req.Alpha, *req.Beta
	if !(a >= -scene.MaxLength && a <= scene.MaxLength) {
		return survey.ProbeReport{}, &ParamError{Param: "alpha", Value: fmt.Sprint(a), Allowed: fmt.Sprintf("must be within ±%g M", scene.MaxLength)}
	}
	if !(b >= -scene.MaxLength && b <= scene.MaxLength) {
		return survey.ProbeReport{}, &ParamError{Param: "beta", Value: fmt.Sprint(b), Allowed: fmt.Sprintf("must be within ±%g M", scene.MaxLength)}
	}
	return survey.Probe(m.Obs, a, b, orders, m.RedshiftAt), nil
}

func (s *Server) probe(w http.ResponseWriter, r *http.Request) {
	var req ProbeRequest
	if err := readJSON(r, &req); err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	select {
	case s.probes <- struct{}{}:
		defer func() { <-s.probes }()
	case <-r.Context().Done():
		return
	}
	rep, err := probeReport(s.cfg.Base, req)
	if err != nil {
		writeError(w, http.StatusBadRequest, err)
		return
	}
	w.Header().Set("Content-Type", "application/json")
	w.Header().Set("Cache-Control", "no-store")
	rep.WriteJSON(w)
}

func mapNames() []string { return append([]string(nil), scene.MapNames...) }
