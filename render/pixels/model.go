// Package pixels is the compute stage of the renderer: it turns a resolved
// scene into per-pixel records (fate, source radius, redshift factor and
// intensity of each image order), with one photon per pixel centre or
// adaptive refinement, collapses them into a line spectrum, and locates
// bands of source radii on the screen. It uses raytrace for the photons and
// scene for the disk's gas and emission; it knows nothing of files,
// colours, figures or the terminal (those are render/maps and
// render/outputs).
package pixels

import (
	"math"

	"kerrscope/raytrace"
	"kerrscope/scene"
)

// Model is what one photon sees: the observer, the disk edges and the
// disk's gas and emission. It is a plain value, safe for concurrent use.
type Model struct {
	Obs        raytrace.Observer
	Gas        scene.Gas
	Emissivity scene.Emissivity
	// Lines are the rest lines; a crossing's line intensity is
	// g³ Lines.At(r) f (Lines.At is Emissivity.At unless a line of a
	// list has its own law).
	Lines        scene.RestLines
	Limb         scene.Limb
	Inner, Outer float64 // emitting disk edges in M
	Opaque       bool
	Orders       int
	// Behind: on an opaque disk, also shade the crossings that an
	// earlier landing hides (Hit.Behind), for maps that show every
	// image order on its own; they add no light to the image.
	Behind bool
	// Timing: also record each crossing's time delay and azimuth
	// (raytrace.TraceTimed, about twice the cost of a plain trace); set
	// when the scene asks for a map that needs them.
	Timing bool
}

// NewModel builds the model of a resolved scene.
func NewModel(r scene.Resolved) (Model, error) {
	o, err := raytrace.NewObserver(r.Hole.Spin, r.Observer.InclinationDeg)
	if err != nil {
		return Model{}, err
	}
	lines := r.RestLines
	lines.Main = r.Emissivity
	return Model{Obs: o, Gas: r.Gas, Emissivity: r.Emissivity, Lines: lines, Limb: r.Limb,
		Inner: r.Inner, Outer: r.Disk.OuterRadius, Opaque: r.Disk.Opaque, Orders: r.Disk.Orders,
		Timing: r.NeedsTiming()}, nil
}

// Hit is the light a photon picks up at one crossing of the disk.
type Hit struct {
	R    float64 // source radius, M
	G    float64 // redshift factor E_obs/E_emit
	Line float64 // observed line intensity g³ ε(r) L(cos δ) (Liouville: I_ν/ν³ conserved)
	Bol  float64 // bolometric intensity g⁴ ε(r) L(cos δ)
	Seen bool    // the crossing lands on the disk and its light reaches the observer
	// Behind: the crossing lands on the emitting disk but an earlier
	// landing of an opaque disk hides it (only with Model.Behind); R, G,
	// Line and Bol are its light as a transparent disk would show it.
	Behind bool
	// T and Phi are the crossing's time delay t_o − t (regularised, M) and
	// azimuth φ − φ_o (radians) of raytrace.Timing; NaN unless the model
	// records timing.
	T, Phi float64
}

// Sample is one photon's record: its fate, the first order that landed on
// the disk (-1: none) and the light of each order.
type Sample struct {
	Fate  raytrace.Fate
	First int
	Hits  [scene.MaxOrders]Hit
}

// Shade traces the photon of (α, β) and fills s. p is scratch space
// (reuse one per goroutine).
func (m *Model) Shade(alpha, beta float64, p *raytrace.Path, s *Sample) {
	m.Obs.Trace(alpha, beta, m.Orders, p)
	m.fill(p, nil, s)
}

// ShadeTimed is Shade with each seen crossing's time delay and azimuth
// (Hit.T, Hit.Phi), from raytrace.TraceTimed.
func (m *Model) ShadeTimed(alpha, beta float64, tp *raytrace.TimedPath, s *Sample) {
	m.Obs.TraceTimed(alpha, beta, m.Orders, tp)
	m.fill(&tp.Path, tp.Times, s)
}

// fill turns a traced path (and its times, if any) into the sample.
func (m *Model) fill(p *raytrace.Path, times []raytrace.Timing, s *Sample) {
	s.Fate = p.Fate
	s.First = -1
	hidden := false // an opaque disk's first landing is behind us
	for n := 0; n < m.Orders; n++ {
		s.Hits[n] = Hit{R: math.NaN(), G: math.NaN(), T: math.NaN(), Phi: math.NaN()}
	}
	for n, c := range p.Crossings {
		if c.R < m.Inner || c.R > m.Outer {
			continue // through the hole inside the inner edge, or past the outer edge
		}
		g, ok := m.Gas.Redshift(c.R, p.Lambda, p.Eta, c.Outbound)
		if !ok {
			continue
		}
		eps, epsE := m.Lines.At(c.R), m.Lines.EnergyAt(c.R)
		limb := m.Limb.At(scene.EmissionCosine(g, c.R, p.Eta))
		g3 := g * g * g
		if hidden {
			s.Hits[n] = Hit{R: c.R, G: g, Line: g3 * eps * limb, Bol: g3 * g * epsE * limb, Behind: true, T: math.NaN(), Phi: math.NaN()}
			continue
		}
		s.Hits[n] = Hit{R: c.R, G: g, Line: g3 * eps * limb, Bol: g3 * g * epsE * limb, Seen: true, T: math.NaN(), Phi: math.NaN()}
		if times != nil {
			s.Hits[n].T, s.Hits[n].Phi = times[n].Delay, times[n].DeltaPhi
		}
		if s.First < 0 {
			s.First = n
		}
		if m.Opaque {
			if !m.Behind {
				break
			}
			hidden = true
		}
	}
}

// RedshiftAt returns g of the disk gas for a crossing, if it lands on the
// emitting disk (for probes).
func (m *Model) RedshiftAt(c raytrace.Crossing, lambda, eta float64) (float64, bool) {
	if c.R < m.Inner || c.R > m.Outer {
		return 0, false
	}
	return m.Gas.Redshift(c.R, lambda, eta, c.Outbound)
}
