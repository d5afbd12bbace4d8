package sweep

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/render/pixels"
)

// ErrDefinitionChanged is returned (wrapped) by Run when the output
// directory holds a different sweep and Options.Restart is not set.
var ErrDefinitionChanged = errors.New("the output directory holds a different sweep")

// Options control a sweep run.
type Options struct {
	Shard   Shard  // this process's share; zero = the whole sweep (1/1)
	Restart bool   // remove the files the manifests record and start over
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
	Window   Window      // the window every frame uses
	// Clipped lists the frames rendered by this run whose disk image
	// touches the window's border, with the estimate of the line flux
	// outside it (their spectrum CSV and FITS header record it too).
	Clipped  []ClippedFrame
	Manifest string   // path of this shard's manifest
	Removed  int      // files of the old sweep removed by Options.Restart
	SetAside []string // unreadable manifests renamed by Options.Restart
}

// Run renders the plan's frames that belong to the shard and are not
// already finished. With an automatic field of view every frame gets the
// one window the manifests record, else the union of the frames'
// automatic windows (Report.Window, recorded in the manifest). Scales
// come from a manifest of the same sweep in the directory if there is
// one, else from the fixed scales completed by a pre-pass. A frame is finished when any manifest of the same sweep in
// the directory records it and its files are intact (sizes and SHA-256);
// every other frame of the shard is rendered again, one after another
// (each render uses every core). Each frame's files are committed
// together, and only then is the frame recorded in the shard's manifest,
// which is rewritten atomically; on cancellation Run records what is
// finished and returns ctx.Err(). A directory holding another sweep is
// refused with ErrDefinitionChanged unless opt.Restart is set. The shards
// of a sweep share the directory's lock (outputs.LockShared); a restart
// takes it alone.
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
	lock := outputs.LockShared
	if opt.Restart {
		lock = outputs.Lock
	}
	lk, err := lock(dir)
	if err != nil {
		return rep, err
	}
	defer lk.Unlock()
	// A temporary manifest of this shard is left over from a killed run.
	if ents, err := os.ReadDir(dir); err == nil {
		for _, e := range ents {
			if strings.HasPrefix(e.Name(), manifestTemp(sh)) && e.Type().IsRegular() {
				os.Remove(filepath.Join(dir, e.Name()))
			}
		}
	}
	olds, bad, err := readManifests(dir)
	if err != nil {
		return rep, err
	}
	if opt.Restart {
		if rep.SetAside, err = setAside(dir, bad, time.Now()); err != nil {
			return rep, err
		}
		if rep.Removed, err = clean(lk, olds, bad); err != nil {
			return rep, err
		}
		olds = nil
	} else if len(bad) > 0 {
		return rep, bad[0]
	}
	for _, m := range olds {
		if ok, what := def.same(m.Definition); !ok {
			return rep, fmt.Errorf("%w: %s differs from %s (use --restart to start over, or another --out)", ErrDefinitionChanged, what, m.name)
		}
	}
	win, err := p.frameWindow(ctx, olds)
	if err != nil {
		return rep, err
	}
	rep.Window = win
	var sc maps.Scales
	if len(olds) > 0 {
		if sc, err = agreedScales(olds); err != nil {
			return rep, err
		}
	} else if sc, err = p.chooseScales(ctx); err != nil {
		return rep, err
	}
	rep.Scales = sc

	known := map[int][]frameRecord{}
	for _, m := range olds {
		for _, fr := range m.Frames {
			known[fr.Index] = append(known[fr.Index], fr)
		}
	}
	own := &manifest{Format: manifestFormat, Program: strings.TrimSpace("kerrscope " + opt.Version), Definition: def,
		Scales: toRecord(sc), Window: win, Shard: sh, Frames: []frameRecord{}}
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
		files, clip, err := p.writeFrame(ctx, lk, pt, sc, opt.Version)
		if clip != nil {
			rep.Clipped = append(rep.Clipped, ClippedFrame{Index: pt.Index, Clip: *clip})
		}
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

// ClippedFrame is a frame whose window clips the disk image.
type ClippedFrame struct {
	Index int
	Clip  pixels.Clip
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

// clean removes what the manifests ms record: every frame file that is
// unchanged since it was written (size and SHA-256), also those of the
// whole file records left in the unreadable manifests bad, the merged
// files (their own record, see Merge), then the manifests. Files the
// manifests do not name, or that changed, are left alone. It returns the
// number of files removed.
func clean(lk *outputs.DirLock, ms []*manifest, bad []*badManifest) (int, error) {
	dir := lk.Dir()
	var recs []fileRecord
	for _, m := range ms {
		for _, fr := range m.Frames {
			recs = append(recs, fr.Files...)
		}
	}
	for _, b := range bad {
		recs = append(recs, b.salvage()...)
	}
	n := 0
	for _, f := range recs {
		if !plainName(f.Name) {
			continue
		}
		path := filepath.Join(dir, f.Name)
		if size, sum, err := outputs.HashFile(path); err != nil || size != f.Bytes || sum != f.SHA256 {
			continue
		}
		if err := os.Remove(path); err != nil {
			return n, err
		}
		n++
	}
	merged, err := outputs.RemoveSet(lk, "merge")
	n += len(merged)
	if err != nil {
		return n, err
	}
	for _, m := range ms {
		if err := os.Remove(filepath.Join(dir, m.name)); err != nil {
			return n, err
		}
		n++
	}
	return n, outputs.SyncDir(dir)
}

// plainName reports whether a recorded file name names a visible file of
// the directory itself.
func plainName(n string) bool {
	return n != "" && n != "." && n != ".." && !strings.HasPrefix(n, ".") && !strings.ContainsAny(n, "/\x00")
}

// setAside renames each unreadable manifest to NAME.corrupt-TIME (UTC),
// out of the way of the sweep but kept for the user to inspect (it may
// not even be ours). It returns the new paths.
func setAside(dir string, bad []*badManifest, now time.Time) ([]string, error) {
	var out []string
	for _, b := range bad {
		to := filepath.Join(dir, b.name+".corrupt-"+now.UTC().Format("20060102T150405Z"))
		if _, err := os.Lstat(to); err == nil {
			return out, fmt.Errorf("%s: cannot set it aside, %s exists", b.name, to)
		}
		if err := os.Rename(filepath.Join(dir, b.name), to); err != nil {
			return out, err
		}
		out = append(out, to)
	}
	return out, nil
}
