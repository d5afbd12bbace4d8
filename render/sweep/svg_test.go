package sweep

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"

	"kerrscope/render/maps"
	"kerrscope/scene"
)

// A sweep whose scene asks for svg gets its merged spectra plot as
// vector graphics too: a well-formed XML document that carries the plot's
// axis labels and colour-bar title as text. Without svg there is none.
func TestMergeWritesSpectraSVG(t *testing.T) {
	for _, withSVG := range []bool{true, false} {
		dir := t.TempDir()
		p := testPlan(t, dir, []string{"spin=0.5:0.9:2"}, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height = 24, 20
			s.Output.Maps = []string{"redshift"}
			s.Output.Formats = []string{"csv"}
			if withSVG {
				s.Output.Formats = append(s.Output.Formats, "svg")
			}
		}, maps.Scales{})
		mustRun(t, p, Options{})
		if _, err := Merge(context.Background(), dir, MergeOptions{}); err != nil {
			t.Fatal(err)
		}
		data, err := os.ReadFile(filepath.Join(dir, "sweep-spectra.svg"))
		if !withSVG {
			if !errors.Is(err, os.ErrNotExist) {
				t.Errorf("without svg: sweep-spectra.svg exists (%v)", err)
			}
			continue
		}
		if err != nil {
			t.Fatal(err)
		}
		dec := xml.NewDecoder(bytes.NewReader(data))
		var text bytes.Buffer
		for {
			tok, err := dec.Token()
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatalf("sweep-spectra.svg is not XML: %v", err)
			}
			if c, ok := tok.(xml.CharData); ok {
				text.Write(c)
			}
		}
		for _, want := range []string{"observed energy", "keV", "spin a"} {
			if !bytes.Contains(text.Bytes(), []byte(want)) {
				t.Errorf("sweep-spectra.svg has no text %q", want)
			}
		}
	}
}
