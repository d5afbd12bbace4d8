package scene

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2"
)

// Field is one scene value that a command-line flag can override.
type Field struct {
	Flag  string // flag name, without dashes
	Key   string // scene key, section.key
	Usage string
	Bool  bool // a switch: --flag alone sets it
	set   func(s *Scene, v string) error
}

// Set parses v and stores it in s, recording that the user gave the key.
// A value that cannot be read is a *FieldError naming the key; ranges are
// checked by Resolve.
func (f Field) Set(s *Scene, v string) error {
	if err := f.set(s, v); err != nil {
		return &FieldError{Key: f.Key, Value: Cut(v), Allowed: err.Error()}
	}
	s.markGiven(f.Key)
	return nil
}

func parseNumber(v string) (float64, error) {
	x, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
	var ne *strconv.NumError
	if errors.As(err, &ne) && errors.Is(ne.Err, strconv.ErrRange) {
		return 0, fmt.Errorf("out of the range of a 64-bit float")
	}
	if err != nil {
		return 0, fmt.Errorf("not a number (e.g. 0.9, -3, 6.4e3)")
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, fmt.Errorf("must be a finite number")
	}
	return x, nil
}

func num(p func(*Scene) *float64) func(*Scene, string) error {
	return func(s *Scene, v string) error {
		x, err := parseNumber(v)
		if err == nil {
			*p(s) = x
		}
		return err
	}
}

func optNum(p func(*Scene) **float64) func(*Scene, string) error {
	return func(s *Scene, v string) error {
		x, err := parseNumber(v)
		if err == nil {
			*p(s) = &x
		}
		return err
	}
}

func whole(p func(*Scene) *int) func(*Scene, string) error {
	return func(s *Scene, v string) error {
		x, err := strconv.Atoi(strings.TrimSpace(v))
		var ne *strconv.NumError
		if errors.As(err, &ne) && errors.Is(ne.Err, strconv.ErrRange) {
			return fmt.Errorf("whole number too large")
		}
		if err != nil {
			return fmt.Errorf("not a whole number")
		}
		*p(s) = x
		return nil
	}
}

func text(p func(*Scene) *string) func(*Scene, string) error {
	return func(s *Scene, v string) error { *p(s) = strings.TrimSpace(v); return nil }
}

func list(p func(*Scene) *[]string) func(*Scene, string) error {
	return func(s *Scene, v string) error {
		var out []string
		for _, x := range strings.Split(v, ",") {
			if x = strings.TrimSpace(x); x != "" {
				out = append(out, x)
			}
		}
		*p(s) = out
		return nil
	}
}

func boolean(p func(*Scene) *bool, on bool) func(*Scene, string) error {
	return func(s *Scene, v string) error {
		b, err := strconv.ParseBool(v)
		if err != nil {
			return fmt.Errorf("must be true or false")
		}
		*p(s) = b == on
		return nil
	}
}

// Fields lists every scene value with its flag, in help order.
func Fields() []Field {
	return []Field{
		{Flag: "spin", Key: "black_hole.spin", Usage: "black-hole spin a, signed, -1 < a < 1 (a > 0: disk co-rotates)", set: num(func(s *Scene) *float64 { return &s.Hole.Spin })},
		{Flag: "mass", Key: "black_hole.mass_msun", Usage: "black-hole mass in solar masses (with a distance: axes in µas too)", set: optNum(func(s *Scene) **float64 { return &s.Hole.MassSolar })},
		{Flag: "distance-kpc", Key: "black_hole.distance_kpc", Usage: "distance in kpc", set: optNum(func(s *Scene) **float64 { return &s.Hole.DistanceKpc })},
		{Flag: "distance-mpc", Key: "black_hole.distance_mpc", Usage: "distance in Mpc", set: optNum(func(s *Scene) **float64 { return &s.Hole.DistanceMpc })},
		{Flag: "ra", Key: "black_hole.ra_deg", Usage: "right ascension of the hole, degrees (ICRS), 0 to 360, with --dec (FITS sky coordinates)", set: optNum(func(s *Scene) **float64 { return &s.Hole.RADeg })},
		{Flag: "dec", Key: "black_hole.dec_deg", Usage: "declination of the hole, degrees (ICRS), -90 to 90, with --ra", set: optNum(func(s *Scene) **float64 { return &s.Hole.DecDeg })},
		{Flag: "inclination", Key: "observer.inclination_deg", Usage: "observer inclination from the spin axis, degrees, 0 to 180", set: num(func(s *Scene) *float64 { return &s.Observer.InclinationDeg })},
		{Flag: "position-angle", Key: "observer.position_angle_deg", Usage: "position angle of the projected spin axis (+β) on the sky, degrees from north through east", set: num(func(s *Scene) *float64 { return &s.Observer.PositionAngleDeg })},
		{Flag: "width", Key: "screen.width", Usage: "image width in pixels", set: whole(func(s *Scene) *int { return &s.Screen.Width })},
		{Flag: "height", Key: "screen.height", Usage: "image height in pixels", set: whole(func(s *Scene) *int { return &s.Screen.Height })},
		{Flag: "fov", Key: "screen.field_of_view", Usage: "horizontal field of view in M; 0: automatic, the whole disk image with a small margin, centred on it unless a centre is given", set: num(func(s *Scene) *float64 { return &s.Screen.FieldOfView })},
		{Flag: "center-alpha", Key: "screen.center_alpha", Usage: "window centre α in M", set: num(func(s *Scene) *float64 { return &s.Screen.CenterAlpha })},
		{Flag: "center-beta", Key: "screen.center_beta", Usage: "window centre β in M", set: num(func(s *Scene) *float64 { return &s.Screen.CenterBeta })},
		{Flag: "inner", Key: "disk.inner_radius", Usage: "disk inner edge in M (default: the ISCO, or the horizon with --plunging)", set: optNum(func(s *Scene) **float64 { return &s.Disk.InnerRadius })},
		{Flag: "outer", Key: "disk.outer_radius", Usage: "disk outer edge in M", set: num(func(s *Scene) *float64 { return &s.Disk.OuterRadius })},
		{Flag: "transparent", Key: "disk.opaque", Usage: "every crossing adds light (default: opaque, the first landing stops the ray)", Bool: true, set: boolean(func(s *Scene) *bool { return &s.Disk.Opaque }, false)},
		{Flag: "orders", Key: "disk.orders", Usage: "image orders to follow", set: whole(func(s *Scene) *int { return &s.Disk.Orders })},
		{Flag: "plunging", Key: "disk.plunging", Usage: "gas inside the ISCO shines (plunging geodesics); without --inner the disk then reaches the horizon", Bool: true, set: boolean(func(s *Scene) *bool { return &s.Disk.Plunging }, true)},
		{Flag: "line", Key: "emission.line_kev", Usage: "line rest energy in keV", set: num(func(s *Scene) *float64 { return &s.Emission.LineKeV })},
		{Flag: "emissivity", Key: "emission.emissivity", Usage: "emissivity law: powerlaw, broken, novikov-thorne, lamp", set: text(func(s *Scene) *string { return &s.Emission.Emissivity })},
		{Flag: "index", Key: "emission.index", Usage: "power-law emissivity index q (ε ∝ r^-q)", set: num(func(s *Scene) *float64 { return &s.Emission.Index })},
		{Flag: "index-inner", Key: "emission.index_inner", Usage: "broken power law: index inside the break", set: num(func(s *Scene) *float64 { return &s.Emission.IndexInner })},
		{Flag: "index-outer", Key: "emission.index_outer", Usage: "broken power law: index outside the break", set: num(func(s *Scene) *float64 { return &s.Emission.IndexOuter })},
		{Flag: "break-radius", Key: "emission.break_radius", Usage: "broken power law: break radius in M", set: num(func(s *Scene) *float64 { return &s.Emission.BreakRad })},
		{Flag: "lamp-height", Key: "emission.lamp_height", Usage: "lamp emissivity: height of the point source on the spin axis, M", set: optNum(func(s *Scene) **float64 { return &s.Emission.LampHeight })},
		{Flag: "photon-index", Key: "emission.photon_index", Usage: "lamp emissivity: photon index Γ of the source's power law (default 2)", set: optNum(func(s *Scene) **float64 { return &s.Emission.PhotonIndex })},
		{Flag: "limb", Key: "emission.limb", Usage: "limb law: isotropic, laor", set: text(func(s *Scene) *string { return &s.Emission.Limb })},
		{Flag: "line-luminosity", Key: "emission.line_luminosity_erg_s", Usage: "line luminosity in erg/s, both disk faces (with mass and distance: physical units)", set: optNum(func(s *Scene) **float64 { return &s.Emission.LineLuminosityErgS })},
		{Flag: "emin", Key: "spectrum.energy_min_kev", Usage: "spectrum lower energy in keV (default 0.2 × line)", set: optNum(func(s *Scene) **float64 { return &s.Spectrum.MinKeV })},
		{Flag: "emax", Key: "spectrum.energy_max_kev", Usage: "spectrum upper energy in keV (default 1.8 × line)", set: optNum(func(s *Scene) **float64 { return &s.Spectrum.MaxKeV })},
		{Flag: "bins", Key: "spectrum.bins", Usage: "number of spectrum bins", set: whole(func(s *Scene) *int { return &s.Spectrum.Bins })},
		{Flag: "fwhm", Key: "spectrum.instrument_fwhm_ev", Usage: "Gaussian instrument resolution FWHM in eV (0 = none)", set: num(func(s *Scene) *float64 { return &s.Spectrum.FWHMeV })},
		{Flag: "refine-depth", Key: "refine.depth", Usage: "adaptive refinement levels below each pixel (0: one photon per pixel)", set: whole(func(s *Scene) *int { return &s.Refine.Depth })},
		{Flag: "refine-r", Key: "refine.tolerance_r", Usage: "refinement: relative change of source radius that splits a cell", set: num(func(s *Scene) *float64 { return &s.Refine.TolR })},
		{Flag: "refine-g", Key: "refine.tolerance_g", Usage: "refinement: change of g that splits a cell", set: num(func(s *Scene) *float64 { return &s.Refine.TolG })},
		{Flag: "band-min", Key: "band.r_min", Usage: "locate: inner source radius (M, or isco / horizon with *x or +x)", set: text(func(s *Scene) *string { return &s.Band.RMin })},
		{Flag: "band-max", Key: "band.r_max", Usage: "locate: outer source radius (M, or isco / horizon with *x or +x)", set: text(func(s *Scene) *string { return &s.Band.RMax })},
		{Flag: "spot-radius", Key: "spot.radius", Usage: "spot: orbit radius in M (at least the ISCO)", set: num(func(s *Scene) *float64 { return &s.Spot.Radius })},
		{Flag: "spot-size", Key: "spot.size", Usage: "spot: Gaussian width σ in M (gaussian) or radial width (annulus)", set: num(func(s *Scene) *float64 { return &s.Spot.Size })},
		{Flag: "spot-contrast", Key: "spot.contrast", Usage: "spot: emissivity in units of the disk's at the spot radius", set: num(func(s *Scene) *float64 { return &s.Spot.Contrast })},
		{Flag: "spot-phase", Key: "spot.phase_deg", Usage: "spot: azimuth at emission time 0, degrees from the observer's", set: num(func(s *Scene) *float64 { return &s.Spot.PhaseDeg })},
		{Flag: "spot-profile", Key: "spot.profile", Usage: "spot: emissivity profile, gaussian or annulus", set: text(func(s *Scene) *string { return &s.Spot.Profile })},
		{Flag: "spot-arc", Key: "spot.arc_deg", Usage: "spot: annulus azimuthal extent in degrees (360: a whole ring)", set: num(func(s *Scene) *float64 { return &s.Spot.ArcDeg })},
		{Flag: "spot-alone", Key: "spot.alone", Usage: "spot: no steady disk, only the (optically thin) spot shines", Bool: true, set: boolean(func(s *Scene) *bool { return &s.Spot.Alone }, true)},
		{Flag: "frames", Key: "spot.frames", Usage: "spot: frames of the movie", set: whole(func(s *Scene) *int { return &s.Spot.Frames })},
		{Flag: "periods", Key: "spot.periods", Usage: "spot: observer time covered, in orbital periods", set: num(func(s *Scene) *float64 { return &s.Spot.Periods })},
		{Flag: "eddington-ratio", Key: "thermal.eddington_ratio", Usage: "thermal continuum: disk luminosity (1 - E_isco) Mdot c^2 over the Eddington luminosity (needs mass and distance)", set: optNum(func(s *Scene) **float64 { return &s.Thermal.EddingtonRatio })},
		{Flag: "accretion-rate", Key: "thermal.accretion_rate_g_s", Usage: "thermal continuum: accretion rate in g/s, instead of --eddington-ratio", set: optNum(func(s *Scene) **float64 { return &s.Thermal.AccretionRateGS })},
		{Flag: "fcol", Key: "thermal.color_correction", Usage: "thermal continuum: colour correction f_col = T_colour/T_eff", set: num(func(s *Scene) *float64 { return &s.Thermal.ColorCorrection })},
		{Flag: "continuum-emin", Key: "thermal.energy_min_kev", Usage: "thermal continuum: lowest energy in keV (default: from the disk's coolest ring)", set: optNum(func(s *Scene) **float64 { return &s.Thermal.MinKeV })},
		{Flag: "continuum-emax", Key: "thermal.energy_max_kev", Usage: "thermal continuum: highest energy in keV (default: from the disk's hottest ring)", set: optNum(func(s *Scene) **float64 { return &s.Thermal.MaxKeV })},
		{Flag: "continuum-bins", Key: "thermal.bins", Usage: "thermal continuum: energies, equally spaced in log E", set: whole(func(s *Scene) *int { return &s.Thermal.Bins })},
		{Flag: "field-radial", Key: "polarisation.field_radial", Usage: "polarisation: radial component of the magnetic field in the gas frame (only the direction counts)", set: num(func(s *Scene) *float64 { return &s.Polarisation.FieldRadial })},
		{Flag: "field-azimuthal", Key: "polarisation.field_azimuthal", Usage: "polarisation: azimuthal (toroidal) field component, + along the orbit", set: num(func(s *Scene) *float64 { return &s.Polarisation.FieldAzimuthal })},
		{Flag: "field-vertical", Key: "polarisation.field_vertical", Usage: "polarisation: vertical field component, + along the spin axis", set: num(func(s *Scene) *float64 { return &s.Polarisation.FieldVertical })},
		{Flag: "pol-fraction", Key: "polarisation.fraction", Usage: "polarisation: emitted linear polarisation fraction, 0 to 1", set: num(func(s *Scene) *float64 { return &s.Polarisation.Fraction })},
		{Flag: "sin-power", Key: "polarisation.sin_power", Usage: "polarisation: emitted intensity ∝ sin^p of the photon–field angle (0: none; it then shapes every map)", set: num(func(s *Scene) *float64 { return &s.Polarisation.SinPower })},
		{Flag: "out", Key: "output.directory", Usage: "output directory", set: text(func(s *Scene) *string { return &s.Output.Directory })},
		{Flag: "maps", Key: "output.maps", Usage: "comma-separated maps: " + strings.Join(MapNames, ","), set: list(func(s *Scene) *[]string { return &s.Output.Maps })},
		{Flag: "formats", Key: "output.formats", Usage: "comma-separated outputs: png (figures), bare (pixel-exact PNG), fits, csv (spectrum), svg (figures as vector graphics)", set: list(func(s *Scene) *[]string { return &s.Output.Formats })},
		{Flag: "intensity-scale", Key: "output.intensity_scale", Usage: "intensity map scale: log or linear", set: text(func(s *Scene) *string { return &s.Output.IntensityScale })},
		{Flag: "column", Key: "output.column", Usage: "figure width preset: single (86 mm) or double (178 mm) journal column", set: text(func(s *Scene) *string { return &s.Output.Column })},
		{Flag: "width-mm", Key: "output.width_mm", Usage: "figure width in mm (0: from --column)", set: num(func(s *Scene) *float64 { return &s.Output.WidthMM })},
		{Flag: "dpi", Key: "output.dpi", Usage: "figure resolution in dots per inch (text is 8 pt at any size)", set: num(func(s *Scene) *float64 { return &s.Output.DPI })},
		{Flag: "redshift-scale", Key: "output.redshift_scale", Usage: "redshift colours: split (log g, each side of g = 1 on its own half) or linear (linear in g)", set: text(func(s *Scene) *string { return &s.Output.RedshiftScale })},
		{Flag: "spectrum-axis", Key: "output.spectrum_axis", Usage: "spectrum figure y axis: linear or log", set: text(func(s *Scene) *string { return &s.Output.SpectrumAxis })},
		{Flag: "spectrum-norm", Key: "output.spectrum_norm", Usage: "spectrum figure curves: flux, area (unit integral) or peak (maximum 1)", set: text(func(s *Scene) *string { return &s.Output.SpectrumNorm })},
		{Flag: "spectrum-overlay", Key: "output.spectrum_overlay", Usage: "CSV of energy [keV], flux to draw over the spectrum figure", set: text(func(s *Scene) *string { return &s.Output.SpectrumOverlay })},
		{Flag: "orientation-marks", Key: "output.orientation_marks", Usage: "draw the projected spin axis and the disk's orbital direction on every map figure", Bool: true, set: boolean(func(s *Scene) *bool { return &s.Output.OrientationMarks }, true)},
		{Flag: "g-min", Key: "scales.g_min", Usage: "redshift colour scale lower end, 0 < g < 1", set: optNum(func(s *Scene) **float64 { return &s.Scales.GMin })},
		{Flag: "g-max", Key: "scales.g_max", Usage: "redshift colour scale upper end, g > 1", set: optNum(func(s *Scene) **float64 { return &s.Scales.GMax })},
		{Flag: "intensity-max", Key: "scales.intensity_max", Usage: "intensity colour scale maximum in relative units, > 0", set: optNum(func(s *Scene) **float64 { return &s.Scales.IntensityMax })},
		{Flag: "intensity-decades", Key: "scales.intensity_decades", Usage: "decades on the log intensity scale, 0 < d ≤ 30", set: optNum(func(s *Scene) **float64 { return &s.Scales.IntensityDecades })},
		{Flag: "radius-min", Key: "scales.radius_min", Usage: "radius colour scale lower end in M, > 0", set: optNum(func(s *Scene) **float64 { return &s.Scales.RadiusMin })},
		{Flag: "radius-max", Key: "scales.radius_max", Usage: "radius colour scale upper end in M, above --radius-min", set: optNum(func(s *Scene) **float64 { return &s.Scales.RadiusMax })},
		{Flag: "flux-max", Key: "scales.flux_max", Usage: "spectrum plot's upper flux limit per keV, > 0", set: optNum(func(s *Scene) **float64 { return &s.Scales.FluxMax })},
		{Flag: "scale-percentile", Key: "scales.percentile", Usage: "colour ranges not fixed span the p-th to (100−p)-th percentile of the values by screen area, 0 ≤ p < 50", set: optNum(func(s *Scene) **float64 { return &s.Scales.Percentile })},
	}
}

// Quantity is how figures name a scene value: Name in words, Symbol as in
// the formulas (subscripts written with _, as in the figures' labels)
// and Unit ("" for a pure number).
type Quantity struct {
	Name, Symbol, Unit string
}

// quantities names the numeric scene values a sweep can vary, by key
// (Fields), for the labels of animation frames and colour bars.
var quantities = map[string]Quantity{
	"black_hole.spin":                {"spin", "a", ""},
	"black_hole.mass_msun":           {"mass", "M", "M_sun"},
	"black_hole.distance_kpc":        {"distance", "D", "kpc"},
	"black_hole.distance_mpc":        {"distance", "D", "Mpc"},
	"black_hole.ra_deg":              {"right ascension", "RA", "deg"},
	"black_hole.dec_deg":             {"declination", "Dec", "deg"},
	"observer.inclination_deg":       {"inclination", "i", "deg"},
	"observer.position_angle_deg":    {"position angle", "PA", "deg"},
	"disk.inner_radius":              {"inner edge", "r_in", "M"},
	"disk.outer_radius":              {"outer edge", "r_out", "M"},
	"emission.line_kev":              {"line energy", "E_line", "keV"},
	"emission.index":                 {"emissivity index", "q", ""},
	"emission.index_inner":           {"inner emissivity index", "q_in", ""},
	"emission.index_outer":           {"outer emissivity index", "q_out", ""},
	"emission.break_radius":          {"break radius", "r_br", "M"},
	"emission.line_luminosity_erg_s": {"line luminosity", "L", "erg s⁻¹"},
	"spectrum.instrument_fwhm_ev":    {"instrument FWHM", "ΔE", "eV"},
	"refine.tolerance_r":             {"refinement tolerance in r", "δr/r", ""},
	"refine.tolerance_g":             {"refinement tolerance in g", "δg", ""},
	"spot.radius":                    {"spot radius", "r_s", "M"},
	"spot.size":                      {"spot size", "σ_s", "M"},
	"spot.contrast":                  {"spot contrast", "C", ""},
	"spot.phase_deg":                 {"spot phase", "φ_s", "deg"},
	"spot.arc_deg":                   {"spot arc", "Δφ", "deg"},
	"spot.periods":                   {"time span", "Δt", "orbits"},
	"thermal.eddington_ratio":        {"Eddington ratio", "L/L_Edd", ""},
	"thermal.accretion_rate_g_s":     {"accretion rate", "Ṁ", "g s⁻¹"},
	"thermal.color_correction":       {"colour correction", "f_col", ""},
	"thermal.energy_min_kev":         {"continuum lower energy", "E_min", "keV"},
	"thermal.energy_max_kev":         {"continuum upper energy", "E_max", "keV"},
	"output.width_mm":                {"figure width", "w", "mm"},
	"output.dpi":                     {"figure resolution", "ρ", "dpi"},
	"emission.lamp_height":           {"lamp height", "h", "M"},
	"emission.photon_index":          {"photon index", "Γ", ""},
	"polarisation.field_radial":      {"radial field component", "B_r", ""},
	"polarisation.field_azimuthal":   {"azimuthal field component", "B_φ", ""},
	"polarisation.field_vertical":    {"vertical field component", "B_z", ""},
	"polarisation.fraction":          {"emitted polarisation fraction", "p", ""},
	"polarisation.sin_power":         {"field-angle power", "s", ""},
}

// QuantityOf returns how figures name the scene value of key; a key
// without an entry is named by the key itself.
func QuantityOf(key string) Quantity {
	if q, ok := quantities[key]; ok {
		return q
	}
	if _, ok := LineField(key); ok {
		n, k, _ := strings.Cut(strings.TrimPrefix(key, "lines."), ".")
		if k == "weight" {
			return Quantity{"weight of line " + n, "w_" + n, ""}
		}
		return Quantity{"energy of line " + n, "E_" + n, "keV"}
	}
	return Quantity{Name: key}
}

// Title is the quantity's name for an axis or colour bar: name, symbol
// and unit in brackets, e.g. "spin a", "inclination i [deg]".
func (q Quantity) Title() string {
	t := q.Name
	if q.Symbol != "" {
		t += " " + q.Symbol
	}
	if q.Unit != "" {
		t += " [" + q.Unit + "]"
	}
	return t
}

// Value writes a value of the quantity as the symbol, the value and the
// unit, e.g. "a = 0.998", "i = 60°", "r_out = 30 M" (the key when there
// is no symbol).
func (q Quantity) Value(v string) string {
	sym := q.Symbol
	if sym == "" {
		sym = q.Name
	}
	switch q.Unit {
	case "":
		return sym + " = " + v
	case "deg":
		return sym + " = " + v + "°"
	}
	return sym + " = " + v + " " + q.Unit
}

// Values returns the scene's values by key ("black_hole.spin"), as the
// text its TOML gives them, lists joined by commas: the defaults that help
// texts show and the values a page fills its controls with. Keys of
// array tables ([[lines]]) are left out.
func (s Scene) Values() map[string]string {
	out := map[string]string{}
	text, err := s.TOML()
	if err != nil {
		return out
	}
	var m map[string]any
	if toml.Unmarshal(text, &m) != nil {
		return out
	}
	for sec, body := range m {
		kv, ok := body.(map[string]any)
		if !ok {
			continue
		}
		for k, v := range kv {
			if list, ok := v.([]any); ok {
				parts := make([]string, len(list))
				for i, e := range list {
					parts[i] = fmt.Sprint(e)
				}
				out[sec+"."+k] = strings.Join(parts, ",")
				continue
			}
			out[sec+"."+k] = fmt.Sprint(v)
		}
	}
	return out
}
