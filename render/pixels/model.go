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
	// Polar is the polarisation emission model; Stokes: also record each
	// seen crossing's Stokes Q and U (Hit.Q, Hit.U), set by Render when
	// the frame keeps them (KeepStokes). PositionAngleDeg orients them on the
	// sky (IAU: from north through east).
	Polar            scene.PolarisationModel
	Stokes           bool
	PositionAngleDeg float64
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
		Timing: r.NeedsTiming(), Polar: r.Polar, PositionAngleDeg: r.Observer.PositionAngleDeg}, nil
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
	// Q and U are the Stokes parameters of the line intensity, IAU
	// convention (angle from north through east on the sky), in the
	// units of Line; NaN unless the model records them (Model.Stokes).
	// The linear polarisation is sqrt(Q² + U²) = fraction × Line.
	Q, U float64
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
	m.fill(alpha, beta, p, nil, s)
}

// ShadeTimed is Shade with each seen crossing's time delay and azimuth
// (Hit.T, Hit.Phi), from raytrace.TraceTimed.
func (m *Model) ShadeTimed(alpha, beta float64, tp *raytrace.TimedPath, s *Sample) {
	m.Obs.TraceTimed(alpha, beta, m.Orders, tp)
	m.fill(alpha, beta, &tp.Path, tp.Times, s)
}

// fill turns a traced path (and its times, if any) into the sample of
// the photon of (α, β).
func (m *Model) fill(alpha, beta float64, p *raytrace.Path, times []raytrace.Timing, s *Sample) {
	s.Fate = p.Fate
	s.First = -1
	hidden := false // an opaque disk's first landing is behind us
	nan := math.NaN()
	for n := 0; n < m.Orders; n++ {
		s.Hits[n] = Hit{R: nan, G: nan, T: nan, Phi: nan, Q: nan, U: nan}
	}
	for n, c := range p.Crossings {
		if c.R < m.Inner || c.R > m.Outer {
			continue // through the hole inside the inner edge, or past the outer edge
		}
		g, ok := m.Gas.Redshift(c.R, p.Lambda, p.Eta, c.Outbound)
		if !ok {
			continue
		}
		eps, epsE := m.Lines.AtBoth(c.R)
		limb := m.Limb.At(scene.EmissionCosine(g, c.R, p.Eta))
		q, u := nan, nan
		if m.Stokes || m.Polar.SinPower != 0 {
			var w float64
			w, q, u = m.polarised(alpha, beta, n, c, p)
			limb *= w
		}
		g3 := g * g * g
		line := g3 * eps * limb
		hit := Hit{R: c.R, G: g, Line: line, Bol: g3 * g * epsE * limb, T: nan, Phi: nan, Q: q * line, U: u * line}
		if hidden {
			hit.Behind = true
			s.Hits[n] = hit
			continue
		}
		hit.Seen = true
		if times != nil {
			hit.T, hit.Phi = times[n].Delay, times[n].DeltaPhi
		}
		s.Hits[n] = hit
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

// polarised returns, for crossing n of the photon of (α, β), the factor
// sin^p θ_B of the emitted intensity (1 when p = 0) and, with Stokes,
// q = Q/I and u = U/I of the light reaching the observer (NaN without):
// the emitted vector of the gas frame (scene.PolarisationModel.Emit)
// carried to the screen by the Walker–Penrose constant
// (raytrace.WalkerPenrose, ScreenPolarisation), its angle χ on the sky
// (scene.SkyAngle, IAU) giving q = f cos 2χ, u = f sin 2χ for the
// emitted fraction f. Light whose field lies along the ray is unpolarised
// (q = u = 0).
func (m *Model) polarised(alpha, beta float64, n int, c raytrace.Crossing, p *raytrace.Path) (w, q, u float64) {
	a := m.Obs.Spin()
	k := raytrace.EquatorialMomentum(a, p.Lambda, p.Eta, c.R, c.Outbound, m.Obs.Up(beta, n))
	em := m.Polar.Emit(m.Gas.Frame(c.R), a, c.R, k)
	w = 1.0
	if m.Polar.SinPower != 0 {
		w = math.Pow(em.SinB, m.Polar.SinPower)
	}
	q, u = math.NaN(), math.NaN()
	if !m.Stokes {
		return w, q, u
	}
	q, u = 0, 0
	if !em.OK {
		return w, q, u
	}
	ea, eb, ok := m.Obs.ScreenPolarisation(alpha, beta, raytrace.WalkerPenrose(a, c.R, math.Pi/2, k, em.F))
	if !ok {
		return w, q, u
	}
	s2, c2 := math.Sincos(2 * scene.SkyAngle(ea, eb, m.PositionAngleDeg))
	return w, m.Polar.Fraction * c2, m.Polar.Fraction * s2
}

// RedshiftAt returns g of the disk gas for a crossing, if it lands on the
// emitting disk (for probes).
func (m *Model) RedshiftAt(c raytrace.Crossing, lambda, eta float64) (float64, bool) {
	if c.R < m.Inner || c.R > m.Outer {
		return 0, false
	}
	return m.Gas.Redshift(c.R, lambda, eta, c.Outbound)
}

// PolarisationAt returns the emitted and observed polarisation angles, in
// radians in (−π/2, π/2], of crossing n of the photon of (α, β) with
// constants λ, η, if it lands on the emitting disk with polarised light:
// emitted in the gas frame (scene.Emitted.Angle), observed on the sky
// from north through east (scene.SkyAngle), carried by the
// Walker–Penrose constant (for probes).
func (m *Model) PolarisationAt(alpha, beta float64, n int, c raytrace.Crossing, lambda, eta float64) (emitted, observed float64, ok bool) {
	if _, ok := m.RedshiftAt(c, lambda, eta); !ok {
		return 0, 0, false
	}
	a := m.Obs.Spin()
	k := raytrace.EquatorialMomentum(a, lambda, eta, c.R, c.Outbound, m.Obs.Up(beta, n))
	em := m.Polar.Emit(m.Gas.Frame(c.R), a, c.R, k)
	if !em.OK {
		return 0, 0, false
	}
	ea, eb, ok := m.Obs.ScreenPolarisation(alpha, beta, raytrace.WalkerPenrose(a, c.R, math.Pi/2, k, em.F))
	if !ok {
		return 0, 0, false
	}
	return em.Angle, scene.SkyAngle(ea, eb, m.PositionAngleDeg), true
}
