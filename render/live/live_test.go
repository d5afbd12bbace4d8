package live

import (
	"bufio"
	"bytes"
	"context"
	"encoding/base64"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"kerrscope/raytrace/survey"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// testBase is a small, fast scene: the page's values override it.
func testBase() scene.Scene {
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 64, 64
	s.Output.Maps = []string{"redshift"}
	s.Output.Formats = []string{"csv", "png"}
	return s
}

func newTestServer(t *testing.T, cfg Config) (*Server, *httptest.Server) {
	t.Helper()
	if cfg.OutDir == "" {
		cfg.OutDir = filepath.Join(t.TempDir(), "out")
	}
	if cfg.Base.Disk.OuterRadius == 0 {
		cfg.Base = testBase()
	}
	if cfg.Size == 0 {
		cfg.Size = 64
	}
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	return s, ts
}

func post(t *testing.T, ts *httptest.Server, path string, body any) (*http.Response, []byte) {
	t.Helper()
	b, err := json.Marshal(body)
	if err != nil {
		t.Fatal(err)
	}
	resp, err := ts.Client().Post(ts.URL+path, "application/json", bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	out, err := io.ReadAll(resp.Body)
	if err != nil {
		t.Fatal(err)
	}
	return resp, out
}

// stages splits an update's NDJSON answer into its lines.
func stages(t *testing.T, body []byte) []map[string]json.RawMessage {
	t.Helper()
	var out []map[string]json.RawMessage
	sc := bufio.NewScanner(bytes.NewReader(body))
	sc.Buffer(nil, 64<<20)
	for sc.Scan() {
		var m map[string]json.RawMessage
		if err := json.Unmarshal(sc.Bytes(), &m); err != nil {
			t.Fatalf("line %q: %v", sc.Text()[:min(80, len(sc.Text()))], err)
		}
		out = append(out, m)
	}
	return out
}

func field[T any](t *testing.T, m map[string]json.RawMessage, key string) T {
	t.Helper()
	var v T
	if err := json.Unmarshal(m[key], &v); err != nil {
		t.Fatalf("%s: %v", key, err)
	}
	return v
}

// sceneError is what the scene layer itself says of the values: the
// first refusal of scene.Field.Set in table order, else of Resolve.
func sceneError(base scene.Scene, params map[string]string) *scene.FieldError {
	s := base
	for _, f := range scene.Fields() {
		if v, ok := params[f.Flag]; ok {
			if err := f.Set(&s, v); err != nil {
				var fe *scene.FieldError
				errors.As(err, &fe)
				return fe
			}
		}
	}
	_, err := s.Resolve()
	var fe *scene.FieldError
	if errors.As(err, &fe) {
		return fe
	}
	return nil
}

// A refused value gets a 400 with the scene layer's own key, value and
// reason, for updates, probes, saves and renders alike; the server keeps
// answering.
func TestValuesCheckedLikeTheSceneLayer(t *testing.T) {
	_, ts := newTestServer(t, Config{})
	cases := []map[string]string{
		{"spin": "1.5"},
		{"spin": "-1"},
		{"spin": "fast"},
		{"spin": "NaN"},
		{"inclination": "200"},
		{"fov": "-3"},
		{"orders": "0"},
		{"orders": "2.5"},
		{"outer": "1"},
		{"inner": "40", "outer": "30"},
		{"emissivity": "quadratic"},
		{"limb": "dark"},
		{"line": "0"},
		{"width": "100000"},
		{"mass": "4e6"},
		{"band-min": "isco*", "band-max": "isco*1.1"},
		{"transparent": "maybe"},
		{"intensity-scale": "cubic"},
	}
	a0, b0 := 3.0, 1.0
	for _, params := range cases {
		want := sceneError(testBase(), params)
		if want == nil {
			t.Fatalf("%v: the scene layer accepts it; not a refusal case", params)
		}
		for _, ep := range []struct {
			path string
			body any
		}{
			{"/api/view", ViewRequest{Client: "c", Params: params}},
			{"/api/probe", ProbeRequest{Params: params, Alpha: &a0, Beta: &b0}},
			{"/api/save", FileRequest{Params: params, Name: "x"}},
			{"/api/render", FileRequest{Params: params, Name: "x"}},
		} {
			if ep.path == "/api/probe" && sceneErrorFor(params) {
				continue // the probe sets the orders itself
			}
			resp, body := post(t, ts, ep.path, ep.body)
			var got errorBody
			if err := json.Unmarshal(body, &got); err != nil {
				t.Fatalf("%s %v: answer %q is not an error object: %v", ep.path, params, body, err)
			}
			if resp.StatusCode != http.StatusBadRequest || got.Field == nil {
				t.Fatalf("%s %v: status %d, %s", ep.path, params, resp.StatusCode, body)
			}
			if got.Field.Key != want.Key || got.Field.Value != want.Value || got.Field.Allowed != want.Allowed {
				t.Errorf("%s %v: got %+v, scene layer says %+v", ep.path, params, *got.Field, *want)
			}
			if !strings.Contains(got.Error, want.Error()) || !strings.HasPrefix(got.Error, "--"+got.Field.Param+": ") {
				t.Errorf("%s %v: message %q does not give the flag and the scene layer's %q", ep.path, params, got.Error, want.Error())
			}
		}
	}
	// Values of the page itself.
	for _, c := range []struct {
		req   ViewRequest
		param string
	}{
		{ViewRequest{Params: map[string]string{"nonsense": "1"}}, "nonsense"},
		{ViewRequest{Params: map[string]string{"out": "/etc"}}, "out"},
		{ViewRequest{Settings: Settings{Map: "colour"}}, "map"},
		{ViewRequest{Settings: Settings{Size: 5000}}, "size"},
		{ViewRequest{Settings: Settings{Size: -1}}, "size"},
		{ViewRequest{Settings: Settings{GMin: "0.5"}}, "gmin"},
		{ViewRequest{Settings: Settings{GMin: "1.5", GMax: "2"}}, "gmin"},
		{ViewRequest{Settings: Settings{GMin: "0.5", GMax: "1e9"}}, "gmax"},
		{ViewRequest{Settings: Settings{Decades: "Inf"}}, "decades"},
		{ViewRequest{Settings: Settings{Decades: "40"}}, "decades"},
	} {
		resp, body := post(t, ts, "/api/view", c.req)
		var got errorBody
		json.Unmarshal(body, &got)
		if resp.StatusCode != http.StatusBadRequest || got.Field == nil || got.Field.Param != c.param || got.Field.Allowed == "" {
			t.Errorf("%+v: status %d, %s; want a refusal naming %q", c.req, resp.StatusCode, body, c.param)
		}
	}
	// Still answering.
	resp, body := post(t, ts, "/api/view", ViewRequest{Client: "c"})
	if resp.StatusCode != http.StatusOK || len(stages(t, body)) != 2 {
		t.Fatalf("after the refusals: status %d, %d lines", resp.StatusCode, len(stages(t, body)))
	}
}

// sceneErrorFor reports whether params refuse only disk.orders, which
// the probe replaces with the crossings it lists (as the probe command).
func sceneErrorFor(params map[string]string) bool {
	_, ok := params["orders"]
	return ok && len(params) == 1
}

// Requests that do not come from the page are refused before any work.
func TestGuard(t *testing.T) {
	s, ts := newTestServer(t, Config{})
	req, _ := http.NewRequest("GET", ts.URL+"/api/start", nil)
	req.Host = "attacker.example:80"
	resp, err := ts.Client().Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusForbidden {
		t.Errorf("foreign Host: status %d, want 403", resp.StatusCode)
	}
	resp, err = ts.Client().Post(ts.URL+"/api/save", "text/plain", strings.NewReader(`{"name":"x"}`))
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusUnsupportedMediaType {
		t.Errorf("form post: status %d, want 415", resp.StatusCode)
	}
	// An oversized body, through a recorder: over a connection the
	// server may close it while the client still writes.
	big := `{"client":"` + strings.Repeat("x", MaxBody) + `"}`
	req = httptest.NewRequest("POST", "http://127.0.0.1/api/view", strings.NewReader(big))
	req.Header.Set("Content-Type", "application/json")
	rec := httptest.NewRecorder()
	s.Handler().ServeHTTP(rec, req)
	if rec.Code != http.StatusBadRequest || !strings.Contains(rec.Body.String(), "larger than") {
		t.Errorf("oversized body: status %d, %s", rec.Code, rec.Body)
	}
	for _, body := range []string{`{"client": 3}`, `{"client":"a"} {"client":"b"}`, `{"unknown": 1}`, `[`} {
		resp, err = ts.Client().Post(ts.URL+"/api/view", "application/json", strings.NewReader(body))
		if err != nil {
			t.Fatal(err)
		}
		b, _ := io.ReadAll(resp.Body)
		resp.Body.Close()
		if resp.StatusCode != http.StatusBadRequest || !strings.Contains(string(b), `"param":"body"`) {
			t.Errorf("body %s: status %d, %s", body, resp.StatusCode, b)
		}
	}
	if _, err := Listener("0.0.0.0", 0); err == nil {
		t.Error("Listener accepted 0.0.0.0")
	}
	ln, err := Listener("127.0.0.1", 0)
	if err != nil {
		t.Fatal(err)
	}
	ln.Close()
}

// pixelBytes decodes a stage's image.
func pixelBytes(t *testing.T, text string) []byte {
	t.Helper()
	b, err := base64.StdEncoding.DecodeString(text)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// An update answers a coarse pass, then the full view, whose image is the
// map of the engine's own render of the same window, pixel for pixel, and
// whose window is the one pixels.FrameWindowAt frames for the scene at liveFramingSide.
func TestUpdateCoarseThenFull(t *testing.T) {
	_, ts := newTestServer(t, Config{})
	params := map[string]string{"spin": "0.6", "inclination": "70", "width": "96", "height": "64"}
	resp, body := post(t, ts, "/api/view", ViewRequest{Client: "c", Params: params, Settings: Settings{Map: "radius", Size: 96, Band: true}})
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("status %d: %s", resp.StatusCode, body)
	}
	lines := stages(t, body)
	if len(lines) != 2 || field[string](t, lines[0], "stage") != "coarse" || field[string](t, lines[1], "stage") != "full" {
		t.Fatalf("want coarse then full, got %d lines", len(lines))
	}
	if w, h := field[int](t, lines[0], "width"), field[int](t, lines[0], "height"); w != 96/coarseDivisor || h != 64/coarseDivisor {
		t.Errorf("coarse pass %d×%d, want %d×%d", w, h, 96/coarseDivisor, 64/coarseDivisor)
	}
	full := lines[1]
	win := field[Window](t, full, "window")

	// The same scene through the engine.
	s := testBase()
	for _, f := range scene.Fields() {
		if v, ok := params[f.Flag]; ok {
			if err := f.Set(&s, v); err != nil {
				t.Fatal(err)
			}
		}
	}
	s.Output.Maps = []string{"radius"}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	framed, err := pixels.FrameWindowAt(context.Background(), r, liveFramingSide)
	if err != nil {
		t.Fatal(err)
	}
	if win.Field != framed.Screen.FieldOfView || win.Alpha != framed.Screen.CenterAlpha || win.Beta != framed.Screen.CenterBeta {
		t.Errorf("window %+v, FrameWindow gives %g at (%g, %g)", win, framed.Screen.FieldOfView, framed.Screen.CenterAlpha, framed.Screen.CenterBeta)
	}
	f, err := pixels.Render(context.Background(), framed, nil)
	if err != nil {
		t.Fatal(err)
	}
	m, _ := maps.Lookup("radius")
	want := m.Image(f, maps.Scales{})
	if got := pixelBytes(t, field[string](t, full, "image")); !bytes.Equal(got, want.Pix) {
		t.Fatalf("image of %d bytes differs from the engine's map (%d bytes)", len(got), len(want.Pix))
	}
	if got := pixelBytes(t, field[string](t, lines[0], "image")); len(got) != 4*24*16 {
		t.Errorf("coarse image of %d bytes, want %d", len(got), 4*24*16)
	}
	// The line profile is the frame's (pixels.Frame.Spectrum).
	prof := field[LineProfile](t, full, "spectrum")
	spec := f.Spectrum()
	tot := spec.Total()
	if len(prof.Total) != len(tot) {
		t.Fatalf("profile has %d bins, spectrum %d", len(prof.Total), len(tot))
	}
	for i := range tot {
		if prof.Total[i] != tot[i] {
			t.Fatalf("bin %d: %g, spectrum %g", i, prof.Total[i], tot[i])
		}
	}
	// The band report is the frame's (pixels.Frame.LocateBand) and the
	// critical curve is there.
	fb, err := pixels.Render(context.Background(), framed, nil, pixels.KeepG|pixels.KeepLine|pixels.KeepR|pixels.KeepBand)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := fb.LocateBand()
	if err != nil {
		t.Fatal(err)
	}
	band := field[pixels.BandReport](t, full, "band")
	if band.RMin != rep.RMin || band.RMax != rep.RMax || band.Area != rep.Area || band.Flux != rep.Flux {
		t.Errorf("band %+v, LocateBand %+v", band, rep)
	}
	if crit := field[[][2]float64](t, full, "critical"); len(crit) < 100 {
		t.Errorf("critical curve of %d points", len(crit))
	}
}

// A newer update of the same page cancels the older one in the server:
// the older stream ends with a "cancelled" line giving the reason, after
// its coarse pass and without its full one.
func TestNewerUpdateCancelsOlder(t *testing.T) {
	s, ts := newTestServer(t, Config{})
	release := make(chan struct{})
	reached := make(chan struct{})
	var first atomic.Bool
	s.beforePass = func(client, pass string) {
		if client == "page" && pass == "full" && first.CompareAndSwap(false, true) {
			close(reached)
			<-release // the older update waits here until the newer one is in
		}
	}
	type answer struct {
		body []byte
		code int
	}
	older := make(chan answer, 1)
	go func() {
		b, _ := json.Marshal(ViewRequest{Client: "page", Params: map[string]string{"spin": "0.3"}})
		resp, err := ts.Client().Post(ts.URL+"/api/view", "application/json", bytes.NewReader(b))
		if err != nil {
			older <- answer{}
			return
		}
		defer resp.Body.Close()
		body, _ := io.ReadAll(resp.Body)
		older <- answer{body, resp.StatusCode}
	}()
	select {
	case <-reached:
	case <-time.After(time.Minute):
		t.Fatal("the older update never reached its full pass")
	}
	// Another page's update does not cancel it.
	if resp, body := post(t, ts, "/api/view", ViewRequest{Client: "other page"}); resp.StatusCode != http.StatusOK || len(stages(t, body)) != 2 {
		t.Fatalf("other page: status %d: %s", resp.StatusCode, body)
	}
	select {
	case a := <-older:
		t.Fatalf("the older update ended before it was released: %s", a.body)
	default:
	}
	// The same page's newer update does.
	resp, body := post(t, ts, "/api/view", ViewRequest{Client: "page", Params: map[string]string{"spin": "0.4"}})
	close(release)
	if resp.StatusCode != http.StatusOK || len(stages(t, body)) != 2 {
		t.Fatalf("newer update: status %d: %s", resp.StatusCode, body)
	}
	a := <-older
	lines := stages(t, a.body)
	if len(lines) != 2 || field[string](t, lines[0], "stage") != "coarse" || field[string](t, lines[1], "stage") != "cancelled" {
		t.Fatalf("older update answered %d lines: %.300s", len(lines), a.body)
	}
	if reason := field[string](t, lines[1], "reason"); reason != ErrSuperseded.Error() {
		t.Errorf("reason %q, want %q", reason, ErrSuperseded)
	}
}

// The probe endpoint answers exactly what survey.Probe reports (the JSON
// of kerrscope probe --json) for the scene's observer and disk.
func TestProbeIsSurveyProbe(t *testing.T) {
	_, ts := newTestServer(t, Config{})
	params := map[string]string{"spin": "-0.7", "inclination": "80", "inner": "7", "outer": "25", "emissivity": "broken"}
	for _, pt := range []struct {
		a, b   float64
		orders int
	}{{0, 0, 0}, {-12.5, 3.25, 3}, {5.1, -1.7, 8}, {2.9, 4.2, 1}, {300, -200, 64}} {
		a, b := pt.a, pt.b
		resp, body := post(t, ts, "/api/probe", ProbeRequest{Params: params, Alpha: &a, Beta: &b, Orders: pt.orders})
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("(%g, %g): status %d: %s", a, b, resp.StatusCode, body)
		}
		s := testBase()
		for _, f := range scene.Fields() {
			if v, ok := params[f.Flag]; ok {
				if err := f.Set(&s, v); err != nil {
					t.Fatal(err)
				}
			}
		}
		n := pt.orders
		if n == 0 {
			n = 3
		}
		s.Disk.Orders = min(n, scene.MaxOrders)
		r, err := s.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		m, err := pixels.NewModel(r)
		if err != nil {
			t.Fatal(err)
		}
		var want bytes.Buffer
		if err := survey.Probe(m.Obs, a, b, n, m.RedshiftAt).WriteJSON(&want); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(body, want.Bytes()) {
			t.Errorf("(%g, %g):\n got %s\nwant %s", a, b, body, want.Bytes())
		}
	}
	for _, req := range []ProbeRequest{{}, {Alpha: new(float64)}, {Alpha: new(float64), Beta: new(float64), Orders: 65}} {
		resp, body := post(t, ts, "/api/probe", req)
		if resp.StatusCode != http.StatusBadRequest || !strings.Contains(string(body), `"allowed"`) {
			t.Errorf("%+v: status %d: %s", req, resp.StatusCode, body)
		}
	}
}

// A saved scene loads and resolves to the view it was saved from: the same
// values and, for an automatic window, the same framed window.
func TestSaveResolvesToTheView(t *testing.T) {
	s, ts := newTestServer(t, Config{})
	for _, params := range []map[string]string{
		{"spin": "0.98", "inclination": "35", "transparent": "true", "orders": "4", "outer": "18", "index": "2.5"},
		{"spin": "-0.2", "fov": "24", "center-alpha": "-3", "center-beta": "1.5", "emissivity": "novikov-thorne", "width": "80", "height": "60"},
	} {
		resp, body := post(t, ts, "/api/view", ViewRequest{Client: "c", Params: params})
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("view: %s", body)
		}
		lines := stages(t, body)
		win := field[Window](t, lines[len(lines)-1], "window")
		resp, body = post(t, ts, "/api/save", FileRequest{Params: params, Name: "kept"})
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("save: status %d: %s", resp.StatusCode, body)
		}
		var saved savedFile
		json.Unmarshal(body, &saved)
		if saved.Path != filepath.Join(s.OutDir(), "kept.toml") {
			t.Errorf("saved at %q", saved.Path)
		}
		loaded, err := scene.Load(saved.Path)
		if err != nil {
			t.Fatal(err)
		}
		got, err := loaded.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		want, err := resolve(testBase(), params)
		if err != nil {
			t.Fatal(err)
		}
		if got.Output.Directory != filepath.Join(s.OutDir(), "kept") {
			t.Errorf("saved scene renders into %q", got.Output.Directory)
		}
		// The file holds the view's window, concrete, and every other
		// value of the view's scene.
		if got.AutoField || got.Screen.FieldOfView != win.Field || got.Screen.CenterAlpha != win.Alpha || got.Screen.CenterBeta != win.Beta {
			t.Errorf("saved scene's window %+v (automatic %v); the view showed %+v", got.Screen, got.AutoField, win)
		}
		framed, err := pixels.FrameWindowAt(context.Background(), want, liveFramingSide)
		if err != nil {
			t.Fatal(err)
		}
		got.Output.Directory = want.Output.Directory
		gt, _ := got.Scene.TOML()
		wt, _ := framed.Scene.TOML()
		if !bytes.Equal(gt, wt) {
			t.Errorf("saved scene\n%s\nview's scene\n%s", gt, wt)
		}
		if got.PixelSize != framed.PixelSize || got.Inner != framed.Inner || got.MinKeV != framed.MinKeV {
			t.Errorf("saved scene resolves to pixel %g, inner %g, %g keV; the view's to %g, %g, %g", got.PixelSize, got.Inner, got.MinKeV, framed.PixelSize, framed.Inner, framed.MinKeV)
		}
	}
}

// snapshot lists every entry under root with its size and modification
// time.
func snapshot(t *testing.T, root string) map[string]string {
	t.Helper()
	out := map[string]string{}
	filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		fi, err := os.Lstat(p)
		if err == nil {
			out[p] = fmt.Sprint(fi.Mode(), fi.ModTime(), fi.Size())
		}
		return nil
	})
	return out
}

// Nothing is ever written outside the output folder: names that leave it,
// absolute paths, hidden names and symbolic links inside it that lead out
// are refused; a good name writes only inside it, and a render from the
// page lands in a folder of it with its progress reported.
func TestWritesStayInsideTheFolder(t *testing.T) {
	root := t.TempDir()
	out := filepath.Join(root, "out")
	outside := filepath.Join(root, "outside")
	if err := os.MkdirAll(outside, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(outside, "victim.toml"), []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	s, ts := newTestServer(t, Config{OutDir: out})
	if err := os.Symlink(outside, filepath.Join(out, "away")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(outside, "victim.toml"), filepath.Join(out, "victim.toml")); err != nil {
		t.Fatal(err)
	}
	before := snapshot(t, root)
	bad := []string{"", "..", "../outside/x", "../../etc/passwd", "/tmp/abs", outside, "a/b", `a\b`, ".hidden",
		"x/../../y", "%2e%2e", "away/inner", "victim.toml", "..toml", "a..b", "na\x00me", "tab\tname",
		strings.Repeat("n", 65), "~", "-", "é", "./x", "x/"}
	for _, c := range []struct {
		path  string
		names []string
	}{
		{"/api/save", append([]string{"victim"}, bad...)}, // victim.toml: a link to a file outside
		{"/api/render", append([]string{"away"}, bad...)}, // away: a link to a folder outside
	} {
		for _, name := range c.names {
			path := c.path
			resp, body := post(t, ts, path, FileRequest{Name: name})
			if resp.StatusCode != http.StatusBadRequest {
				t.Errorf("%s %q: status %d: %s", path, name, resp.StatusCode, body)
			}
		}
	}
	if after := snapshot(t, root); len(after) != len(before) {
		t.Fatalf("refused names changed the tree:\nbefore %v\nafter  %v", before, after)
	} else {
		for p, v := range before {
			if after[p] != v {
				t.Errorf("%s changed", p)
			}
		}
	}
	// Good names.
	if resp, body := post(t, ts, "/api/save", FileRequest{Name: "view-1", Params: map[string]string{"spin": "0.5"}}); resp.StatusCode != http.StatusOK {
		t.Fatalf("save: %s", body)
	}
	resp, body := post(t, ts, "/api/render", FileRequest{Name: "run_1", Params: map[string]string{"width": "40", "height": "40"}})
	if resp.StatusCode != http.StatusAccepted {
		t.Fatalf("render: status %d: %s", resp.StatusCode, body)
	}
	// A second render while the first runs is refused, or the first is done.
	var st JobStatus
	deadline := time.Now().Add(2 * time.Minute)
	for {
		r, err := ts.Client().Get(ts.URL + "/api/render")
		if err != nil {
			t.Fatal(err)
		}
		json.NewDecoder(r.Body).Decode(&st)
		r.Body.Close()
		if st.State != "running" || time.Now().After(deadline) {
			break
		}
		time.Sleep(20 * time.Millisecond)
	}
	if st.State != "done" || st.Rows != 40 || st.Total != 40 || len(st.Files) == 0 {
		t.Fatalf("render status %+v", st)
	}
	for _, f := range st.Files {
		if _, err := os.Stat(filepath.Join(out, "run_1", f)); err != nil {
			t.Errorf("render lists %s: %v", f, err)
		}
	}
	if resp, body := post(t, ts, "/api/render", FileRequest{Name: "run_2", Params: map[string]string{"width": "4096", "height": "4096"}}); resp.StatusCode != http.StatusBadRequest || !strings.Contains(string(body), "at most") {
		t.Errorf("oversized render: status %d: %s", resp.StatusCode, body)
	}
	// Everything new is inside out; outside is as it was.
	after := snapshot(t, root)
	for p := range after {
		if _, old := before[p]; old {
			continue
		}
		rel, err := filepath.Rel(s.OutDir(), p)
		if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
			t.Errorf("wrote %s, outside %s", p, s.OutDir())
		}
	}
	if b, _ := os.ReadFile(filepath.Join(outside, "victim.toml")); string(b) != "keep" {
		t.Errorf("the file behind the link was changed: %q", b)
	}
	ents, _ := os.ReadDir(outside)
	if len(ents) != 1 {
		t.Errorf("outside holds %d entries", len(ents))
	}
}

// The page loads nothing from anywhere else: every file it refers to is
// served by the server, and none names a remote address.
func TestPageIsSelfContained(t *testing.T) {
	_, ts := newTestServer(t, Config{})
	get := func(path string) (string, string) {
		resp, err := ts.Client().Get(ts.URL + path)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		b, _ := io.ReadAll(resp.Body)
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("GET %s: status %d", path, resp.StatusCode)
		}
		return string(b), resp.Header.Get("Content-Security-Policy")
	}
	html, csp := get("/")
	if !strings.Contains(csp, "default-src 'self'") {
		t.Errorf("page served without a same-origin policy: %q", csp)
	}
	refs := []string{"/page/app.js", "/page/style.css", "/font/regular.ttf", "/font/bold.ttf", "/font/mono.ttf"}
	texts := []string{html}
	for _, r := range refs {
		body, _ := get(r)
		if strings.HasPrefix(r, "/page/") {
			texts = append(texts, body)
		}
	}
	for i, text := range texts {
		for _, bad := range []string{"http://", "https://", "//cdn", "@import", "<iframe"} {
			if strings.Contains(text, bad) {
				t.Errorf("file %d of the page holds %q", i, bad)
			}
		}
	}
	for _, r := range []string{"/page/app.js", "/page/style.css"} {
		if !strings.Contains(html, r) {
			t.Errorf("the page does not load %s", r)
		}
	}
	for _, r := range []string{"/font/regular.ttf", "/font/bold.ttf", "/font/mono.ttf"} {
		if !strings.Contains(texts[2], r) {
			t.Errorf("the style does not use %s", r)
		}
	}
}

// Every map of the renderer can be shown, on opaque and transparent disks.
func TestEveryMap(t *testing.T) {
	_, ts := newTestServer(t, Config{})
	for _, name := range maps.Names() {
		for _, tr := range []string{"false", "true"} {
			params := map[string]string{"transparent": tr}
			if slices.Contains(scene.ThermalMaps, name) { // they need a thermal disk
				params["mass"], params["distance-mpc"], params["eddington-ratio"] = "1e7", "10", "0.1"
			}
			resp, body := post(t, ts, "/api/view", ViewRequest{Client: "c", Params: params, Settings: Settings{Map: name, Size: 32}})
			if resp.StatusCode != http.StatusOK {
				t.Fatalf("%s: status %d: %s", name, resp.StatusCode, body)
			}
			lines := stages(t, body)
			if len(lines) != 2 || field[string](t, lines[1], "stage") != "full" {
				t.Fatalf("%s, transparent %s: %.300s", name, tr, body)
			}
			if l := field[Legend](t, lines[1], "legend"); l.Label == "" || len(l.Ramp)+len(l.Swatches) == 0 {
				t.Errorf("%s: no colour key", name)
			}
		}
	}
}

// One image order alone: the map is coloured exactly where that order of
// the engine's frame lands on the disk, and an order the scene does not
// follow is refused.
func TestOneOrderAlone(t *testing.T) {
	_, ts := newTestServer(t, Config{})
	params := map[string]string{"transparent": "true", "inclination": "80", "fov": "24"}
	resp, body := post(t, ts, "/api/view", ViewRequest{Client: "c", Params: params, Settings: Settings{Map: "radius", Order: "1"}})
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("status %d: %s", resp.StatusCode, body)
	}
	lines := stages(t, body)
	got := pixelBytes(t, field[string](t, lines[1], "image"))
	r, err := resolve(testBase(), params)
	if err != nil {
		t.Fatal(err)
	}
	f, err := pixels.Render(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	grey := [][3]byte{{0x77, 0x77, 0x77}, {6, 6, 8}} // colormap.NoHit, colormap.Shadow
	seen := 0
	for k := 0; k < f.W*f.H; k++ {
		c := [3]byte{got[4*k], got[4*k+1], got[4*k+2]}
		coloured := c != grey[0] && c != grey[1]
		lands := f.R[1][k] == f.R[1][k] // not NaN
		if coloured != lands {
			t.Fatalf("pixel %d: coloured %v, order 1 lands %v", k, coloured, lands)
		}
		if lands {
			seen++
		}
	}
	if seen == 0 {
		t.Fatal("order 1 lands nowhere in the window; not a test")
	}
	resp, body = post(t, ts, "/api/view", ViewRequest{Client: "c", Settings: Settings{Order: "3"}})
	if resp.StatusCode != http.StatusBadRequest || !strings.Contains(string(body), `"param":"order"`) {
		t.Errorf("order 3 of 3: status %d: %s", resp.StatusCode, body)
	}
}

// When a change needs the automatic window framed again, the coarse pass
// shows the page's last window at once and the full pass the newly framed
// one, pixels.FrameWindowAt's for the new scene.
func TestCoarsePassKeepsLastWindowWhileFraming(t *testing.T) {
	_, ts := newTestServer(t, Config{})
	view := func(client, spin string) (Window, Window) {
		resp, body := post(t, ts, "/api/view", ViewRequest{Client: client, Params: map[string]string{"inclination": spin}})
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("status %d: %s", resp.StatusCode, body)
		}
		lines := stages(t, body)
		if len(lines) != 2 {
			t.Fatalf("%d lines", len(lines))
		}
		return field[Window](t, lines[0], "window"), field[Window](t, lines[1], "window")
	}
	framed := func(spin string) Window {
		r, err := resolve(testBase(), map[string]string{"inclination": spin})
		if err != nil {
			t.Fatal(err)
		}
		f, err := pixels.FrameWindowAt(context.Background(), r, liveFramingSide)
		if err != nil {
			t.Fatal(err)
		}
		return Window{Field: f.Screen.FieldOfView, Alpha: f.Screen.CenterAlpha, Beta: f.Screen.CenterBeta}
	}
	c1, f1 := view("p", "20")
	if want := framed("20"); c1 != want || f1 != want {
		t.Fatalf("first view: coarse %+v, full %+v, framed %+v", c1, f1, want)
	}
	c2, f2 := view("p", "80")
	want := framed("80")
	if want == f1 {
		t.Fatal("the two inclinations frame the same window; not a test")
	}
	if c2 != f1 || f2 != want {
		t.Errorf("second view: coarse %+v (last %+v), full %+v (framed %+v)", c2, f1, f2, want)
	}
	// Another page has no last window: its coarse pass is framed.
	if c3, _ := view("q", "45"); c3 != framed("45") {
		t.Errorf("new page's coarse window %+v", c3)
	}
}
