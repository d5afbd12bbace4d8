package sweep

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"time"

	"kerrscope/render/maps"
)

// ErrDefinitionChanged is returned (wrapped) by Run when the output
// directory holds a different sweep and Options.Restart is not set.
var ErrDefinitionChanged = errors.New("the output directory holds a different sweep")

// Options control a sweep run.
type Options struct {
	Shard   Shard  // this process's share; zero = the whole sweep (1/1)
	Restart bool   // remove what the directory holds of a sweep and start over
	Version string // program version recorded in the outputs
	// Progress, if not nil, is called after each rendered frame with the
	// number done and the number this run renders.
	Progress func(done, total int)
}

// Report says what a run did.
type Report struct {
	Shard    Shard
	Frames   int         // frames of this shard
	Skipped  int         // already finished (recorded, files intact)
	Rendered []int       // frames rendered by this run, in order
	Scales   maps.Scales // the colour scales every frame uses
	Manifest string      // path of this shard's manifest
}

// Run renders the plan's frames that belong to the shard and are not
// already finished. Scales come from a manifest of the same sweep in the
// directory if there is one, else from the fixed scales completed by a
// pre-pass. A frame is finished when any manifest of the same sweep in
// the directory records it and its files are intact (sizes and SHA-256);
// every other frame of the shard is rendered again, one after another
// (each render uses every core). Each frame's files are committed
// together, and only then is the frame recorded in the shard's manifest,
// which is rewritten atomically; on cancellation Run records what is
// finished and returns ctx.Err(). A directory holding another sweep is
// refused with ErrDefinitionChanged unless opt.Restart is set.
func Run(ctx context.Context, p *Plan, opt Options) (Report, error) {
	sh := opt.Shard
	if sh == (Shard{}) {
		sh = Shard{K: 1, N: 1}
	}
	rep := Report{Shard: sh}
	if err := sh.Validate(); err != nil {
		return rep, err
	}
	def, err := p.definition()
	if err != nil {
		return rep, err
	}
	dir := p.Dir()
	olds, err := loadManifests(dir)
	if err != nil {
		return rep, err
	}
	if opt.Restart {
		if err := clean(dir); err != nil {
			return rep, err
		}
		olds = nil
	}
	for _, m := range olds {
		if ok, what := def.same(m.Definition); !ok {
			return rep, fmt.Errorf("%w: %s differs from %s (use --restart to start over, or another --out)", ErrDefinitionChanged, what, m.name)
		}
	}
	var sc maps.Scales
	if len(olds) > 0 {
		if sc, err = agreedScales(olds); err != nil {
			return rep, err
		}
	} else if sc, err = p.chooseScales(ctx); err != nil {
		return rep, err
	}
	rep.Scales = sc
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return rep, fmt.Errorf("output directory: %w", err)
	}

	known := map[int][]frameRecord{}
	for _, m := range olds {
		for _, fr := range m.Frames {
			known[fr.Index] = append(known[fr.Index], fr)
		}
	}
	own := &manifest{Format: manifestFormat, Program: strings.TrimSpace("kerrscope " + opt.Version), Definition: def,
		Scales: toRecord(sc), Shard: sh, Frames: []frameRecord{}}
	var todo []Point
	for _, pt := range p.Points {
		if !sh.Owns(pt.Index) {
			continue
		}
		rep.Frames++
		done := false
		for _, fr := range known[pt.Index] {
			if p.verify(fr, pt) {
				own.Frames = append(own.Frames, fr)
				done = true
				break
			}
		}
		if done {
			rep.Skipped++
		} else {
			todo = append(todo, pt)
		}
	}
	rep.Manifest = filepath.Join(dir, sh.ManifestName())
	if err := own.write(dir); err != nil {
		return rep, err
	}

	// The manifest is rewritten after every frame unless that would take
	// more than a twentieth of the time (very long sweeps); the content
	// does not depend on when it is written.
	var lastWrite time.Time
	var lastCost time.Duration
	pending := false
	save := func() error {
		t0 := time.Now()
		if err := own.write(dir); err != nil {
			return err
		}
		lastWrite, lastCost, pending = time.Now(), time.Since(t0), false
		return nil
	}
	for i, pt := range todo {
		files, err := p.writeFrame(ctx, pt, sc, opt.Version)
		if err != nil {
			if pending {
				if serr := save(); serr != nil {
					return rep, serr
				}
			}
			return rep, err
		}
		own.Frames = append(own.Frames, frameRecord{Index: pt.Index, Values: p.valuesRecord(pt), Files: files})
		slices.SortFunc(own.Frames, func(a, b frameRecord) int { return a.Index - b.Index })
		rep.Rendered = append(rep.Rendered, pt.Index)
		pending = true
		if time.Since(lastWrite) >= 20*lastCost || i == len(todo)-1 {
			if err := save(); err != nil {
				return rep, err
			}
		}
		if opt.Progress != nil {
			opt.Progress(i+1, len(todo))
		}
	}
	return rep, nil
}

// agreedScales returns the scales the manifests record, which must agree.
func agreedScales(ms []*manifest) (maps.Scales, error) {
	for _, m := range ms[1:] {
		if m.Scales != ms[0].Scales {
			return maps.Scales{}, fmt.Errorf("%s and %s record different colour scales; fix them with the scale flags and start over", ms[0].name, m.name)
		}
	}
	return ms[0].Scales.scales(), nil
}

// sweepFile matches the files a sweep or its merge writes.
var sweepFile = regexp.MustCompile(`^(frame-[0-9]+-[a-z]+(-bare|-indexed)?\.(png|csv|fits)|sweep-[a-z0-9-]+\.(gif|png|csv))$`)

// clean removes the manifests and every frame and merge file of a sweep
// from dir (files named as a sweep names them), for a fresh start.
func clean(dir string) error {
	ents, err := os.ReadDir(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	for _, e := range ents {
		if !e.IsDir() && (sweepFile.MatchString(e.Name()) || manifestPattern.MatchString(e.Name())) {
			if err := os.Remove(filepath.Join(dir, e.Name())); err != nil {
				return err
			}
		}
	}
	return nil
}
