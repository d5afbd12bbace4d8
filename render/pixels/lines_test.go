package pixels

import (
	"context"
	"math"
	"testing"

	"kerrscope/scene"
)

// linesScene resolves a small scene (40 × 40 pixels, two orders, a fixed
// energy range 1–12 keV) with the given line list and [emission] edits;
// depth > 0 refines.
func linesScene(t *testing.T, depth int, lines []scene.Line, edit func(s *scene.Scene)) scene.Resolved {
	t.Helper()
	s := scene.Default()
	s.Screen.Width, s.Screen.Height = 40, 40
	s.Disk.Orders = 2
	s.Disk.OuterRadius = 20
	s.Refine.Depth = depth
	s.Spectrum.MinKeV, s.Spectrum.MaxKeV = f64(1), f64(12)
	s.Spectrum.Bins = 300
	s.Lines = lines
	if edit != nil {
		edit(&s)
	}
	r, err := s.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	// One window for every render of a test: the automatic one of the
	// default disk, fixed.
	return r.WithWindow(50, 0, 0)
}

// spectrumOf renders r and collapses its spectrum.
func spectrumOf(t *testing.T, r scene.Resolved) Spectrum {
	t.Helper()
	f, err := RenderScene(context.Background(), r, nil)
	if err != nil {
		t.Fatal(err)
	}
	return f.Spectrum()
}

// peak is the largest value of v.
func peak(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}

// TestOneLineListIsTheOneLine: a list of one line at emission.line_kev's
// energy with [emission]'s law gives the spectrum of the scene without a
// list, bit for bit, plain and refined; its one line column is the total.
func TestOneLineListIsTheOneLine(t *testing.T) {
	for _, depth := range []int{0, 2} {
		single := spectrumOf(t, linesScene(t, depth, nil, nil))
		list := spectrumOf(t, linesScene(t, depth, []scene.Line{{EnergyKeV: 6.4, Weight: f64(0.3)}}, nil))
		if list.Line == nil || single.Line != nil {
			t.Fatalf("depth %d: line columns %v and %v", depth, len(list.Line), len(single.Line))
		}
		for o := range single.Order {
			for k, v := range single.Order[o] {
				if list.Order[o][k] != v {
					t.Fatalf("depth %d: order %d bin %d: %v, want %v", depth, o, k, list.Order[o][k], v)
				}
			}
		}
		if list.Below != single.Below || list.Above != single.Above {
			t.Errorf("depth %d: outside the range %v %v, want %v %v", depth, list.Below, list.Above, single.Below, single.Above)
		}
		tot := single.Total()
		for k := range tot {
			if d := math.Abs(list.Line[0][k] - tot[k]); d > 1e-14*peak(tot) {
				t.Fatalf("depth %d: bin %d: line column %v, total %v", depth, k, list.Line[0][k], tot[k])
			}
		}
		if peak(tot) == 0 {
			t.Fatalf("depth %d: empty spectrum", depth)
		}
	}
}

// TestTwoLinesAreWeightedSum: two lines of [emission]'s law with weights
// 3 and 1 give 3/4 of the one-line spectrum at the first energy plus 1/4
// of the one-line spectrum at the second, each rendered on its own (an
// independent render per line), plain and refined; each line's column is
// its share and the columns sum to the total.
func TestTwoLinesAreWeightedSum(t *testing.T) {
	for _, depth := range []int{0, 2} {
		at := func(e float64) Spectrum {
			return spectrumOf(t, linesScene(t, depth, nil, func(s *scene.Scene) { s.Emission.LineKeV = e }))
		}
		a, b := at(6.4), at(6.97)
		list := spectrumOf(t, linesScene(t, depth, []scene.Line{{EnergyKeV: 6.4, Weight: f64(3)}, {EnergyKeV: 6.97}}, nil))
		ta, tb, tl := a.Total(), b.Total(), list.Total()
		scale := peak(tl)
		if scale == 0 {
			t.Fatal("empty spectrum")
		}
		for k := range tl {
			want := 0.75*ta[k] + 0.25*tb[k]
			if d := math.Abs(tl[k] - want); d > 1e-12*scale {
				t.Fatalf("depth %d: bin %d: %v, want %v", depth, k, tl[k], want)
			}
			if d := math.Abs(list.Line[0][k] - 0.75*ta[k]); d > 1e-12*scale {
				t.Fatalf("depth %d: bin %d: line 1 %v, want %v", depth, k, list.Line[0][k], 0.75*ta[k])
			}
			if d := math.Abs(list.Line[1][k] - 0.25*tb[k]); d > 1e-12*scale {
				t.Fatalf("depth %d: bin %d: line 2 %v, want %v", depth, k, list.Line[1][k], 0.25*tb[k])
			}
			if d := math.Abs(list.Line[0][k] + list.Line[1][k] - tl[k]); d > 1e-13*scale {
				t.Fatalf("depth %d: bin %d: columns sum to %v, total %v", depth, k, list.Line[0][k]+list.Line[1][k], tl[k])
			}
		}
	}
}

// TestOwnLawLineMatchesOneLine: a list of a 6.4 keV line of [emission]'s
// power law and a 6.97 keV line of its own broken law, in physical units
// with luminosity L, gives per line the spectrum of a one-line scene of
// that line's law and energy with the line's luminosity F_l E_l L / Ē
// (rendered on its own), to the float32 precision of the intensity
// records; with a FWHM, after the same broadening. Plain and refined.
func TestOwnLawLineMatchesOneLine(t *testing.T) {
	phys := func(s *scene.Scene, lum float64) {
		s.Hole.MassSolar, s.Hole.DistanceKpc = f64(10), f64(8)
		s.Emission.LineLuminosityErgS = f64(lum)
		s.Spectrum.FWHMeV = 150
	}
	const lum = 1e37
	for _, depth := range []int{0, 2} {
		lines := []scene.Line{{EnergyKeV: 6.4, Weight: f64(2)}, {EnergyKeV: 6.97, Emissivity: strp("broken"), IndexInner: f64(6), IndexOuter: f64(2), BreakRad: f64(5)}}
		rl := linesScene(t, depth, lines, func(s *scene.Scene) { phys(s, lum) })
		list := spectrumOf(t, rl)
		if !rl.RestLines.Own() {
			t.Fatal("line 2 should have its own law")
		}
		mean := rl.RestLines.MeanKeV
		for l, edit := range []func(s *scene.Scene){
			func(s *scene.Scene) { s.Emission.LineKeV = 6.4; phys(s, lum*2.0/3*6.4/mean) },
			func(s *scene.Scene) {
				s.Emission.LineKeV = 6.97
				s.Emission.Emissivity, s.Emission.IndexInner, s.Emission.IndexOuter, s.Emission.BreakRad = "broken", 6, 2, 5
				phys(s, lum/3*6.97/mean)
			},
		} {
			r1 := linesScene(t, depth, nil, edit)
			one := spectrumOf(t, r1)
			want, got := one.Total(), list.Line[l]
			u1, ul := r1.SpectrumPerUnit(), rl.SpectrumPerUnit()
			scale := peak(want) * u1
			if scale == 0 {
				t.Fatal("empty spectrum")
			}
			for k := range want {
				if d := math.Abs(got[k]*ul - want[k]*u1); d > 3e-6*scale {
					t.Fatalf("depth %d: line %d bin %d: %g, one-line render %g photons/cm²/s per bin", depth, l+1, k, got[k]*ul, want[k]*u1)
				}
			}
		}
	}
}

func strp(s string) *string { return &s }
