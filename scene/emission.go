package scene

import (
	"fmt"
	"math"
	"strings"

	"kerrscope/raytrace"
)

// EmissivityKind names a radial emissivity law. The zero value is no law
// and fails validation.
type EmissivityKind int

// The emissivity laws, with the names ParseEmissivityKind accepts.
const (
	PowerLaw       EmissivityKind = iota + 1 // "powerlaw": ε = r^{-q}
	BrokenPowerLaw                           // "broken": r^{-q_in} inside r_break, ∝ r^{-q_out} outside
	NovikovThorne                            // "novikov-thorne": Page & Thorne (1974) flux
	Lamp                                     // "lamp": lit by a point source on the spin axis (Illuminate)
)

var emissivityNames = [...]string{
	PowerLaw:       "powerlaw",
	BrokenPowerLaw: "broken",
	NovikovThorne:  "novikov-thorne",
	Lamp:           "lamp",
}

// String returns the law's name as ParseEmissivityKind accepts it.
func (k EmissivityKind) String() string {
	if k > 0 && int(k) < len(emissivityNames) {
		return emissivityNames[k]
	}
	return fmt.Sprintf("EmissivityKind(%d)", int(k))
}

// ParseEmissivityKind returns the emissivity law called name: "powerlaw",
// "broken", "novikov-thorne" or "lamp". Any other name is an error that lists the
// valid ones.
func ParseEmissivityKind(name string) (EmissivityKind, error) {
	for k := PowerLaw; int(k) < len(emissivityNames); k++ {
		if name == emissivityNames[k] {
			return k, nil
		}
	}
	return 0, fmt.Errorf("unknown emissivity law %q (valid: %s)", name,
		strings.Join(emissivityNames[PowerLaw:], ", "))
}

// MarshalText encodes the kind as its name.
func (k EmissivityKind) MarshalText() ([]byte, error) {
	if !(k > 0 && int(k) < len(emissivityNames)) {
		return nil, fmt.Errorf("invalid emissivity law %d", int(k))
	}
	return []byte(emissivityNames[k]), nil
}

// UnmarshalText decodes a name accepted by ParseEmissivityKind.
func (k *EmissivityKind) UnmarshalText(b []byte) error {
	v, err := ParseEmissivityKind(string(b))
	if err != nil {
		return err
	}
	*k = v
	return nil
}

// DefaultPowerLawIndex is the conventional index q = 3 of the power-law
// emissivity r^{-q}, the large-radius fall-off of a thin disk's flux
// (common practice; Page & Thorne 1974).
const DefaultPowerLawIndex = 3.0

// EmissivityDecades bounds the dynamic range of the power laws on a disk:
// every index is limited (see IndexLimits) so that ε lies within
// 10^±EmissivityDecades for 1 M < r ≤ r_out (every radius outside a
// horizon exceeds 1 M). The renderer keeps g³ε × limb and g⁴ε × limb in
// float32 (largest 3.4e38), summed over up to MaxOrders orders; with the
// limb factor at most 3.06 and g of disk gas a few at most, 10^30 leaves a
// margin of about 10^6.
const EmissivityDecades = 30

// MaxAbsIndex bounds every power-law index whatever the disk: steeper
// than r^{±100} is no emissivity profile at all.
const MaxAbsIndex = 100

// IndexLimits returns the largest allowed |index| of e's power laws on a
// disk with outer edge rOut > 1 M, so that ε stays within
// 10^±EmissivityDecades there. For PowerLaw both results bound Q:
// EmissivityDecades / log10(rOut). For BrokenPowerLaw (RBreak ≥ 1 M)
// inner bounds QIn, EmissivityDecades / log10(min(RBreak, rOut)), and
// outer bounds QOut given QIn: (EmissivityDecades − |QIn| log10 RBreak) /
// log10(rOut/RBreak), since log10 ε at rOut is −QIn log10 RBreak − QOut
// log10(rOut/RBreak); QOut is unused, and not limited, when RBreak ≥
// rOut. Both are at most MaxAbsIndex. Other laws have no index: both are
// MaxAbsIndex.
func (e Emissivity) IndexLimits(rOut float64) (inner, outer float64) {
	lim := func(decades, logr float64) float64 {
		if !(logr > 0) {
			return MaxAbsIndex
		}
		return math.Max(0, math.Min(MaxAbsIndex, decades/logr))
	}
	switch e.Kind {
	case PowerLaw:
		q := lim(EmissivityDecades, math.Log10(rOut))
		return q, q
	case BrokenPowerLaw:
		if !(e.RBreak < rOut) {
			return lim(EmissivityDecades, math.Log10(rOut)), MaxAbsIndex
		}
		lb := math.Log10(e.RBreak)
		return lim(EmissivityDecades, lb), lim(EmissivityDecades-math.Abs(e.QIn)*lb, math.Log10(rOut/e.RBreak))
	}
	return MaxAbsIndex, MaxAbsIndex
}

// Emissivity is a radial law ε(r) for the line emissivity per unit disk
// area in the rest frame of the gas, up to an overall constant. Only the
// fields of the chosen Kind are used.
type Emissivity struct {
	Kind EmissivityKind

	// Q is the index of PowerLaw: ε = r^{-Q}.
	Q float64

	// QIn, QOut and RBreak define BrokenPowerLaw: ε = r^{-QIn} for
	// r < RBreak and RBreak^{QOut-QIn} r^{-QOut} for r ≥ RBreak, which is
	// continuous at RBreak and equals PowerLaw when QIn = QOut.
	QIn, QOut, RBreak float64

	// Spin is the signed black-hole spin a of NovikovThorne.
	Spin float64

	// Height (M) and PhotonIndex Γ define Lamp; Illumination is its
	// profile over the disk, from Illuminate (shared, read only).
	Height, PhotonIndex float64
	Illumination        *Illumination
}

// DefaultEmissivity returns the power law r^{-3} (common practice).
func DefaultEmissivity() Emissivity {
	return Emissivity{Kind: PowerLaw, Q: DefaultPowerLawIndex}
}

// Validate reports whether the parameters of e's law are usable: finite
// indices, a finite positive break radius, a spin in (-1, 1).
func (e Emissivity) Validate() error {
	finite := func(name string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%s emissivity: %s = %v is not finite", e.Kind, name, v)
		}
		return nil
	}
	switch e.Kind {
	case PowerLaw:
		return finite("q", e.Q)
	case BrokenPowerLaw:
		if err := finite("q_in", e.QIn); err != nil {
			return err
		}
		if err := finite("q_out", e.QOut); err != nil {
			return err
		}
		if !(e.RBreak > 0) || math.IsInf(e.RBreak, 0) {
			return fmt.Errorf("%s emissivity: r_break = %v must be finite and > 0", e.Kind, e.RBreak)
		}
		return nil
	case NovikovThorne:
		if err := raytrace.ValidSpin(e.Spin); err != nil {
			return fmt.Errorf("%s emissivity: %w", e.Kind, err)
		}
		return nil
	case Lamp:
		if err := finite("photon_index", e.PhotonIndex); err != nil {
			return err
		}
		if err := finite("lamp_height", e.Height); err != nil {
			return err
		}
		if e.Illumination == nil {
			return fmt.Errorf("%s emissivity: no illumination profile (see Illuminate)", e.Kind)
		}
		return nil
	}
	return fmt.Errorf("unknown emissivity law %d (valid: %s)", int(e.Kind),
		strings.Join(emissivityNames[PowerLaw:], ", "))
}

// At returns ε(r) for a law that passes Validate. It returns 0 for NaN r,
// for r ≤ 0 and where invalid parameters would give NaN; it never returns
// NaN.
//
// PowerLaw is r^{-q} and BrokenPowerLaw is r^{-q_in} below r_break and
// r_break^{q_out-q_in} r^{-q_out} above (common practice); domain r > 0.
//
// NovikovThorne is the flux F(r) from one face of a thin disk with zero
// torque at the ISCO, per unit rest-mass accretion rate, in the closed form
// of Page & Thorne (1974, ApJ 191, 499) for signed spin a, with x = sqrt(r),
// x0 = sqrt(r_isco) and x1, x2, x3 the roots of x³ − 3x + 2a = 0:
//
//	F = 3 / (8π x⁴ (x³ − 3x + 2a)) [ x − x0 − (3/2) a ln(x/x0)
//	    − Σᵢ 3 (xᵢ − a)² / (xᵢ (xᵢ − xⱼ)(xᵢ − xₖ)) ln((x − xᵢ)/(x0 − xᵢ)) ],
//
// summed over i with j, k the other two roots. Domain r > r_isco; it is 0
// at and inside r_isco. As |a| → 1 two roots merge and the root factors
// grow, so a few digits are lost there; the result stays finite.
//
// Lamp is the emissivity of Illumination (the lamp's photons per unit
// area with the shift g^(Γ−1); Martocchia & Matt 1996, Wilkins & Fabian
// 2012), interpolated between its bins; 0 off the disk it was made for.
func (e Emissivity) At(r float64) float64 {
	if !(r > 0) {
		return 0
	}
	var v float64
	switch e.Kind {
	case PowerLaw:
		v = powNeg(r, e.Q)
	case BrokenPowerLaw:
		if r < e.RBreak {
			v = powNeg(r, e.QIn)
		} else {
			v = powNeg(e.RBreak, e.QIn) * powNeg(r/e.RBreak, e.QOut)
		}
	case NovikovThorne:
		v = novikovThorne(e.Spin, r)
	case Lamp:
		v = e.Illumination.EmissionAt(r)
	}
	if !(v >= 0) { // NaN from parameters that fail Validate
		return 0
	}
	return v
}

// powNeg returns r^{−q} for r > 0: by multiplication for the whole
// indices 0 to 6 that most scenes use (within 3 rounding units of
// math.Pow, at a tenth of its cost), math.Pow otherwise.
func powNeg(r, q float64) float64 {
	switch q {
	case 0:
		return 1
	case 1:
		return 1 / r
	case 2:
		return 1 / (r * r)
	case 3:
		return 1 / (r * r * r)
	case 4:
		r2 := r * r
		return 1 / (r2 * r2)
	case 5:
		r2 := r * r
		return 1 / (r2 * r2 * r)
	case 6:
		r3 := r * r * r
		return 1 / (r3 * r3)
	}
	return math.Pow(r, -q)
}

// novikovThorne evaluates the Page & Thorne (1974) flux of Emissivity.At.
func novikovThorne(a, r float64) float64 {
	if !(a > -1 && a < 1) {
		return 0
	}
	risco := raytrace.ISCO(a)
	if !(r > risco) || math.IsInf(r, 0) {
		return 0
	}
	x := math.Sqrt(r)
	x0 := math.Sqrt(risco)
	dx := (r - risco) / (x + x0) // x − x0 without cancellation
	th := math.Acos(a)
	xs := [3]float64{
		2 * math.Cos((th-math.Pi)/3),
		2 * math.Cos((th+math.Pi)/3),
		-2 * math.Cos(th/3),
	}
	b := dx - 1.5*a*math.Log1p(dx/x0)
	for i, xi := range xs {
		xj, xk := xs[(i+1)%3], xs[(i+2)%3]
		// (xᵢ − a)²/xᵢ = xᵢ (xᵢ² − 1)²/4 because 2a = 3xᵢ − xᵢ³; this form
		// stays finite at a = 0, where one root is 0.
		w := xi * (xi*xi - 1) * (xi*xi - 1) / 4
		c := 3 * w / ((xi - xj) * (xi - xk))
		b -= c * math.Log1p(dx/(x0-xi))
	}
	if !(b > 0) {
		return 0
	}
	return 3 * b / (8 * math.Pi * r * r * (r*x - 3*x + 2*a))
}

// LimbKind names an angular law for emission from the disk surface. The
// zero value is no law and fails validation.
type LimbKind int

// The limb laws, with the names ParseLimbKind accepts.
const (
	Isotropic LimbKind = iota + 1 // "isotropic": 1
	Laor                          // "laor": 1 + 2.06 cos δ
)

var limbNames = [...]string{
	Isotropic: "isotropic",
	Laor:      "laor",
}

// String returns the law's name as ParseLimbKind accepts it.
func (k LimbKind) String() string {
	if k > 0 && int(k) < len(limbNames) {
		return limbNames[k]
	}
	return fmt.Sprintf("LimbKind(%d)", int(k))
}

// ParseLimbKind returns the limb law called name: "isotropic" or "laor".
// Any other name is an error that lists the valid ones.
func ParseLimbKind(name string) (LimbKind, error) {
	for k := Isotropic; int(k) < len(limbNames); k++ {
		if name == limbNames[k] {
			return k, nil
		}
	}
	return 0, fmt.Errorf("unknown limb law %q (valid: %s)", name,
		strings.Join(limbNames[Isotropic:], ", "))
}

// MarshalText encodes the kind as its name.
func (k LimbKind) MarshalText() ([]byte, error) {
	if !(k > 0 && int(k) < len(limbNames)) {
		return nil, fmt.Errorf("invalid limb law %d", int(k))
	}
	return []byte(limbNames[k]), nil
}

// UnmarshalText decodes a name accepted by ParseLimbKind.
func (k *LimbKind) UnmarshalText(b []byte) error {
	v, err := ParseLimbKind(string(b))
	if err != nil {
		return err
	}
	*k = v
	return nil
}

// Limb is the angular dependence of the emitted specific intensity in the
// gas frame, as a function of cos δ, δ the angle from the disk normal.
type Limb struct {
	Kind LimbKind
}

// Validate reports an error unless l names a known law.
func (l Limb) Validate() error {
	if l.Kind > 0 && int(l.Kind) < len(limbNames) {
		return nil
	}
	return fmt.Errorf("unknown limb law %d (valid: %s)", int(l.Kind),
		strings.Join(limbNames[Isotropic:], ", "))
}

// At returns the limb factor for mu = cos δ. Domain 0 ≤ mu ≤ 1; mu is
// clamped to it, NaN counting as 0. An invalid law gives 0.
//
//   - Isotropic: 1.
//   - Laor: 1 + 2.06 mu, limb darkening of an electron-scattering atmosphere
//     as used for disk lines (Laor 1991, ApJ 376, 90).
func (l Limb) At(mu float64) float64 {
	switch l.Kind {
	case Isotropic:
		return 1
	case Laor:
		if !(mu > 0) {
			mu = 0
		} else if mu > 1 {
			mu = 1
		}
		return 1 + 2.06*mu
	}
	return 0
}
