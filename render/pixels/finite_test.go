package pixels

import (
	"context"
	"errors"
	"math"
	"slices"
	"testing"

	"kerrscope/scene"
)

// TestExtremeAllowedIndexIsFinite renders at the steepest rising
// emissivity the scene accepts for the default disk: every map and the
// spectrum must be finite.
func TestExtremeAllowedIndexIsFinite(t *testing.T) {
	qmax, _ := scene.Emissivity{Kind: scene.PowerLaw}.IndexLimits(30)
	for _, q := range []float64{-qmax, qmax} {
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height = 24, 24
			s.Emission.Index = q
			s.Emission.Limb = "laor"
			s.Observer.InclinationDeg = 85
			s.Hole.Spin = 0.998
		})
		f := render(t, r)
		if _, err := CheckFinite(f); err != nil {
			t.Errorf("q = %v: %v", q, err)
		}
	}
}

// CheckFinite checks the records in pieces on all cores; the error it
// gives is still that of the first bad pixel in pixel order (row by row
// from the top), with the record and order a scan from pixel 0 names:
// bad values are put into a rendered frame in a late row and in an
// earlier one, each in a different piece, and then the earlier one is
// mended. A sum over the orders beyond float32 is caught too.
func TestCheckFiniteFirstBadPixel(t *testing.T) {
	r := resolve(t, func(s *scene.Scene) { s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 40, 5*finiteRows+3, 20 })
	f := render(t, r)
	if _, err := CheckFinite(f); err != nil {
		t.Fatal(err)
	}
	// seen returns a pixel of piece p (rows p·finiteRows on) where
	// order o is seen.
	seen := func(p, o int) int {
		for k := p * finiteRows * f.W; k < (p+1)*finiteRows*f.W; k++ {
			if !math.IsNaN(float64(f.G[o][k])) {
				return k
			}
		}
		t.Fatalf("piece %d has no pixel where order %d is seen", p, o)
		return 0
	}
	late, early := seen(3, 0), seen(1, 0)
	f.R[0][late] = float32(math.Inf(1))
	oldG := f.G[0][early]
	f.G[0][early] = float32(math.NaN())
	check := func(want NonFiniteError) {
		t.Helper()
		_, err := CheckFinite(f)
		var nf *NonFiniteError
		if !errors.As(err, &nf) {
			t.Fatalf("error %v, want a *NonFiniteError", err)
		}
		if nf.Quantity != want.Quantity || nf.Order != want.Order || nf.Pixel != want.Pixel || nf.Bin != -1 {
			t.Fatalf("error %v, want %s of order %d at pixel %v", err, want.Quantity, want.Order, want.Pixel)
		}
	}
	at := func(k int) [2]int { return [2]int{k % f.W, k / f.W} }
	check(NonFiniteError{Quantity: "redshift factor g", Order: 0, Pixel: at(early)})
	f.G[0][early] = oldG
	check(NonFiniteError{Quantity: "source radius", Order: 0, Pixel: at(late)})
	f.R[0][late] = f.G[0][late] // finite again
	if _, err := CheckFinite(f); err != nil {
		t.Fatal(err)
	}
	// Two orders of 3e38 each: finite as float32, their sum is not.
	f.Line[0][late], f.Line[1][late] = 3e38, 3e38
	for _, q := range [][][]float32{f.R, f.G, f.Bol} {
		q[1][late] = q[0][late] // order 1 seen there too
	}
	check(NonFiniteError{Quantity: "line intensity", Order: -1, Pixel: at(late)})
}

// RenderChecked checks the records inside the render's workers, pixel by
// pixel; with CheckedSpectrum after it, the outcome is CheckFinite's
// after a plain render: the same error
// text for a scene whose intensities overflow float32, with and without
// refinement, and the same spectrum for one that does not.
func TestRenderCheckedIsCheckFinite(t *testing.T) {
	for _, c := range []struct {
		name  string
		q     float64 // emissivity index; -40 overflows (30^40 ≈ 1e59)
		depth int
	}{{"overflow", -40, 0}, {"overflow refined", -40, 1}, {"finite", 3, 0}} {
		r := resolve(t, func(s *scene.Scene) {
			s.Screen.Width, s.Screen.Height = 24, 3*finiteRows+5
			s.Refine.Depth = c.depth
		})
		r.Emissivity.Q = c.q
		f, err := RenderScene(context.Background(), r, nil, KeepAll)
		if err != nil {
			t.Fatal(err)
		}
		want, wantErr := CheckFinite(f)
		g, gotErr := RenderChecked(context.Background(), r, nil, KeepAll)
		var got *Spectrum
		if gotErr == nil {
			got, gotErr = CheckedSpectrum(g)
		}
		if (wantErr == nil) != (gotErr == nil) || wantErr != nil && wantErr.Error() != gotErr.Error() {
			t.Errorf("%s: RenderChecked error %v, CheckFinite %v", c.name, gotErr, wantErr)
		}
		if c.q < 0 && wantErr == nil {
			t.Errorf("%s: no error", c.name)
		}
		if wantErr == nil && (got == nil || !slices.Equal(got.Total(), want.Total()) || got.Below != want.Below || got.Above != want.Above) {
			t.Errorf("%s: RenderChecked's spectrum differs from CheckFinite's", c.name)
		}
	}
}
