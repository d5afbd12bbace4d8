package main

import (
	"context"
	"io"
	"math"
	"strconv"
	"strings"

	"kerrscope/raytrace"
	"kerrscope/raytrace/survey"
	"kerrscope/scene"
)

func runLensing(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	f := newFlags("lensing", stdout)
	base := scene.Default()
	path, vals := sceneFlags(f, base, func(fl scene.Field) bool { return fl.Flag == "spin" || fl.Flag == "inclination" })
	dirs := f.fs.String("directions", "0,90,180,270", "comma-separated screen directions in degrees (0 = +α, 90 = +β) from the shadow's centre")
	orders := f.fs.Int("orders", 5, "highest band order to measure, 1 to 12")
	asJSON := f.fs.Bool("json", false, "print JSON instead of a table")
	if err := f.parse(args); err != nil {
		return err
	}
	s, err := loadScene(*path, base, *vals)
	if err != nil {
		return err
	}
	spin, inc := s.Hole.Spin, s.Observer.InclinationDeg
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
	rep, err := survey.Lensing(ctx, o, angles, *orders)
	if err != nil {
		return err
	}
	if *asJSON {
		return rep.WriteJSON(stdout)
	}
	return rep.WriteText(stdout)
}
