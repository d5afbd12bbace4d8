package main

import (
	"context"
	"io"
	"slices"

	"kerrscope/raytrace"
	"kerrscope/raytrace/survey"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

func runProbe(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("probe", stdout)
	base := scene.Default()
	path, vals := sceneFlags(f, base, func(fl scene.Field) bool {
		return slices.Contains([]string{"spin", "inclination", "inner", "outer", "plunging"}, fl.Flag)
	})
	var alpha, beta float64
	f.float(&alpha, "alpha", 0, "screen coordinate α (right), in M (required)")
	f.float(&beta, "beta", 0, "screen coordinate β (up, along the projected spin axis), in M (required)")
	orders := f.fs.Int("orders", 3, "how many equatorial crossings to list, 1 to 64")
	asJSON := f.fs.Bool("json", false, "print one JSON object instead of a table")
	if err := f.parse(args); err != nil {
		return err
	}
	s, err := loadScene(*path, base, *vals)
	if err != nil {
		return err
	}
	if a := s.Hole.Spin; !(a > -1 && a < 1) {
		return usagef("--spin %g is outside the allowed range -1 < spin < 1", a)
	}
	if inc := s.Observer.InclinationDeg; !(inc >= 0 && inc <= 180) {
		return usagef("--inclination %g is outside the allowed range 0 to 180 degrees", inc)
	}
	for _, name := range []string{"alpha", "beta"} {
		if !f.given(name) {
			return usagef("--%s is required (screen coordinate in M, any finite number)", name)
		}
	}
	if *orders < 1 || *orders > 64 {
		return usagef("--orders %d is outside the allowed range 1 to 64", *orders)
	}
	s.Disk.Orders = min(*orders, scene.MaxOrders)
	r, err := s.Resolve()
	if err != nil {
		return usagef("%w", err)
	}
	m, err := pixels.NewModel(r)
	if err != nil {
		return usagef("%w", err)
	}
	polar := func(b float64, n int, c raytrace.Crossing, lambda, eta float64) (float64, float64, bool) {
		return m.PolarisationAt(alpha, b, n, c, lambda, eta)
	}
	rep := survey.ProbePolarised(m.Obs, alpha, beta, *orders, m.RedshiftAt, polar)
	if *asJSON {
		return rep.WriteJSON(stdout)
	}
	return rep.WriteText(stdout)
}
