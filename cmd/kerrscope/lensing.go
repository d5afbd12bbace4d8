package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"kerrscope/raytrace"
	"kerrscope/render"
)

func runLensing(args []string, stdout, stderr io.Writer) error {
	f := newFlags("lensing", stdout)
	var spin, inc float64
	f.float(&spin, "spin", 0, "black-hole spin a, signed, -1 < a < 1")
	f.float(&inc, "inclination", 60, "observer inclination from the spin axis, degrees, 0 to 180")
	dirs := f.fs.String("directions", "0,90,180,270", "comma-separated screen directions in degrees (0 = +α, 90 = +β) from the shadow's centre")
	orders := f.fs.Int("orders", 5, "highest band order to measure, 1 to 12")
	asJSON := f.fs.Bool("json", false, "print JSON instead of a table")
	if err := f.parse(args); err != nil {
		return err
	}
	if !(spin > -1 && spin < 1) {
		return usagef("--spin %g is outside the allowed range -1 < spin < 1", spin)
	}
	if !(inc >= 0 && inc <= 180) {
		return usagef("--inclination %g is outside the allowed range 0 to 180 degrees", inc)
	}
	if *orders < 1 || *orders > 12 {
		return usagef("--orders %d is outside the allowed range 1 to 12", *orders)
	}
	var angles []float64
	for _, s := range strings.Split(*dirs, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return usagef("--directions: %q is not a number of degrees", s)
		}
		angles = append(angles, v)
	}
	o, err := raytrace.NewObserver(spin, inc)
	if err != nil {
		return usagef("%w", err)
	}
	// Centre: the middle of the critical curve's bounding box, inside the shadow.
	amin, amax, bmin, bmax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, p := range o.CriticalCurve(400) {
		amin, amax = math.Min(amin, p.Alpha), math.Max(amax, p.Alpha)
		bmin, bmax = math.Min(bmin, p.Beta), math.Max(bmax, p.Beta)
	}
	ca, cb := (amin+amax)/2, (bmin+bmax)/2
	var all []render.LensingBand
	for _, d := range angles {
		all = append(all, render.LensingBands(o, ca, cb, d, *orders)...)
	}
	if *asJSON {
		b, err := json.Marshal(map[string]any{"spin": spin, "inclination_deg": inc, "center_alpha": ca, "center_beta": cb, "bands": all})
		if err != nil {
			return err
		}
		_, err = fmt.Fprintf(stdout, "%s\n", b)
		return err
	}
	fmt.Fprintf(stdout, "lensing bands (photons crossing the equatorial plane ≥ n+1 times), a = %g, i = %g°\n", spin, inc)
	fmt.Fprintf(stdout, "distances from the shadow centre (α, β) = (%.6g, %.6g) M; e^-π = %.6f for reference (a = 0)\n\n", ca, cb, math.Exp(-math.Pi))
	tw := tabwriter.NewWriter(stdout, 0, 0, 3, ' ', 0)
	fmt.Fprintln(tw, "  direction [°]\tn\tinner [M]\touter [M]\twidth [M]\twidth / previous")
	for _, b := range all {
		ratio := "—"
		if b.Demagnified > 0 {
			ratio = fmt.Sprintf("%.6f", b.Demagnified)
		}
		fmt.Fprintf(tw, "  %g\t%d\t%.10g\t%.10g\t%.6g\t%s\n", b.Direction, b.Order, b.Inner, b.Outer, b.Width, ratio)
	}
	return tw.Flush()
}
