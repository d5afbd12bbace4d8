package live

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"kerrscope/render/maps"
	"kerrscope/scene"
)

// ParamError is a request value that is refused: the parameter (a scene
// flag name, or a view setting), the scene key when it is a scene value,
// the value found (cut to scene.MaxValueLen) and what is allowed. It is
// what the page shows beside the control.
type ParamError struct {
	Param   string `json:"param"`
	Key     string `json:"key,omitempty"`
	Value   string `json:"value,omitempty"`
	Allowed string `json:"allowed"`
}

// Error reads like the command line's: "--spin: black_hole.spin = 1.5:
// must be in -1 < spin < 1" for a scene value, "map = x: …" otherwise.
func (e *ParamError) Error() string {
	name := e.Param
	if e.Key != "" {
		name = e.Key
	}
	msg := name + ": " + e.Allowed
	if e.Value != "" {
		msg = name + " = " + e.Value + ": " + e.Allowed
	}
	if e.Key != "" && e.Param != "" {
		msg = "--" + e.Param + ": " + msg
	}
	return msg
}

// viewOnly are the scene flags the page does not take: where and what the
// command-line render writes, and the hot spot of the spot command. The
// output folder of a render from the page is chosen by the server.
var viewOnly = []string{"out", "maps", "formats"}

// sceneFields returns the scene fields the page may set, by flag name, in
// the order of scene.Fields.
func sceneFields() []scene.Field {
	var out []scene.Field
	for _, f := range scene.Fields() {
		if slices.Contains(viewOnly, f.Flag) || strings.HasPrefix(f.Key, "spot.") {
			continue
		}
		out = append(out, f)
	}
	return out
}

// flagOfKey returns the flag of a scene key ("" if none).
func flagOfKey(key string) string {
	for _, f := range scene.Fields() {
		if f.Key == key {
			return f.Flag
		}
	}
	return ""
}

// paramErr turns an error of the scene layer into a *ParamError naming the
// flag and key; other errors are kept as they are.
func paramErr(err error) error {
	var fe *scene.FieldError
	if errors.As(err, &fe) {
		return &ParamError{Param: flagOfKey(fe.Key), Key: fe.Key, Value: fe.Value, Allowed: fe.Allowed}
	}
	return err
}

// MaxParams bounds the number of values in one request.
const MaxParams = 128

// applyParams sets the scene values of params (flag name → text, as on the
// command line) on a copy of base, in the order of scene.Fields, each with
// scene.Field.Set; a blank value leaves base's. The scene is not resolved.
func applyParams(base scene.Scene, params map[string]string) (scene.Scene, error) {
	if len(params) > MaxParams {
		return base, &ParamError{Param: "params", Value: strconv.Itoa(len(params)), Allowed: fmt.Sprintf("at most %d values", MaxParams)}
	}
	fields := sceneFields()
	for name := range params {
		if !slices.ContainsFunc(fields, func(f scene.Field) bool { return f.Flag == name }) {
			names := make([]string, len(fields))
			for i, f := range fields {
				names[i] = f.Flag
			}
			return base, &ParamError{Param: scene.Cut(name), Allowed: "unknown parameter (known: " + strings.Join(names, ", ") + ")"}
		}
	}
	s := base
	for _, f := range fields {
		v, ok := params[f.Flag]
		if !ok || strings.TrimSpace(v) == "" {
			continue
		}
		if err := f.Set(&s, v); err != nil {
			return base, paramErr(err)
		}
	}
	return s, nil
}

// resolve applies params to base and validates the scene (scene.Resolve).
func resolve(base scene.Scene, params map[string]string) (scene.Resolved, error) {
	s, err := applyParams(base, params)
	if err != nil {
		return scene.Resolved{}, err
	}
	r, err := s.Resolve()
	if err != nil {
		return r, paramErr(err)
	}
	return r, nil
}

// Settings are the page's own choices, which are not part of the scene:
// the map shown, the overlays and the colour scales.
type Settings struct {
	Map string `json:"map"`
	// Size is the view's larger side in pixels (the other follows the
	// scene's aspect); 0: the server's default.
	Size int `json:"size"`
	// Band overlays where the scene's band of source radii lands (the
	// report of pixels.Frame.LocateBand).
	Band bool `json:"band"`
	// GMin, GMax fix the redshift colours; blank: from the view.
	GMin string `json:"gmin"`
	GMax string `json:"gmax"`
	// Decades of a log intensity scale; blank: 4.
	Decades string `json:"decades"`
	// Order shows one image order alone ("0", "1", …); blank or "all":
	// every order, as the maps of a render show them.
	Order string `json:"order"`
}

// order reads the image order to show alone (-1: all) for a scene
// following orders image orders.
func (s Settings) order(orders int) (int, error) {
	v := strings.TrimSpace(s.Order)
	if v == "" || v == "all" {
		return -1, nil
	}
	n, err := strconv.Atoi(v)
	if err != nil || n < 0 || n >= orders {
		return 0, &ParamError{Param: "order", Value: scene.Cut(v), Allowed: fmt.Sprintf("all, or an image order from 0 to %d (the scene follows %d)", orders-1, orders)}
	}
	return n, nil
}

// Colour scale limits the page accepts.
const (
	MinDecades, MaxDecades = 0.5, 12
	MaxGScale              = 100
)

// scales reads the colour settings into maps.Scales (zero fields: chosen
// from the frame).
func (s Settings) scales() (maps.Scales, error) {
	var sc maps.Scales
	read := func(name, v string) (float64, bool, error) {
		v = strings.TrimSpace(v)
		if v == "" {
			return 0, false, nil
		}
		x, err := strconv.ParseFloat(v, 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, false, &ParamError{Param: name, Value: scene.Cut(v), Allowed: "not a finite number"}
		}
		return x, true, nil
	}
	gmin, okMin, err := read("gmin", s.GMin)
	if err != nil {
		return sc, err
	}
	gmax, okMax, err := read("gmax", s.GMax)
	if err != nil {
		return sc, err
	}
	switch {
	case okMin != okMax:
		return sc, &ParamError{Param: "gmin", Allowed: "give both ends of the redshift scale, or neither (automatic)"}
	case okMin && !(gmin > 0 && gmin < 1):
		return sc, &ParamError{Param: "gmin", Value: strconv.FormatFloat(gmin, 'g', -1, 64), Allowed: "must be in 0 < g < 1"}
	case okMax && !(gmax > 1 && gmax <= MaxGScale):
		return sc, &ParamError{Param: "gmax", Value: strconv.FormatFloat(gmax, 'g', -1, 64), Allowed: fmt.Sprintf("must be in 1 < g ≤ %g", float64(MaxGScale))}
	}
	sc.GMin, sc.GMax = gmin, gmax
	dec, ok, err := read("decades", s.Decades)
	if err != nil {
		return sc, err
	}
	if ok && !(dec >= MinDecades && dec <= MaxDecades) {
		return sc, &ParamError{Param: "decades", Value: strconv.FormatFloat(dec, 'g', -1, 64), Allowed: fmt.Sprintf("must be from %g to %g", MinDecades, float64(MaxDecades))}
	}
	sc.IDecades = dec
	return sc, nil
}

// mapOf returns the map the settings name (the first map by default).
func (s Settings) mapOf() (maps.Map, error) {
	name := s.Map
	if name == "" {
		name = maps.Names()[0]
	}
	m, err := maps.Lookup(name)
	if err != nil {
		return m, &ParamError{Param: "map", Value: scene.Cut(name), Allowed: "unknown map (maps: " + strings.Join(maps.Names(), ", ") + ")"}
	}
	return m, nil
}

// Initial is one control's starting value: the scene flag, its scene key,
// its text on the command line, whether it is a switch, and its usage.
type Initial struct {
	Flag      string `json:"flag"`
	Key       string `json:"key"`
	Value     string `json:"value"`
	Bool      bool   `json:"bool,omitempty"`
	Usage     string `json:"usage"`
	Automatic bool   `json:"automatic,omitempty"`
}

// initials lists the values of base for every field the page may set.
// A switch is on when setting it leaves base as it is.
func initials(base scene.Scene) []Initial {
	vals := base.Values()
	var out []Initial
	for _, f := range sceneFields() {
		in := Initial{Flag: f.Flag, Key: f.Key, Usage: f.Usage, Bool: f.Bool, Value: vals[f.Key], Automatic: base.Automatic(f.Key)}
		if f.Bool {
			on := base
			in.Value = "false"
			if f.Set(&on, "true") == nil && sameTOML(on, base) {
				in.Value = "true"
			}
		}
		out = append(out, in)
	}
	return out
}

func sameTOML(a, b scene.Scene) bool {
	ta, errA := a.TOML()
	tb, errB := b.TOML()
	return errA == nil && errB == nil && string(ta) == string(tb)
}
