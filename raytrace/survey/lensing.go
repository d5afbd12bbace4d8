package survey

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"kerrscope/raytrace"
)

// LensingBand is the stretch of one screen direction whose photons cross
// the equatorial plane at least Order+1 times: the n-th lensing band of
// Johnson et al. (2020, Science Advances 6, eaaz1310), cut along a ray
// from a centre point at angle Direction (degrees, counter-clockwise from
// the +α axis).
type LensingBand struct {
	Order     int     `json:"order"`
	Direction float64 `json:"direction_deg"`
	Inner     float64 `json:"inner"` // distance from the centre where the band starts, M
	Outer     float64 `json:"outer"` // … and ends, M
	Width     float64 `json:"width"` // Outer - Inner, M
	// Demagnified is Width over the previous order's width; nil (JSON
	// null, "—" in the table) for the first order, which has none.
	Demagnified *float64 `json:"ratio_to_previous"`
}

// crossings counts the plane crossings (up to max) of the photon at
// distance rho from (ca, cb) along (ux, uy).
func crossings(o raytrace.Observer, ca, cb, ux, uy, rho float64, max int, p *raytrace.Path) int {
	o.Trace(ca+rho*ux, cb+rho*uy, max, p)
	return len(p.Crossings)
}

// LensingBands measures bands 1 … maxOrder along one direction from the
// centre (ca, cb) (choose a point inside the shadow, e.g. its centroid).
// The bands straddle the critical curve; each edge is found by bracketing
// outward from the curve and bisecting to 1e-14 relative. Band 0 (at least
// one crossing) covers most of the screen and has no finite width, so it
// is not listed.
func LensingBands(o raytrace.Observer, ca, cb, dirDeg float64, maxOrder int) []LensingBand {
	s, c := math.Sincos(dirDeg * math.Pi / 180)
	ux, uy := c, s
	// The critical curve along this direction: bisect on the fate.
	var p raytrace.Path
	lo, hi := 0.0, 1.0
	for {
		o.Trace(ca+hi*ux, cb+hi*uy, 0, &p)
		if p.Fate == raytrace.Escaped || hi > 1e4 {
			break
		}
		lo, hi = hi, hi*2
	}
	for i := 0; i < 200 && hi-lo > 1e-15*hi; i++ {
		mid := (lo + hi) / 2
		o.Trace(ca+mid*ux, cb+mid*uy, 0, &p)
		if p.Fate == raytrace.Captured {
			lo = mid
		} else {
			hi = mid
		}
	}
	rc := (lo + hi) / 2
	var out []LensingBand
	for n := 1; n <= maxOrder; n++ {
		need := n + 1
		// The band contains the critical curve; find where the crossing
		// count drops below need on each side.
		edge := func(sign float64) float64 {
			in := 0.0 // offset known inside the band
			step := 1e-14 * rc
			for crossings(o, ca, cb, ux, uy, rc+sign*step, need, &p) >= need {
				in = step
				step *= 2
				// Inward the band may reach the centre; outward it
				// ends within a few rc (the last crossing runs out
				// to infinity there) unless the direction misses
				// the hole's lensing altogether.
				if (sign < 0 && step > rc) || step > 1e3*rc {
					return rc + sign*step
				}
			}
			out := step
			for i := 0; i < 200 && out-in > 1e-15*rc; i++ {
				mid := (in + out) / 2
				if crossings(o, ca, cb, ux, uy, rc+sign*mid, need, &p) >= need {
					in = mid
				} else {
					out = mid
				}
			}
			return rc + sign*(in+out)/2
		}
		inner, outer := edge(-1), edge(1)
		b := LensingBand{Order: n, Direction: dirDeg, Inner: inner, Outer: outer, Width: outer - inner}
		if len(out) > 0 && out[len(out)-1].Width > 0 {
			ratio := b.Width / out[len(out)-1].Width
			b.Demagnified = &ratio
		}
		out = append(out, b)
	}
	return out
}

// LensingReport lists the lensing bands of one observer along several
// screen directions from the centre of its shadow. Its JSON keys are fixed
// so that scripts can rely on them; the fields follow their alphabetical
// order.
type LensingReport struct {
	Bands          []LensingBand `json:"bands"`
	CenterAlpha    float64       `json:"center_alpha"` // centre of the shadow, M
	CenterBeta     float64       `json:"center_beta"`
	InclinationDeg float64       `json:"inclination_deg"`
	Spin           float64       `json:"spin"`
}

// Lensing measures the bands 1 … maxOrder (see LensingBands) along each
// of the directions (degrees, counter-clockwise from the +α axis) from the
// centre of the shadow, taken as the middle of the bounding box of the
// critical curve, which lies inside the shadow.
// It stops between directions once ctx is cancelled and returns
// context.Cause(ctx).
func Lensing(ctx context.Context, o raytrace.Observer, directionsDeg []float64, maxOrder int) (LensingReport, error) {
	ca, cb := ShadowCenter(o)
	rep := LensingReport{CenterAlpha: ca, CenterBeta: cb,
		InclinationDeg: o.InclinationDeg(), Spin: o.Spin()}
	for _, d := range directionsDeg {
		if ctx.Err() != nil {
			return LensingReport{}, context.Cause(ctx)
		}
		rep.Bands = append(rep.Bands, LensingBands(o, rep.CenterAlpha, rep.CenterBeta, d, maxOrder)...)
	}
	return rep, nil
}

// ShadowCenter returns the middle of the bounding box of the observer's
// critical curve (Bardeen 1973), a point inside the shadow from which the
// lensing bands and photon rings are measured.
func ShadowCenter(o raytrace.Observer) (alpha, beta float64) {
	amin, amax, bmin, bmax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, p := range o.CriticalCurve(400) {
		amin, amax = min(amin, p.Alpha), max(amax, p.Alpha)
		bmin, bmax = min(bmin, p.Beta), max(bmax, p.Beta)
	}
	return (amin + amax) / 2, (bmin + bmax) / 2
}

// WriteJSON writes the report as one JSON object and a newline.
func (r LensingReport) WriteJSON(w io.Writer) error {
	b, err := json.Marshal(r)
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// WriteText writes the report as a table for people. It stops at the
// first failed write and returns its error.
func (r LensingReport) WriteText(w io.Writer) error {
	p := &printer{w: w}
	p.printf("lensing bands (photons crossing the equatorial plane ≥ n+1 times), a = %g, i = %g°\n", r.Spin, r.InclinationDeg)
	p.printf("distances from the shadow centre (α, β) = (%.6g, %.6g) M; e^-π = %.6f for reference (a = 0)\n\n", r.CenterAlpha, r.CenterBeta, math.Exp(-math.Pi))
	if p.err != nil {
		return p.err
	}
	tw := tabwriter.NewWriter(w, 0, 0, 3, ' ', 0)
	t := &printer{w: tw}
	t.println("  direction [°]\tn\tinner [M]\touter [M]\twidth [M]\twidth / previous")
	for _, b := range r.Bands {
		ratio := "—"
		if b.Demagnified != nil {
			ratio = fmt.Sprintf("%.6f", *b.Demagnified)
		}
		t.printf("  %g\t%d\t%.10g\t%.10g\t%.6g\t%s\n", b.Direction, b.Order, b.Inner, b.Outer, b.Width, ratio)
	}
	if t.err != nil {
		return t.err
	}
	return tw.Flush()
}
