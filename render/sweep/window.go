package sweep

import (
	"context"
	"fmt"
	"math"

	"kerrscope/render/pixels"
	"kerrscope/render/spot"
)

// Window is the window every frame of a sweep shares, as the manifest
// records it: the field of view and the centre.
type Window struct {
	FieldOfView float64 `json:"field_of_view"`
	CenterAlpha float64 `json:"center_alpha"`
	CenterBeta  float64 `json:"center_beta"`
	// Automatic: the scene left the field (and maybe the centre) to the
	// sweep, which chose the union of its frames' automatic windows.
	Automatic bool `json:"automatic"`
}

// frameWindow gives every frame the sweep's one window. A scene with a
// field of view keeps it. With an automatic field (the frames share the
// base scene's screen), the window is the one the manifests ms record,
// which must agree, or else the union of the frames' automatic windows:
// the smallest window of the frames' size that holds the margined disk
// box (pixels.DiskBox) of every frame, centred on that union unless the
// scene gives a centre. A hot-spot movie has one scene; its window is
// spot.FrameWindow's. The window depends only on the sweep's definition,
// so the shards of a sweep agree on it. It returns the record for the
// manifest.
func (p *Plan) frameWindow(ctx context.Context, ms []*manifest) (Window, error) {
	r0 := p.Points[0].Scene
	if !r0.AutoField {
		return Window{FieldOfView: r0.Screen.FieldOfView, CenterAlpha: r0.Screen.CenterAlpha, CenterBeta: r0.Screen.CenterBeta}, nil
	}
	var win Window
	var recorded []*manifest
	for _, m := range ms {
		if m.Window.Automatic {
			recorded = append(recorded, m)
		}
	}
	switch {
	case len(recorded) > 0:
		win = recorded[0].Window
		for _, m := range recorded[1:] {
			if m.Window != win {
				return win, fmt.Errorf("%s and %s record different windows; start over with --restart", recorded[0].name, m.name)
			}
		}
	case p.spot != nil:
		r, err := spot.FrameWindow(ctx, r0, p.spot.sp)
		if err != nil {
			return win, err
		}
		win = Window{r.Screen.FieldOfView, r.Screen.CenterAlpha, r.Screen.CenterBeta, true}
	default:
		var union pixels.Box
		found := false
		for _, pt := range p.Points {
			b, ok, err := pixels.DiskBox(ctx, pt.Scene)
			if err != nil {
				return win, err
			}
			if !ok {
				continue
			}
			if !found {
				union, found = b, true
			} else {
				union = union.Union(b)
			}
		}
		if !found {
			// No frame's disk was seen by the coarse pass: the widest
			// provisional window holds them all.
			for _, pt := range p.Points {
				win.FieldOfView = math.Max(win.FieldOfView, pt.Scene.Screen.FieldOfView)
			}
			win.CenterAlpha, win.CenterBeta = r0.Screen.CenterAlpha, r0.Screen.CenterBeta
		} else {
			for _, pt := range p.Points {
				f, a, b := union.Window(pt.Scene)
				win.FieldOfView = math.Max(win.FieldOfView, f)
				win.CenterAlpha, win.CenterBeta = a, b
			}
		}
		win.Automatic = true
	}
	for k := range p.Points {
		p.Points[k].Scene = p.Points[k].Scene.WithWindow(win.FieldOfView, win.CenterAlpha, win.CenterBeta)
	}
	return win, nil
}
