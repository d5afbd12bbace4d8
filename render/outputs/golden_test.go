package outputs

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kerrscope/scene"
)

var updateGolden = flag.Bool("update-golden", false, "rewrite testdata/golden from the current code (only for an intended change of the outputs)")

// TestGoldenOneLine renders the default scene and a refined one (32 × 24
// pixels, refine.depth 2) and compares spectrum.csv, maps.fits and the
// manifest byte for byte with the files the program wrote before line
// lists existed (testdata/golden, made by that earlier version with the
// same scenes and version string): a scene without [[lines]] keeps its
// one line emission.line_kev and every output it had.
func TestGoldenOneLine(t *testing.T) {
	for _, c := range []struct {
		name  string
		depth int
	}{{"default", 0}, {"refined", 2}} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			s := scene.Default()
			s.Screen.Width, s.Screen.Height = 32, 24
			s.Refine.Depth = c.depth
			s.Output.Directory = dir
			r, err := s.Resolve()
			if err != nil {
				t.Fatal(err)
			}
			if _, err := Run(context.Background(), r, Options{Version: "golden"}); err != nil {
				t.Fatal(err)
			}
			for _, name := range []string{"spectrum.csv", "maps.fits", "kerrscope-run.toml"} {
				got, err := os.ReadFile(filepath.Join(dir, name))
				if err != nil {
					t.Fatal(err)
				}
				if name == "kerrscope-run.toml" {
					got = bytes.ReplaceAll(got, []byte("directory = '"+dir+"'"), []byte("directory = '@DIR@'"))
				}
				path := filepath.Join("testdata", "golden", c.name, name)
				if *updateGolden {
					if err := os.WriteFile(path, got, 0o644); err != nil {
						t.Fatal(err)
					}
					continue
				}
				want, err := os.ReadFile(path)
				if err != nil {
					t.Fatal(err)
				}
				if !bytes.Equal(got, want) {
					t.Errorf("%s differs from %s (%d and %d bytes)%s", name, path, len(got), len(want), firstDiff(got, want))
				}
			}
		})
	}
}

// firstDiff describes the first line where two texts differ.
func firstDiff(a, b []byte) string {
	la, lb := strings.Split(string(a), "\n"), strings.Split(string(b), "\n")
	for i := 0; i < min(len(la), len(lb)); i++ {
		if la[i] != lb[i] {
			return fmt.Sprintf("; first at line %d: got %.120q, want %.120q", i+1, la[i], lb[i])
		}
	}
	return ""
}
