package pixels

import (
	"math"

	"kerrscope/raytrace"
)

// BandReport says where emission from source radii [RMin, RMax] lands on
// the screen. Fractions are of the line flux of the whole rendered window.
type BandReport struct {
	Spin            float64   `json:"spin"`
	InclinationDeg  float64   `json:"inclination_deg"`
	RMin            float64   `json:"r_min"`
	RMax            float64   `json:"r_max"`
	Pixels          []int     `json:"pixels_per_order"`
	FluxFraction    []float64 `json:"flux_fraction_per_order"`
	FluxFractionAll float64   `json:"flux_fraction"`
	// Bounding box of the located pixel centres (null when none).
	AlphaMin *float64 `json:"alpha_min"`
	AlphaMax *float64 `json:"alpha_max"`
	BetaMin  *float64 `json:"beta_min"`
	BetaMax  *float64 `json:"beta_max"`
	GMin     *float64 `json:"g_min"`
	GMax     *float64 `json:"g_max"`
	// For spin > 0.99: distance of the located pixels from the critical
	// curve at this spin (near its vertical piece), and the α of that piece
	// in the a → 1 limit, -2/sin θo (Bardeen 1973).
	CriticalDistanceMax  *float64 `json:"critical_distance_max"`
	CriticalDistanceMean *float64 `json:"critical_distance_mean"`
	ExtremalAlpha        *float64 `json:"extremal_alpha"`
	Photons              int64    `json:"photons"`
}

// LocateBand marks, per image order, the pixels whose seen crossing comes
// from r in [rmin, rmax] and summarises them. mask[o][k] is true for pixel
// k of order o. The frame must hold R, G and Line (KeepR, KeepG,
// KeepLine).
func (f *Frame) LocateBand(rmin, rmax float64) (BandReport, [][]bool) {
	r := f.Res
	rep := BandReport{Spin: r.Hole.Spin, InclinationDeg: r.Observer.InclinationDeg, RMin: rmin, RMax: rmax,
		Pixels: make([]int, f.Orders), FluxFraction: make([]float64, f.Orders), Photons: f.Photons}
	mask := make([][]bool, f.Orders)
	total := 0.0
	amin, amax, bmin, bmax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	gmin, gmax := math.Inf(1), math.Inf(-1)
	var loc raytrace.CriticalLocator
	near := r.Hole.Spin > 0.99
	if near {
		loc = f.Model.Obs.NewCriticalLocator()
	}
	dsum, dmax, dn := 0.0, 0.0, 0
	for o := 0; o < f.Orders; o++ {
		mask[o] = make([]bool, f.W*f.H)
		for k, l := range f.Line[o] {
			if math.IsNaN(float64(l)) {
				continue
			}
			total += float64(l)
			rr := float64(f.R[o][k])
			if rr < rmin || rr > rmax {
				continue
			}
			mask[o][k] = true
			rep.Pixels[o]++
			rep.FluxFraction[o] += float64(l)
			al, be := PixelAlpha(r, k%f.W), PixelBeta(r, k/f.W)
			amin, amax = math.Min(amin, al), math.Max(amax, al)
			bmin, bmax = math.Min(bmin, be), math.Max(bmax, be)
			g := float64(f.G[o][k])
			gmin, gmax = math.Min(gmin, g), math.Max(gmax, g)
			if near {
				d, _ := loc.Distance(al, be)
				dsum += d
				dmax = math.Max(dmax, d)
				dn++
			}
		}
	}
	if total > 0 {
		for o := range rep.FluxFraction {
			rep.FluxFraction[o] /= total
			rep.FluxFractionAll += rep.FluxFraction[o]
		}
	}
	ptr := func(v float64) *float64 { return &v }
	if !math.IsInf(amin, 1) {
		rep.AlphaMin, rep.AlphaMax, rep.BetaMin, rep.BetaMax = ptr(amin), ptr(amax), ptr(bmin), ptr(bmax)
		rep.GMin, rep.GMax = ptr(gmin), ptr(gmax)
	}
	if near {
		rep.ExtremalAlpha = ptr(-2 / f.Model.Obs.SinInclination())
		if dn > 0 {
			rep.CriticalDistanceMax, rep.CriticalDistanceMean = ptr(dmax), ptr(dsum/float64(dn))
		}
	}
	return rep, mask
}
