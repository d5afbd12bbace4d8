package survey

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"kerrscope/raytrace"
)

// ProbeCrossing is one equatorial crossing in a probe report.
type ProbeCrossing struct {
	Order    int      `json:"order"`
	R        float64  `json:"r"`
	MinoTime float64  `json:"mino_time"`
	Outbound bool     `json:"outbound"`
	G        *float64 `json:"g"` // redshift factor of the disk gas there; nil off the disk
	// TimeDelay is t_o − t from the crossing to the observer, in M,
	// regularised for an observer at infinity (raytrace.Timing): only
	// differences between crossings and between photons are physical.
	TimeDelay float64 `json:"time_delay"`
	// DeltaPhi is the crossing's azimuth minus the observer's, in
	// radians, not reduced modulo 2π.
	DeltaPhi float64 `json:"delta_phi"`
	// EVPAEmitted and EVPAObserved are the electric-vector angles of the
	// light of a crossing on the disk, in degrees in (−90, 90]: emitted,
	// in the gas frame from the disk normal projected across the ray;
	// observed, on the sky from north through east (IAU). Absent off the
	// disk or where the light is unpolarised.
	EVPAEmitted  *float64 `json:"evpa_emitted_deg,omitempty"`
	EVPAObserved *float64 `json:"evpa_observed_deg,omitempty"`
}

// PolarisationAt gives the emitted and observed polarisation angles, in
// radians, of crossing n of the photon of screen point β (see
// ProbeCrossing); ok = false off the disk or for unpolarised light.
type PolarisationAt func(beta float64, n int, c raytrace.Crossing, lambda, eta float64) (emitted, observed float64, ok bool)

// ProbeReport is what happens to the photon of one screen point. Its JSON
// keys are fixed so that scripts can rely on them.
type ProbeReport struct {
	Spin           float64         `json:"spin"`
	InclinationDeg float64         `json:"inclination_deg"`
	Alpha          float64         `json:"alpha"`
	Beta           float64         `json:"beta"`
	Lambda         float64         `json:"lambda"`
	Eta            float64         `json:"eta"`
	Fate           string          `json:"fate"`
	RootCase       string          `json:"root_case"`
	TotalMino      float64         `json:"total_mino_time"`
	Crossings      []ProbeCrossing `json:"crossings"`
}

// Probe traces the photon arriving at (α, β) and reports up to orders
// crossings. redshift, if not nil, gives g of the disk gas at a crossing
// (ok = false where the crossing misses the disk).
func Probe(o raytrace.Observer, alpha, beta float64, orders int, redshift func(c raytrace.Crossing, lambda, eta float64) (float64, bool)) ProbeReport {
	return ProbePolarised(o, alpha, beta, orders, redshift, nil)
}

// ProbePolarised is Probe that also reports each crossing's polarisation
// angles from polar (if not nil).
func ProbePolarised(o raytrace.Observer, alpha, beta float64, orders int, redshift func(c raytrace.Crossing, lambda, eta float64) (float64, bool), polar PolarisationAt) ProbeReport {
	var p raytrace.TimedPath
	o.TraceTimed(alpha, beta, orders, &p)
	rep := ProbeReport{
		Spin: o.Spin(), InclinationDeg: o.InclinationDeg(), Alpha: alpha, Beta: beta,
		Lambda: p.Lambda, Eta: p.Eta, Fate: p.Fate.String(), RootCase: p.Roots.String(),
		TotalMino: p.Mino, Crossings: []ProbeCrossing{},
	}
	for i, c := range p.Crossings {
		pc := ProbeCrossing{Order: i, R: c.R, MinoTime: c.Mino, Outbound: c.Outbound,
			TimeDelay: p.Times[i].Delay, DeltaPhi: p.Times[i].DeltaPhi}
		if redshift != nil {
			if g, ok := redshift(c, p.Lambda, p.Eta); ok {
				pc.G = &g
			}
		}
		if polar != nil && pc.G != nil {
			if em, ob, ok := polar(beta, i, c, p.Lambda, p.Eta); ok {
				em, ob = em*180/math.Pi, ob*180/math.Pi
				pc.EVPAEmitted, pc.EVPAObserved = &em, &ob
			}
		}
		rep.Crossings = append(rep.Crossings, pc)
	}
	return rep
}

// WriteJSON writes the report as one JSON object and a newline.
func (r ProbeReport) WriteJSON(w io.Writer) error {
	b, err := json.Marshal(r)
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// WriteText writes the report as a short table for people. It stops at
// the first failed write and returns its error.
func (r ProbeReport) WriteText(w io.Writer) error {
	p := &printer{w: w}
	p.printf("photon at α = %g M, β = %g M   (spin a = %g, inclination %g°)\n", r.Alpha, r.Beta, r.Spin, r.InclinationDeg)
	p.printf("  λ = %.10g M   η = %.10g M²   radial roots: case %s\n", r.Lambda, r.Eta, r.RootCase)
	if c, ok := r.firstOnDisk(); ok {
		p.printf("  traced back, its light comes from the disk at crossing %d (r = %.6g M); the path beyond ends at: %s   (total Mino time %.10g /M)\n", c.Order, c.R, r.Fate, r.TotalMino)
	} else {
		p.printf("  traced back, it comes from: %s   (total Mino time %.10g /M)\n", r.Fate, r.TotalMino)
	}
	if len(r.Crossings) == 0 {
		p.println("  it never crosses the equatorial plane")
		return p.err
	}
	p.println("  delay: t at the observer minus t at the crossing, less r_o + 2 ln r_o (observer at r_o → ∞);")
	p.println("  Δφ: azimuth of the crossing minus the observer's")
	p.println()
	if p.err != nil {
		return p.err
	}
	tw := tabwriter.NewWriter(w, 0, 0, 3, ' ', 0)
	t := &printer{w: tw}
	polar := false
	for _, c := range r.Crossings {
		polar = polar || c.EVPAObserved != nil
	}
	head := "  order\tr [M]\tMino time [1/M]\tmoving\tg (disk)\tdelay [M]\tΔφ [rad]"
	if polar {
		head += "\tEVPA emitted [°]\tEVPA on sky [°]"
	}
	t.println(head)
	for _, c := range r.Crossings {
		dir := "toward the hole"
		if c.Outbound {
			dir = "away from the hole"
		}
		g := "off disk"
		if c.G != nil {
			g = fmt.Sprintf("%.8f", *c.G)
		}
		t.printf("  %d\t%.10g\t%.10g\t%s\t%s\t%.10g\t%.10g", c.Order, c.R, c.MinoTime, dir, g, c.TimeDelay, c.DeltaPhi)
		if polar {
			if c.EVPAObserved != nil {
				t.printf("\t%.6f\t%.6f", *c.EVPAEmitted, *c.EVPAObserved)
			} else {
				t.printf("\t–\t–")
			}
		}
		t.println()
	}
	if t.err != nil {
		return t.err
	}
	return tw.Flush()
}

// firstOnDisk returns the lowest-order crossing that lands on the disk
// (one with a redshift): where an opaque disk's light for this photon is
// emitted.
func (r ProbeReport) firstOnDisk() (ProbeCrossing, bool) {
	for _, c := range r.Crossings {
		if c.G != nil {
			return c, true
		}
	}
	return ProbeCrossing{}, false
}

// printer writes formatted text until the first error, which it keeps.
type printer struct {
	w   io.Writer
	err error
}

func (p *printer) printf(format string, args ...any) {
	if p.err == nil {
		_, p.err = fmt.Fprintf(p.w, format, args...)
	}
}

func (p *printer) println(args ...any) {
	if p.err == nil {
		_, p.err = fmt.Fprintln(p.w, args...)
	}
}
