package scene

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// MaxLines bounds the rest lines of a scene's line list ([[lines]]).
const MaxLines = 16

// Line is one rest line of the scene's line list, a [[lines]] table:
//
//	[[lines]]
//	energy_kev = 6.97
//	weight = 0.3          # optional, 1 by default
//	emissivity = "broken" # optional: the line's own law
//	index_inner = 5       # optional, replaces [emission]'s for this line
//
// Weight is the line's share of the photons the disk emits in all the
// lines together (RestLines). Each emissivity key a line gives replaces
// the one of [emission] for that line; a line that gives none shines with
// [emission]'s law.
type Line struct {
	EnergyKeV  float64  `toml:"energy_kev"`
	Weight     *float64 `toml:"weight,omitempty"`
	Emissivity *string  `toml:"emissivity,omitempty"`
	Index      *float64 `toml:"index,omitempty"`
	IndexInner *float64 `toml:"index_inner,omitempty"`
	IndexOuter *float64 `toml:"index_outer,omitempty"`
	BreakRad   *float64 `toml:"break_radius,omitempty"`
}

// lineKeys are the keys of a [[lines]] table, in the order of Line.
var lineKeys = []string{"energy_kev", "weight", "emissivity", "index", "index_inner", "index_outer", "break_radius"}

// LineKey is the scene key of key in the n-th line (1-based) of the line
// list, e.g. LineKey(2, "weight") = "lines.2.weight".
func LineKey(n int, key string) string { return "lines." + strconv.Itoa(n) + "." + key }

// RestLine is one resolved rest line.
type RestLine struct {
	EnergyKeV float64
	Weight    float64 // as given (1 by default)
	// Fraction is Weight over the sum of the weights: the line's share
	// of the photons the disk emits in all the lines (per unit distant
	// time, both faces).
	Fraction   float64
	Emissivity Emissivity
	// Own is set when the line's law differs from [emission]'s.
	Own bool
	// scale turns Emissivity.At into the line's photon emissivity in the
	// scene's units (RestLines.At).
	scale float64
}

// RestLines are the scene's rest lines: the one line emission.line_kev
// with [emission]'s law, or the line list ([[lines]]). A line's photon
// emissivity per unit comoving area and proper time is, in the scene's
// units,
//
//	ε_l(r) = F_l (A / A_l) e_l(r),
//
// with F_l its Fraction, e_l its law, A_l = ∫ e_l r dr over the emitting
// disk and A the same integral of [emission]'s law e (Emissivity.
// AreaIntegral). √|h| = r on the disk (flux.go), so each line's photon
// rate per unit distant time is proportional to F_l A: the lines share
// the photons of the one line of [emission]'s law in proportion to their
// weights, whatever their laws. Lines of [emission]'s law have
// ε_l = F_l e exactly; their sum is e.
type RestLines struct {
	Main  Emissivity // [emission]'s law, e
	Lines []RestLine
	// MeanKeV is Σ F_l E_l, the mean rest energy of an emitted line
	// photon (the line energy itself for one line).
	MeanKeV float64
	// List is set when the lines come from [[lines]].
	List bool
	own  bool // some line has its own law
}

// Own reports whether some line has a law of its own, so that the share
// of each line in a crossing's light depends on the source radius.
func (ls RestLines) Own() bool { return ls.own }

// Energies returns the rest energies of the lines, keV, in scene order.
func (ls RestLines) Energies() []float64 {
	out := make([]float64, len(ls.Lines))
	for i, l := range ls.Lines {
		out[i] = l.EnergyKeV
	}
	return out
}

// Lowest and Highest return the smallest and largest rest energy, keV.
func (ls RestLines) Lowest() float64  { return slices.Min(ls.Energies()) }
func (ls RestLines) Highest() float64 { return slices.Max(ls.Energies()) }

// At returns Σ_l ε_l(r), the photon emissivity of all the lines at r in
// the scene's units (e(r) itself unless a line has its own law). Domain
// r > 0 (0 elsewhere, as Emissivity.At).
func (ls RestLines) At(r float64) float64 {
	if !ls.own {
		return ls.Main.At(r)
	}
	t := 0.0
	for _, l := range ls.Lines {
		t += l.scale * l.Emissivity.At(r)
	}
	return t
}

// EnergyAt returns Σ_l ε_l(r) E_l / MeanKeV, the lines' energy emissivity
// at r in units of MeanKeV per photon (e(r) itself unless a line has its
// own law, since Σ F_l E_l = MeanKeV).
func (ls RestLines) EnergyAt(r float64) float64 {
	if !ls.own {
		return ls.Main.At(r)
	}
	t := 0.0
	for _, l := range ls.Lines {
		t += l.scale * l.Emissivity.At(r) * l.EnergyKeV
	}
	return t / ls.MeanKeV
}

// AtBoth returns At(r) and EnergyAt(r) together, evaluating the law once
// when no line has its own (then both are e(r)).
func (ls RestLines) AtBoth(r float64) (photon, energy float64) {
	if !ls.own {
		v := ls.Main.At(r)
		return v, v
	}
	return ls.At(r), ls.EnergyAt(r)
}

// Parts fills parts (one per line) with each line's share ε_l(r) / Σ ε_l(r)
// of the photons emitted at r: the Fractions, whatever r, unless a line
// has its own law; the Fractions too where no line shines (Σ ε_l = 0).
func (ls RestLines) Parts(r float64, parts []float64) {
	if ls.own {
		t := 0.0
		for i, l := range ls.Lines {
			parts[i] = l.scale * l.Emissivity.At(r)
			t += parts[i]
		}
		if t > 0 && !math.IsInf(t, 0) {
			for i := range ls.Lines {
				parts[i] /= t
			}
			return
		}
	}
	for i, l := range ls.Lines {
		parts[i] = l.Fraction
	}
}

// resolveLines sets r.RestLines from the line list, or from
// emission.line_kev without one. It needs the disk's edges and
// [emission]'s law (r.Emissivity).
func (r *Resolved) resolveLines() error {
	s := r.Scene
	main := r.Emissivity
	if len(s.Lines) == 0 {
		r.RestLines = RestLines{Main: main, MeanKeV: s.Emission.LineKeV,
			Lines: []RestLine{{EnergyKeV: s.Emission.LineKeV, Weight: 1, Fraction: 1, Emissivity: main, scale: 1}}}
		return nil
	}
	if len(s.Lines) > MaxLines {
		return &FieldError{Key: "lines", Value: strconv.Itoa(len(s.Lines)) + " lines", Allowed: fmt.Sprintf("at most %d [[lines]]", MaxLines)}
	}
	// With a list, emission.line_kev is the first line's energy (so the
	// effective scene, which writes both, loads again); a different one
	// given with the list is refused.
	if first := s.Lines[0].EnergyKeV; s.isGiven("emission.line_kev") && s.Emission.LineKeV != first {
		return fieldErr("emission.line_kev", s.Emission.LineKeV, "a [[lines]] list gives the lines; leave emission.line_kev out (or equal to the first line's energy, %v keV)", first)
	}
	r.Emission.LineKeV = s.Lines[0].EnergyKeV
	ls := RestLines{Main: main, List: true}
	sum := 0.0
	for i, l := range s.Lines {
		n := i + 1
		if !(l.EnergyKeV >= MinLineKeV && l.EnergyKeV <= MaxLineKeV) {
			return fieldErr(LineKey(n, "energy_kev"), l.EnergyKeV, "must be a line energy from %g to %g keV", MinLineKeV, MaxLineKeV)
		}
		for j := range i {
			if e := s.Lines[j].EnergyKeV; math.Abs(e-l.EnergyKeV) < MinEnergySpan*math.Max(e, l.EnergyKeV) {
				return fieldErr(LineKey(n, "energy_kev"), l.EnergyKeV, "is the energy of line %d (%v keV); the lines' energies must differ by more than %g of the larger", j+1, e, MinEnergySpan)
			}
		}
		w := 1.0
		if l.Weight != nil {
			w = *l.Weight
		}
		if !(w >= 0 && w <= MaxLineWeight) {
			return fieldErr(LineKey(n, "weight"), w, "must be from 0 to %g (relative photon emission of the line)", float64(MaxLineWeight))
		}
		sum += w
		e, err := r.lineEmissivity(n, l)
		if err != nil {
			return err
		}
		ls.Lines = append(ls.Lines, RestLine{EnergyKeV: l.EnergyKeV, Weight: w, Emissivity: e, Own: e != main})
	}
	if !(sum > 0) {
		return &FieldError{Key: LineKey(1, "weight"), Value: "0", Allowed: "the weights of the [[lines]] are all 0; at least one must be positive"}
	}
	var area float64
	for i := range ls.Lines {
		l := &ls.Lines[i]
		l.Fraction = l.Weight / sum
		l.scale = l.Fraction
		ls.MeanKeV += l.Fraction * l.EnergyKeV
		if !l.Own {
			continue
		}
		ls.own = true
		if area == 0 {
			area = main.AreaIntegral(r.Inner, r.Disk.OuterRadius, r.ISCO)
			if !(area > 0) || math.IsInf(area, 0) {
				return fieldErr("emission.emissivity", s.Emission.Emissivity, "its integral over the disk, %.6g–%.6g M, is %g, so the lines' shares cannot be set by it", r.Inner, r.Disk.OuterRadius, area)
			}
		}
		al := l.Emissivity.AreaIntegral(r.Inner, r.Disk.OuterRadius, r.ISCO)
		if !(al > 0) || math.IsInf(al, 0) {
			return fieldErr(LineKey(i+1, "emissivity"), l.Emissivity.Kind, "its integral over the disk, %.6g–%.6g M, is %g: the line emits nothing there (novikov-thorne is 0 inside the ISCO)", r.Inner, r.Disk.OuterRadius, al)
		}
		l.scale = l.Fraction * area / al
	}
	r.RestLines = ls
	return nil
}

// MaxLineWeight bounds a line's weight; weights are relative, so only
// their ratios matter.
const MaxLineWeight = 1e30

// lineEmissivity returns the law of line n (1-based): [emission]'s, with
// the keys the line gives replacing its own, checked like [emission]'s
// with the line's keys named.
func (r *Resolved) lineEmissivity(n int, l Line) (Emissivity, error) {
	em := r.Emission
	if l.Emissivity == nil && l.Index == nil && l.IndexInner == nil && l.IndexOuter == nil && l.BreakRad == nil {
		return r.Emissivity, nil
	}
	keys := map[string]string{}
	pick := func(key string, own *float64, main *float64) {
		if own != nil {
			*main = *own
			keys[key] = LineKey(n, key)
		} else {
			keys[key] = "emission." + key
		}
	}
	law := em.Emissivity
	keys["emissivity"] = "emission.emissivity"
	if l.Emissivity != nil {
		law = strings.TrimSpace(*l.Emissivity)
		keys["emissivity"] = LineKey(n, "emissivity")
	}
	pick("index", l.Index, &em.Index)
	pick("index_inner", l.IndexInner, &em.IndexInner)
	pick("index_outer", l.IndexOuter, &em.IndexOuter)
	pick("break_radius", l.BreakRad, &em.BreakRad)
	em.Emissivity = law
	e, err := emissivityLaw(em, r.Hole.Spin, r.Disk.OuterRadius, keys)
	if err != nil {
		return e, err
	}
	if e.Kind == Lamp {
		// The lamp's keys are [emission]'s: the line shares its lamp.
		if r.Emissivity.Kind != Lamp {
			return e, fieldErr(keys["emissivity"], law, "a line lit by the lamp needs emission.emissivity = lamp (the lamp's keys are [emission]'s)")
		}
		e.Height, e.PhotonIndex, e.Illumination = r.Emissivity.Height, r.Emissivity.PhotonIndex, r.Emissivity.Illumination
	}
	if err := e.Validate(); err != nil {
		return e, fieldErr(keys["emissivity"], law, "%v", err)
	}
	return e, nil
}

// emissivityLaw builds the law of em's emissivity keys and checks its
// indices and break radius (Emissivity.Validate and a lamp's keys are
// checked by the caller); keys names the scene key of each
// ("emissivity", "index", "index_inner", "index_outer", "break_radius")
// in errors.
func emissivityLaw(em Emission, spin, outer float64, keys map[string]string) (Emissivity, error) {
	kind, err := ParseEmissivityKind(em.Emissivity)
	if err != nil {
		return Emissivity{}, fieldErr(keys["emissivity"], em.Emissivity, "must be one of %s", strings.Join(emissivityNames[PowerLaw:], ", "))
	}
	e := Emissivity{Kind: kind, Q: em.Index, QIn: em.IndexInner, QOut: em.IndexOuter, RBreak: em.BreakRad, Spin: spin}
	switch kind {
	case PowerLaw:
		if qmax, _ := e.IndexLimits(outer); !(math.Abs(em.Index) <= qmax) {
			return e, fieldErr(keys["index"], em.Index, "must be within ±%.4g for disk.outer_radius = %v M (ε = r^-index within 10^±%d across the disk)", qmax, outer, EmissivityDecades)
		}
	case BrokenPowerLaw:
		if !(em.BreakRad >= 1 && em.BreakRad <= MaxLength) {
			return e, fieldErr(keys["break_radius"], em.BreakRad, "must be from 1 M (no horizon is smaller) to %g M", MaxLength)
		}
		qin, _ := e.IndexLimits(outer)
		if !(math.Abs(em.IndexInner) <= qin) {
			return e, fieldErr(keys["index_inner"], em.IndexInner, "must be within ±%.4g for break_radius = %v M and disk.outer_radius = %v M (ε within 10^±%d across the disk)", qin, em.BreakRad, outer, EmissivityDecades)
		}
		if _, qout := e.IndexLimits(outer); !(math.Abs(em.IndexOuter) <= qout) {
			return e, fieldErr(keys["index_outer"], em.IndexOuter, "must be within ±%.4g with index_inner = %v, break_radius = %v M and disk.outer_radius = %v M (ε within 10^±%d across the disk)", qout, em.IndexInner, em.BreakRad, outer, EmissivityDecades)
		}
	}
	return e, nil
}

// mainEmissivityKeys names [emission]'s keys for checkEmissivity.
var mainEmissivityKeys = map[string]string{
	"emissivity": "emission.emissivity", "index": "emission.index", "index_inner": "emission.index_inner",
	"index_outer": "emission.index_outer", "break_radius": "emission.break_radius",
}

// LineField returns the Field of a numeric key of the line list,
// "lines.N.weight" or "lines.N.energy_kev" (N from 1), for sweeps; ok is
// false for any other key. Setting it on a scene whose list has fewer
// than N lines is an error; the scene's list is copied, never changed in
// place.
func LineField(key string) (f Field, ok bool) {
	rest, found := strings.CutPrefix(key, "lines.")
	if !found {
		return Field{}, false
	}
	ns, k, found := strings.Cut(rest, ".")
	n, err := strconv.Atoi(ns)
	if !found || err != nil || n < 1 || n > MaxLines || (k != "weight" && k != "energy_kev") || ns != strconv.Itoa(n) {
		return Field{}, false
	}
	usage := fmt.Sprintf("weight of line %d of [[lines]]", n)
	if k == "energy_kev" {
		usage = fmt.Sprintf("rest energy of line %d of [[lines]], keV", n)
	}
	return Field{Flag: key, Key: key, Usage: usage, set: func(s *Scene, v string) error {
		x, err := parseNumber(v)
		if err != nil {
			return err
		}
		if n > len(s.Lines) {
			return fmt.Errorf("the scene has %d [[lines]], so there is no line %d", len(s.Lines), n)
		}
		s.Lines = slices.Clone(s.Lines)
		if k == "weight" {
			s.Lines[n-1].Weight = &x
		} else {
			s.Lines[n-1].EnergyKeV = x
		}
		return nil
	}}, true
}

// Describe writes the law with its parameters, e.g. "powerlaw q = 3",
// "broken q_in = 6, q_out = 3, r_break = 6 M", "novikov-thorne",
// "lamp h = 10 M, Gamma = 2".
func (e Emissivity) Describe() string {
	switch e.Kind {
	case PowerLaw:
		return fmt.Sprintf("%s q = %g", e.Kind, e.Q)
	case BrokenPowerLaw:
		return fmt.Sprintf("%s q_in = %g, q_out = %g, r_break = %g M", e.Kind, e.QIn, e.QOut, e.RBreak)
	case Lamp:
		return fmt.Sprintf("%s h = %g M, Gamma = %g", e.Kind, e.Height, e.PhotonIndex)
	}
	return e.Kind.String()
}
