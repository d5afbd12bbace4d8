package sweep

import (
	"bytes"
	"context"
	"image"
	"image/color"
	"image/gif"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/scene"
)

// Bookkeeping: the merged GIF has one frame per sweep frame, in order,
// with the asked delay, the palette of its map and the palette images'
// pixels; the spectra plot and the frame table are written; decorated
// figures of every frame have one size.
func TestMerge(t *testing.T) {
	dir := t.TempDir()
	p := testPlan(t, dir, []string{"spin=0.5:0.999:4:log1m"}, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height = 32, 24
		s.Output.Maps = []string{"order", "redshift"}
		s.Output.Formats = []string{"png", "csv"}
	}, maps.Scales{})
	mustRun(t, p, Options{})
	files := dirFiles(t, dir, "frame-")
	var size image.Point
	for k := 0; k < 4; k++ {
		for _, name := range []string{"redshift.png", "order.png", "spectrum.png"} {
			b := decodePNG(t, files[p.framePrefix(k)+"-"+name]).Bounds().Size()
			if name == "redshift.png" {
				if k == 0 {
					size = b
				} else if b != size {
					t.Errorf("frame %d figure %v, frame 0 %v", k, b, size)
				}
			}
		}
	}
	paths, err := Merge(context.Background(), dir, MergeOptions{DelayMS: 250, Bare: true})
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"sweep-frames.csv", "sweep-order.gif", "sweep-spectra.png"}
	if len(paths) != len(want) {
		t.Fatalf("wrote %v", paths)
	}
	for i, w := range want {
		if filepath.Base(paths[i]) != w {
			t.Errorf("wrote %v, want %v", paths, want)
		}
	}
	data, _ := os.ReadFile(filepath.Join(dir, "sweep-order.gif"))
	g, err := gif.DecodeAll(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	if len(g.Image) != 4 || g.Config.Width != 32 || g.Config.Height != 24 || g.LoopCount != 0 {
		t.Fatalf("GIF: %d frames, %d×%d, loop %d", len(g.Image), g.Config.Width, g.Config.Height, g.LoopCount)
	}
	for k, im := range g.Image {
		if g.Delay[k] != 25 {
			t.Errorf("frame %d delay %d cs", k, g.Delay[k])
		}
		src := decodePNG(t, files[p.framePrefix(k)+"-order-indexed.png"]).(*image.Paletted)
		if !bytes.Equal(im.Pix, src.Pix) {
			t.Errorf("GIF frame %d differs from its palette image", k)
		}
		for i, c := range orderPalette(t) {
			if !sameColor(im.Palette[i], c) {
				t.Errorf("GIF frame %d palette entry %d is %v, want %v", k, i, im.Palette[i], c)
			}
		}
	}
	plot := decodePNG(t, mustRead(t, filepath.Join(dir, "sweep-spectra.png")))
	if b := plot.Bounds(); b.Dx() < 300 || b.Dy() < 200 {
		t.Errorf("spectra plot %v", b)
	}
	table := string(mustRead(t, filepath.Join(dir, "sweep-frames.csv")))
	if lines := strings.Split(strings.TrimSpace(table), "\n"); len(lines) != 6 || lines[1] != "frame,prefix,black_hole.spin" ||
		lines[2] != "0,frame-0000,0.5" || lines[5] != "3,frame-0003,0.999" {
		t.Errorf("table:\n%s", table)
	}

	// Refusals, each leaving the merged files as they were.
	for _, opt := range []MergeOptions{{DelayMS: 15}, {DelayMS: 5}, {GIFs: []string{"intensity"}}} {
		if _, err := Merge(context.Background(), dir, opt); err == nil {
			t.Errorf("%+v accepted", opt)
		}
	}
	if _, err := Merge(context.Background(), t.TempDir(), MergeOptions{}); err == nil || !strings.Contains(err.Error(), "no sweep manifest") {
		t.Errorf("empty directory: %v", err)
	}
	other := testPlan(t, dir, []string{"spin=0.5:0.999:5:log1m"}, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height = 32, 24
	}, maps.Scales{})
	m := readManifestFile(t, filepath.Join(dir, "sweep-shard-1-of-1.json"))
	m.Shard = Shard{K: 2, N: 2}
	if m.Definition, err = other.definition(); err != nil {
		t.Fatal(err)
	}
	if err := m.write(dir); err != nil {
		t.Fatal(err)
	}
	if _, err := Merge(context.Background(), dir, MergeOptions{}); err == nil || !strings.Contains(err.Error(), "different sweeps") {
		t.Errorf("mixed manifests: %v", err)
	}
	if !bytes.Equal(mustRead(t, filepath.Join(dir, "sweep-order.gif")), data) {
		t.Error("a refused merge changed the GIF")
	}
	// No GIF at all.
	os.Remove(filepath.Join(dir, "sweep-shard-2-of-2.json"))
	if paths, err := Merge(context.Background(), dir, MergeOptions{GIFs: []string{}}); err != nil || len(paths) != 2 {
		t.Errorf("no GIFs: %v, %v", paths, err)
	}
}

func mustRead(t *testing.T, path string) []byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

func readManifestFile(t *testing.T, path string) *manifest {
	t.Helper()
	m := readManifest(t, path)
	return &m
}

func orderPalette(t *testing.T) color.Palette {
	t.Helper()
	m, err := maps.Lookup("order")
	if err != nil {
		t.Fatal(err)
	}
	return m.Palette()
}
