package raytrace

import (
	"math"
	"sort"
)

// Sampling and search policy of the critical curve (choices of this
// package).
const (
	// minCurvePoints is the least n CriticalCurve accepts.
	minCurvePoints = 8
	// curveScan is the number of equal steps in the orbit parameter t
	// used to find the part of the curve seen at an inclination before
	// its ends are bisected.
	curveScan = 4096
	// searchMaxIter and searchTol bound the bisections in t ∈ [0, 1] and
	// the golden-section search of CriticalLocator: 1e-17 lies below the
	// float64 spacing near t = 1 (1.1e-16), so the searches run until the
	// bracket stops shrinking, within searchMaxIter halvings.
	searchMaxIter = 200
	searchTol     = 1e-17
	// progradePoints extra parameters t - tlo = 10^(progradeFirstExp + j/
	// progradePerDecade), j = 0 … progradePoints-1, resolve the thin
	// near-horizon vertical piece of the curve of near-extremal holes
	// (α ≈ -2/sin θo), which spans a tiny range of t at the prograde end.
	progradePoints    = 48
	progradeFirstExp  = -12
	progradePerDecade = 4
	// locatorSamples is the sampling of the curve that CriticalLocator
	// brackets its nearest point on before refining it.
	locatorSamples = 400
)

// ScreenPoint is a point (α, β) on the observer's screen, in M.
type ScreenPoint struct{ Alpha, Beta float64 }

// criticalConstants returns λ and η of the spherical photon orbit labelled
// by t ∈ [0, 1], which runs linearly in r from the prograde (t = 0) to
// the retrograde (t = 1) equatorial photon orbit (Bardeen 1973):
//
//	λ(r) = a + (r/a)[r - 2Δ/(r - 1)],  η(r) = (r³/a²)[4Δ/(r - 1)² - r]
//
// rewritten with d = (3 - r)/|a| as λ = |a| + r(r d - 2|a|)/(r - 1) and
// η = r³(4 - r d²)/(r - 1)², where d comes from the photon-orbit radii
// 3 ∓ [2 sin²(x/2) ± √3 sin x], x = (2/3) arcsin|a| (Bardeen, Press &
// Teukolsky 1972, eq. 2.18), so nothing divides by a: a = 0 gives the
// circle of radius √27 (Synge 1966). For a < 0 the orbit is mirrored
// (λ → -λ). Domain: -1 < a < 1, 0 ≤ t ≤ 1.
func criticalConstants(a, t float64) (r, lambda, eta float64) {
	b := math.Abs(a)
	x := 2.0 / 3.0 * math.Asin(b)
	sx := math.Sin(x)
	sh := math.Sin(x / 2)
	s2 := sh * sh
	r = 3 - 2*s2 - math.Sqrt(3)*sx*(1-2*t)
	var d float64
	if b == 0 {
		d = 2 / math.Sqrt(3) * (1 - 2*t)
	} else {
		d = (2*s2 + math.Sqrt(3)*sx*(1-2*t)) / b
	}
	lambda = b + r*(r*d-2*b)/(r-1)
	eta = r * r * r * (4 - r*d*d) / ((r - 1) * (r - 1))
	if a < 0 {
		lambda = -lambda
	}
	return r, lambda, eta
}

// criticalBeta2 returns α and β² of the critical photon labelled t on this
// observer's screen (β² < 0: that photon orbit is not seen at θo).
func (o Observer) criticalBeta2(t float64) (alpha, beta2 float64) {
	a := o.spin
	_, lambda, eta := criticalConstants(a, t)
	c, s := o.cos, o.sin
	alpha = -lambda / s
	beta2 = eta + a*a*c*c - lambda*lambda*c*c/(s*s)
	return alpha, beta2
}

// CriticalCurve returns the edge of the black hole's shadow (the critical
// curve of Bardeen 1973) on this observer's screen as a closed polyline of
// about 2n points, upper half (β ≥ 0) left to right then lower half back.
// Points cluster where the curve bends fastest and, for spins near 1, along
// the near-horizon vertical piece at α ≈ -2/sin θo. For θo = 0° or 180°
// the curve is a circle of radius sqrt(η + a²) of the orbit with λ = 0.
// Domain: n ≥ 8 (smaller n is raised to 8).
func (o Observer) CriticalCurve(n int) []ScreenPoint {
	o = o.resolved()
	if n < minCurvePoints {
		n = minCurvePoints
	}
	a := o.spin
	if o.sin == 0 {
		// On the axis: only the orbit with λ = 0 reaches the observer.
		lo, hi := 0.0, 1.0
		_, l0, _ := criticalConstants(a, lo)
		for i := 0; i < searchMaxIter && hi-lo > searchTol; i++ {
			mid := (lo + hi) / 2
			_, lm, _ := criticalConstants(a, mid)
			if (lm > 0) == (l0 > 0) {
				lo = mid
			} else {
				hi = mid
			}
		}
		_, _, eta := criticalConstants(a, (lo+hi)/2)
		rad := math.Sqrt(eta + a*a)
		pts := make([]ScreenPoint, 2*n)
		for i := range pts {
			s, c := math.Sincos(2 * math.Pi * float64(i) / float64(len(pts)))
			pts[i] = ScreenPoint{rad * c, rad * s}
		}
		return pts
	}
	ts := o.criticalParams(n)
	if ts == nil {
		return nil
	}
	pts := make([]ScreenPoint, 0, 2*len(ts))
	for _, t := range ts {
		al, b2 := o.criticalBeta2(t)
		pts = append(pts, ScreenPoint{al, math.Sqrt(max(0, b2))})
	}
	for i := len(ts) - 1; i >= 0; i-- {
		al, b2 := o.criticalBeta2(ts[i])
		pts = append(pts, ScreenPoint{al, -math.Sqrt(max(0, b2))})
	}
	return pts
}

// criticalParams returns sorted curve parameters t covering the part of
// the critical curve seen at this inclination (β² ≥ 0), clustered at both
// ends and, geometrically, toward the prograde end; nil if none is seen.
func (o Observer) criticalParams(n int) []float64 {
	// Find the t-interval where β² ≥ 0 by scanning, then bisecting its ends.
	first, last := -1, -1
	for i := 0; i <= curveScan; i++ {
		if _, b2 := o.criticalBeta2(float64(i) / curveScan); b2 >= 0 {
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	if first < 0 {
		return nil
	}
	edge := func(in, out float64) float64 {
		for i := 0; i < searchMaxIter && math.Abs(in-out) > searchTol; i++ {
			mid := (in + out) / 2
			if _, b2 := o.criticalBeta2(mid); b2 >= 0 {
				in = mid
			} else {
				out = mid
			}
		}
		return in
	}
	tlo, thi := 0.0, 1.0
	if first > 0 {
		tlo = edge(float64(first)/curveScan, float64(first-1)/curveScan)
	}
	if last < curveScan {
		thi = edge(float64(last)/curveScan, float64(last+1)/curveScan)
	}
	span := thi - tlo
	ts := make([]float64, 0, n+progradePoints)
	for i := 0; i < n; i++ {
		u := float64(i) / float64(n-1)
		ts = append(ts, tlo+span*(1-math.Cos(math.Pi*u))/2)
	}
	// Geometric points near the prograde end resolve the thin vertical
	// piece of near-extremal holes.
	for j := 0; j < progradePoints; j++ {
		ts = append(ts, tlo+span*math.Pow(10, progradeFirstExp+float64(j)/progradePerDecade))
	}
	sort.Float64s(ts)
	return ts
}

// CriticalDistance returns the distance on the screen (in M) from (α, β)
// to the critical curve, and the point of the curve nearest to it. It
// brackets the nearest point on a dense sampling of the curve and refines
// the curve parameter by golden-section search, so it stays accurate far
// below the sampling step (down to ~1e-12 M near the near-extremal
// vertical piece). On the spin axis (θo = 0°, 180°) the curve is a circle.
func (o Observer) CriticalDistance(alpha, beta float64) (float64, ScreenPoint) {
	return o.NewCriticalLocator().Distance(alpha, beta)
}

// CriticalLocator answers many CriticalDistance queries for one observer,
// sampling the curve once. Safe for concurrent use. Build it with
// Observer.NewCriticalLocator; the zero value measures to the curve of
// Observer{}.
type CriticalLocator struct {
	o  Observer
	ts []float64
}

// NewCriticalLocator samples the observer's critical curve for Distance.
func (o Observer) NewCriticalLocator() CriticalLocator {
	o = o.resolved()
	c := CriticalLocator{o: o}
	if o.sin != 0 {
		c.ts = o.criticalParams(locatorSamples)
	}
	return c
}

// Distance is CriticalDistance with the sampling done once.
func (c CriticalLocator) Distance(alpha, beta float64) (float64, ScreenPoint) {
	o := c.o.resolved()
	if o.sin == 0 {
		pts := o.CriticalCurve(8)
		rad := math.Hypot(pts[0].Alpha, pts[0].Beta)
		rho := math.Hypot(alpha, beta)
		if rho == 0 {
			return rad, pts[0]
		}
		return math.Abs(rho - rad), ScreenPoint{alpha * rad / rho, beta * rad / rho}
	}
	ts := c.ts
	if len(ts) == 0 {
		return math.Inf(1), ScreenPoint{math.NaN(), math.NaN()}
	}
	sign := 1.0
	if beta < 0 {
		sign = -1
	}
	pt := func(t float64) ScreenPoint {
		al, b2 := o.criticalBeta2(t)
		return ScreenPoint{al, sign * math.Sqrt(max(0, b2))}
	}
	dist := func(t float64) float64 {
		p := pt(t)
		return math.Hypot(p.Alpha-alpha, p.Beta-beta)
	}
	best := 0
	bd := math.Inf(1)
	for i, t := range ts {
		if d := dist(t); d < bd {
			best, bd = i, d
		}
	}
	lo, hi := ts[max(0, best-1)], ts[min(len(ts)-1, best+1)]
	const gr = 0.6180339887498949
	x1, x2 := hi-gr*(hi-lo), lo+gr*(hi-lo)
	f1, f2 := dist(x1), dist(x2)
	for i := 0; i < searchMaxIter && hi-lo > searchTol*max(1, math.Abs(hi)); i++ {
		if f1 < f2 {
			hi, x2, f2 = x2, x1, f1
			x1 = hi - gr*(hi-lo)
			f1 = dist(x1)
		} else {
			lo, x1, f1 = x1, x2, f2
			x2 = lo + gr*(hi-lo)
			f2 = dist(x2)
		}
	}
	t := (lo + hi) / 2
	if d := dist(t); d < bd {
		return d, pt(t)
	}
	return bd, pt(ts[best])
}
