package survey

import (
	"bytes"
	"errors"
	"io"
	"strings"
	"testing"

	"kerrscope/raytrace"
)

var errFull = errors.New("device full")

// flakyWriter accepts n bytes, fails the write that would go past them,
// and accepts everything after that: a transient failure that a writer
// which ignores errors would not notice.
type flakyWriter struct {
	n      int
	failed bool
	buf    bytes.Buffer
}

func (f *flakyWriter) Write(p []byte) (int, error) {
	if f.failed || len(p) <= f.n {
		f.n -= len(p)
		return f.buf.Write(p)
	}
	k := f.n
	f.failed = true
	f.buf.Write(p[:k])
	return k, errFull
}

// checkWriteErrors writes a report into writers that fail once after
// every possible number of bytes: the failure must be returned, and
// nothing written after it. With no failure the text must be complete.
func checkWriteErrors(t *testing.T, name string, write func(io.Writer) error) {
	t.Helper()
	var full bytes.Buffer
	if err := write(&full); err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	for n := 0; n < full.Len(); n++ {
		w := &flakyWriter{n: n}
		if err := write(w); !errors.Is(err, errFull) {
			t.Fatalf("%s: write failing after %d of %d bytes: error %v, want %v", name, n, full.Len(), err, errFull)
		}
		if w.buf.Len() != n {
			t.Fatalf("%s: write failing after %d bytes: %d bytes written in all, want no more after the failure", name, n, w.buf.Len())
		}
	}
	w := &flakyWriter{n: full.Len()}
	if err := write(w); err != nil || w.buf.String() != full.String() {
		t.Fatalf("%s: exact-size writer: error %v, text %q", name, err, w.buf.String())
	}
}

func TestProbeWriteErrors(t *testing.T) {
	o, err := raytrace.NewObserver(0.9, 80)
	if err != nil {
		t.Fatal(err)
	}
	g := func(c raytrace.Crossing, lambda, eta float64) (float64, bool) { return 0.5, c.R < 10 }
	crossing := Probe(o, 6.8, 0.5, 5, g)
	if len(crossing.Crossings) < 2 {
		t.Fatalf("test photon has %d crossings, want several", len(crossing.Crossings))
	}
	o60, err := raytrace.NewObserver(0.9, 60)
	if err != nil {
		t.Fatal(err)
	}
	// At (0, 0), η = -a² cos²θo < 0: the photon never crosses the plane
	// (Bardeen 1973; see the raytrace documentation).
	never := Probe(o60, 0, 0, 3, nil)
	if len(never.Crossings) != 0 {
		t.Fatalf("photon at (0, 0) crosses %d times, want 0", len(never.Crossings))
	}
	for name, rep := range map[string]ProbeReport{"crossing": crossing, "never": never} {
		checkWriteErrors(t, name+" text", rep.WriteText)
		checkWriteErrors(t, name+" JSON", rep.WriteJSON)
	}
	var text strings.Builder
	if err := crossing.WriteText(&text); err != nil || !strings.Contains(text.String(), "off disk") || !strings.Contains(text.String(), "0.50000000") {
		t.Errorf("text report lacks the g column: %v\n%s", err, text.String())
	}
}
