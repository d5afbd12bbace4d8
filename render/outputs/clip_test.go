package outputs

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// readAll returns every file of dir by name.
func readAll(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string][]byte{}
	for _, e := range ents {
		if e.Type().IsRegular() && !strings.HasPrefix(e.Name(), ".") {
			data, err := os.ReadFile(filepath.Join(dir, e.Name()))
			if err != nil {
				t.Fatal(err)
			}
			out[e.Name()] = data
		}
	}
	return out
}

// TestRunRecordReproducesTheRun renders a scene, renders again from the
// run record it wrote (into the same directory, which the record names)
// and compares every file byte for byte: with the automatic window, whose
// concrete field and centre the record must carry, and with a window that
// clips the disk, whose note the record carries as a comment.
func TestRunRecordReproducesTheRun(t *testing.T) {
	for _, c := range []struct {
		name    string
		field   float64
		clipped bool
	}{{"automatic", scene.AutoField, false}, {"clipped", 30, true}} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			r := resolve(t, func(s *scene.Scene) {
				s.Hole.Spin, s.Observer.InclinationDeg = 0.95, 75
				s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 48, 40, c.field
				s.Output.Directory = dir
			})
			sum, err := Run(context.Background(), r, Options{Version: "test"})
			if err != nil {
				t.Fatal(err)
			}
			if (sum.Clip != nil) != c.clipped {
				t.Fatalf("clip estimate %+v, want clipped %v", sum.Clip, c.clipped)
			}
			if sum.Scene.AutoField || !(sum.Scene.Screen.FieldOfView > 0) {
				t.Fatalf("summary scene window %v, auto %v", sum.Scene.Screen.FieldOfView, sum.Scene.AutoField)
			}
			first := readAll(t, dir)
			s, err := scene.Load(filepath.Join(dir, "kerrscope-run.toml"))
			if err != nil {
				t.Fatal(err)
			}
			again, err := s.Resolve()
			if err != nil {
				t.Fatal(err)
			}
			if again.AutoField || again.Screen != sum.Scene.Screen {
				t.Fatalf("run record window %+v (auto %v), the run's %+v", again.Screen, again.AutoField, sum.Scene.Screen)
			}
			if _, err := Run(context.Background(), again, Options{Version: "test"}); err != nil {
				t.Fatal(err)
			}
			second := readAll(t, dir)
			if len(first) != len(second) || len(first) < 5 {
				t.Fatalf("%d files, then %d", len(first), len(second))
			}
			for name, data := range first {
				if !bytes.Equal(data, second[name]) {
					t.Errorf("%s differs when rendered from the run record", name)
				}
			}
			note := "touches the window's border"
			for _, name := range []string{"kerrscope-run.toml", "spectrum.csv"} {
				if got := bytes.Contains(first[name], []byte(note)); got != c.clipped {
					t.Errorf("%s states the clipping: %v, want %v", name, got, c.clipped)
				}
			}
			if got := bytes.Contains(first["maps.fits"], []byte("CLIPFRAC=")); got != c.clipped {
				t.Errorf("maps.fits has CLIPFRAC: %v, want %v", got, c.clipped)
			}
		})
	}
}

// TestClipNoteStatesTheEstimate checks the note carries the estimate's
// numbers: the outside flux, its percentage and the cell size.
func TestClipNoteStatesTheEstimate(t *testing.T) {
	n := ClipNote(pixels.Clip{Outside: 0.0123, Total: 1.23, Fraction: 0.01, CellAlpha: 0.278, CellBeta: 0.281, Samples: 1000})
	for _, want := range []string{"0.0123", "1 %", "0.278 × 0.281 M", "1000 photons"} {
		if !strings.Contains(n, want) {
			t.Errorf("note %q lacks %q", n, want)
		}
	}
}
