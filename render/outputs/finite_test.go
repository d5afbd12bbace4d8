package outputs

import (
	"context"
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// TestOverflowIsAnErrorNotAnOutput renders a scene whose emissivity,
// set past the validated range, overflows the float32 intensity records:
// Run must fail naming the quantity, order and pixel, and write nothing.
func TestOverflowIsAnErrorNotAnOutput(t *testing.T) {
	for _, scale := range []string{"linear", "log"} {
		dir := t.TempDir()
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height = 16, 16
			s.Output.Directory = dir
			s.Output.IntensityScale = scale
		})
		// 30^40 ≈ 1e59 exceeds the largest float32, 3.4e38.
		r.Emissivity.Q = -40
		_, err := Run(context.Background(), r, Options{Version: "test"})
		var nf *pixels.NonFiniteError
		if !errors.As(err, &nf) {
			t.Fatalf("%s scale: error %v, want a *NonFiniteError", scale, err)
		}
		if !strings.Contains(nf.Quantity, "intensity") || nf.Order < -1 || nf.Pixel[0] < 0 || nf.Pixel[1] < 0 || !math.IsInf(nf.Value, 1) {
			t.Errorf("%s scale: %+v", scale, nf)
		}
		// Only the directory's lock files (journal.go) may remain.
		entries, _ := os.ReadDir(dir)
		for _, e := range entries {
			if n := e.Name(); !(strings.HasPrefix(n, ".kerrscope-") && strings.HasSuffix(n, "lock")) {
				t.Errorf("%s scale: the failed run left %s", scale, n)
			}
		}
	}
}
