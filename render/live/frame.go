package live

import (
	"context"
	"encoding/base64"
	"fmt"
	"image"
	"image/color"
	"math"
	"sync"

	"kerrscope/colormap"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// View sizes, in pixels along the larger side.
const (
	DefaultSize = 256
	MaxSize     = 768
	MinSize     = 16
	// coarseDivisor: the first pass of every update traces one pixel in
	// coarseDivisor² of the full view.
	coarseDivisor = 4
)

// Window is a concrete screen window: the field of view (M, horizontal)
// and its centre (M), and the pixel-edge ranges it spans.
type Window struct {
	Field  float64 `json:"field"`
	Alpha  float64 `json:"center_alpha"`
	Beta   float64 `json:"center_beta"`
	A0, A1 float64 `json:"-"`
	B0, B1 float64 `json:"-"`
}

// Legend is the colour key of a map: a ramp with ticks for maps on a
// continuous scale, or swatches for categorical ones.
type Legend struct {
	Label    string   `json:"label"`
	Ramp     []string `json:"ramp,omitempty"` // colours from t = 0 to 1, "#rrggbb"
	Ticks    []Tick   `json:"ticks,omitempty"`
	Swatches []Swatch `json:"swatches,omitempty"`
}

// Tick is a labelled position on a ramp, T in [0, 1].
type Tick struct {
	T     float64 `json:"t"`
	Label string  `json:"label"`
}

// Swatch is one colour of a categorical map.
type Swatch struct {
	Color string `json:"color"`
	Label string `json:"label"`
}

// LineProfile is the collapsed line of the view (pixels.Frame.Spectrum):
// photon flux per keV in each bin, total and per image order, in the
// units of the spectrum (relative unless the scene gives a luminosity,
// mass and distance).
type LineProfile struct {
	EnergyKeV []float64   `json:"energy_kev"` // bin centres
	Total     []float64   `json:"total"`
	Orders    [][]float64 `json:"orders"`
	LineKeV   float64     `json:"line_kev"`
	Physical  bool        `json:"physical"` // photons cm⁻² s⁻¹ keV⁻¹
	// OrderColors are the colours of the image orders (colormap.Order).
	OrderColors []string `json:"order_colors"`
}

// Stage is one pass of a view update, as the page receives it.
type Stage struct {
	Stage           string     `json:"stage"` // "coarse" or "full"
	Width           int        `json:"width"`
	Height          int        `json:"height"`
	Window          Window     `json:"window"`
	Edges           [4]float64 `json:"edges"` // α0, α1, β0, β1 of the pixel edges, M
	Image           string     `json:"image"` // data: URL of the map's PNG
	Legend          *Legend    `json:"legend,omitempty"`
	Millis          float64    `json:"ms"`
	Photons         int64      `json:"photons"`
	Caption         string     `json:"caption"`
	MicroArcsecPerM float64    `json:"uas_per_m"`
	Horizon         float64    `json:"horizon"`
	ISCO            float64    `json:"isco"`
	Inner           float64    `json:"inner"`
	// Full pass only:
	Critical  [][2]float64       `json:"critical,omitempty"` // critical curve (Bardeen 1973), α, β in M
	Spectrum  *LineProfile       `json:"spectrum,omitempty"`
	BandImage string             `json:"band_image,omitempty"` // as Image: band area as opacity
	Band      *pixels.BandReport `json:"band,omitempty"`
}

// view is one update request made concrete: the scene at its own size
// with its window framed, and what to show.
type view struct {
	scene  scene.Resolved // the scene as a render of it would see it (concrete window)
	size   int
	mp     maps.Map
	scales maps.Scales
	band   bool
	order  int // the image order shown alone; -1: all
	// unframed, when set, is the scene whose automatic window is still
	// to be framed; scene then holds the page's last window, for the
	// coarse pass only.
	unframed *scene.Resolved
}

// frameCache remembers the automatic windows of recent scenes: framing
// traces up to liveFramingSide² photons, about as many as a view itself.
type frameCache struct {
	mu sync.Mutex
	m  map[string]Window
}

const frameCacheSize = 64

// liveFramingSide is the side of the coarse framing pass of a view's
// automatic window (pixels.FrameWindowAt): 160² = 25 600 photons, a
// quarter of a render's framing, so that reframing after a change of spin
// or inclination stays within the time of a view. The window it frames is
// the one the view shows and a saved scene keeps.
const liveFramingSide = 160

// framingKey holds everything pixels.FrameWindowAt reads: the model (hole,
// observer, disk, gas) and the screen's shape and given centre.
func framingKey(r scene.Resolved) string {
	return fmt.Sprintf("%v|%v|%v|%v|%v|%v|%v|%v|%v|%v|%v|%v", r.Hole.Spin, r.Observer.InclinationDeg, r.Inner,
		r.Disk.OuterRadius, r.Disk.Opaque, r.Disk.Orders, r.Disk.Plunging, r.Screen.Width, r.Screen.Height,
		r.Screen.CenterAlpha, r.Screen.CenterBeta, r.AutoCenter)
}

// cached returns r with its window concrete when that needs no tracing:
// a window given, or an automatic one framed before.
func (c *frameCache) cached(r scene.Resolved) (scene.Resolved, bool) {
	if !r.AutoField {
		return r, true
	}
	c.mu.Lock()
	w, ok := c.m[framingKey(r)]
	c.mu.Unlock()
	if ok {
		return r.WithWindow(w.Field, w.Alpha, w.Beta), true
	}
	return r, false
}

// frame returns r with a concrete window (pixels.FrameWindowAt, liveFramingSide), cached.
func (c *frameCache) frame(ctx context.Context, r scene.Resolved) (scene.Resolved, error) {
	if f, ok := c.cached(r); ok {
		return f, nil
	}
	key := framingKey(r)
	f, err := pixels.FrameWindowAt(ctx, r, liveFramingSide)
	if err != nil {
		return r, err
	}
	c.mu.Lock()
	if c.m == nil || len(c.m) >= frameCacheSize {
		c.m = map[string]Window{}
	}
	c.m[key] = Window{Field: f.Screen.FieldOfView, Alpha: f.Screen.CenterAlpha, Beta: f.Screen.CenterBeta}
	c.mu.Unlock()
	return f, nil
}

// sized returns the scene of the view at the given larger side: the same
// window (field and centre) on a grid of about size pixels along the
// scene's larger side, in the scene's aspect.
func sized(r scene.Resolved, size int) scene.Resolved {
	w, h := r.Screen.Width, r.Screen.Height
	k := float64(size) / float64(max(w, h))
	vw, vh := max(1, int(math.Round(float64(w)*k))), max(1, int(math.Round(float64(h)*k)))
	field := r.Screen.FieldOfView
	r.Screen.Width, r.Screen.Height = vw, vh
	return r.WithWindow(field, r.Screen.CenterAlpha, r.Screen.CenterBeta)
}

// keep is the set of records a pass of the view needs.
func (v *view) keep(full bool) pixels.Keep {
	k := v.mp.Needs()
	if v.order >= 0 {
		k |= pixels.KeepLine // tells where the order is seen
	}
	if full {
		k |= pixels.KeepG | pixels.KeepLine
		if v.band {
			k |= pixels.KeepBand
		}
	}
	return k
}

// render makes one pass of the view at the given larger side.
func (v *view) render(ctx context.Context, size int, full bool) (Stage, error) {
	r := sized(v.scene, size)
	f, err := pixels.Render(ctx, r, nil, v.keep(full))
	if err != nil {
		return Stage{}, err
	}
	shown := f
	if v.order >= 0 {
		shown = onlyOrder(f, v.order)
	}
	sc := v.scales.Fill(shown)
	img := v.mp.Image(shown, sc)
	a0, a1, b0, b1 := f.Window()
	st := Stage{Stage: "coarse", Width: f.W, Height: f.H,
		Window:  Window{Field: r.Screen.FieldOfView, Alpha: r.Screen.CenterAlpha, Beta: r.Screen.CenterBeta},
		Edges:   [4]float64{a0, a1, b0, b1},
		Photons: f.Photons, Caption: r.Caption(), MicroArcsecPerM: r.MicroArcsecPerM,
		Horizon: r.Horizon, ISCO: r.ISCO, Inner: r.Inner}
	st.Image = pixelText(img.Pix)
	if !full {
		return st, nil
	}
	st.Stage = "full"
	st.Legend = legend(v.mp, shown, sc)
	if v.order >= 0 {
		st.Legend.Label += fmt.Sprintf("   ·   image order n = %d alone", v.order)
	}
	for _, p := range f.Model.Obs.CriticalCurve(300) {
		st.Critical = append(st.Critical, [2]float64{round6(p.Alpha), round6(p.Beta)})
	}
	spec := f.Spectrum()
	st.Spectrum = profile(spec, r)
	if v.band {
		rep, err := f.LocateBand()
		if err != nil {
			return st, err
		}
		st.Band = &rep
		st.BandImage = pixelText(bandMask(f).Pix)
	}
	return st, nil
}

// onlyOrder returns a copy of f in which only image order n is seen: the
// records of the other orders are NaN and the first order seen is n
// wherever n is seen (on an opaque disk, where nothing lower hides it).
// The maps then show that order alone.
func onlyOrder(f *pixels.Frame, n int) *pixels.Frame {
	g := *f
	nan := make([]float32, f.W*f.H)
	for k := range nan {
		nan[k] = float32(math.NaN())
	}
	keep := func(q [][]float32) [][]float32 {
		if q == nil {
			return nil
		}
		out := make([][]float32, len(q))
		for o := range out {
			out[o] = nan
		}
		out[n] = q[n]
		return out
	}
	g.R, g.G, g.Line, g.Bol, g.Behind, g.T, g.Phi = keep(f.R), keep(f.G), keep(f.Line), keep(f.Bol), keep(f.Behind), keep(f.T), keep(f.Phi)
	g.First = make([]int8, len(f.First))
	for k := range g.First {
		g.First[k] = -1
		if !math.IsNaN(float64(f.Line[n][k])) {
			g.First[k] = int8(n)
		}
	}
	return &g
}

func round6(x float64) float64 { return math.Round(x*1e6) / 1e6 }

// pixelText is the base64 text of an image's pixel bytes.
func pixelText(pix []byte) string { return base64.StdEncoding.EncodeToString(pix) }

// bandColor marks the band overlay; its alpha is the pixel's band area.
var bandColor = color.NRGBA{0x00, 0xe0, 0x90, 0xff}

// bandMask is the band overlay: each pixel's area in the band, summed over
// the image orders and capped at 1, as the opacity of bandColor.
func bandMask(f *pixels.Frame) *image.NRGBA {
	img := image.NewNRGBA(image.Rect(0, 0, f.W, f.H))
	for k := 0; k < f.W*f.H; k++ {
		s := 0.0
		for o := range f.Band {
			s += float64(f.Band[o][k])
		}
		if s <= 0 {
			continue
		}
		c := bandColor
		c.A = uint8(math.Round(255 * (0.35 + 0.65*math.Min(1, s))))
		img.SetNRGBA(k%f.W, k/f.W, c)
	}
	return img
}

// profile is the view's line profile, with bin centres.
func profile(s pixels.Spectrum, r scene.Resolved) *LineProfile {
	n := s.Bins()
	p := &LineProfile{EnergyKeV: make([]float64, n), Total: s.Total(), LineKeV: r.Emission.LineKeV,
		Physical: r.PhotonNorm > 0 && r.DistanceCm > 0}
	for i := range p.EnergyKeV {
		p.EnergyKeV[i] = s.MinKeV + (float64(i)+0.5)*s.Width()
	}
	p.Orders = append(p.Orders, s.Order...)
	for o := range s.Order {
		p.OrderColors = append(p.OrderColors, hex(colormap.Order(o)))
	}
	return p
}

func hex(c color.RGBA) string { return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B) }

// minTickGap is the least distance, as a fraction of the key's length,
// between two labelled ticks.
const minTickGap = 0.06

// legend is the colour key of the map for the page, with the scales the
// frame was drawn with.
func legend(m maps.Map, f *pixels.Frame, sc maps.Scales) *Legend {
	ramp := func() []string {
		out := make([]string, 65)
		for i := range out {
			out[i] = hex(m.Scale.At(float64(i) / 64))
		}
		return out
	}
	key := func(label string, pos func(float64) float64, values []float64) *Legend {
		l := &Legend{Label: label, Ramp: ramp()}
		for _, v := range values {
			t := pos(v)
			if !(t >= 0 && t <= 1) {
				continue
			}
			if n := len(l.Ticks); n > 0 && t-l.Ticks[n-1].T < minTickGap {
				continue // too close to the last label to be read
			}
			l.Ticks = append(l.Ticks, Tick{T: t, Label: fmt.Sprintf("%g", v)})
		}
		return l
	}
	switch m.Name {
	case "redshift":
		gs := []float64{0.1, 0.2, 0.3, 0.5, 0.7, 1, 1.1, 1.2, 1.3, 1.5, 2, 3}
		var in []float64
		for _, g := range gs {
			if g >= sc.GMin && g <= sc.GMax {
				in = append(in, g)
			}
		}
		return key("redshift factor g = E_obs / E_emit", sc.GPosition, in)
	case "intensity":
		if f.Res.Output.IntensityScale == "linear" {
			l := key("line intensity g³ε (relative, linear)", func(x float64) float64 { return colormap.Linear(x, 0, sc.IMax) }, nil)
			for _, t := range []float64{0, 0.25, 0.5, 0.75, 1} {
				l.Ticks = append(l.Ticks, Tick{T: t, Label: fmt.Sprintf("%.2g", t)})
			}
			return l
		}
		l := &Legend{Label: "line intensity g³ε (relative to the brightest pixel)", Ramp: ramp()}
		for d := 0.0; d <= sc.IDecades+1e-9; d++ {
			l.Ticks = append(l.Ticks, Tick{T: 1 - d/sc.IDecades, Label: fmt.Sprintf("1e-%g", d)})
		}
		l.Ticks[0].Label = "1"
		return l
	case "radius":
		var rs []float64
		for dec := 0.1; dec < 1e8; dec *= 10 {
			for _, m := range []float64{1, 2, 5} {
				if v := m * dec; v >= sc.RMin && v <= sc.RMax {
					rs = append(rs, v)
				}
			}
		}
		return key("source radius r [M]", colormap.LogScale(sc.RMin, sc.RMax), rs)
	case "delay":
		l := &Legend{Label: "arrival-time delay t_o − t − min [M]", Ramp: ramp()}
		span := sc.TMax - sc.TMin
		for _, t := range []float64{0, 0.25, 0.5, 0.75, 1} {
			l.Ticks = append(l.Ticks, Tick{T: t, Label: fmt.Sprintf("%.3g", t*span)})
		}
		return l
	case "shadow":
		return &Legend{Label: "photon fate", Swatches: []Swatch{
			{hex(colormap.Shadow), "from the horizon"}, {hex(maps.EscapedColor), "from infinity"}, {hex(maps.EdgeColor), "ray-traced edge"}}}
	}
	l := &Legend{Label: "image order n"}
	for o := 0; o < f.Orders; o++ {
		l.Swatches = append(l.Swatches, Swatch{hex(colormap.Order(o)), fmt.Sprintf("n = %d", o)})
	}
	l.Swatches = append(l.Swatches, Swatch{hex(colormap.NoHit), "no disk"}, Swatch{hex(colormap.Shadow), "horizon"})
	return l
}
