package sweep

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

func TestSweepFramesShareOneAutomaticWindow(t *testing.T) {
	auto := func(s *scene.Scene) { s.Screen.FieldOfView = scene.AutoField }
	// From nearly face-on to nearly edge-on the disk image changes shape
	// (round, then a wide flat band with the far side lensed up).
	specs := []string{"inclination=10:85:4"}
	dir := t.TempDir()
	p := testPlan(t, dir, specs, auto, maps.Scales{})
	unframed := make([]scene.Resolved, len(p.Points))
	for k, pt := range p.Points {
		unframed[k] = pt.Scene
	}
	rep := mustRun(t, p, Options{})
	w := rep.Window
	if !w.Automatic || !(w.FieldOfView > 0) {
		t.Fatalf("window %+v", w)
	}
	for k, pt := range p.Points {
		sc := pt.Scene.Screen
		if pt.Scene.AutoField || sc.FieldOfView != w.FieldOfView || sc.CenterAlpha != w.CenterAlpha || sc.CenterBeta != w.CenterBeta {
			t.Errorf("frame %d: window %v at (%v, %v), the sweep's %+v", k, sc.FieldOfView, sc.CenterAlpha, sc.CenterBeta, w)
		}
		// Each frame's own margined disk box (what its automatic
		// window would hold) lies inside the shared window, and the
		// shared window holds each frame's whole disk.
		box, ok, err := pixels.DiskBox(context.Background(), unframed[k])
		if err != nil || !ok {
			t.Fatalf("frame %d: disk box %v, %v", k, ok, err)
		}
		HW, HH := w.FieldOfView/2, w.FieldOfView/2*float64(sc.Height)/float64(sc.Width)
		if box.A0 < w.CenterAlpha-HW || box.A1 > w.CenterAlpha+HW || box.B0 < w.CenterBeta-HH || box.B1 > w.CenterBeta+HH {
			t.Errorf("frame %d: disk box %+v is not inside the shared window %+v", k, box, w)
		}
		f, err := pixels.Render(context.Background(), pt.Scene, nil)
		if err != nil {
			t.Fatal(err)
		}
		if f.TouchesBorder() {
			t.Errorf("frame %d (inclination %v): the disk touches the shared window's border", k, pt.Values[0])
		}
	}
	// The shared window is the union, not just any large window: it is
	// no wider than the widest frame's own window allows for.
	maxOwn := 0.0
	for k := range unframed {
		own, _ := pixels.FrameWindow(context.Background(), unframed[k])
		maxOwn = math.Max(maxOwn, own.Screen.FieldOfView)
	}
	if w.FieldOfView > 1.5*maxOwn {
		t.Errorf("shared field %v, the widest frame alone needs %v", w.FieldOfView, maxOwn)
	}
	// The manifest records the window.
	data, err := os.ReadFile(rep.Manifest)
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Window Window `json:"window"`
	}
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	if m.Window != w {
		t.Errorf("manifest window %+v, the run's %+v", m.Window, w)
	}
	if testing.Short() {
		return
	}
	// Another shard of the same sweep, alone in its own directory,
	// computes the same window.
	other := testPlan(t, t.TempDir(), specs, auto, maps.Scales{})
	rep2 := mustRun(t, other, Options{Shard: Shard{K: 2, N: 2}})
	if rep2.Window != w {
		t.Errorf("shard 2/2 chose window %+v, shard 1/1 %+v", rep2.Window, w)
	}
	// Frames written by the two processes are the same files.
	for _, k := range []int{1, 3} {
		for _, name := range p.fileNames(k) {
			a, err1 := os.ReadFile(filepath.Join(dir, name))
			b, err2 := os.ReadFile(filepath.Join(other.Dir(), name))
			if err1 != nil || err2 != nil || string(a) != string(b) {
				t.Errorf("frame %d: %s differs between the shards (%v, %v)", k, name, err1, err2)
			}
		}
	}
}

func TestSweepReportsClippedFrames(t *testing.T) {
	dir := t.TempDir()
	// A 36 M field over 40 × 32 pixels cuts off the ends of the 30 M disk.
	p := testPlan(t, dir, []string{"spin=0.1:0.9:2"}, nil, maps.Scales{})
	rep := mustRun(t, p, Options{})
	if len(rep.Clipped) != 2 {
		t.Fatalf("clipped frames %+v, want both", rep.Clipped)
	}
	for _, c := range rep.Clipped {
		if !(c.Clip.Fraction > 0 && c.Clip.Fraction < 1) {
			t.Errorf("frame %d: fraction outside %v", c.Index, c.Clip.Fraction)
		}
		data, err := os.ReadFile(filepath.Join(dir, p.framePrefix(c.Index)+"-spectrum.csv"))
		if err != nil {
			t.Fatal(err)
		}
		if !strings.HasPrefix(string(data), "# the disk image touches the window's border") {
			t.Errorf("frame %d: the spectrum CSV does not note the clipping", c.Index)
		}
	}
}
