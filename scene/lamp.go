package scene

import (
	"fmt"
	"math"

	"kerrscope/raytrace"
)

// Bounds and default of the lamp emissivity's keys.
const (
	// DefaultPhotonIndex is Γ = 2 of the illuminating power law
	// N(E) ∝ E^−Γ, typical of the hard X-rays of accreting holes (common
	// practice).
	DefaultPhotonIndex = 2.0
	// MinPhotonIndex and MaxPhotonIndex bound emission.photon_index.
	MinPhotonIndex, MaxPhotonIndex = 0.0, 6.0
	// MaxLampHeight bounds emission.lamp_height, in M.
	MaxLampHeight = 1e5
	// MinLampClearance is the least height of the lamp above the
	// horizon, in M.
	MinLampClearance = 1e-3
)

// Sampling of Illuminate: the emission angles start on lampGrid equal
// steps in cos ψ and are halved wherever the outcome changes (disk,
// infinity, horizon, or which crossing lands) down to lampEdge in cos ψ, and
// wherever the landing radius changes by more than lampStep in ln r. The
// profile has lampBinsPerDecade bins per decade of radius.
const (
	lampGrid          = 256
	lampEdge          = 1e-13
	lampStep          = 0.004
	lampBinsPerDecade = 48
	lampOrders        = MaxOrders
)

// Illumination is what a lamp (a point source at rest on the spin axis,
// isotropic in its own frame; Martocchia & Matt 1996, MNRAS 282, L53) does
// to the disk: where its photons go and how they light the disk, from the
// closed-form photons of raytrace.AxisSource.
//
// The profile is binned in radius (Edges, log-spaced over the disk).
// Photons is the fraction of the lamp's photons landing per unit of the
// disk's coordinate area 2πr dr: by the worldsheet element √|h| = r of
// resolvePhotonRate (flux.go) this is the photon rate per unit proper time
// and comoving area of the gas, for a lamp emitting one photon per unit
// coordinate time, whatever the gas's motion (the method of Wilkins &
// Fabian 2012, MNRAS 424, 1284, who count photons per proper area).
// Emission is the line emissivity the landing photons drive, with
// Shift g = E_gas/E_lamp of each photon:
//
//	ε = Σ (photon fraction) g^(Γ−1) / area,
//
// because a power law N(E) ∝ E^−Γ shifted by g has g^(Γ−1) E^−Γ photons
// per unit energy and the rate's own factor g is already in Photons (so ε
// is Wilkins & Fabian's N g^Γ/A per unit lamp time, up to a constant).
// Shift is the photon-weighted mean of each bin; Delay is the coordinate
// time from the lamp to the disk at the bin's centre: sqrt(r² + h²) there
// plus the photon-weighted mean of t − sqrt(r² + h²) over the bin (small
// and smooth: the bending and Shapiro parts).
type Illumination struct {
	Height, Index float64 // h in M and Γ
	Inner, Outer  float64 // disk edges, M
	Edges         []float64
	Photons       []float64
	Emission      []float64
	Shift         []float64
	Delay         []float64
	// Disk, Escape and Horizon are the fractions of the lamp's photons
	// that land on the disk (on either face, at their first landing),
	// reach infinity and fall into the hole; they sum to 1.
	Disk, Escape, Horizon float64
	// Photons traced.
	Traced int
}

// Reflection returns the ratio of the photons landing on the disk to those
// reaching infinity (+Inf if none escape).
func (il *Illumination) Reflection() float64 {
	if il.Escape == 0 {
		return math.Inf(1)
	}
	return il.Disk / il.Escape
}

// lampOutcome is where one lamp photon goes.
type lampOutcome struct {
	class int // 0 disk, 1 infinity, 2 horizon
	order int // crossing that lands (disk)
	r     float64
	g     float64 // E_gas/E_lamp
	t     float64 // time from the lamp to the disk, M
}

// Illuminate traces the lamp of height h (M) and photon index gamma over a
// disk from inner to outer (M) whose gas moves as gas does, and returns
// the fractions and the binned profile. Errors name the offending value;
// Resolve checks the ranges first (emission.lamp_height, photon_index).
func Illuminate(gas Gas, h, gamma, inner, outer float64) (*Illumination, error) {
	return illuminate(gas, h, gamma, inner, outer, lampGrid, lampStep)
}

// illuminate is Illuminate with the initial grid in cos ψ and the largest
// step in ln r of the landing radius as parameters.
func illuminate(gas Gas, h, gamma, inner, outer float64, grid int, step float64) (*Illumination, error) {
	src, err := raytrace.NewAxisSource(gas.Spin(), h)
	if err != nil {
		return nil, err
	}
	if !(inner > src.Horizon() && outer > inner) || math.IsInf(outer, 0) {
		return nil, fmt.Errorf("lamp: disk edges %v–%v M must lie outside the horizon, inner below outer", inner, outer)
	}
	nb := int(math.Ceil(lampBinsPerDecade * math.Log10(outer/inner)))
	nb = max(nb, 8)
	il := &Illumination{Height: h, Index: gamma, Inner: inner, Outer: outer,
		Edges: make([]float64, nb+1), Photons: make([]float64, nb), Emission: make([]float64, nb),
		Shift: make([]float64, nb), Delay: make([]float64, nb)}
	lin, lout := math.Log(inner), math.Log(outer)
	for i := range il.Edges {
		il.Edges[i] = math.Exp(lin + (lout-lin)*float64(i)/float64(nb))
	}
	il.Edges[0], il.Edges[nb] = inner, outer
	eLamp := src.LocalEnergy()
	var p raytrace.SourcePath
	var firstErr error
	shoot := func(mu float64) lampOutcome {
		il.Traced++
		psi := math.Acos(math.Max(-1, math.Min(1, mu)))
		if err := src.Emit(psi, lampOrders, &p); err != nil {
			if firstErr == nil {
				firstErr = err
			}
			return lampOutcome{class: 2}
		}
		for n, c := range p.Crossings {
			if c.R < inner || c.R > outer {
				continue
			}
			g, ok := gas.Redshift(c.R, 0, p.Eta, c.Outbound)
			if !ok || !(g > 0) {
				continue
			}
			return lampOutcome{class: 0, order: n, r: c.R, g: 1 / (g * eLamp), t: c.Time}
		}
		if p.Fate == raytrace.Escaped {
			return lampOutcome{class: 1}
		}
		return lampOutcome{class: 2}
	}
	sumW := make([]float64, nb)
	sumWG := make([]float64, nb)
	sumWT := make([]float64, nb)
	sumWE := make([]float64, nb)
	var frac [3]float64
	deposit := func(w float64, a, b lampOutcome) {
		frac[0] += w
		la, lb := math.Log(a.r), math.Log(b.r)
		if la > lb {
			la, lb = lb, la
		}
		g := (a.g + b.g) / 2
		// The delay less the straight path sqrt(r² + h²): small and smooth.
		tt := (a.t - math.Hypot(a.r, h) + b.t - math.Hypot(b.r, h)) / 2
		ge := math.Pow(g, gamma-1)
		// Spread w uniformly in ln r over [la, lb].
		pos := func(l float64) float64 { return (l - lin) / (lout - lin) * float64(nb) }
		x0, x1 := pos(la), pos(lb)
		i0 := min(nb-1, max(0, int(math.Floor(x0))))
		i1 := min(nb-1, max(0, int(math.Floor(x1))))
		for i := i0; i <= i1; i++ {
			share := 1.0
			if x1 > x0 {
				share = (math.Min(x1, float64(i+1)) - math.Max(x0, float64(i))) / (x1 - x0)
				if i == i0 && i == i1 {
					share = 1
				}
			}
			if !(share > 0) {
				continue
			}
			wi := w * share
			sumW[i] += wi
			sumWG[i] += wi * g
			sumWT[i] += wi * tt
			sumWE[i] += wi * ge
		}
	}
	var refine func(ma, mb float64, a, b lampOutcome)
	refine = func(ma, mb float64, a, b lampOutcome) {
		w := (mb - ma) / 2
		same := a.class == b.class && (a.class != 0 || a.order == b.order)
		if same && a.class != 0 {
			frac[a.class] += w
			return
		}
		if same && math.Abs(math.Log(a.r/b.r)) <= step {
			deposit(w, a, b)
			return
		}
		if mb-ma <= lampEdge {
			if same {
				deposit(w, a, b)
				return
			}
			for _, o := range []lampOutcome{a, b} {
				if o.class == 0 {
					deposit(w/2, o, o)
				} else {
					frac[o.class] += w / 2
				}
			}
			return
		}
		mm := (ma + mb) / 2
		m := shoot(mm)
		refine(ma, mm, a, m)
		refine(mm, mb, m, b)
	}
	prevMu := -1.0
	prev := shoot(prevMu)
	for i := 1; i <= grid; i++ {
		mu := -1 + 2*float64(i)/float64(grid)
		o := shoot(mu)
		refine(prevMu, mu, prev, o)
		prevMu, prev = mu, o
	}
	if firstErr != nil {
		return nil, fmt.Errorf("lamp at %v M: %w", h, firstErr)
	}
	il.Disk, il.Escape, il.Horizon = frac[0], frac[1], frac[2]
	for i := range nb {
		area := math.Pi * (il.Edges[i+1] - il.Edges[i]) * (il.Edges[i+1] + il.Edges[i])
		il.Photons[i] = sumW[i] / area
		il.Emission[i] = sumWE[i] / area
		if sumW[i] > 0 {
			il.Shift[i] = sumWG[i] / sumW[i]
			il.Delay[i] = sumWT[i]/sumW[i] + math.Hypot(il.Centre(i), h)
		} else {
			il.Shift[i], il.Delay[i] = math.NaN(), math.NaN()
		}
	}
	return il, nil
}

// Centre returns the bin centre √(r_i r_{i+1}) of bin i.
func (il *Illumination) Centre(i int) float64 { return math.Sqrt(il.Edges[i] * il.Edges[i+1]) }

// interp returns v interpolated at radius r between bin centres, linearly
// in ln r (and in ln v where both neighbours are positive), the end bins'
// values beyond the first and last centres; 0 outside the disk.
func (il *Illumination) interp(v []float64, r float64) float64 {
	if il == nil || !(r >= il.Inner && r <= il.Outer) || len(v) == 0 {
		return 0
	}
	n := len(v)
	lin, lout := math.Log(il.Inner), math.Log(il.Outer)
	x := (math.Log(r)-lin)/(lout-lin)*float64(n) - 0.5
	if x <= 0 {
		return v[0]
	}
	if x >= float64(n-1) {
		return v[n-1]
	}
	i := int(x)
	f := x - float64(i)
	a, b := v[i], v[i+1]
	if a > 0 && b > 0 {
		return math.Exp((1-f)*math.Log(a) + f*math.Log(b))
	}
	return (1-f)*a + f*b
}

// EmissionAt returns the emissivity ε(r) interpolated between bins.
func (il *Illumination) EmissionAt(r float64) float64 { return il.interp(il.Emission, r) }

// DelayAt returns the lamp-to-disk time at r, M: sqrt(r² + h²) plus the
// bins' t − sqrt(r² + h²) at their centres interpolated linearly in ln r
// (a bin no photon reached takes its neighbour's value); NaN outside the
// disk.
func (il *Illumination) DelayAt(r float64) float64 {
	if il == nil {
		return math.NaN()
	}
	n := len(il.Delay)
	if !(r >= il.Inner && r <= il.Outer) || n == 0 {
		return math.NaN()
	}
	res := func(i int) float64 { return il.Delay[i] - math.Hypot(il.Centre(i), il.Height) }
	straight := math.Hypot(r, il.Height)
	if n == 1 {
		return straight + res(0)
	}
	lin, lout := math.Log(il.Inner), math.Log(il.Outer)
	x := (math.Log(r)-lin)/(lout-lin)*float64(n) - 0.5
	x = math.Max(0, math.Min(float64(n-1), x))
	i := min(n-2, int(x))
	f := x - float64(i)
	a, b := res(i), res(i+1)
	switch {
	case math.IsNaN(a):
		return straight + b
	case math.IsNaN(b):
		return straight + a
	}
	return straight + (1-f)*a + f*b
}

// FlatPhotons returns the flat-space photon fraction per unit area of a
// disk lit by an isotropic point source at height h: h/(4π (r² + h²)^{3/2})
// (the inverse-square law times the cosine of incidence; common practice).
func FlatPhotons(h, r float64) float64 {
	d2 := r*r + h*h
	return h / (4 * math.Pi * d2 * math.Sqrt(d2))
}

// FlatDiskFraction returns the flat-space fraction of an isotropic point
// source's photons at height h that land on the annulus r0 ≤ r ≤ r1:
// (h/sqrt(r0² + h²) − h/sqrt(r1² + h²))/2, the integral of FlatPhotons
// over the annulus (common practice).
func FlatDiskFraction(h, r0, r1 float64) float64 {
	return (h/math.Hypot(r0, h) - h/math.Hypot(r1, h)) / 2
}

// resolveLamp validates emission.lamp_height and photon_index and traces
// the lamp over the disk (Illuminate) into r.Emissivity.
func (r *Resolved) resolveLamp() error {
	em := r.Emission
	if em.LampHeight == nil {
		return &FieldError{Key: "emission.lamp_height", Allowed: "needed with emissivity = lamp: the source's height on the spin axis, in M"}
	}
	h := *em.LampHeight
	if !(h >= r.Horizon+MinLampClearance && h <= MaxLampHeight) {
		return fieldErr("emission.lamp_height", h, "must be from %.6g M (%g M above the horizon) to %g M", r.Horizon+MinLampClearance, MinLampClearance, MaxLampHeight)
	}
	gamma := DefaultPhotonIndex
	if em.PhotonIndex != nil {
		gamma = *em.PhotonIndex
		if !(gamma >= MinPhotonIndex && gamma <= MaxPhotonIndex) {
			return fieldErr("emission.photon_index", gamma, "must be from %g to %g", MinPhotonIndex, MaxPhotonIndex)
		}
	}
	gas, err := NewGas(r.Hole.Spin)
	if err != nil {
		return fieldErr("black_hole.spin", r.Hole.Spin, "%v", err)
	}
	il, err := Illuminate(gas, h, gamma, r.Inner, r.Disk.OuterRadius)
	if err != nil {
		return fieldErr("emission.lamp_height", h, "%v", err)
	}
	r.Emissivity.Height, r.Emissivity.PhotonIndex, r.Emissivity.Illumination = h, gamma, il
	return nil
}
