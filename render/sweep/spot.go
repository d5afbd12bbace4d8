package sweep

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
	"sync"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/render/spot"
	"kerrscope/scene"
)

// SpotTime is the key of the axis of a hot-spot movie (NewSpotPlan): the
// observer time t_obs in M of each frame.
const SpotTime = "spot.time"

// spotMovie is what a plan of a hot-spot movie shares between its frames:
// the screen, traced once (spot.Trace) when the first frame or the scales
// need it, and sampled at every frame time.
type spotMovie struct {
	sp    scene.SpotEmission
	times []float64

	mu     sync.Mutex
	movie  *spot.Movie
	traces int // number of traces made, for the tests
}

// NewSpotPlan returns the plan of the movie of the scene's orbiting spot
// (scene.ResolveSpot): one frame per observer time of spot.FrameTimes,
// on the axis SpotTime from 0 to the last frame time. Every frame shares
// one trace of the screen. Of the scales only the intensity maximum may
// be fixed; by default it is the brightest pixel of any frame. Frame k
// is spot-frame-NNNN.png, byte for byte the file spot.Run writes.
func NewSpotPlan(base scene.Scene, fixed maps.Scales) (*Plan, error) {
	_, _, _, a, err := spotAxis(base)
	if err != nil {
		return nil, err
	}
	return NewPlan(base, []Axis{a}, fixed)
}

// spotAxis resolves the scene and its spot and returns the frame times
// and the SpotTime axis through them.
func spotAxis(base scene.Scene) (scene.Resolved, scene.SpotEmission, []float64, Axis, error) {
	r, err := base.Resolve()
	if err != nil {
		return r, scene.SpotEmission{}, nil, Axis{}, err
	}
	sp, err := scene.ResolveSpot(r)
	if err != nil {
		return r, sp, nil, Axis{}, err
	}
	times := spot.FrameTimes(r, sp)
	return r, sp, times, Axis{Key: SpotTime, From: 0, To: times[len(times)-1], Count: len(times), Spacing: Linear}, nil
}

// newSpotPlan is NewPlan for an axis SpotTime, which must be the axis
// NewSpotPlan makes for the scene.
func newSpotPlan(base scene.Scene, axes []Axis, fixed maps.Scales) (*Plan, error) {
	if strings.TrimSpace(base.Output.Directory) == "" {
		return nil, errors.New("output.directory is empty")
	}
	if len(axes) != 1 {
		return nil, fmt.Errorf("%s is swept alone: every frame of a spot movie shares one traced screen", SpotTime)
	}
	if fixed.GMin != 0 || fixed.GMax != 0 || fixed.IDecades != 0 || fixed.RMin != 0 || fixed.RMax != 0 || fixed.FluxMax != 0 {
		return nil, errors.New("a spot movie has one colour scale, the intensity maximum; the other scales cannot be fixed")
	}
	r, sp, times, want, err := spotAxis(base)
	if err != nil {
		return nil, err
	}
	// The GIF of the merge holds every frame.
	if n := int64(r.Spot.Frames) * int64(r.Screen.Width) * int64(r.Screen.Height); n > spot.MaxMovieBytes {
		return nil, fmt.Errorf("spot.frames = %d of %d×%d pixels: %d MB of frames, more than the %d MB a movie may hold; use fewer frames or pixels",
			r.Spot.Frames, r.Screen.Width, r.Screen.Height, n>>20, spot.MaxMovieBytes>>20)
	}
	if axes[0] != want {
		return nil, fmt.Errorf("%s: axis %s is not the scene's (%s, from spot.frames = %d and spot.periods = %g)",
			SpotTime, axes[0], want, r.Spot.Frames, r.Spot.Periods)
	}
	p := &Plan{Base: base, Axes: []Axis{want}, Fixed: fixed, spot: &spotMovie{sp: sp, times: times}}
	for k, t := range times {
		p.Points = append(p.Points, Point{Index: k, Values: []float64{t}, Scene: r})
	}
	return p, nil
}

// movie returns the plan's movie with the intensity maximum imax (0: the
// brightest pixel of any frame), tracing the screen the first time.
func (p *Plan) movie(ctx context.Context, imax float64) (*spot.Movie, error) {
	s := p.spot
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.movie == nil {
		tb, err := spot.Trace(ctx, p.Points[0].Scene, s.sp, nil)
		if err != nil {
			return nil, err
		}
		s.traces++
		mv := tb.MovieAt(ctx, s.times)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		s.movie = mv
	}
	mv := *s.movie
	if imax != 0 {
		mv.IMax = imax
	}
	return &mv, nil
}

// spotScales completes the fixed scales of a spot movie: the intensity
// maximum, by default the brightest pixel of any frame.
func (p *Plan) spotScales(ctx context.Context) (maps.Scales, error) {
	mv, err := p.movie(ctx, p.Fixed.IMax)
	if err != nil {
		return maps.Scales{}, err
	}
	return maps.Scales{IMax: mv.IMax}, nil
}

// spotFrameName returns the file name of frame k of a spot movie.
func (p *Plan) spotFrameName(k int) string {
	return fmt.Sprintf("spot-frame-%0*d.png", p.digits(), k)
}

// writeSpotFrame samples frame pt of a spot movie and commits it.
func (p *Plan) writeSpotFrame(ctx context.Context, lk *outputs.DirLock, pt Point, sc maps.Scales) ([]fileRecord, error) {
	mv, err := p.movie(ctx, sc.IMax)
	if err != nil {
		return nil, err
	}
	return p.commitFrame(ctx, lk, pt.Index, func(put outputs.Put) error {
		return put(p.spotFrameName(pt.Index), func(w io.Writer) error { return mv.WriteFrame(pt.Index, w) })
	})
}

// mergeSpot writes what a spot movie makes of all its frames, through
// out: the GIF, the light curve, the centroid track, the line profile
// against time and spot.toml (spot.Movie.WriteFiles), and the frame
// table.
func (p *Plan) mergeSpot(ctx context.Context, out *outputs.Outputs, sc maps.Scales, program string) error {
	mv, err := p.movie(ctx, sc.IMax)
	if err != nil {
		return err
	}
	if err := mv.WriteFiles(out.Write, strings.TrimSpace(strings.TrimPrefix(program, "kerrscope")), false); err != nil {
		return err
	}
	return out.Write("sweep-frames.csv", p.writeTable)
}
