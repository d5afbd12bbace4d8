package maps

import (
	"math"

	"kerrscope/render/internal/figure"
	"kerrscope/render/pixels"
)

// OrientationMarks returns the marks that show how the hole and its disk
// are turned on the screen, centred on the hole (α = β = 0) when it is in
// the window, else on the window's centre:
//
//   - a straight arrow along +β, where the disk's angular momentum +z
//     projects for every inclination 0 < θo < 180° (β is the projected
//     spin axis); labelled "spin axis" for a > 0, and for a ≤ 0 "disk
//     axis +z" (for a < 0 with the note that the hole counter-rotates);
//
//   - a curved arrow along the projected circle of an orbit (semi-axes R
//     and R|cos θo|, flattened no further than 0.2 R) in the gas's
//     direction of motion, +φ: counter-clockwise on the screen for
//     θo ≤ 90° (seen from above the disk's plane), clockwise for
//     θo > 90°. Either way it moves towards the observer at α < 0, the
//     approaching side, where it runs towards the near side of the disk
//     (β < 0 for θo < 90°, β > 0 for θo > 90°).
//
//   - a sky compass in the lower right corner: north and east on the
//     screen for the scene's position angle PA of the projected spin axis
//     (observer.position_angle_deg, north through east). The screen is
//     not mirrored, so north is (sin PA, cos PA) and east (−cos PA,
//     sin PA) in (α, β) — the inverse of scene.SkyOffset.
//
// The arrows follow from the screen convention of raytrace.Observer
// (β along the projected +z, α to the observer's right); Cunningham &
// Bardeen (1973, ApJ 183, 237) use the same screen.
func OrientationMarks(f *pixels.Frame) []figure.Arrow {
	a0, a1, b0, b1 := f.Window()
	ca, cb := 0.0, 0.0
	if !(a0 < 0 && a1 > 0 && b0 < 0 && b1 > 0) {
		ca, cb = (a0+a1)/2, (b0+b1)/2
	}
	s := math.Min(a1-a0, b1-b0) / 2
	r := 0.8 * s
	cos := math.Cos(f.Res.Observer.InclinationDeg * math.Pi / 180)
	k := math.Max(math.Abs(cos), 0.2)

	length := 0.5 * s
	axis := figure.Arrow{Points: [][2]float64{{ca, cb}, {ca, cb + length}}, LabelAt: [2]float64{ca, cb + length + 0.1*s}}
	switch a := f.Res.Hole.Spin; {
	case a > 0:
		axis.Label = "spin axis"
	case a < 0:
		axis.Label, axis.Note = "disk axis +z", "hole counter-rotating"
	default:
		axis.Label = "disk axis +z"
	}

	// The orbit's projected ellipse, with a gap at the top for the axis
	// arrow: t runs over [130°, 410°] counter-clockwise, or back over
	// the same arc clockwise.
	const n = 120
	t0, t1 := 130.0, 410.0
	if f.Res.Observer.InclinationDeg > 90 {
		t0, t1 = t1, t0
	}
	pts := make([][2]float64, n+1)
	for i := range pts {
		t := (t0 + (t1-t0)*float64(i)/n) * math.Pi / 180
		pts[i] = [2]float64{ca + r*math.Cos(t), cb + r*k*math.Sin(t)}
	}
	orbit := figure.Arrow{Points: pts, Label: "orbital motion", LabelAt: [2]float64{ca, cb - r*k - 0.1*s}}
	return append([]figure.Arrow{axis, orbit}, skyCompass(f.Res.Observer.PositionAngleDeg, a0, a1, b0, b1)...)
}

// skyCompass returns a north and an east arrow from a point near the
// lower right corner of the window [a0, a1] × [b0, b1] (α, β in M), for
// the position angle pa (degrees) of the projected spin axis (+β).
func skyCompass(pa, a0, a1, b0, b1 float64) []figure.Arrow {
	s := math.Min(a1-a0, b1-b0)
	l := 0.09 * s
	ox, oy := a1-0.14*s, b0+0.14*s
	sp, cp := math.Sincos(pa * math.Pi / 180)
	arrow := func(label string, dx, dy float64) figure.Arrow {
		return figure.Arrow{Points: [][2]float64{{ox, oy}, {ox + l*dx, oy + l*dy}}, Label: label,
			LabelAt: [2]float64{ox + 1.45*l*dx, oy + 1.45*l*dy}}
	}
	return []figure.Arrow{arrow("N", sp, cp), arrow("E", -cp, sp)}
}
