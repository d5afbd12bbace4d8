package survey

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
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
	// The photon's light comes from its first crossing on the disk, not
	// from where the path traced back ends.
	first, ok := crossing.firstOnDisk()
	if !ok {
		t.Fatal("test photon lands nowhere on the disk")
	}
	if want := fmt.Sprintf("its light comes from the disk at crossing %d", first.Order); !strings.Contains(text.String(), want) {
		t.Errorf("text report does not say %q:\n%s", want, text.String())
	}
	// Outbound crossings move to larger r (raytrace.Crossing): away from the hole.
	for _, c := range crossing.Crossings {
		if c.Outbound && !strings.Contains(text.String(), "away from the hole") || !c.Outbound && !strings.Contains(text.String(), "toward the hole") {
			t.Errorf("crossing %d (outbound %v) is not described by its direction:\n%s", c.Order, c.Outbound, text.String())
		}
	}
	var offDisk strings.Builder
	if err := Probe(o, 6.8, 0.5, 5, nil).WriteText(&offDisk); err != nil || !strings.Contains(offDisk.String(), "it comes from: ") {
		t.Errorf("a photon that lands nowhere on the disk is not traced to its end: %v\n%s", err, offDisk.String())
	}
}

func TestProbeTimingSchwarzschild(t *testing.T) {
	// At a = 0 a photon moves in a plane through the centre, so its
	// successive equatorial crossings lie on one line through the hole:
	// their azimuths differ by π (Chandrasekhar 1983, The Mathematical
	// Theory of Black Holes, §20), and the earlier crossing is the later
	// in the report, so its delay is larger.
	o, err := raytrace.NewObserver(0, 75)
	if err != nil {
		t.Fatal(err)
	}
	rep := Probe(o, 5.25, 0.5, 3, nil)
	if len(rep.Crossings) < 2 {
		t.Fatalf("%d crossings, want at least 2", len(rep.Crossings))
	}
	c0, c1 := rep.Crossings[0], rep.Crossings[1]
	if d := math.Abs(c1.DeltaPhi - c0.DeltaPhi); math.Abs(d-math.Pi) > 1e-12 {
		t.Errorf("crossings differ by %.15g rad in azimuth, want π", d)
	}
	if !(c1.TimeDelay > c0.TimeDelay) {
		t.Errorf("delays %v, %v: the earlier crossing must have the larger delay", c0.TimeDelay, c1.TimeDelay)
	}
	var text strings.Builder
	if err := rep.WriteText(&text); err != nil || !strings.Contains(text.String(), "delay [M]") {
		t.Errorf("text report lacks the delay column: %v\n%s", err, text.String())
	}
}

// ProbePolarised adds the angles of the crossings on the disk, in
// degrees, to the JSON and the table; Probe and crossings off the disk
// carry none (the JSON keys are then absent).
func TestProbePolarisedAngles(t *testing.T) {
	o, err := raytrace.NewObserver(0.5, 40)
	if err != nil {
		t.Fatal(err)
	}
	onDisk := func(c raytrace.Crossing, _, _ float64) (float64, bool) { return 1, c.R > 4 }
	polar := func(beta float64, n int, c raytrace.Crossing, _, _ float64) (float64, float64, bool) {
		return 0.25, -math.Pi / 4, true
	}
	rep := ProbePolarised(o, 6, 2, 3, onDisk, polar)
	if len(rep.Crossings) == 0 {
		t.Fatal("no crossings")
	}
	for _, c := range rep.Crossings {
		if (c.G != nil) != (c.EVPAObserved != nil) {
			t.Errorf("order %d: g %v, EVPA %v", c.Order, c.G, c.EVPAObserved)
		}
		if c.EVPAObserved != nil && (math.Abs(*c.EVPAObserved+45) > 1e-12 || math.Abs(*c.EVPAEmitted-0.25*180/math.Pi) > 1e-12) {
			t.Errorf("order %d: angles %v, %v degrees", c.Order, *c.EVPAEmitted, *c.EVPAObserved)
		}
	}
	var b bytes.Buffer
	if err := rep.WriteJSON(&b); err != nil || !strings.Contains(b.String(), `"evpa_observed_deg":-45`) {
		t.Errorf("JSON %s (%v)", b.String(), err)
	}
	b.Reset()
	if err := rep.WriteText(&b); err != nil || !strings.Contains(b.String(), "EVPA on sky [°]") {
		t.Errorf("text %s (%v)", b.String(), err)
	}
	b.Reset()
	if err := Probe(o, 6, 2, 3, onDisk).WriteJSON(&b); err != nil || strings.Contains(b.String(), "evpa") {
		t.Errorf("plain probe JSON %s (%v)", b.String(), err)
	}
}
