package scene

import "math"

// Bounds of the sky orientation: a position angle within ±MaxPositionAngle
// degrees (one turn either way), right ascension in [0, 360) and
// declination in [−90, 90] degrees.
const MaxPositionAngle = 360

// checkSky validates observer.position_angle_deg and the optional
// black_hole.ra_deg, black_hole.dec_deg (both or neither).
func (s Scene) checkSky() error {
	if pa := s.Observer.PositionAngleDeg; !(math.Abs(pa) <= MaxPositionAngle) {
		return fieldErr("observer.position_angle_deg", pa, "must be a finite angle from %d to %d degrees (north through east)", -MaxPositionAngle, MaxPositionAngle)
	}
	h := s.Hole
	switch {
	case h.RADeg != nil && h.DecDeg == nil:
		return &FieldError{Key: "black_hole.dec_deg", Allowed: "needed with black_hole.ra_deg (give both or neither)"}
	case h.RADeg == nil && h.DecDeg != nil:
		return &FieldError{Key: "black_hole.ra_deg", Allowed: "needed with black_hole.dec_deg (give both or neither)"}
	case h.RADeg == nil:
		return nil
	}
	if ra := *h.RADeg; !(ra >= 0 && ra < 360) {
		return fieldErr("black_hole.ra_deg", ra, "must be a right ascension from 0 to below 360 degrees")
	}
	if dec := *h.DecDeg; !(dec >= -90 && dec <= 90) {
		return fieldErr("black_hole.dec_deg", dec, "must be a declination from -90 to 90 degrees")
	}
	return nil
}

// SkyOffset returns the offsets east and north on the sky (in the unit of
// alpha and beta) of the screen point (alpha, beta) from the hole, for the
// projected spin axis +β at position angle paDeg (degrees from north
// through east).
//
// Derivation (position angles as defined by the IAU, north through east;
// common practice): the observer's screen is not mirrored — α grows to the
// observer's right, β up — and on the sky seen with north up, east is to
// the left. With β̂ at position angle PA, β̂ = cos PA N̂ + sin PA Ê, and α̂ is
// β̂ turned 90° clockwise as seen: at PA = 0, α̂ points right, i.e. west,
// −Ê; in general α̂ = −cos PA Ê + sin PA N̂. Hence
//
//	E = −α cos PA + β sin PA,  N = α sin PA + β cos PA.
//
// The map is a rotation (det = +1 in the (−E, N) frame seen by the
// observer): it keeps the sky's handedness. Domain: any finite input.
func SkyOffset(alpha, beta, paDeg float64) (east, north float64) {
	s, c := math.Sincos(paDeg * math.Pi / 180)
	return -alpha*c + beta*s, alpha*s + beta*c
}
