package live

import (
	"bufio"
	"bytes"
	"context"
	"crypto/rand"
	"encoding/base64"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"image/png"
	"io"
	"net"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"kerrscope/raytrace/survey"
	"kerrscope/scene"
)

// devtools is a minimal client of Chromium's DevTools protocol: JSON
// messages over one WebSocket (RFC 6455, client side: masked text frames
// out, unmasked frames in), enough to drive the page in a test.
type devtools struct {
	conn net.Conn
	br   *bufio.Reader
	mu   sync.Mutex
	next int
	wait map[int]chan json.RawMessage
	errs chan error
}

func dialDevtools(wsURL string) (*devtools, error) {
	u, err := url.Parse(wsURL)
	if err != nil {
		return nil, err
	}
	conn, err := net.DialTimeout("tcp", u.Host, 5*time.Second)
	if err != nil {
		return nil, err
	}
	key := make([]byte, 16)
	rand.Read(key)
	fmt.Fprintf(conn, "GET %s HTTP/1.1\r\nHost: %s\r\nUpgrade: websocket\r\nConnection: Upgrade\r\nSec-WebSocket-Key: %s\r\nSec-WebSocket-Version: 13\r\n\r\n",
		u.RequestURI(), u.Host, base64.StdEncoding.EncodeToString(key))
	br := bufio.NewReader(conn)
	resp, err := http.ReadResponse(br, nil)
	if err != nil {
		conn.Close()
		return nil, err
	}
	if resp.StatusCode != http.StatusSwitchingProtocols {
		conn.Close()
		return nil, fmt.Errorf("websocket handshake: %s", resp.Status)
	}
	d := &devtools{conn: conn, br: br, wait: map[int]chan json.RawMessage{}, errs: make(chan error, 1)}
	go d.readLoop()
	return d, nil
}

func (d *devtools) readMessage() ([]byte, error) {
	var msg []byte
	for {
		var h [2]byte
		if _, err := io.ReadFull(d.br, h[:]); err != nil {
			return nil, err
		}
		n := uint64(h[1] & 0x7f)
		switch n {
		case 126:
			var b [2]byte
			if _, err := io.ReadFull(d.br, b[:]); err != nil {
				return nil, err
			}
			n = uint64(binary.BigEndian.Uint16(b[:]))
		case 127:
			var b [8]byte
			if _, err := io.ReadFull(d.br, b[:]); err != nil {
				return nil, err
			}
			n = binary.BigEndian.Uint64(b[:])
		}
		if n > 256<<20 {
			return nil, errors.New("websocket frame too large")
		}
		payload := make([]byte, n)
		if _, err := io.ReadFull(d.br, payload); err != nil {
			return nil, err
		}
		switch h[0] & 0x0f {
		case 8:
			return nil, io.EOF
		case 9, 10: // ping, pong: Chromium sends none to clients
			continue
		}
		msg = append(msg, payload...)
		if h[0]&0x80 != 0 {
			return msg, nil
		}
	}
}

func (d *devtools) readLoop() {
	for {
		b, err := d.readMessage()
		if err != nil {
			d.errs <- err
			return
		}
		var m struct {
			ID     int             `json:"id"`
			Result json.RawMessage `json:"result"`
			Error  json.RawMessage `json:"error"`
		}
		if json.Unmarshal(b, &m) != nil || m.ID == 0 {
			continue // an event
		}
		d.mu.Lock()
		ch := d.wait[m.ID]
		delete(d.wait, m.ID)
		d.mu.Unlock()
		if ch != nil {
			if m.Error != nil {
				ch <- append([]byte(`{"error":`), append(m.Error, '}')...)
			} else {
				ch <- m.Result
			}
		}
	}
}

func (d *devtools) send(method string, params any) (json.RawMessage, error) {
	d.mu.Lock()
	d.next++
	id := d.next
	ch := make(chan json.RawMessage, 1)
	d.wait[id] = ch
	d.mu.Unlock()
	body, err := json.Marshal(map[string]any{"id": id, "method": method, "params": params})
	if err != nil {
		return nil, err
	}
	frame := []byte{0x81}
	switch n := len(body); {
	case n < 126:
		frame = append(frame, 0x80|byte(n))
	case n < 1<<16:
		frame = append(frame, 0x80|126, byte(n>>8), byte(n))
	default:
		frame = append(frame, 0x80|127)
		frame = binary.BigEndian.AppendUint64(frame, uint64(n))
	}
	mask := make([]byte, 4)
	rand.Read(mask)
	frame = append(frame, mask...)
	for i, c := range body {
		frame = append(frame, c^mask[i%4])
	}
	if _, err := d.conn.Write(frame); err != nil {
		return nil, err
	}
	select {
	case r := <-ch:
		if bytes.HasPrefix(r, []byte(`{"error":`)) {
			return nil, fmt.Errorf("%s: %s", method, r)
		}
		return r, nil
	case err := <-d.errs:
		return nil, err
	case <-time.After(30 * time.Second):
		return nil, fmt.Errorf("%s: no answer", method)
	}
}

// browser is a headless Chromium with the page of a test server open.
type browser struct {
	t  *testing.T
	dt *devtools
}

// stopBrowser ends chromium and every helper process it started (they share
// its process group), waits until the group is gone, and removes the profile.
// A profile that will not go away is reported, not failed on: it is chromium's
// cache, not the page under test.
func stopBrowser(t *testing.T, cmd *exec.Cmd, profile string) {
	pgid := cmd.Process.Pid
	syscall.Kill(-pgid, syscall.SIGKILL)
	cmd.Wait()
	for i := 0; i < 100 && syscall.Kill(-pgid, 0) == nil; i++ {
		time.Sleep(20 * time.Millisecond)
	}
	var err error
	for i := 0; i < 20; i++ {
		if err = os.RemoveAll(profile); err == nil {
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Logf("chromium's profile %s left behind: %v", profile, err)
}

// openBrowser starts Debian's chromium headless on the page, or skips the
// test when there is no chromium to start.
func openBrowser(t *testing.T, pageURL string) *browser {
	t.Helper()
	bin := ""
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			bin = p
			break
		}
	}
	if bin == "" {
		t.Skip("no chromium on PATH: the browser tests need Debian's chromium package (apt-get install chromium)")
	}
	// The profile is ours to remove: chromium's helper processes can still
	// be writing their caches when the main process has exited, which would
	// make t.TempDir's own removal fail the test.
	profile, err := os.MkdirTemp("", "kerrscope-browser-")
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(bin, "--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars", "--no-first-run",
		"--remote-debugging-port=0", "--user-data-dir="+profile, "--window-size=1400,900", "about:blank")
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	stderr, err := cmd.StderrPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		os.RemoveAll(profile)
		t.Skipf("chromium does not start (%v): the browser tests need Debian's chromium package", err)
	}
	t.Cleanup(func() { stopBrowser(t, cmd, profile) })
	found := make(chan string, 1)
	go func() {
		sc := bufio.NewScanner(stderr)
		re := regexp.MustCompile(`DevTools listening on (ws://\S+)`)
		for sc.Scan() {
			if m := re.FindStringSubmatch(sc.Text()); m != nil {
				found <- m[1]
				break
			}
		}
		io.Copy(io.Discard, stderr)
	}()
	var ws string
	select {
	case ws = <-found:
	case <-time.After(30 * time.Second):
		t.Fatal("chromium never opened its DevTools port")
	}
	u, _ := url.Parse(ws)
	var targets []struct{ Type, WebSocketDebuggerURL string }
	for i := 0; i < 50; i++ {
		resp, err := http.Get("http://" + u.Host + "/json/list")
		if err == nil {
			json.NewDecoder(resp.Body).Decode(&targets)
			resp.Body.Close()
		}
		if len(targets) > 0 {
			break
		}
		time.Sleep(100 * time.Millisecond)
	}
	var pageWS string
	for _, tg := range targets {
		if tg.Type == "page" {
			pageWS = tg.WebSocketDebuggerURL
		}
	}
	if pageWS == "" {
		t.Fatal("chromium has no page")
	}
	dt, err := dialDevtools(pageWS)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { dt.conn.Close() })
	b := &browser{t: t, dt: dt}
	b.call("Emulation.setDeviceMetricsOverride", map[string]any{"width": 1400, "height": 900, "deviceScaleFactor": 1, "mobile": false})
	b.call("Page.navigate", map[string]any{"url": pageURL})
	return b
}

func (b *browser) call(method string, params any) json.RawMessage {
	b.t.Helper()
	r, err := b.dt.send(method, params)
	if err != nil {
		b.t.Fatal(err)
	}
	return r
}

// eval runs a JavaScript expression in the page and decodes its value
// into v (if not nil).
func (b *browser) eval(expr string, v any) {
	b.t.Helper()
	r := b.call("Runtime.evaluate", map[string]any{"expression": expr, "returnByValue": true, "awaitPromise": true})
	var out struct {
		Result struct {
			Value json.RawMessage `json:"value"`
		} `json:"result"`
		Exception *struct {
			Text string `json:"text"`
		} `json:"exceptionDetails"`
	}
	if err := json.Unmarshal(r, &out); err != nil {
		b.t.Fatal(err)
	}
	if out.Exception != nil {
		b.t.Fatalf("%s: %s", expr, out.Exception.Text)
	}
	if v != nil && json.Unmarshal(out.Result.Value, v) != nil {
		b.t.Fatalf("%s: value %s", expr, out.Result.Value)
	}
}

// until waits for a JavaScript condition to hold.
func (b *browser) until(cond, what string) {
	b.t.Helper()
	deadline := time.Now().Add(60 * time.Second)
	for {
		var ok bool
		b.eval("(() => { try { return !!("+cond+"); } catch (e) { return false; } })()", &ok)
		if ok {
			return
		}
		if time.Now().After(deadline) {
			var text string
			b.eval(`document.getElementById("error").textContent`, &text)
			b.t.Fatalf("%s: never happened (page error: %q)", what, text)
		}
		time.Sleep(50 * time.Millisecond)
	}
}

func (b *browser) mouse(kind string, x, y float64) {
	b.t.Helper()
	buttons := 1
	if kind == "mouseReleased" {
		buttons = 0
	}
	b.call("Input.dispatchMouseEvent", map[string]any{"type": kind, "x": x, "y": y, "button": "left", "buttons": buttons, "clickCount": 1})
}

// screenshot saves the page as PNG into the test's folder, or into
// $KERRSCOPE_SCREENSHOTS when set, and checks it decodes at the window's size.
func (b *browser) screenshot(name string) {
	b.t.Helper()
	r := b.call("Page.captureScreenshot", map[string]any{"format": "png"})
	var out struct{ Data string }
	json.Unmarshal(r, &out)
	data, err := base64.StdEncoding.DecodeString(out.Data)
	if err != nil {
		b.t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		b.t.Fatal(err)
	}
	if img.Bounds().Dx() != 1400 || img.Bounds().Dy() != 900 {
		b.t.Errorf("screenshot %v, want 1400 × 900", img.Bounds())
	}
	dir := os.Getenv("KERRSCOPE_SCREENSHOTS")
	if dir == "" {
		dir = b.t.TempDir()
	}
	if err := os.WriteFile(filepath.Join(dir, name), data, 0o644); err != nil {
		b.t.Fatal(err)
	}
}

// The page in a real browser: it draws the view, a moved slider changes
// the image, the readout under the pointer is survey.Probe's report for
// that point, a dragged box zooms, and the scene it saves and the render
// it starts land in the output folder.
func TestPageInBrowser(t *testing.T) {
	out := filepath.Join(t.TempDir(), "out")
	base := testBase()
	base.Screen.Width, base.Screen.Height = 512, 512
	s, err := New(Config{Base: base, OutDir: out, Size: 256})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(s.Handler())
	defer srv.Close()
	b := openBrowser(t, srv.URL+"/")

	b.until("state.full !== null", "the first full view")
	var first string
	b.eval("state.full.image", &first)
	b.screenshot("explore-start.png")

	// Move the inclination slider.
	b.eval(`(() => { const el = document.getElementById("inc-slider"); el.value = "75"; el.dispatchEvent(new Event("input")); })()`, nil)
	b.until(`state.full.caption.includes("i = 75°")`, "the view at 75°")
	var moved string
	b.eval("state.full.image", &moved)
	if moved == first {
		t.Error("the image did not change with the inclination")
	}

	// Hover over a point of the image.
	var at struct{ X, Y float64 }
	b.eval(`(() => { const r = document.getElementById("overlay").getBoundingClientRect();
		return { x: r.left + place.x + 0.3 * place.w, y: r.top + place.y + 0.45 * place.h }; })()`, &at)
	b.mouse("mouseMoved", at.X, at.Y)
	b.until("state.hover", "a readout under the pointer")
	var shown json.RawMessage
	b.eval("state.hover", &shown)
	var got survey.ProbeReport
	if err := json.Unmarshal(shown, &got); err != nil {
		t.Fatal(err)
	}
	var params map[string]string
	b.eval("state.params", &params)
	want, err := probeReport(base, ProbeRequest{Params: params, Alpha: &got.Alpha, Beta: &got.Beta, Orders: 3})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("readout\n%+v\nsurvey.Probe\n%+v", got, want)
	}
	if len(want.Crossings) == 0 {
		t.Fatal("the point's photon crosses nothing; not a test of the crossings")
	}
	g := firstG(want)
	if g == nil {
		t.Fatal("the point's light does not come from the disk; not a test of the readout")
	}
	var text string
	b.eval(`document.getElementById("hover").textContent`, &text)
	if !strings.Contains(text, fmt.Sprintf("%.5f", *g)) {
		t.Errorf("readout text %q does not show g = %.5f", text, *g)
	}

	// Drag a box: the view zooms into it.
	var before Window
	b.eval("state.full.window", &before)
	b.mouse("mousePressed", at.X, at.Y)
	b.mouse("mouseMoved", at.X+60, at.Y+40)
	b.mouse("mouseMoved", at.X+120, at.Y+90)
	b.mouse("mouseReleased", at.X+120, at.Y+90)
	b.until(fmt.Sprintf("state.full.window.field < %g", before.Field/2), "the zoomed view")
	var zoomed Window
	b.eval("state.full.window", &zoomed)
	b.screenshot("explore-zoomed.png")

	// Save the scene, then render it from the page.
	b.eval(`(() => { document.getElementById("name").value = "from-browser";
		for (const k of ["width", "height"]) document.querySelector('[data-param="' + k + '"]').value = "96";
		document.getElementById("save").click(); })()`, nil)
	b.until(`document.getElementById("files").textContent.startsWith("wrote")`, "the saved scene")
	saved, err := scene.Load(filepath.Join(s.OutDir(), "from-browser.toml"))
	if err != nil {
		t.Fatal(err)
	}
	r, err := saved.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if r.Screen.FieldOfView != zoomed.Field || r.Screen.CenterAlpha != zoomed.Alpha || r.Screen.CenterBeta != zoomed.Beta || r.Observer.InclinationDeg != 75 {
		t.Errorf("saved scene: field %g at (%g, %g), i = %g; the page showed %+v at 75°", r.Screen.FieldOfView, r.Screen.CenterAlpha, r.Screen.CenterBeta, r.Observer.InclinationDeg, zoomed)
	}
	b.eval(`document.getElementById("render").click()`, nil)
	b.until(`!document.getElementById("render").disabled && document.getElementById("files").textContent.includes("kerrscope-run.toml")`, "the render from the page")
	run, err := scene.Load(filepath.Join(s.OutDir(), "from-browser", "kerrscope-run.toml"))
	if err != nil {
		t.Fatal(err)
	}
	if run.Screen != saved.Screen {
		t.Errorf("rendered window %+v, saved %+v", run.Screen, saved.Screen)
	}
	b.screenshot("explore-rendered.png")
	if err := s.Wait(context.Background()); err != nil {
		t.Fatal(err)
	}
}

// firstG is g of the first crossing that lands on the disk (nil: none).
func firstG(r survey.ProbeReport) *float64 {
	for _, c := range r.Crossings {
		if c.G != nil {
			return c.G
		}
	}
	return nil
}
