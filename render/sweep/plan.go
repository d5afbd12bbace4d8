package sweep

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Plan is a validated sweep: the base scene, the axes, the colour scales
// fixed by the user and every frame's resolved scene. Frame k of a grid
// of two axes has values (axis 0 value k / n1, axis 1 value k mod n1):
// the first axis is the outer one.
type Plan struct {
	Base   scene.Scene
	Axes   []Axis
	Fixed  maps.Scales // zero fields are chosen by a low-resolution pre-pass
	Points []Point

	spot *spotMovie // a hot-spot movie in observer time (NewSpotPlan)
}

// Point is one frame of a plan.
type Point struct {
	Index  int
	Values []float64 // one per axis
	Scene  scene.Resolved
}

// PointError reports a frame whose scene is invalid.
type PointError struct {
	Index int
	Label string // the frame's swept values, "key = value, ..."
	Err   error
}

func (e *PointError) Error() string {
	return fmt.Sprintf("frame %d (%s): %v", e.Index, e.Label, e.Err)
}

// Unwrap returns the scene's error.
func (e *PointError) Unwrap() error { return e.Err }

// NewPlan validates the axes and the fixed scales, and resolves the scene
// of every frame (base with the swept values set) before anything is
// rendered; an invalid frame gives a *PointError. The output directory is
// base.Output.Directory.
func NewPlan(base scene.Scene, axes []Axis, fixed maps.Scales) (*Plan, error) {
	if len(axes) < 1 || len(axes) > MaxAxes {
		return nil, fmt.Errorf("a sweep varies 1 or %d scene values, not %d", MaxAxes, len(axes))
	}
	for _, a := range axes {
		if a.Key == SpotTime {
			return newSpotPlan(base, axes, fixed)
		}
	}
	if len(axes) == 2 && axes[0].Key == axes[1].Key {
		return nil, fmt.Errorf("%s is varied twice", axes[0].Key)
	}
	if strings.TrimSpace(base.Output.Directory) == "" {
		return nil, errors.New("output.directory is empty")
	}
	// The scene's fixed scales fill what fixed leaves zero.
	fromScene := maps.FromScene(base.Scales)
	for _, q := range []struct{ v, by *float64 }{{&fixed.GMin, &fromScene.GMin}, {&fixed.GMax, &fromScene.GMax}, {&fixed.IMax, &fromScene.IMax},
		{&fixed.IDecades, &fromScene.IDecades}, {&fixed.RMin, &fromScene.RMin}, {&fixed.RMax, &fromScene.RMax}, {&fixed.FluxMax, &fromScene.FluxMax}} {
		if *q.v == 0 {
			*q.v = *q.by
		}
	}
	if err := validateScales(fixed); err != nil {
		return nil, err
	}
	vals := make([][]float64, len(axes))
	fields := make([]scene.Field, len(axes))
	total := 1
	for i, a := range axes {
		v, err := a.Values()
		if err != nil {
			return nil, err
		}
		vals[i] = v
		fields[i], _ = numericField(a.Key)
		total *= a.Count
		if total > MaxFrames {
			return nil, fmt.Errorf("the sweep has more than %d frames", MaxFrames)
		}
	}
	p := &Plan{Base: base, Axes: append([]Axis(nil), axes...), Fixed: fixed}
	for k := 0; k < total; k++ {
		pt := Point{Index: k, Values: p.valuesOf(k, vals)}
		s := base
		// Lists are shared with base; frames never modify them.
		for i, f := range fields {
			if err := f.Set(&s, formatValue(pt.Values[i])); err != nil {
				return nil, &PointError{k, p.label(pt.Values), err}
			}
		}
		r, err := s.Resolve()
		if err != nil {
			return nil, &PointError{k, p.label(pt.Values), err}
		}
		pt.Scene = r
		p.Points = append(p.Points, pt)
	}
	return p, nil
}

// valuesOf returns the axis values of frame k.
func (p *Plan) valuesOf(k int, vals [][]float64) []float64 {
	if len(vals) == 1 {
		return []float64{vals[0][k]}
	}
	n1 := len(vals[1])
	return []float64{vals[0][k/n1], vals[1][k%n1]}
}

// label describes swept values, e.g. "black_hole.spin = 0.99".
func (p *Plan) label(values []float64) string {
	var parts []string
	for i, v := range values {
		parts = append(parts, p.Axes[i].Key+" = "+formatValue(v))
	}
	return strings.Join(parts, ", ")
}

// valueLabel writes swept values as figures show them: each axis's
// symbol, value (6 significant digits) and unit (scene.QuantityOf),
// e.g. "a = 0.998, i = 60°".
func (p *Plan) valueLabel(values []float64) string {
	var parts []string
	for i, v := range values {
		parts = append(parts, scene.QuantityOf(p.Axes[i].Key).Value(strconv.FormatFloat(v, 'g', 6, 64)))
	}
	return strings.Join(parts, ", ")
}

// captionKeys are the scene values the scene's caption on every figure
// shows already (scene.Resolved.Caption).
var captionKeys = []string{"black_hole.spin", "observer.inclination_deg", "disk.inner_radius", "disk.outer_radius"}

// figureNote is the swept values a frame's figures add to the scene's
// caption: those it does not show (valueLabel).
func (p *Plan) figureNote(values []float64) string {
	var parts []string
	for i, v := range values {
		if !slices.Contains(captionKeys, p.Axes[i].Key) {
			parts = append(parts, scene.QuantityOf(p.Axes[i].Key).Value(strconv.FormatFloat(v, 'g', 6, 64)))
		}
	}
	return strings.Join(parts, ", ")
}

// Dir returns the output directory.
func (p *Plan) Dir() string { return p.Base.Output.Directory }

// digits is the zero-padded width of frame numbers.
func (p *Plan) digits() int { return max(4, len(strconv.Itoa(len(p.Points)-1))) }

// framePrefix returns "frame-0007" for frame 7.
func (p *Plan) framePrefix(k int) string { return fmt.Sprintf("frame-%0*d", p.digits(), k) }

// artifacts returns the files of frame k, in writing order: for every
// map of the scene, the figure (format png), the pixel-exact image (bare)
// and the 8-bit palette image the GIFs are made from (always); the
// spectrum as CSV (csv) and plot (png and csv), and so the thermal
// continuum when the scene has one; the FITS maps (fits).
func (p *Plan) artifacts(k int) []outputs.Artifact {
	return outputs.Artifacts(p.Base.Output, outputs.SceneSet(p.Points[k].Scene, outputs.Set{Prefix: p.framePrefix(k) + "-", Indexed: true}))
}

// fileNames returns the names of the files of frame k, sorted.
func (p *Plan) fileNames(k int) []string {
	if p.spot != nil {
		return []string{p.spotFrameName(k)}
	}
	out := outputs.Names(p.artifacts(k))
	slices.Sort(out)
	return out
}

// validateScales checks the user-fixed scales (zero = not fixed).
func validateScales(s maps.Scales) error {
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) || v < 0 }
	switch {
	case bad(s.GMin) || bad(s.GMax) || bad(s.IMax) || bad(s.IDecades) || bad(s.RMin) || bad(s.RMax) || bad(s.FluxMax):
		return errors.New("fixed scales must be finite and not negative (0 = chosen from the sweep)")
	case s.GMin != 0 && !(s.GMin < 1):
		return fmt.Errorf("redshift scale minimum %v must be between 0 and 1", s.GMin)
	case s.GMax != 0 && !(s.GMax > 1):
		return fmt.Errorf("redshift scale maximum %v must be above 1", s.GMax)
	case s.IDecades > 30:
		return fmt.Errorf("intensity decades %v must be at most 30", s.IDecades)
	case s.RMin != 0 && s.RMax != 0 && !(s.RMax > s.RMin):
		return fmt.Errorf("radius scale %v to %v is empty", s.RMin, s.RMax)
	}
	return nil
}

// Pre-pass settings: how many frames and how many pixels across.
const (
	prepassFrames = 16
	prepassWidth  = 96
)

// chooseScales completes the fixed scales from the plan: the radius range
// spans every frame's emitting disk; the redshift range, the intensity
// maximum and the spectrum's flux maximum come from up to prepassFrames
// frames (ends and corners included) rendered at most prepassWidth pixels
// across over the same window (prepassScales), so that every process of
// a sweep computes the same values.
func (p *Plan) chooseScales(ctx context.Context) (maps.Scales, error) {
	if p.spot != nil {
		return p.spotScales(ctx)
	}
	sc := p.Fixed
	if sc.IDecades == 0 {
		sc.IDecades = 4
	}
	rmin, rmax := math.Inf(1), math.Inf(-1)
	for _, pt := range p.Points {
		rmin, rmax = math.Min(rmin, pt.Scene.Inner), math.Max(rmax, pt.Scene.Disk.OuterRadius)
	}
	if sc.RMin == 0 {
		sc.RMin = rmin
	}
	if sc.RMax == 0 {
		sc.RMax = math.Max(rmax, sc.RMin*1.01)
	}
	if !(sc.RMax > sc.RMin) {
		return sc, fmt.Errorf("radius scale %v to %v is empty", sc.RMin, sc.RMax)
	}
	if sc.GMin != 0 && sc.GMax != 0 && sc.IMax != 0 && sc.FluxMax != 0 {
		return sc, nil
	}
	var gs, is []maps.Sample
	fmax := 0.0
	for _, k := range p.prepassIndices() {
		r := p.Points[k].Scene
		w := min(r.Screen.Width, prepassWidth)
		if w < r.Screen.Width {
			h := max(1, int(math.Round(float64(r.Screen.Height)*float64(w)/float64(r.Screen.Width))))
			s := r.Scene
			s.Screen.Width, s.Screen.Height = w, h
			var err error
			if r, err = s.Resolve(); err != nil {
				return sc, err
			}
		}
		f, err := pixels.RenderScene(ctx, r, nil, pixels.KeepG|pixels.KeepLine)
		if err != nil {
			return sc, err
		}
		gs, is = maps.GSamples(gs, f), maps.IntensitySamples(is, f)
		// The spectrum's axis is in the units its figure shows: photons
		// cm⁻² s⁻¹ keV⁻¹ when the scene is physical, else relative.
		unit := r.SpectrumPerUnit()
		if unit == 0 {
			unit = 1
		}
		spec := f.Spectrum()
		for _, v := range spec.Total() {
			fmax = math.Max(fmax, v*unit/spec.Width())
		}
	}
	return prepassScales(sc, gs, is, fmax, p.Percentile()), nil
}

// Percentile is the percentile of the pre-pass (prepassScales): the
// scene's scales.percentile, else scene.DefaultSweepPercentile.
func (p *Plan) Percentile() float64 {
	if v := p.Base.Scales.Percentile; v != nil {
		return *v
	}
	return scene.DefaultSweepPercentile
}

// prepassScales completes the zero fields of sc from the pre-pass: the
// redshift factors gs and line intensities is of the pixels that see the
// disk, pooled over every pre-pass frame and weighted by screen area, and
// the largest spectrum value fmax. The redshift range spans the pct-th to
// (100 − pct)-th percentile of gs (maps.Percentiles), widened by 3 % and
// reaching at least 0.95 to 1.05; the intensity maximum is 1.5 times the
// (100 − pct)-th percentile of is (room for brighter frames between the
// pre-pass ones); the flux maximum is 1.1 fmax. Each is rounded outward to
// two significant digits. A pooled percentile, unlike the smallest value,
// is not moved by a few pixels of light from just outside the horizon:
// with pct = 0.5, up to 0.5 % of the disk's area at each end may lie off
// the scale (drawn in its end colours).
func prepassScales(sc maps.Scales, gs, is []maps.Sample, fmax, pct float64) maps.Scales {
	gmin, gmax, okG := maps.Percentiles(gs, pct)
	_, imax, okI := maps.Percentiles(is, pct)
	if sc.GMin == 0 {
		sc.GMin = 1 / 1.5
		if okG && gmin > 0 {
			sc.GMin = roundSig(math.Min(0.95, gmin*0.97), false)
		}
	}
	if sc.GMax == 0 {
		sc.GMax = 1.5
		if okG && gmax > 0 {
			sc.GMax = roundSig(math.Max(1.05, gmax*1.03), true)
		}
	}
	if sc.IMax == 0 {
		sc.IMax = 1
		if okI && imax > 0 {
			sc.IMax = roundSig(imax*1.5, true)
		}
	}
	if sc.FluxMax == 0 {
		sc.FluxMax = 1
		if fmax > 0 {
			sc.FluxMax = roundSig(fmax*1.1, true)
		}
	}
	return sc
}

// prepassIndices returns up to prepassFrames frame indices spread evenly
// over the sweep, always with its first and last frame and, for a grid,
// its four corners; sorted and distinct.
func (p *Plan) prepassIndices() []int {
	n := len(p.Points)
	seen := map[int]bool{}
	var out []int
	add := func(k int) {
		if !seen[k] {
			seen[k] = true
			out = append(out, k)
		}
	}
	if len(p.Axes) == 2 {
		n1 := p.Axes[1].Count
		add(n1 - 1)
		add(n - n1)
	}
	m := min(n, prepassFrames)
	for i := 0; i < m; i++ {
		if m == 1 {
			add(0)
			break
		}
		add(int(math.Round(float64(i) * float64(n-1) / float64(m-1))))
	}
	slices.Sort(out)
	return out
}

// roundSig rounds x > 0 to two significant digits, up or down.
func roundSig(x float64, up bool) float64 {
	e := int(math.Floor(math.Log10(x))) - 1
	scaled := x / math.Pow(10, float64(e))
	var k float64
	if up {
		k = math.Ceil(scaled - 1e-9)
	} else {
		k = math.Floor(scaled + 1e-9)
	}
	if k < 1 {
		k = 1
	}
	// k·10^e written and read back in decimal is the double nearest to it.
	v, _ := strconv.ParseFloat(strconv.FormatFloat(k, 'f', 0, 64)+"e"+strconv.Itoa(e), 64)
	return v
}
