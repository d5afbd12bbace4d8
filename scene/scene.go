package scene

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/pelletier/go-toml/v2"

	"kerrscope/raytrace"
)

// Scene is everything needed to render one image. Pointer fields are
// optional: nil means "not given" and Resolve fills the default.
type Scene struct {
	Hole     Hole     `toml:"black_hole"`
	Observer Observer `toml:"observer"`
	Screen   Screen   `toml:"screen"`
	Disk     Disk     `toml:"disk"`
	Emission Emission `toml:"emission"`
	Spectrum Spectrum `toml:"spectrum"`
	Refine   Refine   `toml:"refine"`
	Band     Band     `toml:"band"`
	Spot     Spot     `toml:"spot"`
	Output   Output   `toml:"output"`
	Scales   Scales   `toml:"scales,omitempty"`
	Thermal  Thermal  `toml:"thermal"`
	// Polarisation is the emission model of the polarisation map.
	Polarisation Polarisation `toml:"polarisation"`
	// Lines is the line list ([[lines]]); empty: the one line
	// emission.line_kev (RestLines).
	Lines []Line `toml:"lines,omitempty"`

	// given holds the keys set by the user (scene file or flags); see
	// markGiven. It is not part of the scene's TOML.
	given map[string]bool
}

// Refine is adaptive sampling: Depth 0 traces one photon per pixel centre;
// Depth > 0 samples pixel corners and splits cells whose samples differ in
// fate or image order, or in r (relative) or g (absolute) by more than
// the tolerances, down to Depth levels.
type Refine struct {
	Depth int     `toml:"depth"`
	TolR  float64 `toml:"tolerance_r"`
	TolG  float64 `toml:"tolerance_g"`
}

// Band is the range of source radii that "kerrscope locate" finds on the
// screen. Each end is a number of M or an expression of "isco" or
// "horizon" (e.g. "isco*1.1", "horizon+0.05").
type Band struct {
	RMin string `toml:"r_min"`
	RMax string `toml:"r_max"`
}

// Hole is the black hole. Mass and distance are optional; when both are
// given, figures also carry axes in micro-arcseconds.
type Hole struct {
	Spin        float64  `toml:"spin"`                   // signed, -1 < a < 1
	MassSolar   *float64 `toml:"mass_msun,omitempty"`    // M in solar masses
	DistanceKpc *float64 `toml:"distance_kpc,omitempty"` // distance in kpc
	DistanceMpc *float64 `toml:"distance_mpc,omitempty"` // or in Mpc
	// RADeg and DecDeg place the hole on the sky (ICRS, degrees), for
	// the celestial WCS of the FITS maps; both or neither.
	RADeg  *float64 `toml:"ra_deg,omitempty"`
	DecDeg *float64 `toml:"dec_deg,omitempty"`
}

// Observer is the distant observer.
type Observer struct {
	InclinationDeg float64 `toml:"inclination_deg"` // from the spin axis, 0–180
	// PositionAngleDeg is the position angle on the sky of the projected
	// spin axis (the screen's +β), from north through east, in degrees
	// (SkyOffset). The pixel grid stays aligned with α, β; the angle
	// enters the celestial WCS only.
	PositionAngleDeg float64 `toml:"position_angle_deg"`
}

// Screen is the observer's pixel grid: Width × Height pixels spanning
// FieldOfView M horizontally (square pixels), centred on (CenterAlpha,
// CenterBeta). FieldOfView 0 (AutoField) is automatic: the renderer
// chooses the field, and unless the centre is given also the centre, so
// that the whole disk image fits (Resolved.AutoField, AutoCenter).
type Screen struct {
	Width       int     `toml:"width"`
	Height      int     `toml:"height"`
	FieldOfView float64 `toml:"field_of_view"` // M, horizontal; 0: automatic
	CenterAlpha float64 `toml:"center_alpha"`  // M
	CenterBeta  float64 `toml:"center_beta"`   // M
}

// Disk is the thin equatorial disk.
type Disk struct {
	// InnerRadius is the inner edge in M; nil means the ISCO, or the
	// horizon when Plunging is set. Inside the ISCO gas shines only when
	// Plunging is set (otherwise the edge is raised to the ISCO).
	InnerRadius *float64 `toml:"inner_radius,omitempty"`
	OuterRadius float64  `toml:"outer_radius"`
	Opaque      bool     `toml:"opaque"` // stop at the first landing; else every crossing adds light
	Orders      int      `toml:"orders"` // image orders to follow
	Plunging    bool     `toml:"plunging"`
}

// Emission is the line and how the disk emits it.
type Emission struct {
	LineKeV    float64 `toml:"line_kev"`
	Emissivity string  `toml:"emissivity"` // powerlaw, broken, novikov-thorne, lamp
	Index      float64 `toml:"index"`      // powerlaw q
	IndexInner float64 `toml:"index_inner"`
	IndexOuter float64 `toml:"index_outer"`
	BreakRad   float64 `toml:"break_radius"`
	// LampHeight (M) and PhotonIndex Γ of the lamp emissivity: a point
	// source on the spin axis lighting the disk (Illuminate). Γ defaults
	// to DefaultPhotonIndex.
	LampHeight  *float64 `toml:"lamp_height,omitempty"`
	PhotonIndex *float64 `toml:"photon_index,omitempty"`
	Limb        string   `toml:"limb"` // isotropic, laor
	// LineLuminosityErgS is the line luminosity L in erg/s, both faces
	// (defined at resolvePhotonRate in flux.go); with mass and distance
	// it puts the maps and the spectrum in physical units. nil: relative
	// units.
	LineLuminosityErgS *float64 `toml:"line_luminosity_erg_s,omitempty"`
}

// Spectrum is the binning of the collapsed line profile.
type Spectrum struct {
	MinKeV *float64 `toml:"energy_min_kev,omitempty"` // default 0.2 × line
	MaxKeV *float64 `toml:"energy_max_kev,omitempty"` // default 1.8 × line
	Bins   int      `toml:"bins"`
	FWHMeV float64  `toml:"instrument_fwhm_ev"` // Gaussian, 0 = none
}

// Output says where and what to write.
type Output struct {
	Directory      string   `toml:"directory"`
	Maps           []string `toml:"maps"`
	Formats        []string `toml:"formats"`
	IntensityScale string   `toml:"intensity_scale"` // log or linear
	// OrientationMarks: draw the projected spin axis and the direction
	// of the disk's orbit on every map figure.
	OrientationMarks bool `toml:"orientation_marks"`
	// Column sets the width of every decorated figure: "single" or
	// "double" for a one- or two-column journal figure (86 or 178 mm);
	// WidthMM > 0 gives the width in millimetres instead. DPI is the
	// resolution; text is 8 pt at any size.
	Column  string  `toml:"column"`
	WidthMM float64 `toml:"width_mm"`
	DPI     float64 `toml:"dpi"`
	// RedshiftScale places g on the redshift colour scale: "split" (log
	// g, each side of g = 1 stretched to its own half of the scale) or
	// "linear" (linear in g across the range, g = 1 wherever it falls).
	RedshiftScale string `toml:"redshift_scale"`
	// SpectrumAxis is the y axis of the spectrum figure, "linear" or
	// "log"; SpectrumNorm scales its curves: "flux" (as computed),
	// "area" (unit integral over energy) or "peak" (maximum 1).
	SpectrumAxis string `toml:"spectrum_axis"`
	SpectrumNorm string `toml:"spectrum_norm"`
	// SpectrumOverlay, if not empty, is a CSV file of energy (keV) and
	// flux columns drawn over the spectrum for comparison, normalised
	// like the spectrum.
	SpectrumOverlay string `toml:"spectrum_overlay"`
}

// Figure widths of the column presets, in millimetres, and the accepted
// ranges of Output.WidthMM and Output.DPI.
const (
	SingleColumnMM = 86.0
	DoubleColumnMM = 178.0
	MinFigureMM    = 30.0
	MaxFigureMM    = 500.0
	MinDPI         = 50.0
	MaxDPI         = 1200.0
	// MaxFigurePixels bounds the width of a figure in pixels.
	MaxFigurePixels = 16384
)

// FigureSize returns the width in millimetres and the resolution of the
// decorated figures.
func (o Output) FigureSize() (widthMM, dpi float64) {
	widthMM = SingleColumnMM
	if o.Column == "double" {
		widthMM = DoubleColumnMM
	}
	if o.WidthMM > 0 {
		widthMM = o.WidthMM
	}
	return widthMM, o.DPI
}

// Map names and format names accepted in Output.
var (
	MapNames    = []string{"redshift", "intensity", "radius", "order", "shadow", "delay", "rings", "temperature", "color-temperature", PolarisationMap}
	FormatNames = []string{"png", "bare", "fits", "csv", "svg"}
	// defaultFormats are the outputs written when the scene names none:
	// all but svg.
	defaultFormats = []string{"png", "bare", "fits", "csv"}
	// defaultMaps are the maps rendered when the scene names none: all
	// but delay, which doubles the cost of every photon (time delays).
	defaultMaps = []string{"redshift", "intensity", "radius", "order", "shadow"}
	// TimingMaps are the maps that need each crossing's time delay.
	TimingMaps = []string{"delay"}
	// ThermalMaps are the maps that need a thermal disk ([thermal]).
	ThermalMaps = []string{"temperature", "color-temperature"}
)

// NeedsTiming reports whether the scene asks for a map that needs the time
// delays of the crossings (TimingMaps).
func (s Scene) NeedsTiming() bool {
	for _, m := range s.Output.Maps {
		for _, t := range TimingMaps {
			if m == t {
				return true
			}
		}
	}
	return false
}

// Default returns the built-in default scene.
func Default() Scene {
	return Scene{
		Hole:     Hole{Spin: 0.9},
		Observer: Observer{InclinationDeg: 60},
		Screen:   Screen{Width: 512, Height: 512, FieldOfView: AutoField},
		Disk:     Disk{OuterRadius: 30, Opaque: true, Orders: 3},
		Emission: Emission{LineKeV: 6.4, Emissivity: "powerlaw", Index: DefaultPowerLawIndex,
			IndexInner: 6, IndexOuter: 3, BreakRad: 6, Limb: "isotropic"},
		Spectrum:     Spectrum{Bins: 240},
		Refine:       Refine{Depth: 0, TolR: 0.05, TolG: 0.01},
		Band:         Band{RMin: "isco", RMax: "isco*1.1"},
		Spot:         DefaultSpot(),
		Thermal:      Thermal{ColorCorrection: DefaultColorCorrection, Bins: 200},
		Polarisation: DefaultPolarisation(),
		Output: Output{Directory: "kerrscope-out", Maps: append([]string(nil), defaultMaps...),
			Formats: append([]string(nil), defaultFormats...), IntensityScale: "log",
			Column: "single", DPI: 300, RedshiftScale: "split", SpectrumAxis: "linear", SpectrumNorm: "flux"},
	}
}

// MaxSceneBytes is the largest scene file Load reads; a scene is a short
// TOML text, so anything larger is not one.
const MaxSceneBytes = 1 << 20

// Load reads a scene file over the defaults. Unknown keys and wrong types
// are errors naming the key and the line; a file larger than
// MaxSceneBytes (or a device that never ends) is refused after reading
// at most that much.
func Load(path string) (Scene, error) {
	f, err := os.Open(path)
	if err != nil {
		return Scene{}, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxSceneBytes+1))
	if err != nil {
		return Scene{}, fmt.Errorf("%s: %w", path, err)
	}
	if len(data) > MaxSceneBytes {
		return Scene{}, &ParseError{File: path, Problem: fmt.Sprintf("larger than %d KiB; a scene file is a short TOML text", MaxSceneBytes>>10)}
	}
	return Parse(path, data)
}

// Parse decodes TOML scene text (name is used in error messages) over
// the defaults. A leading UTF-8 byte-order mark is skipped. Errors are
// *ParseError values.
func Parse(name string, data []byte) (Scene, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if !utf8.Valid(data) {
		line := 1 + bytes.Count(data[:firstInvalid(data)], []byte("\n"))
		return Scene{}, &ParseError{File: name, Line: line, Problem: "not UTF-8 text; a scene file is UTF-8 TOML"}
	}
	s := Default()
	// Lists replace the defaults rather than merge with them.
	s.Output.Maps, s.Output.Formats = nil, nil
	d := toml.NewDecoder(bytes.NewReader(data))
	d.DisallowUnknownFields()
	if err := d.Decode(&s); err != nil {
		return Scene{}, tomlError(name, data, err)
	}
	def := Default()
	if s.Output.Maps == nil {
		s.Output.Maps = def.Output.Maps
	}
	if s.Output.Formats == nil {
		s.Output.Formats = def.Output.Formats
	}
	// Record which keys the file sets, so that a refused pair of values
	// blames the one the user wrote (the decoder matches keys regardless
	// of case).
	var doc map[string]any
	if toml.Unmarshal(data, &doc) == nil {
		for sec, v := range doc {
			if kv, ok := v.(map[string]any); ok {
				for k := range kv {
					s.markGiven(strings.ToLower(sec + "." + k))
				}
			}
		}
	}
	return s, nil
}

// firstInvalid returns the offset of the first byte of data that is not
// part of valid UTF-8.
func firstInvalid(data []byte) int {
	for i := 0; i < len(data); {
		r, n := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && n <= 1 {
			return i
		}
		i += n
	}
	return len(data)
}

// markGiven records that key was set by the user (scene file or flag).
// The set is copied, never changed in place, because scenes are copied by
// value and share it.
func (s *Scene) markGiven(key string) {
	m := make(map[string]bool, len(s.given)+1)
	for k := range s.given {
		m[k] = true
	}
	m[key] = true
	s.given = m
}

// isGiven reports whether the user set key (scene file or flag).
func (s Scene) isGiven(key string) bool { return s.given[key] }

var (
	typeMsg  = regexp.MustCompile(`cannot decode TOML ([\w ]+?) into .* of type (\S+)`)
	storeMsg = regexp.MustCompile(`cannot store (?:a|an) ([\w ]+?) in (?:a|an) (\S+)`)
)

// typeWords says in words what a Go type of the scene expects.
func typeWords(goType string) string {
	goType = strings.TrimPrefix(goType, "*")
	switch goType {
	case "float64":
		return "a number"
	case "int":
		return "a whole number"
	case "bool":
		return "true or false"
	case "string":
		return "a string"
	case "[]string":
		return "a list of strings"
	case "[]scene.Line", "scene.Line":
		return "an array of tables ([[lines]] blocks, each with energy_kev)"
	}
	if strings.HasPrefix(goType, "scene.") || goType == "struct" {
		return "a table (a [section] of keys)"
	}
	return "a different kind of value"
}

// tomlError rewrites a decoder error as a *ParseError naming the line, the
// key, what was found there and what is allowed, in words rather than in
// the decoder's terms.
func tomlError(name string, data []byte, err error) error {
	var sm *toml.StrictMissingError
	if errors.As(err, &sm) && len(sm.Errors) > 0 {
		e := sm.Errors[0]
		row, _ := e.Position()
		key := strings.Join(e.Key(), ".")
		pe := &ParseError{File: name, Line: row, Key: key, Problem: "unknown key (valid keys: " + validKeys(e.Key()) + ")"}
		if len(sm.Errors) > 1 {
			pe.Problem += fmt.Sprintf("; and %d more unknown keys", len(sm.Errors)-1)
		}
		return pe
	}
	var de *toml.DecodeError
	if !errors.As(err, &de) {
		return &ParseError{File: name, Problem: "cannot read the scene: " + Cut(err.Error())}
	}
	row, _ := de.Position()
	pe := &ParseError{File: name, Line: row, Key: strings.Join(de.Key(), "."), Found: foundAt(data, row)}
	msg := strings.TrimPrefix(de.Error(), "toml: ")
	switch m1, m2 := typeMsg.FindStringSubmatch(msg), storeMsg.FindStringSubmatch(msg); {
	case m1 != nil:
		pe.Problem = fmt.Sprintf("wrong type: TOML %s where %s is expected", m1[1], typeWords(m1[2]))
	case m2 != nil:
		pe.Problem = fmt.Sprintf("wrong type: TOML %s where %s is expected", m2[1], typeWords(m2[2]))
	case strings.Contains(msg, "strconv.Parse") || strings.HasPrefix(msg, "unable to parse"):
		pe.Problem = "not a number TOML can read, or out of the range of a 64-bit float (e.g. 0.9, -3, 6.4e3)"
	case strings.Contains(msg, "too large to fit"):
		pe.Problem = "whole number too large"
	case strings.Contains(msg, "already defined") || strings.Contains(msg, "already exists"):
		pe.Problem = "given twice"
		if pe.Key != "" && !strings.Contains(pe.Key, ".") {
			pe.Key = sectionAt(data, row, pe.Key)
		}
	default:
		pe.Problem = Cut(msg)
	}
	return pe
}

// foundAt returns the text of the value at line row (1-based) of data:
// what follows the first "=" on the line, or the line itself, trimmed
// and cut to MaxValueLen characters.
func foundAt(data []byte, row int) string {
	lines := bytes.Split(data, []byte("\n"))
	if row < 1 || row > len(lines) {
		return ""
	}
	line := string(bytes.TrimSpace(lines[row-1]))
	if i := strings.Index(line, "="); i >= 0 && !strings.HasPrefix(line, "[") {
		line = strings.TrimSpace(line[i+1:])
	}
	return Cut(line)
}

// sectionAt prefixes key, found at line row (1-based), with the
// [section] in force there, unless that line is itself a table header.
func sectionAt(data []byte, row int, key string) string {
	lines := bytes.Split(data, []byte("\n"))
	header := func(i int) (string, bool) {
		l := strings.TrimSpace(string(lines[i]))
		return strings.Trim(l, "[] "), strings.HasPrefix(l, "[")
	}
	if row < 1 || row > len(lines) {
		return key
	}
	if _, ok := header(row - 1); ok {
		return key
	}
	for i := row - 2; i >= 0; i-- {
		if sec, ok := header(i); ok {
			return sec + "." + key
		}
	}
	return key
}

// validKeys lists the keys of the section of key (or the sections).
func validKeys(key []string) string {
	if len(key) > 1 && key[0] == "lines" {
		return strings.Join(lineKeys, ", ")
	}
	if len(key) > 1 {
		var out []string
		for _, f := range Fields() {
			if sec, k, _ := strings.Cut(f.Key, "."); sec == key[0] {
				out = append(out, k)
			}
		}
		if len(out) > 0 {
			return strings.Join(out, ", ")
		}
	}
	var secs []string
	for _, f := range Fields() {
		sec, _, _ := strings.Cut(f.Key, ".")
		if len(secs) == 0 || secs[len(secs)-1] != "["+sec+"]" {
			secs = append(secs, "["+sec+"]")
		}
	}
	return strings.Join(append(secs, "[[lines]]"), ", ")
}

// Resolved holds the scene's derived quantities, all validated.
type Resolved struct {
	Scene
	Horizon   float64 // r₊
	ISCO      float64
	Inner     float64 // effective inner edge of the emitting disk
	PixelSize float64 // M per pixel
	MinKeV    float64
	MaxKeV    float64
	// MicroArcsecPerM is the angle one M subtends, if mass and distance are given (else 0).
	MicroArcsecPerM  float64
	BandMin, BandMax float64 // band of source radii to locate, M
	Gas              Gas
	Emissivity       Emissivity
	Limb             Limb
	// Polar is the validated polarisation model (always resolved; the
	// renderer uses it for the polarisation map and when
	// polarisation.sin_power makes the intensity depend on the field).
	Polar PolarisationModel
	// RestLines are the rest lines the disk emits: emission.line_kev, or
	// the line list.
	RestLines RestLines

	// GravRadiusCm (GM/c²) and DistanceCm are in cm, if mass and distance
	// are given (else 0).
	GravRadiusCm, DistanceCm float64
	// PhotonRate is Ṅ, the line photons emitted per second, and
	// PhotonNorm the factor that turns ε(r) × limb into the comoving
	// photon number intensity (resolvePhotonRate in flux.go), when
	// emission.line_luminosity_erg_s is given (else 0).
	PhotonRate, PhotonNorm float64
	// Thermal is the disk's thermal continuum, when the scene gives an
	// accretion rate ([thermal]; else off).
	Thermal ThermalDisk
	// AutoField is set when the scene leaves the field of view automatic
	// (Screen.FieldOfView = AutoField). Resolve then gives the window a
	// provisional field, ImageBox around the hole as seen from the centre,
	// which holds every image of the disk; the renderer tightens it to the
	// disk's image (render/pixels.FrameWindow) and clears the flag.
	// AutoCenter is set when, in addition, the centre is neither given nor
	// moved from 0: the renderer chooses the centre too.
	AutoField, AutoCenter bool
}

// AutoField is the value of Screen.FieldOfView that asks for an automatic
// window: the whole disk image with a small margin.
const AutoField = 0.0

// MaxAutoField is the largest automatic field of view, in M: the largest
// field a scene may give, so that the effective scene the renderer
// records loads again. A disk whose image is wider (outer_radius above
// about 4.8e6 M) is clipped, which the renderer reports.
const MaxAutoField = MaxLength

// Automatic reports whether the value of key is left to the renderer:
// the field of view when it is AutoField, and the window centre too when
// it is neither given nor moved from 0 (Resolved.AutoCenter). Help texts
// show such a default as "automatic".
func (s Scene) Automatic(key string) bool {
	sc := s.Screen
	switch key {
	case "screen.field_of_view":
		return sc.FieldOfView == AutoField
	case "screen.center_alpha", "screen.center_beta":
		return sc.FieldOfView == AutoField && sc.CenterAlpha == 0 && sc.CenterBeta == 0 &&
			!s.isGiven("screen.center_alpha") && !s.isGiven("screen.center_beta")
	}
	return false
}

// ImageBox returns the half-size, in M, of a square around the hole
// (α = β = 0) that holds every image of the disk, of every order and both
// faces: 1.15 r_out + 10 M. Light from radius r reaches the observer at an
// impact parameter b = r sin ψ / sqrt(1 − 2M/r), ψ its angle to the
// radial direction in the static frame (exact for Schwarzschild;
// Beloborodov 2002, ApJ 566, L85), so b ≤ r / sqrt(1 − 2M/r): about r + M
// for r ≫ M and at most 1.74 r for r ≥ 3 M. Light from inside 3 M that
// escapes, and every higher-order image, arrives just outside the critical
// curve, within about 7 M of the hole for any spin and inclination
// (Bardeen 1973: α from −2 to 7 M for a → 1 seen edge-on; value from
// memory), and frame dragging shifts images sideways by no more than the
// curve's own offset, about 2 M. 15 % and 10 M more than the disk's
// radius cover all of these with room to spare (common practice).
func (r Resolved) ImageBox() float64 {
	return 1.15*r.Disk.OuterRadius + 10
}

// WithWindow returns r with the window field (M, horizontal) centred on
// (alpha, beta), a concrete window: AutoField and AutoCenter are cleared
// and the pixel size follows. The values are not validated; the renderer
// calls it with windows it chose.
func (r Resolved) WithWindow(field, alpha, beta float64) Resolved {
	r.Screen.FieldOfView, r.Screen.CenterAlpha, r.Screen.CenterBeta = field, alpha, beta
	r.PixelSize = field / float64(r.Screen.Width)
	r.AutoField, r.AutoCenter = false, false
	return r
}

// Limits on what one render may ask for.
const (
	MaxPixels = 16384
	MaxOrders = 16
	MaxBins   = 1 << 20
	MaxDepth  = 12
)

// Allowed ranges of the physical values. Together with the emissivity
// bound (Emissivity.IndexLimits) they keep every derived quantity finite: the float32
// records (largest 3.4e38) of g, r and of g³ε × limb and g⁴ε × limb summed
// over the orders, the float64 spectrum and its bin edges, the figure
// axes and the FITS header values.
const (
	// MaxLength bounds every length and screen coordinate, in M: disk
	// edges, break radius, field of view, window centre.
	MaxLength = 1e7
	// MinLineKeV and MaxLineKeV bound the line's rest energy: 1 meV to
	// 1 GeV.
	MinLineKeV, MaxLineKeV = 1e-6, 1e6
	// MaxEnergyRatio bounds the spectrum's upper end, as a multiple of
	// the line energy (disk gas shifts a line by a factor of a few at
	// most, so higher energies stay empty).
	MaxEnergyRatio = 1000
	// MinEnergySpan is the smallest width of the energy range, relative
	// to its upper end: with up to MaxBins bins the bin edges stay
	// distinct in float64 and the spectrum's axis can be labelled.
	MinEnergySpan = 1e-6
	// MinFWHMeV is the smallest non-zero instrument resolution in eV
	// (its Gaussian width stays a normal float64); the largest is the
	// line energy itself.
	MinFWHMeV = 1e-6
	// MinMassSolar and MaxMassSolar bound the mass in solar masses.
	MinMassSolar, MaxMassSolar = 1e-10, 1e15
	// MinDistanceKpc and MaxDistanceKpc bound the distance in kpc (1e-12
	// kpc is about 31 km; 1e10 kpc is beyond the Hubble distance).
	MinDistanceKpc, MaxDistanceKpc = 1e-12, 1e10
)

// Resolve validates the scene and computes its derived quantities. A
// refused value gives a *FieldError naming the scene key (its flag is the
// same key after the dot, as listed by Fields), the value and the allowed
// range; when two values are refused together (inner and outer edge,
// lower and upper energy, band ends) the error names the one the user
// set. Resolve reads nothing from the machine: the same scene gives the
// same answer everywhere.
func (s Scene) Resolve() (Resolved, error) {
	var r Resolved
	r.Scene = s
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	// pick returns a unless only b was given by the user.
	pick := func(a, b string) string {
		if s.isGiven(b) && !s.isGiven(a) {
			return b
		}
		return a
	}
	a := s.Hole.Spin
	if err := raytrace.ValidSpin(a); err != nil {
		return r, fieldErr("black_hole.spin", a, "must be in -1 < spin < 1")
	}
	if h := s.Hole; h.MassSolar != nil || h.DistanceKpc != nil || h.DistanceMpc != nil {
		switch {
		case h.MassSolar == nil:
			return r, &FieldError{Key: "black_hole.mass_msun", Allowed: "needed with a distance, for angular axes (or give neither)"}
		case h.DistanceKpc == nil && h.DistanceMpc == nil:
			return r, &FieldError{Key: "black_hole.distance_kpc", Allowed: "a distance (distance_kpc or distance_mpc) is needed with mass_msun, for angular axes (or give neither)"}
		case h.DistanceKpc != nil && h.DistanceMpc != nil:
			return r, fieldErr("black_hole.distance_mpc", *h.DistanceMpc, "give distance_kpc or distance_mpc, not both")
		}
		if m := *h.MassSolar; !(m >= MinMassSolar && m <= MaxMassSolar) {
			return r, fieldErr("black_hole.mass_msun", m, "must be a mass from %g to %g solar masses", MinMassSolar, MaxMassSolar)
		}
		dkpc := 0.0
		if h.DistanceKpc != nil {
			dkpc = *h.DistanceKpc
			if !(dkpc >= MinDistanceKpc && dkpc <= MaxDistanceKpc) {
				return r, fieldErr("black_hole.distance_kpc", dkpc, "must be from %g to %g kpc", MinDistanceKpc, MaxDistanceKpc)
			}
		} else {
			dmpc := *h.DistanceMpc
			if !(dmpc >= MinDistanceKpc/1000 && dmpc <= MaxDistanceKpc/1000) {
				return r, fieldErr("black_hole.distance_mpc", dmpc, "must be from %g to %g Mpc", MinDistanceKpc/1000, MaxDistanceKpc/1000)
			}
			dkpc = dmpc * 1000
		}
		// GM_sun/c² = 1476.6250 m (IAU 2015 nominal GM_sun); 1 kpc = 3.0856776e19 m (IAU 2012 au, pc).
		const gmSunM, kpcM = 1476.6250385, 3.0856775814913673e19
		rad := *h.MassSolar * gmSunM / (dkpc * kpcM)
		r.MicroArcsecPerM = rad * 180 / math.Pi * 3600 * 1e6
		r.GravRadiusCm, r.DistanceCm = *h.MassSolar*gmSunM*100, dkpc*kpcM*100
	}
	if err := s.checkSky(); err != nil {
		return r, err
	}
	if inc := s.Observer.InclinationDeg; !(inc >= 0 && inc <= 180) {
		return r, fieldErr("observer.inclination_deg", inc, "must be between 0 and 180 degrees")
	}
	sc := s.Screen
	if sc.Width < 1 || sc.Width > MaxPixels {
		return r, fieldErr("screen.width", sc.Width, "must be between 1 and %d pixels", MaxPixels)
	}
	if sc.Height < 1 || sc.Height > MaxPixels {
		return r, fieldErr("screen.height", sc.Height, "must be between 1 and %d pixels", MaxPixels)
	}
	if !(sc.FieldOfView == AutoField || (sc.FieldOfView > 0 && sc.FieldOfView <= MaxLength)) {
		return r, fieldErr("screen.field_of_view", sc.FieldOfView, "must be a positive number of M, at most %g, or 0 for the automatic window", MaxLength)
	}
	if !(math.Abs(sc.CenterAlpha) <= MaxLength) {
		return r, fieldErr("screen.center_alpha", sc.CenterAlpha, "must be within ±%g M", MaxLength)
	}
	if !(math.Abs(sc.CenterBeta) <= MaxLength) {
		return r, fieldErr("screen.center_beta", sc.CenterBeta, "must be within ±%g M", MaxLength)
	}
	if sc.FieldOfView == AutoField {
		// The provisional window is set once the disk is known (below).
		r.AutoField = true
		r.AutoCenter = s.Automatic("screen.center_alpha")
	} else {
		r.PixelSize = sc.FieldOfView / float64(sc.Width)
		if r.PixelSize < 1e-13*math.Max(1, math.Abs(sc.CenterAlpha)+math.Abs(sc.CenterBeta)) {
			return r, fieldErr("screen.field_of_view", sc.FieldOfView, "over %d pixels is finer than floating point resolves at centre (%v, %v)", sc.Width, sc.CenterAlpha, sc.CenterBeta)
		}
	}
	d := s.Disk
	if d.Orders < 1 || d.Orders > MaxOrders {
		return r, fieldErr("disk.orders", d.Orders, "must be between 1 and %d", MaxOrders)
	}
	r.Horizon = raytrace.Horizon(a)
	r.ISCO = raytrace.ISCO(a)
	r.Inner = r.ISCO
	if d.Plunging {
		// Plunging gas fills the whole region inside the ISCO unless an
		// inner edge is given: the disk reaches the horizon (crossings
		// must lie outside it, r > r₊, where Gas.Redshift is defined).
		r.Inner = r.Horizon
	}
	if d.InnerRadius != nil {
		in := *d.InnerRadius
		if !(in > r.Horizon && in < MaxLength) {
			return r, fieldErr("disk.inner_radius", in, "must lie outside the horizon r+ = %.6g M and below %g M", r.Horizon, MaxLength)
		}
		r.Inner = in
		if in < r.ISCO && !d.Plunging {
			r.Inner = r.ISCO
		}
	}
	if !(d.OuterRadius > r.Inner && d.OuterRadius <= MaxLength) {
		if d.OuterRadius <= r.Inner && d.InnerRadius != nil && pick("disk.outer_radius", "disk.inner_radius") == "disk.inner_radius" {
			return r, fieldErr("disk.inner_radius", *d.InnerRadius, "must be smaller than disk.outer_radius = %v M", d.OuterRadius)
		}
		inner := fmt.Sprintf("the inner edge %.6g M", r.Inner)
		switch {
		case d.InnerRadius == nil && d.Plunging:
			inner = fmt.Sprintf("the inner edge, the horizon at %.6g M (disk.plunging without disk.inner_radius)", r.Inner)
		case d.InnerRadius == nil:
			inner = fmt.Sprintf("the inner edge, the ISCO at %.6g M", r.Inner)
		case r.Inner != *d.InnerRadius:
			inner = fmt.Sprintf("the inner edge, raised to the ISCO at %.6g M (disk.plunging lets gas inside it shine)", r.Inner)
		}
		return r, fieldErr("disk.outer_radius", d.OuterRadius, "must be larger than %s, at most %g M", inner, MaxLength)
	}
	em := s.Emission
	if !(em.LineKeV >= MinLineKeV && em.LineKeV <= MaxLineKeV) {
		return r, fieldErr("emission.line_kev", em.LineKeV, "must be a line energy from %g to %g keV", MinLineKeV, MaxLineKeV)
	}
	var err error
	if r.Emissivity, err = emissivityLaw(em, a, d.OuterRadius, mainEmissivityKeys); err != nil {
		return r, err
	}
	if r.Emissivity.Kind == Lamp {
		if err := r.resolveLamp(); err != nil {
			return r, err
		}
	}
	if err := r.Emissivity.Validate(); err != nil {
		return r, fieldErr("emission.emissivity", em.Emissivity, "%v", err)
	}
	lk, err := ParseLimbKind(em.Limb)
	if err != nil {
		return r, fieldErr("emission.limb", em.Limb, "must be one of %s", strings.Join(limbNames[Isotropic:], ", "))
	}
	r.Limb = Limb{Kind: lk}
	if err := r.resolveLines(); err != nil {
		return r, err
	}
	if err := r.resolvePhotonRate(); err != nil {
		return r, err
	}
	if err := r.resolveThermal(); err != nil {
		return r, err
	}
	if r.Polar, err = s.Polarisation.resolve(); err != nil {
		return r, err
	}
	if r.Gas, err = NewGas(a); err != nil {
		return r, fieldErr("black_hole.spin", a, "%v", err)
	}
	sp := s.Spectrum
	// With a line list the defaults and bounds follow its lowest and
	// highest lines.
	lo, hi, top := em.LineKeV, em.LineKeV, "emission.line_kev"
	if r.RestLines.List {
		lo, hi, top = r.RestLines.Lowest(), r.RestLines.Highest(), "the highest line energy"
	}
	r.MinKeV, r.MaxKeV = 0.2*lo, 1.8*hi
	if sp.MinKeV != nil {
		r.MinKeV = *sp.MinKeV
	}
	if sp.MaxKeV != nil {
		r.MaxKeV = *sp.MaxKeV
	}
	emax := MaxEnergyRatio * hi
	if !(r.MinKeV >= 0 && r.MinKeV < emax) {
		return r, fieldErr("spectrum.energy_min_kev", r.MinKeV, "must be from 0 to below %g × %s = %g keV", float64(MaxEnergyRatio), top, emax)
	}
	if !(r.MaxKeV > 0 && r.MaxKeV <= emax) {
		return r, fieldErr("spectrum.energy_max_kev", r.MaxKeV, "must be positive, at most %g × %s = %g keV", float64(MaxEnergyRatio), top, emax)
	}
	if !(r.MaxKeV-r.MinKeV >= MinEnergySpan*r.MaxKeV) {
		key, v := "spectrum.energy_max_kev", r.MaxKeV
		if pick(key, "spectrum.energy_min_kev") != key {
			key, v = "spectrum.energy_min_kev", r.MinKeV
		}
		return r, fieldErr(key, v, "need energy_min_kev < energy_max_kev, apart by at least %g of the upper end (here %g and %g keV)", MinEnergySpan, r.MinKeV, r.MaxKeV)
	}
	if sp.Bins < 1 || sp.Bins > MaxBins {
		return r, fieldErr("spectrum.bins", sp.Bins, "must be between 1 and %d", MaxBins)
	}
	if f := sp.FWHMeV; !(f == 0 || (f >= MinFWHMeV && f <= 1000*hi)) {
		return r, fieldErr("spectrum.instrument_fwhm_ev", f, "must be 0 (no instrument broadening) or from %g eV to the line energy, %g eV", MinFWHMeV, 1000*hi)
	}
	rf := s.Refine
	if rf.Depth < 0 || rf.Depth > MaxDepth {
		return r, fieldErr("refine.depth", rf.Depth, "must be between 0 (off) and %d", MaxDepth)
	}
	if !(rf.TolR > 0) || !finite(rf.TolR) {
		return r, fieldErr("refine.tolerance_r", rf.TolR, "must be a positive number")
	}
	if !(rf.TolG > 0) || !finite(rf.TolG) {
		return r, fieldErr("refine.tolerance_g", rf.TolG, "must be a positive number")
	}
	if r.BandMin, err = ParseRadius(s.Band.RMin, r); err != nil {
		return r, fieldErr("band.r_min", s.Band.RMin, "%v", err)
	}
	if r.BandMax, err = ParseRadius(s.Band.RMax, r); err != nil {
		return r, fieldErr("band.r_max", s.Band.RMax, "%v", err)
	}
	if !(r.BandMax > r.BandMin) {
		key, v := "band.r_max", s.Band.RMax
		if pick(key, "band.r_min") == "band.r_min" {
			key, v = "band.r_min", s.Band.RMin
		}
		return r, fieldErr(key, strconv.Quote(v), "need r_min < r_max (here %.6g and %.6g M)", r.BandMin, r.BandMax)
	}
	o := s.Output
	if strings.TrimSpace(o.Directory) == "" {
		return r, &FieldError{Key: "output.directory", Allowed: "is empty; give a folder to write into"}
	}
	if err := checkNames("output.maps", o.Maps, MapNames); err != nil {
		return r, err
	}
	for _, m := range o.Maps {
		for _, t := range ThermalMaps {
			if m == t && !r.Thermal.On {
				return r, fieldErr("output.maps", strconv.Quote(m), "needs a thermal disk: give thermal.eddington_ratio or thermal.accretion_rate_g_s (with mass and distance)")
			}
		}
	}
	if s.NeedsTiming() && s.Refine.Depth > 0 {
		return r, fmt.Errorf("output.maps includes delay with refine.depth = %d: the adaptive sampler does not record time delays; use refine.depth = 0", s.Refine.Depth)
	}
	if s.NeedsPolarisation() && s.Refine.Depth > 0 {
		return r, fmt.Errorf("output.maps includes %s with refine.depth = %d: the adaptive sampler does not record Stokes Q and U; use refine.depth = 0", PolarisationMap, s.Refine.Depth)
	}
	if err := checkNames("output.formats", o.Formats, FormatNames); err != nil {
		return r, err
	}
	if o.IntensityScale != "log" && o.IntensityScale != "linear" {
		return r, fieldErr("output.intensity_scale", strconv.Quote(o.IntensityScale), "must be log or linear")
	}
	if err := s.Scales.check(); err != nil {
		return r, err
	}
	if sc := s.Scales; sc.RadiusMin != nil && sc.RadiusMax == nil && !(*sc.RadiusMin < s.Disk.OuterRadius) {
		return r, fieldErr("scales.radius_min", *sc.RadiusMin, "must be below the disk's outer edge %v M (or give scales.radius_max too)", s.Disk.OuterRadius)
	}
	if sc := s.Scales; sc.RadiusMax != nil && sc.RadiusMin == nil && !(*sc.RadiusMax > r.Inner) {
		return r, fieldErr("scales.radius_max", *sc.RadiusMax, "must be above the disk's inner edge %.6g M (or give scales.radius_min too)", r.Inner)
	}
	if err := o.checkFigures(); err != nil {
		return r, err
	}
	if r.AutoField {
		r = r.provisionalWindow()
	}
	return r, nil
}

// provisionalWindow gives an automatic window the field that holds the
// square ImageBox around the hole, seen from the window's centre, with
// square pixels (at most MaxAutoField); the flags stay set.
func (r Resolved) provisionalWindow() Resolved {
	sc := r.Screen
	b := r.ImageBox()
	hw, hh := b+math.Abs(sc.CenterAlpha), b+math.Abs(sc.CenterBeta)
	field := math.Min(MaxAutoField, math.Max(2*hw, 2*hh*float64(sc.Width)/float64(sc.Height)))
	auto, center := r.AutoField, r.AutoCenter
	r = r.WithWindow(field, sc.CenterAlpha, sc.CenterBeta)
	r.AutoField, r.AutoCenter = auto, center
	return r
}

func checkNames(key string, got, valid []string) error {
	if len(got) == 0 {
		return &FieldError{Key: key, Allowed: "is empty (valid: " + strings.Join(valid, ", ") + ")"}
	}
	seen := map[string]bool{}
	for _, g := range got {
		ok := false
		for _, v := range valid {
			ok = ok || g == v
		}
		if !ok {
			return fieldErr(key, strconv.Quote(g), "unknown name (valid: %s)", strings.Join(valid, ", "))
		}
		if seen[g] {
			return fieldErr(key, strconv.Quote(g), "given twice")
		}
		seen[g] = true
	}
	return nil
}

// Has reports whether the output asks for a map or a format.
func (o Output) Has(name string) bool {
	for _, m := range append(append([]string(nil), o.Maps...), o.Formats...) {
		if m == name {
			return true
		}
	}
	return false
}

// TOML returns the scene as TOML text (the manifest form): every field,
// with defaults made explicit, in a fixed key order.
func (s Scene) TOML() ([]byte, error) {
	var b bytes.Buffer
	enc := toml.NewEncoder(&b)
	enc.SetIndentTables(false)
	if err := enc.Encode(s); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// Caption is the one-line description of the scene used in titles.
func (r Resolved) Caption() string {
	disk := "opaque"
	if !r.Disk.Opaque {
		disk = "transparent"
	}
	return fmt.Sprintf("a = %g, i = %g°, %s disk %.4g–%.4g M", r.Hole.Spin, r.Observer.InclinationDeg, disk, r.Inner, r.Disk.OuterRadius)
}

// ParseRadius reads a radius expression: a number of M, or "isco" or
// "horizon" optionally followed by "*x" (scaled), "+x" or "-x" (shifted by
// x M), e.g. "isco*1.1", "horizon+0.05", "3.5". The radius must come out
// between 0 and MaxLength M.
func ParseRadius(expr string, r Resolved) (float64, error) {
	v, err := parseRadius(expr, r)
	if err == nil && !(v >= 0 && v <= MaxLength) {
		return 0, fmt.Errorf("radius %.6g M: must be from 0 to %g M", v, MaxLength)
	}
	return v, err
}

func parseRadius(expr string, r Resolved) (float64, error) {
	const want = "want a number of M, or isco / horizon with an optional *x, +x or -x"
	e := strings.ToLower(strings.ReplaceAll(expr, " ", ""))
	base := 0.0
	rest := e
	switch {
	case strings.HasPrefix(e, "isco"):
		base, rest = r.ISCO, e[4:]
	case strings.HasPrefix(e, "horizon"):
		base, rest = r.Horizon, e[7:]
	default:
		v, err := strconv.ParseFloat(e, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, errors.New(want)
		}
		return v, nil
	}
	if rest == "" {
		return base, nil
	}
	v, err := strconv.ParseFloat(rest[1:], 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("cannot read %q: %s", Cut(rest), want)
	}
	switch rest[0] {
	case '*':
		return base * v, nil
	case '+':
		return base + v, nil
	case '-':
		return base - v, nil
	}
	return 0, fmt.Errorf("after %s use *x, +x or -x", e[:len(e)-len(rest)])
}

// checkFigures validates the keys that shape the decorated figures.
func (o Output) checkFigures() error {
	choice := func(key, v string, valid ...string) error {
		for _, w := range valid {
			if v == w {
				return nil
			}
		}
		return fieldErr(key, strconv.Quote(v), "must be %s", strings.Join(valid, " or "))
	}
	for _, c := range []struct {
		key, v string
		valid  []string
	}{
		{"output.column", o.Column, []string{"single", "double"}},
		{"output.redshift_scale", o.RedshiftScale, []string{"split", "linear"}},
		{"output.spectrum_axis", o.SpectrumAxis, []string{"linear", "log"}},
		{"output.spectrum_norm", o.SpectrumNorm, []string{"flux", "area", "peak"}},
	} {
		if err := choice(c.key, c.v, c.valid...); err != nil {
			return err
		}
	}
	if o.WidthMM != 0 && !(o.WidthMM >= MinFigureMM && o.WidthMM <= MaxFigureMM) {
		return fieldErr("output.width_mm", o.WidthMM, "must be 0 (use output.column) or %g to %g mm", MinFigureMM, MaxFigureMM)
	}
	if !(o.DPI >= MinDPI && o.DPI <= MaxDPI) {
		return fieldErr("output.dpi", o.DPI, "must be %g to %g dots per inch", MinDPI, MaxDPI)
	}
	if mm, dpi := o.FigureSize(); math.Round(mm/25.4*dpi) > MaxFigurePixels {
		return fieldErr("output.dpi", o.DPI, "makes a %g mm figure %.0f pixels wide, more than %d; lower output.dpi or output.width_mm", mm, math.Round(mm/25.4*dpi), MaxFigurePixels)
	}
	return nil
}
