package outputs

import (
	"bytes"
	"context"
	"encoding/binary"
	"math"
	"strconv"
	"strings"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// fitsHDU is one header-data unit read back by readHDUs: its cards by key
// (first occurrence) and its float32 data.
type fitsHDU struct {
	cards map[string]string
	data  []float32
}

// readHDUs splits a FITS file into its HDUs by the rules of the FITS
// Standard 4.0 (2880-byte blocks, 80-character cards, BITPIX −32 data of
// NAXIS1 × NAXIS2 big-endian floats).
func readHDUs(t *testing.T, b []byte) []fitsHDU {
	t.Helper()
	var out []fitsHDU
	for len(b) >= 2880 {
		h := fitsHDU{cards: map[string]string{}}
		n := 0
		for ; ; n += 80 {
			card := string(b[n : n+80])
			key := strings.TrimSpace(card[:8])
			if key == "END" {
				break
			}
			if _, ok := h.cards[key]; !ok && len(card) > 10 && card[8] == '=' {
				v, _, _ := strings.Cut(card[10:], " /")
				h.cards[key] = strings.Trim(strings.TrimSpace(v), "' ")
			}
		}
		b = b[(n/2880+1)*2880:]
		w, _ := strconv.Atoi(h.cards["NAXIS1"])
		hh, _ := strconv.Atoi(h.cards["NAXIS2"])
		if h.cards["NAXIS"] == "2" {
			h.data = make([]float32, w*hh)
			for i := range h.data {
				h.data[i] = math.Float32frombits(binary.BigEndian.Uint32(b[4*i:]))
			}
			b = b[(4*w*hh+2879)/2880*2880:]
		}
		out = append(out, h)
	}
	return out
}

func polarScene(t *testing.T, maps []string) scene.Resolved {
	return resolve(t, func(s *scene.Scene) {
		s.Screen.Width, s.Screen.Height = 24, 20
		s.Observer.PositionAngleDeg = 40
		s.Output.Maps = maps
		s.Output.Formats = []string{"fits", "csv"}
	})
}

// The FITS file of a scene with the polarisation map carries Stokes Q and
// U per order and summed, stated in the IAU convention, the net
// polarisation and β₂ in the primary header (the values of
// pixels.Frame.Net), and the maps in FITS row order (row 0 at the
// bottom); without the map the file has none of them.
func TestFITSStokes(t *testing.T) {
	r := polarScene(t, []string{scene.PolarisationMap})
	arts := Artifacts(r.Output, Set{})
	f, err := pixels.Render(context.Background(), r, nil, Needs(arts))
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := writeFITS(&b, f, "test"); err != nil {
		t.Fatal(err)
	}
	hdus := readHDUs(t, b.Bytes())
	byName := map[string]fitsHDU{}
	for _, h := range hdus[1:] {
		byName[h.cards["EXTNAME"]] = h
	}
	for o := 0; o < f.Orders; o++ {
		for _, n := range []string{"Q_ORD", "U_ORD"} {
			h, ok := byName[n+strconv.Itoa(o)]
			if !ok {
				t.Fatalf("no %s%d image", n, o)
			}
			if h.cards["POLCONV"] != "IAU" {
				t.Errorf("%s%d: POLCONV %q", n, o, h.cards["POLCONV"])
			}
		}
	}
	q := byName["STOKES_Q"]
	for j := 0; j < f.H; j++ {
		for i := 0; i < f.W; i++ {
			want := f.TotalAt(f.Q, (f.H-1-j)*f.W+i)
			got := q.data[j*f.W+i]
			if !(got == want || (math.IsNaN(float64(got)) && math.IsNaN(float64(want)))) {
				t.Fatalf("STOKES_Q FITS row %d col %d: %v, frame %v", j, i, got, want)
			}
		}
	}
	n := f.Net()
	p := hdus[0].cards
	for key, want := range map[string]float64{"POLNET": n.Fraction, "EVPANET": n.Angle * 180 / math.Pi, "BFIELDP": 1, "POLEMIT": r.Polar.Fraction} {
		got, err := strconv.ParseFloat(p[key], 64)
		if err != nil || math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
			t.Errorf("primary %s = %q, want %v", key, p[key], want)
		}
	}
	if p["POLCONV"] != "IAU" {
		t.Errorf("primary POLCONV %q", p["POLCONV"])
	}

	plain := polarScene(t, []string{"intensity"})
	g, err := pixels.Render(context.Background(), plain, nil, Needs(Artifacts(plain.Output, Set{})))
	if err != nil {
		t.Fatal(err)
	}
	b.Reset()
	if err := writeFITS(&b, g, "test"); err != nil {
		t.Fatal(err)
	}
	if s := b.String(); strings.Contains(s, "STOKES_Q") || strings.Contains(s, "POLCONV") {
		t.Error("FITS of a scene without the polarisation map carries Stokes maps")
	}
}

// The spectrum CSV of a polarised scene has Q(E), U(E) columns that sum
// to the frame's Q spectrum, which holds the image's Q flux, and a fraction no larger than the
// emitted one (common practice: the polarisation of a sum is at most the
// largest of its parts).
func TestCSVStokes(t *testing.T) {
	r := polarScene(t, []string{scene.PolarisationMap})
	arts := Artifacts(r.Output, Set{})
	f, err := pixels.Render(context.Background(), r, nil, Needs(arts))
	if err != nil {
		t.Fatal(err)
	}
	spec := f.Spectrum()
	qs, us := f.StokesSpectrum()
	var b bytes.Buffer
	if err := writeCSV(&b, &spec, &qs, &us, "t", r); err != nil {
		t.Fatal(err)
	}
	var head []string
	sumQ, wantQ := 0.0, 0.0
	for _, line := range strings.Split(strings.TrimSpace(b.String()), "\n") {
		if strings.HasPrefix(line, "#") {
			continue
		}
		cols := strings.Split(line, ",")
		if head == nil {
			head = cols
			continue
		}
		get := func(name string) string {
			for i, h := range head {
				if h == name {
					return cols[i]
				}
			}
			t.Fatalf("no column %s in %v", name, head)
			return ""
		}
		qv, _ := strconv.ParseFloat(get("stokes_q"), 64)
		sumQ += qv * spec.Width()
		if fr := get("pol_fraction"); fr != "" {
			if v, _ := strconv.ParseFloat(fr, 64); v > r.Polar.Fraction+1e-6 {
				t.Errorf("bin fraction %v above the emitted %v", v, r.Polar.Fraction)
			}
		}
	}
	for _, v := range qs.Order {
		for _, x := range v {
			wantQ += x
		}
	}
	if math.Abs(sumQ-wantQ) > 1e-8*math.Max(1e-30, math.Abs(wantQ)) {
		t.Errorf("stokes_q column sums to %v, the frame's Q spectrum to %v", sumQ, wantQ)
	}
	// The Q spectrum holds the image's Q: in range plus below and above.
	img := 0.0
	for o := range f.Q {
		for _, v := range f.Q[o] {
			if !math.IsNaN(float64(v)) {
				img += float64(v) * r.PixelSize * r.PixelSize
			}
		}
	}
	if got := wantQ + qs.Below + qs.Above; math.Abs(got-img) > 1e-9*math.Abs(img)+1e-15 {
		t.Errorf("Q spectrum holds %v, the image %v", got, img)
	}
}

// MemoryEstimate covers the Stokes records of a polarisation map: from a
// one-pixel image to a larger one it grows by at least the frame's
// records counted from the slices, Q and U included.
func TestMemoryEstimateCoversStokes(t *testing.T) {
	live := func(w, h, n int) (int64, int64) {
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height, s.Disk.Orders = w, h, n
			s.Output.Formats, s.Output.Maps = []string{"png", "fits"}, []string{scene.PolarisationMap}
		})
		arts := Artifacts(r.Output, Set{Manifest: true})
		f, err := pixels.Render(context.Background(), r, nil, Needs(arts))
		if err != nil {
			t.Fatal(err)
		}
		if f.Q == nil {
			t.Fatal("no Stokes records kept")
		}
		b := int64(len(f.Fate)+len(f.First)) + 4*int64(w*h) // the figure's map image
		for _, q := range [][][]float32{f.R, f.G, f.Line, f.Bol, f.Q, f.U} {
			for _, v := range q {
				b += 4 * int64(len(v))
			}
		}
		return b, MemoryEstimate(r, Set{Manifest: true}, 2)
	}
	for _, c := range [][3]int{{40, 30, 1}, {64, 64, 3}, {33, 17, 8}} {
		l0, e0 := live(1, 1, c[2])
		l1, e1 := live(c[0], c[1], c[2])
		if e1-e0 < l1-l0 {
			t.Errorf("%v: estimate grows by %d bytes, the live data by %d", c, e1-e0, l1-l0)
		}
	}
}
