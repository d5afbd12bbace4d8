package scene

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"

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
	Output   Output   `toml:"output"`
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
}

// Observer is the distant observer.
type Observer struct {
	InclinationDeg float64 `toml:"inclination_deg"` // from the spin axis, 0–180
}

// Screen is the observer's pixel grid: Width × Height pixels spanning
// FieldOfView M horizontally (square pixels), centred on (CenterAlpha,
// CenterBeta).
type Screen struct {
	Width       int     `toml:"width"`
	Height      int     `toml:"height"`
	FieldOfView float64 `toml:"field_of_view"` // M, horizontal
	CenterAlpha float64 `toml:"center_alpha"`  // M
	CenterBeta  float64 `toml:"center_beta"`   // M
}

// Disk is the thin equatorial disk.
type Disk struct {
	// InnerRadius is the inner edge in M; nil means the ISCO. Inside the
	// ISCO gas shines only when Plunging is set (otherwise the edge is
	// raised to the ISCO).
	InnerRadius *float64 `toml:"inner_radius,omitempty"`
	OuterRadius float64  `toml:"outer_radius"`
	Opaque      bool     `toml:"opaque"` // stop at the first landing; else every crossing adds light
	Orders      int      `toml:"orders"` // image orders to follow
	Plunging    bool     `toml:"plunging"`
}

// Emission is the line and how the disk emits it.
type Emission struct {
	LineKeV    float64 `toml:"line_kev"`
	Emissivity string  `toml:"emissivity"` // powerlaw, broken, novikov-thorne
	Index      float64 `toml:"index"`      // powerlaw q
	IndexInner float64 `toml:"index_inner"`
	IndexOuter float64 `toml:"index_outer"`
	BreakRad   float64 `toml:"break_radius"`
	Limb       string  `toml:"limb"` // isotropic, laor
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
}

// Map names and format names accepted in Output.
var (
	MapNames    = []string{"redshift", "intensity", "radius", "order", "shadow"}
	FormatNames = []string{"png", "bare", "fits", "csv"}
)

// Default returns the built-in default scene.
func Default() Scene {
	return Scene{
		Hole:     Hole{Spin: 0.9},
		Observer: Observer{InclinationDeg: 60},
		Screen:   Screen{Width: 512, Height: 512, FieldOfView: 40},
		Disk:     Disk{OuterRadius: 30, Opaque: true, Orders: 3},
		Emission: Emission{LineKeV: 6.4, Emissivity: "powerlaw", Index: DefaultPowerLawIndex,
			IndexInner: 6, IndexOuter: 3, BreakRad: 6, Limb: "isotropic"},
		Spectrum: Spectrum{Bins: 240},
		Refine:   Refine{Depth: 0, TolR: 0.05, TolG: 0.01},
		Band:     Band{RMin: "isco", RMax: "isco*1.1"},
		Output: Output{Directory: "kerrscope-out", Maps: append([]string(nil), MapNames...),
			Formats: append([]string(nil), FormatNames...), IntensityScale: "log"},
	}
}

// Load reads a scene file over the defaults. Unknown keys and wrong types
// are errors naming the key and the line.
func Load(path string) (Scene, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return Scene{}, err
	}
	return Parse(path, data)
}

// Parse decodes TOML scene text (name is used in error messages) over
// the defaults.
func Parse(name string, data []byte) (Scene, error) {
	s := Default()
	// Lists replace the defaults rather than merge with them.
	s.Output.Maps, s.Output.Formats = nil, nil
	d := toml.NewDecoder(bytes.NewReader(data))
	d.DisallowUnknownFields()
	if err := d.Decode(&s); err != nil {
		return Scene{}, tomlError(name, err)
	}
	def := Default()
	if s.Output.Maps == nil {
		s.Output.Maps = def.Output.Maps
	}
	if s.Output.Formats == nil {
		s.Output.Formats = def.Output.Formats
	}
	return s, nil
}

var typeMsg = regexp.MustCompile(`cannot decode TOML (\w+) into .* of type (\S+)`)

// tomlError rewrites a decoder error as "file:line: key k: problem".
func tomlError(name string, err error) error {
	var sm *toml.StrictMissingError
	if errors.As(err, &sm) && len(sm.Errors) > 0 {
		var lines []string
		for _, e := range sm.Errors {
			row, _ := e.Position()
			lines = append(lines, fmt.Sprintf("%s:%d: unknown key %q", name, row, strings.Join(e.Key(), ".")))
		}
		return errors.New(strings.Join(lines, "; "))
	}
	var de *toml.DecodeError
	if errors.As(err, &de) {
		row, _ := de.Position()
		msg := de.Error()
		if m := typeMsg.FindStringSubmatch(msg); m != nil {
			want := map[string]string{"float64": "a number", "int": "a whole number", "bool": "true or false",
				"string": "a string", "[]string": "a list of strings"}[strings.TrimPrefix(m[2], "*")]
			if want == "" {
				want = m[2]
			}
			msg = fmt.Sprintf("wrong type: TOML %s where %s is expected", m[1], want)
		} else {
			msg = strings.TrimPrefix(msg, "toml: ")
		}
		if k := de.Key(); len(k) > 0 {
			return fmt.Errorf("%s:%d: key %q: %s", name, row, strings.Join(k, "."), msg)
		}
		return fmt.Errorf("%s:%d: %s", name, row, msg)
	}
	return fmt.Errorf("%s: %v", name, err)
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
}

// Limits on what one render may ask for.
const (
	MaxPixels = 16384
	MaxOrders = 16
	MaxBins   = 1 << 20
)

// BytesPerPixel estimates the renderer's peak memory per pixel for n
// orders with every output: the records (2 + 16n bytes) and the output
// stage's images (about 18 bytes), as measured (README, "Speed").
func BytesPerPixel(orders int) int64 { return int64(20 + 16*orders) }

// Resolve validates the scene and computes its derived quantities. The
// messages name the scene key (its flag is the same key after the dot, as
// listed by Fields).
func (s Scene) Resolve() (Resolved, error) {
	var r Resolved
	r.Scene = s
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	a := s.Hole.Spin
	if err := raytrace.ValidSpin(a); err != nil {
		return r, fmt.Errorf("black_hole.spin = %v: must be in -1 < spin < 1", a)
	}
	if h := s.Hole; h.MassSolar != nil || h.DistanceKpc != nil || h.DistanceMpc != nil {
		if h.MassSolar == nil || (h.DistanceKpc == nil && h.DistanceMpc == nil) {
			return r, errors.New("black_hole: give both mass_msun and a distance (distance_kpc or distance_mpc) for angular axes, or neither")
		}
		if h.DistanceKpc != nil && h.DistanceMpc != nil {
			return r, errors.New("black_hole: give distance_kpc or distance_mpc, not both")
		}
		if m := *h.MassSolar; !(m > 0) || !finite(m) {
			return r, fmt.Errorf("black_hole.mass_msun = %v: must be a positive number", m)
		}
		dkpc := 0.0
		if h.DistanceKpc != nil {
			dkpc = *h.DistanceKpc
		} else {
			dkpc = *h.DistanceMpc * 1000
		}
		if !(dkpc > 0) || !finite(dkpc) {
			return r, fmt.Errorf("black_hole: distance must be a positive number")
		}
		// GM_sun/c² = 1476.6250 m (IAU 2015 nominal GM_sun); 1 kpc = 3.0856776e19 m (IAU 2012 au, pc).
		const gmSunM, kpcM = 1476.6250385, 3.0856775814913673e19
		rad := *h.MassSolar * gmSunM / (dkpc * kpcM)
		r.MicroArcsecPerM = rad * 180 / math.Pi * 3600 * 1e6
	}
	if inc := s.Observer.InclinationDeg; !(inc >= 0 && inc <= 180) {
		return r, fmt.Errorf("observer.inclination_deg = %v: must be between 0 and 180 degrees", inc)
	}
	sc := s.Screen
	if sc.Width < 1 || sc.Width > MaxPixels || sc.Height < 1 || sc.Height > MaxPixels {
		return r, fmt.Errorf("screen.width × screen.height = %d × %d: each must be between 1 and %d pixels", sc.Width, sc.Height, MaxPixels)
	}
	if !(sc.FieldOfView > 0) || !finite(sc.FieldOfView) || sc.FieldOfView > 1e7 {
		return r, fmt.Errorf("screen.field_of_view = %v: must be a positive number of M, at most 1e7", sc.FieldOfView)
	}
	if !finite(sc.CenterAlpha) || !finite(sc.CenterBeta) || math.Abs(sc.CenterAlpha) > 1e7 || math.Abs(sc.CenterBeta) > 1e7 {
		return r, fmt.Errorf("screen.center_alpha/center_beta = (%v, %v): must be finite, within ±1e7 M", sc.CenterAlpha, sc.CenterBeta)
	}
	r.PixelSize = sc.FieldOfView / float64(sc.Width)
	if r.PixelSize < 1e-13*math.Max(1, math.Abs(sc.CenterAlpha)+math.Abs(sc.CenterBeta)) {
		return r, fmt.Errorf("screen.field_of_view = %v over %d pixels is finer than floating point resolves at centre (%v, %v)", sc.FieldOfView, sc.Width, sc.CenterAlpha, sc.CenterBeta)
	}
	d := s.Disk
	if d.Orders < 1 || d.Orders > MaxOrders {
		return r, fmt.Errorf("disk.orders = %d: must be between 1 and %d", d.Orders, MaxOrders)
	}
	need := int64(sc.Width) * int64(sc.Height) * BytesPerPixel(d.Orders)
	if avail := availableMemory(); need > avail {
		return r, fmt.Errorf("screen %d × %d with %d orders needs about %.1f GiB, more than the %.1f GiB this machine has free",
			sc.Width, sc.Height, d.Orders, float64(need)/(1<<30), float64(avail)/(1<<30))
	}
	r.Horizon = raytrace.Horizon(a)
	r.ISCO = raytrace.ISCO(a)
	r.Inner = r.ISCO
	if d.InnerRadius != nil {
		in := *d.InnerRadius
		if !finite(in) || !(in > r.Horizon) {
			return r, fmt.Errorf("disk.inner_radius = %v: must lie outside the horizon r+ = %.6g M", in, r.Horizon)
		}
		r.Inner = in
		if in < r.ISCO && !d.Plunging {
			r.Inner = r.ISCO
		}
	}
	if !finite(d.OuterRadius) || !(d.OuterRadius > r.Inner) {
		return r, fmt.Errorf("disk.outer_radius = %v: must be larger than the inner edge %.6g M", d.OuterRadius, r.Inner)
	}
	em := s.Emission
	if !(em.LineKeV > 0) || !finite(em.LineKeV) {
		return r, fmt.Errorf("emission.line_kev = %v: must be a positive energy in keV", em.LineKeV)
	}
	kind, err := ParseEmissivityKind(em.Emissivity)
	if err != nil {
		return r, fmt.Errorf("emission.emissivity: %v", err)
	}
	r.Emissivity = Emissivity{Kind: kind, Q: em.Index, QIn: em.IndexInner, QOut: em.IndexOuter, RBreak: em.BreakRad, Spin: a}
	if err := r.Emissivity.Validate(); err != nil {
		return r, fmt.Errorf("emission: %v", err)
	}
	lk, err := ParseLimbKind(em.Limb)
	if err != nil {
		return r, fmt.Errorf("emission.limb: %v", err)
	}
	r.Limb = Limb{Kind: lk}
	if r.Gas, err = NewGas(a); err != nil {
		return r, err
	}
	sp := s.Spectrum
	r.MinKeV, r.MaxKeV = 0.2*em.LineKeV, 1.8*em.LineKeV
	if sp.MinKeV != nil {
		r.MinKeV = *sp.MinKeV
	}
	if sp.MaxKeV != nil {
		r.MaxKeV = *sp.MaxKeV
	}
	if !finite(r.MinKeV) || !finite(r.MaxKeV) || r.MinKeV < 0 || !(r.MaxKeV > r.MinKeV) {
		return r, fmt.Errorf("spectrum.energy_min_kev, energy_max_kev = %v, %v: need 0 ≤ min < max", r.MinKeV, r.MaxKeV)
	}
	if sp.Bins < 1 || sp.Bins > MaxBins {
		return r, fmt.Errorf("spectrum.bins = %d: must be between 1 and %d", sp.Bins, MaxBins)
	}
	if !(sp.FWHMeV >= 0) || !finite(sp.FWHMeV) {
		return r, fmt.Errorf("spectrum.instrument_fwhm_ev = %v: must be ≥ 0 (0 = no instrument broadening)", sp.FWHMeV)
	}
	rf := s.Refine
	if rf.Depth < 0 || rf.Depth > 12 {
		return r, fmt.Errorf("refine.depth = %d: must be between 0 (off) and 12", rf.Depth)
	}
	if !(rf.TolR > 0) || !finite(rf.TolR) || !(rf.TolG > 0) || !finite(rf.TolG) {
		return r, fmt.Errorf("refine.tolerance_r, tolerance_g = %v, %v: must be positive", rf.TolR, rf.TolG)
	}
	if r.BandMin, err = ParseRadius(s.Band.RMin, r); err != nil {
		return r, fmt.Errorf("band.r_min: %v", err)
	}
	if r.BandMax, err = ParseRadius(s.Band.RMax, r); err != nil {
		return r, fmt.Errorf("band.r_max: %v", err)
	}
	if !(r.BandMax > r.BandMin) {
		return r, fmt.Errorf("band.r_min, r_max = %q, %q (%.6g, %.6g M): need r_min < r_max", s.Band.RMin, s.Band.RMax, r.BandMin, r.BandMax)
	}
	o := s.Output
	if strings.TrimSpace(o.Directory) == "" {
		return r, errors.New("output.directory is empty")
	}
	if err := checkNames("output.maps", o.Maps, MapNames); err != nil {
		return r, err
	}
	if err := checkNames("output.formats", o.Formats, FormatNames); err != nil {
		return r, err
	}
	if o.IntensityScale != "log" && o.IntensityScale != "linear" {
		return r, fmt.Errorf("output.intensity_scale = %q: must be log or linear", o.IntensityScale)
	}
	return r, nil
}

func checkNames(key string, got, valid []string) error {
	if len(got) == 0 {
		return fmt.Errorf("%s is empty (valid: %s)", key, strings.Join(valid, ", "))
	}
	seen := map[string]bool{}
	for _, g := range got {
		ok := false
		for _, v := range valid {
			ok = ok || g == v
		}
		if !ok {
			return fmt.Errorf("%s: unknown name %q (valid: %s)", key, g, strings.Join(valid, ", "))
		}
		if seen[g] {
			return fmt.Errorf("%s: %q given twice", key, g)
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

// availableMemory reads MemAvailable from /proc/meminfo, or assumes 4 GiB.
func availableMemory() int64 {
	data, err := os.ReadFile("/proc/meminfo")
	if err == nil {
		for _, line := range strings.Split(string(data), "\n") {
			var kb int64
			if n, _ := fmt.Sscanf(line, "MemAvailable: %d kB", &kb); n == 1 {
				return kb * 1024
			}
		}
	}
	return 4 << 30
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
// "horizon" optionally followed by "*x" (scaled) or "+x" (shifted by x M),
// e.g. "isco*1.1", "horizon+0.05", "3.5".
func ParseRadius(expr string, r Resolved) (float64, error) {
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
			return 0, fmt.Errorf("radius %q: want a number, or isco / horizon with an optional *x or +x", expr)
		}
		return v, nil
	}
	if rest == "" {
		return base, nil
	}
	v, err := strconv.ParseFloat(rest[1:], 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("radius %q: cannot read %q", expr, rest)
	}
	switch rest[0] {
	case '*':
		return base * v, nil
	case '+':
		return base + v, nil
	case '-':
		return base - v, nil
	}
	return 0, fmt.Errorf("radius %q: after %s use *x, +x or -x", expr, e[:len(e)-len(rest)])
}
