package sweep

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"image"
	"image/png"
	stdmaps "maps"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"kerrscope/colormap"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// testPlan builds a small sweep in dir: 40×32 pixels, redshift and
// intensity maps, bare PNGs and spectra, unless edit changes the scene.
func testPlan(t *testing.T, dir string, specs []string, edit func(*scene.Scene), fixed maps.Scales) *Plan {
	t.Helper()
	s := scene.Default()
	s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 40, 32, 36
	s.Output.Directory = dir
	s.Output.Maps = []string{"redshift", "intensity"}
	s.Output.Formats = []string{"bare", "csv"}
	s.Spectrum.Bins = 60
	if edit != nil {
		edit(&s)
	}
	var axes []Axis
	for _, spec := range specs {
		a, err := ParseAxis(spec)
		if err != nil {
			t.Fatal(err)
		}
		axes = append(axes, a)
	}
	p, err := NewPlan(s, axes, fixed)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func mustRun(t *testing.T, p *Plan, opt Options) Report {
	t.Helper()
	rep, err := Run(context.Background(), p, opt)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// dirFiles returns the contents of every visible file in dir whose name
// starts with prefix.
func dirFiles(t *testing.T, dir, prefix string) map[string][]byte {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string][]byte{}
	for _, e := range ents {
		if e.IsDir() || !strings.HasPrefix(e.Name(), prefix) || strings.HasPrefix(e.Name(), ".") {
			continue
		}
		data, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		out[e.Name()] = data
	}
	return out
}

func readManifest(t *testing.T, path string) manifest {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m manifest
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

func decodePNG(t *testing.T, data []byte) image.Image {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	return img
}

// Bookkeeping: every frame's scene is validated before anything is
// rendered or written.
func TestPlanValidatesEveryFrame(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "never")
	s := scene.Default()
	s.Output.Directory = dir
	a, err := ParseAxis("spin=0.5:1.3:9")
	if err != nil {
		t.Fatal(err)
	}
	_, err = NewPlan(s, []Axis{a}, maps.Scales{})
	var pe *PointError
	if !errors.As(err, &pe) || pe.Index != 5 || !strings.Contains(err.Error(), "black_hole.spin = 1") {
		t.Fatalf("got %v", err)
	}
	b, _ := ParseAxis("inclination=0:180:3")
	c, _ := ParseAxis("index=2:4:3")
	for _, bad := range []struct {
		axes  []Axis
		fixed maps.Scales
	}{
		{nil, maps.Scales{}},
		{[]Axis{a, b, c}, maps.Scales{}},
		{[]Axis{b, b}, maps.Scales{}},
		{[]Axis{b}, maps.Scales{GMin: 1.2}},
		{[]Axis{b}, maps.Scales{GMax: 0.8}},
		{[]Axis{b}, maps.Scales{RMin: 5, RMax: 4}},
		{[]Axis{b}, maps.Scales{IMax: -1}},
	} {
		if _, err := NewPlan(s, bad.axes, bad.fixed); err == nil {
			t.Errorf("%v %+v accepted", bad.axes, bad.fixed)
		}
	}
	big, _ := ParseAxis("spin=0:0.9:200")
	big2, _ := ParseAxis("inclination=0:90:51")
	if _, err := NewPlan(s, []Axis{big, big2}, maps.Scales{}); err == nil || !strings.Contains(err.Error(), "more than") {
		t.Errorf("10200 frames: %v", err)
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("validation created %s", dir)
	}
}

// Bookkeeping: one set of scales for the whole sweep, recorded in the
// manifest, and a pixel's colour depends only on its value and those
// scales, in every frame.
func TestSharedScales(t *testing.T) {
	dir := t.TempDir()
	p := testPlan(t, dir, []string{"spin=0.3:0.998:3:log1m"}, nil, maps.Scales{IDecades: 3})
	rep := mustRun(t, p, Options{})
	m := readManifest(t, rep.Manifest)
	sc := m.Scales.scales()
	if sc != rep.Scales || !(sc.GMin > 0 && sc.GMin < 1 && sc.GMax > 1 && sc.IMax > 0 && sc.IDecades == 3 &&
		sc.RMin > 0 && sc.RMax > sc.RMin && sc.FluxMax > 0) {
		t.Fatalf("manifest scales %+v, report %+v", sc, rep.Scales)
	}
	// The radius scale spans every frame's disk: the inner edge of the
	// fastest spin.
	if sc.RMin != p.Points[2].Scene.Inner || sc.RMax != 30 {
		t.Errorf("radius scale %v–%v", sc.RMin, sc.RMax)
	}
	files := dirFiles(t, dir, "frame-")
	autos := map[maps.Scales]bool{}
	for _, k := range []int{0, 2} {
		f, err := pixels.RenderScene(context.Background(), p.Points[k].Scene, nil)
		if err != nil {
			t.Fatal(err)
		}
		autos[maps.AutoScales(f)] = true
		g := f.FirstSeen(f.G)
		pre := p.framePrefix(k)
		bare := decodePNG(t, files[pre+"-redshift-bare.png"])
		idx := decodePNG(t, files[pre+"-redshift-indexed.png"]).(*image.Paletted)
		hits := 0
		for i, v := range g {
			if v != v {
				continue
			}
			hits++
			x, y := i%f.W, i/f.W
			pos := gPosition(sc, float64(v))
			if want, got := colormap.Redshift.At(pos), bare.At(x, y); !sameColor(want, got) {
				t.Fatalf("frame %d pixel %d: g %v has colour %v, the shared scale gives %v", k, i, v, got, want)
			}
			if want := colormap.PaletteIndex(pos); idx.ColorIndexAt(x, y) != want {
				t.Fatalf("frame %d pixel %d: palette index %d, want %d", k, i, idx.ColorIndexAt(x, y), want)
			}
		}
		if hits < 100 {
			t.Fatalf("frame %d: only %d pixels see the disk", k, hits)
		}
	}
	if len(autos) != 2 {
		t.Error("the two frames would choose the same scales themselves; the test shows nothing")
	}
}

func sameColor(a, b interface{ RGBA() (r, g, b, a uint32) }) bool {
	r1, g1, b1, a1 := a.RGBA()
	r2, g2, b2, a2 := b.RGBA()
	return r1 == r2 && g1 == g2 && b1 == b2 && a1 == a2
}

// Bookkeeping: a re-run redoes only the frames whose files are gone or
// changed, and refuses a different sweep unless asked to start over.
func TestResume(t *testing.T) {
	dir := t.TempDir()
	specs := []string{"inclination=30:75:4"}
	p := testPlan(t, dir, specs, nil, maps.Scales{})
	rep := mustRun(t, p, Options{Version: "test"})
	if !slices.Equal(rep.Rendered, []int{0, 1, 2, 3}) || rep.Skipped != 0 || rep.Frames != 4 {
		t.Fatalf("first run: %+v", rep)
	}
	before := dirFiles(t, dir, "")
	if len(before) != 4*5+1 {
		t.Fatalf("%d files: %v", len(before), slices.Sorted(stdmaps.Keys(before)))
	}
	rep = mustRun(t, testPlan(t, dir, specs, nil, maps.Scales{}), Options{Version: "test"})
	if len(rep.Rendered) != 0 || rep.Skipped != 4 {
		t.Fatalf("unchanged re-run: %+v", rep)
	}
	// Remove one file of frame 1, change one byte of a file of frame 3.
	os.Remove(filepath.Join(dir, "frame-0001-intensity-indexed.png"))
	spec := filepath.Join(dir, "frame-0003-spectrum.csv")
	data := before["frame-0003-spectrum.csv"]
	bad := bytes.Replace(data, []byte("e"), []byte("E"), 1)
	os.WriteFile(spec, bad, 0o644)
	rep = mustRun(t, testPlan(t, dir, specs, nil, maps.Scales{}), Options{Version: "test"})
	if !slices.Equal(rep.Rendered, []int{1, 3}) || rep.Skipped != 2 {
		t.Fatalf("after damage: %+v", rep)
	}
	after := dirFiles(t, dir, "")
	for name, want := range before {
		if !bytes.Equal(after[name], want) {
			t.Errorf("%s differs after the repair", name)
		}
	}
	if len(after) != len(before) {
		t.Errorf("%d files after the repair, %d before", len(after), len(before))
	}

	// A different sweep in the same directory is refused…
	for _, changed := range []*Plan{
		testPlan(t, dir, []string{"inclination=30:75:5"}, nil, maps.Scales{}),
		testPlan(t, dir, specs, func(s *scene.Scene) { s.Emission.Index = 2.5 }, maps.Scales{}),
		testPlan(t, dir, specs, nil, maps.Scales{GMax: 2}),
	} {
		if _, err := Run(context.Background(), changed, Options{}); !errors.Is(err, ErrDefinitionChanged) {
			t.Errorf("changed sweep: %v", err)
		}
	}
	if now := dirFiles(t, dir, ""); len(now) != len(before) || !bytes.Equal(now["sweep-shard-1-of-1.json"], before["sweep-shard-1-of-1.json"]) {
		t.Error("a refused sweep changed the directory")
	}
	// … unless it starts over, which leaves nothing of the old sweep.
	fewer := testPlan(t, dir, []string{"inclination=30:75:2"}, nil, maps.Scales{})
	rep = mustRun(t, fewer, Options{Restart: true})
	if !slices.Equal(rep.Rendered, []int{0, 1}) {
		t.Fatalf("restart: %+v", rep)
	}
	if left := dirFiles(t, dir, "frame-0002"); len(left) != 0 {
		t.Errorf("restart left %v", slices.Sorted(stdmaps.Keys(left)))
	}
	// Changing a flag that the sweep overrides is not a change.
	same := testPlan(t, dir, []string{"inclination=30:75:2"}, func(s *scene.Scene) { s.Observer.InclinationDeg = 12 }, maps.Scales{})
	if rep := mustRun(t, same, Options{}); len(rep.Rendered) != 0 {
		t.Errorf("overridden base value re-rendered %v", rep.Rendered)
	}
}

// Bookkeeping: cancelling in the middle of a frame leaves none of its
// files and no manifest entry for it; the next run finishes the sweep
// with the same files as an uninterrupted one.
func TestInterrupted(t *testing.T) {
	dir, ref := t.TempDir(), t.TempDir()
	specs := []string{"spin=0.2:0.95:3"}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	staged := 0
	hookStaged = func(index int, name string) {
		if index == 1 {
			staged++
			if staged == 2 {
				cancel()
			}
		}
	}
	defer func() { hookStaged = nil }()
	rep, err := Run(ctx, testPlan(t, dir, specs, nil, maps.Scales{}), Options{})
	hookStaged = nil
	if !errors.Is(err, context.Canceled) || !slices.Equal(rep.Rendered, []int{0}) {
		t.Fatalf("cancelled run: %+v, %v", rep, err)
	}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), "frame-0001") || strings.HasPrefix(e.Name(), ".kerrscope-partial-") || strings.HasPrefix(e.Name(), ".kerrscope-journal-") {
			t.Errorf("left behind: %s", e.Name())
		}
	}
	m := readManifest(t, rep.Manifest)
	if len(m.Frames) != 1 || m.Frames[0].Index != 0 {
		t.Fatalf("manifest frames %+v", m.Frames)
	}
	rep = mustRun(t, testPlan(t, dir, specs, nil, maps.Scales{}), Options{})
	if !slices.Equal(rep.Rendered, []int{1, 2}) {
		t.Fatalf("resumed: %+v", rep)
	}
	mustRun(t, testPlan(t, ref, specs, nil, maps.Scales{}), Options{})
	got, want := dirFiles(t, dir, "frame-"), dirFiles(t, ref, "frame-")
	if len(got) != len(want) || len(got) != 15 {
		t.Fatalf("%d files, uninterrupted %d", len(got), len(want))
	}
	for name := range want {
		if !bytes.Equal(got[name], want[name]) {
			t.Errorf("%s differs from the uninterrupted sweep", name)
		}
	}
}

// Bookkeeping: N shards run one after another write the same frame files
// as one process, each into its own manifest, and merge to the same
// files; a merge before every shard is done is refused.
func TestShardsMatchOneProcess(t *testing.T) {
	one, many := t.TempDir(), t.TempDir()
	specs := []string{"spin=0.1:0.9:3", "inclination=40:70:2"}
	mustRun(t, testPlan(t, one, specs, nil, maps.Scales{}), Options{})
	for k := 1; k <= 4; k++ {
		rep := mustRun(t, testPlan(t, many, specs, nil, maps.Scales{}), Options{Shard: Shard{K: k, N: 4}})
		var want []int
		for i := k - 1; i < 6; i += 4 {
			want = append(want, i)
		}
		if !slices.Equal(rep.Rendered, want) {
			t.Errorf("shard %d/4 rendered %v, want %v", k, rep.Rendered, want)
		}
		if k == 2 {
			if _, err := Merge(context.Background(), many, MergeOptions{}); err == nil || !strings.Contains(err.Error(), "2 of 6 frames") {
				t.Errorf("early merge: %v", err)
			}
		}
	}
	a, b := dirFiles(t, one, "frame-"), dirFiles(t, many, "frame-")
	if len(a) != 6*5 || len(a) != len(b) {
		t.Fatalf("%d files from one process, %d from shards", len(a), len(b))
	}
	for name := range a {
		if !bytes.Equal(a[name], b[name]) {
			t.Errorf("%s differs", name)
		}
	}
	if ms := dirFiles(t, many, "sweep-shard-"); len(ms) != 4 {
		t.Errorf("manifests %v", slices.Sorted(stdmaps.Keys(ms)))
	}
	for _, d := range []string{one, many} {
		if _, err := Merge(context.Background(), d, MergeOptions{GIFs: []string{"redshift", "intensity"}}); err != nil {
			t.Fatal(err)
		}
	}
	a, b = dirFiles(t, one, "sweep-"), dirFiles(t, many, "sweep-")
	for _, name := range []string{"sweep-redshift.gif", "sweep-intensity.gif", "sweep-spectra-00.png", "sweep-spectra-01.png", "sweep-frames.csv"} {
		if len(a[name]) == 0 || !bytes.Equal(a[name], b[name]) {
			t.Errorf("merged %s: %d bytes from one process, %d from shards", name, len(a[name]), len(b[name]))
		}
	}
	// A sweep re-run in the sharded directory as one process finds every
	// frame finished.
	if rep := mustRun(t, testPlan(t, many, specs, nil, maps.Scales{}), Options{}); len(rep.Rendered) != 0 || rep.Skipped != 6 {
		t.Errorf("one process after shards: %+v", rep)
	}
}

// gPosition is the redshift colour-scale position written out again for
// the tests: g = 1 at the centre, log g scaled on each side so that GMin
// and GMax reach the ends.
func gPosition(sc maps.Scales, g float64) float64 {
	if g < 1 {
		return math.Max(0, 0.5*(1-math.Log(g)/math.Log(sc.GMin)))
	}
	return math.Min(1, 0.5*(1+math.Log(g)/math.Log(sc.GMax)))
}
