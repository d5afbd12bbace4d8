package render

import (
	"encoding/json"
	"fmt"
	"io"
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
}

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
	var p raytrace.Path
	o.Trace(alpha, beta, orders, &p)
	rep := ProbeReport{
		Spin: o.Spin(), InclinationDeg: o.InclinationDeg(), Alpha: alpha, Beta: beta,
		Lambda: p.Lambda, Eta: p.Eta, Fate: p.Fate.String(), RootCase: p.Roots.String(),
		TotalMino: p.Mino, Crossings: []ProbeCrossing{},
	}
	for i, c := range p.Crossings {
		pc := ProbeCrossing{Order: i, R: c.R, MinoTime: c.Mino, Outbound: c.Outbound}
		if redshift != nil {
			if g, ok := redshift(c, p.Lambda, p.Eta); ok {
				pc.G = &g
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

// WriteText writes the report as a short table for people.
func (r ProbeReport) WriteText(w io.Writer) error {
	fmt.Fprintf(w, "photon at α = %g M, β = %g M   (spin a = %g, inclination %g°)\n", r.Alpha, r.Beta, r.Spin, r.InclinationDeg)
	fmt.Fprintf(w, "  λ = %.10g M   η = %.10g M²   radial roots: case %s\n", r.Lambda, r.Eta, r.RootCase)
	fmt.Fprintf(w, "  traced back, it comes from: %s   (total Mino time %.10g /M)\n", r.Fate, r.TotalMino)
	if len(r.Crossings) == 0 {
		_, err := fmt.Fprintln(w, "  it never crosses the equatorial plane")
		return err
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 3, ' ', 0)
	fmt.Fprintln(tw, "  order\tr [M]\tMino time [1/M]\tleft the plane\tg (disk)")
	for _, c := range r.Crossings {
		dir := "inward"
		if c.Outbound {
			dir = "outward"
		}
		g := "off disk"
		if c.G != nil {
			g = fmt.Sprintf("%.8f", *c.G)
		}
		fmt.Fprintf(tw, "  %d\t%.10g\t%.10g\t%s\t%s\n", c.Order, c.R, c.MinoTime, dir, g)
	}
	return tw.Flush()
}
