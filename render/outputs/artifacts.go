package outputs

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"image"
	"io"
	"slices"
	"strings"

	"kerrscope/render/internal/figure"
	"kerrscope/render/internal/workers"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Kind is what an artifact holds.
type Kind uint8

const (
	FITSMaps        Kind = iota + 1 // every map as a FITS image extension (maps.fits)
	SpectrumCSV                     // the collapsed line spectrum (spectrum.csv)
	MapFigure                       // decorated figure of one map (<map>.png)
	MapBare                         // pixel-exact PNG of one map (<map>-bare.png)
	MapIndexed                      // 8-bit palette PNG of one map (<map>-indexed.png), the source of sweep GIFs
	SpectrumFigure                  // plot of the spectrum (spectrum.png)
	BandJSON                        // band report for scripts (band.json)
	BandText                        // band report for people (band.txt)
	BandFITS                        // band masks per image order (band.fits)
	BandBare                        // pixel-exact band image (band-bare.png)
	BandFigure                      // decorated band figure (band.png)
	BandRedshift                    // redshift factor of the band's light (band-redshift.png)
	Manifest                        // the effective scene (kerrscope-run.toml)
	ContinuumCSV                    // the collapsed thermal continuum (continuum.csv)
	ContinuumFigure                 // plot of the continuum (continuum.png)
	MapSVG                          // decorated figure of one map as vector graphics (<map>.svg)
	SpectrumSVG                     // plot of the spectrum as vector graphics (spectrum.svg)
	BandSVG                         // decorated band figure as vector graphics (band.svg)
	BandRedshiftSVG                 // band redshift figure as vector graphics (band-redshift.svg)
	CombinedCSV                     // lines and continuum on the spectrum's bins (lines-continuum.csv)
)

// Artifact is one file a run writes.
type Artifact struct {
	Name string // file name in the output directory
	Kind Kind
	// Map is the map, for MapFigure, MapBare and MapIndexed; for
	// FITSMaps and SpectrumCSV it is scene.PolarisationMap when the scene
	// asks for that map, and the file then carries Stokes Q and U too.
	Map string
	// Radii: the spectrum needs the source radii (pixels.KeepR), for
	// rest lines with emissivity laws of their own (Set.LineRadii).
	Radii bool
}

// Set chooses the artifacts a run writes besides those the scene's
// output formats ask for.
type Set struct {
	Prefix   string // put before every file name (a sweep's "frame-0007-")
	Indexed  bool   // an 8-bit palette PNG of every map
	Band     bool   // the band report, masks and figures
	Manifest bool   // kerrscope-run.toml
	// Thermal: the scene has a thermal disk (scene.Resolved.Thermal.On), whose
	// continuum is written with the spectrum (csv, and its plot with png).
	Thermal bool
	// LineRadii: some rest line has an emissivity law of its own
	// (scene.RestLines.Own), so the spectrum needs the source radii.
	LineRadii bool
	// Combined: the lines are in physical units (scene.Resolved.Physical)
	// and Thermal is set, so the lines and the continuum are also
	// written on the spectrum's bins, in one table (with csv).
	Combined bool
}

// SceneSet returns s with the fields the scene decides: Thermal,
// LineRadii and Combined.
func SceneSet(r scene.Resolved, s Set) Set {
	s.Thermal = r.Thermal.On
	s.LineRadii = r.RestLines.Own()
	s.Combined = r.Thermal.On && r.Physical()
	return s
}

// Artifacts lists the files a run of a scene with outputs o writes, in
// the order they are written. It is the one list of a run's files: render
// runs write it, sweeps write and verify it for every frame.
func Artifacts(o scene.Output, s Set) []Artifact {
	var out []Artifact
	add := func(name string, k Kind, m string) {
		out = append(out, Artifact{Name: s.Prefix + name, Kind: k, Map: m, Radii: s.LineRadii && (k == SpectrumCSV || k == SpectrumFigure || k == CombinedCSV)})
	}
	pol := ""
	if slices.Contains(o.Maps, scene.PolarisationMap) {
		pol = scene.PolarisationMap
	}
	if o.Has("fits") {
		add("maps.fits", FITSMaps, pol)
	}
	if o.Has("csv") {
		add("spectrum.csv", SpectrumCSV, pol)
	}
	if s.Thermal && o.Has("csv") {
		add("continuum.csv", ContinuumCSV, "")
	}
	if s.Combined && s.Thermal && o.Has("csv") {
		add("lines-continuum.csv", CombinedCSV, "")
	}
	for _, m := range o.Maps {
		if o.Has("png") {
			add(m+".png", MapFigure, m)
		}
		if o.Has("bare") {
			add(m+"-bare.png", MapBare, m)
		}
		if s.Indexed {
			add(m+"-indexed.png", MapIndexed, m)
		}
		if o.Has("svg") {
			add(m+".svg", MapSVG, m)
		}
	}
	if o.Has("png") && o.Has("csv") {
		add("spectrum.png", SpectrumFigure, "")
		if s.Thermal {
			add("continuum.png", ContinuumFigure, "")
		}
	}
	if o.Has("svg") && o.Has("csv") {
		add("spectrum.svg", SpectrumSVG, "")
	}
	if s.Band {
		add("band.json", BandJSON, "")
		add("band.txt", BandText, "")
		if o.Has("fits") {
			add("band.fits", BandFITS, "")
		}
		if o.Has("bare") {
			add("band-bare.png", BandBare, "")
		}
		if o.Has("png") {
			add("band.png", BandFigure, "")
			add("band-redshift.png", BandRedshift, "")
		}
		if o.Has("svg") {
			add("band.svg", BandSVG, "")
			add("band-redshift.svg", BandRedshiftSVG, "")
		}
	}
	if s.Manifest {
		add("kerrscope-run.toml", Manifest, "")
	}
	return out
}

// Names returns the file names of artifacts.
func Names(arts []Artifact) []string {
	out := make([]string, len(arts))
	for i, a := range arts {
		out[i] = a.Name
	}
	return out
}

// Job is what a run's artifacts are made from.
type Job struct {
	Frame   *pixels.Frame
	Scales  maps.Scales // colour scales; zero fields are chosen from the frame
	Version string      // program version recorded in the files
	// SpectrumTitle titles the spectrum figure (default: "line profile
	// collapsed from the image").
	SpectrumTitle string
	// Note is added to the subtitle of every map figure (a sweep frame's
	// swept values); "" adds nothing.
	Note string
	// Band is the located band (pixels.Frame.LocateBand), for the band
	// artifacts.
	Band *Band
	// Spectrum is the frame's spectrum if it was collapsed already (as
	// pixels.CheckFinite returns it); nil: Write collapses the frame and
	// checks the spectrum (pixels.CheckedSpectrum) beside its other work,
	// and a value that is not finite is its error.
	Spectrum *pixels.Spectrum
}

// Band is a located band of source radii: the report and, per image
// order, the fraction of each pixel's area in the band (pixels.Frame.Band).
type Band struct {
	Report pixels.BandReport
	Mask   [][]float32
}

// Put stores one file, produced by write; Outputs.Write is one.
type Put func(name string, write func(io.Writer) error) error

// Needs returns the per-order records (pixels.Keep) a frame must hold for
// Write to make arts: all of them for FITS, g and the line intensity for
// the spectrum, the band's records (KeepBand) and g for the band, and
// what each map reads (maps.Map.Needs).
func Needs(arts []Artifact) pixels.Keep {
	var k pixels.Keep
	for _, a := range arts {
		switch a.Kind {
		case FITSMaps:
			k |= pixels.KeepAll | stokesOf(a)
		case SpectrumCSV, SpectrumFigure, SpectrumSVG:
			k |= pixels.KeepG | pixels.KeepLine | stokesOf(a)
		case ContinuumCSV, ContinuumFigure, CombinedCSV:
			k |= pixels.KeepR | pixels.KeepG | pixels.KeepLine
		case MapFigure, MapBare, MapIndexed, MapSVG:
			if m, err := maps.Lookup(a.Map); err == nil {
				k |= m.Needs()
			}
		case BandJSON, BandText, BandFITS, BandBare, BandFigure, BandRedshift, BandSVG, BandRedshiftSVG:
			k |= pixels.KeepBand | pixels.KeepG
		}
		if a.Radii {
			k |= pixels.KeepR
		}
	}
	return k
}

// stokesOf is KeepStokes for a table that carries the polarisation.
func stokesOf(a Artifact) pixels.Keep {
	if a.Map == scene.PolarisationMap {
		return pixels.KeepStokes
	}
	return 0
}

// task is one piece of Write's work done on the worker pool; done is
// closed when it has run.
type task struct {
	run  func(s *scratch)
	done chan struct{}
}

// scratch is one worker's map image, reused from map to map.
type scratch struct{ img *image.RGBA }

// image returns the worker's w × h image.
func (s *scratch) image(w, h int) *image.RGBA {
	if s.img == nil || s.img.Rect != image.Rect(0, 0, w, h) {
		s.img = image.NewRGBA(image.Rect(0, 0, w, h))
	}
	return s.img
}

// Write produces every artifact of the job and hands each to put, in the
// order of arts. The images (figures, pixel-exact and palette PNGs; one
// task per map, which draws the map once for all its files) and the
// spectrum are made on all cores while the tables (FITS, CSV, reports)
// are streamed to put, FITS row by row without copies of the maps. It
// stops with ctx.Err() once ctx is cancelled, and returns only when all
// its work has stopped.
func Write(ctx context.Context, arts []Artifact, job Job, put Put) error {
	f := job.Frame
	if need := Needs(arts); !f.Has(need) {
		return fmt.Errorf("outputs: the frame does not hold the per-pixel records these outputs need (render it keeping %s)", keepNames(need))
	}
	ctx, cancel := context.WithCancel(ctx)
	var tasks []*task
	add := func(run func(*scratch)) *task {
		t := &task{run: run, done: make(chan struct{})}
		tasks = append(tasks, t)
		return t
	}

	var spec pixels.Spectrum
	var specErr error
	var specTask *task
	for _, a := range arts {
		if a.Kind == SpectrumCSV || a.Kind == SpectrumFigure || a.Kind == SpectrumSVG || a.Kind == CombinedCSV {
			if job.Spectrum != nil {
				spec = *job.Spectrum
				specTask = &task{done: make(chan struct{})} // done already
				close(specTask.done)
			} else {
				specTask = add(func(*scratch) {
					s, err := pixels.CheckedSpectrum(f)
					if s != nil {
						spec = *s
					} else if err == nil {
						spec = f.Spectrum()
					}
					specErr = err
				})
			}
			break
		}
	}
	var cont pixels.Continuum
	var contErr error
	var contTask *task
	for _, a := range arts {
		if a.Kind == ContinuumCSV || a.Kind == ContinuumFigure {
			contTask = add(func(*scratch) { cont, contErr = f.Continuum() })
			break
		}
	}
	// The continuum at the centres of the spectrum's bins, for the
	// combined table.
	var binCont pixels.Continuum
	var binContErr error
	var binContTask *task
	for _, a := range arts {
		if a.Kind == CombinedCSV {
			binContTask = add(func(*scratch) { binCont, binContErr = f.ContinuumAt(binCentres(f.Res)) })
			break
		}
	}
	encoded := make([][]byte, len(arts))
	errs := make([]error, len(arts))
	producer := make([]*task, len(arts))
	encode := func(i int, img image.Image, err error) {
		if err == nil {
			var b bytes.Buffer
			err = figure.EncodePNG(&b, img)
			encoded[i] = b.Bytes()
		}
		errs[i] = err
	}
	// store keeps a file made directly as bytes (SVG).
	store := func(i int, data []byte, err error) {
		encoded[i], errs[i] = data, err
	}
	// One task per map, in the order the maps first appear.
	byMap := map[string][]int{}
	var order []string
	for i, a := range arts {
		if a.Kind == MapFigure || a.Kind == MapBare || a.Kind == MapIndexed || a.Kind == MapSVG {
			if byMap[a.Map] == nil {
				order = append(order, a.Map)
			}
			byMap[a.Map] = append(byMap[a.Map], i)
		}
	}
	for _, k := range []Kind{MapFigure, MapBare, MapIndexed, MapSVG} {
		if slices.ContainsFunc(arts, func(a Artifact) bool { return a.Kind == k }) {
			job.Scales = job.Scales.Fill(f) // once for every map
			break
		}
	}
	for _, name := range order {
		idx := byMap[name]
		t := add(func(s *scratch) { mapImages(arts, idx, job, s, encode, store) })
		for _, i := range idx {
			producer[i] = t
		}
	}
	for i, a := range arts {
		if isImage(a.Kind) && producer[i] == nil {
			producer[i] = add(func(*scratch) {
				if a.Kind == SpectrumFigure || a.Kind == SpectrumSVG {
					<-specTask.done // an earlier task: already running or done
					if specErr != nil {
						store(i, nil, specErr)
						return
					}
				}
				if a.Kind == ContinuumFigure {
					<-contTask.done // likewise
					if contErr != nil {
						encode(i, nil, contErr)
						return
					}
					img, err := figure.DrawPlot(ContinuumPlot(&cont, "thermal continuum collapsed from the image", f.Res.Caption()))
					if err != nil {
						err = fmt.Errorf("continuum figure: %w", err)
					}
					encode(i, img, err)
					return
				}
				if a.Kind == SpectrumSVG {
					data, err := spectrumSVG(job, &spec)
					store(i, data, err)
					return
				}
				if a.Kind == BandSVG || a.Kind == BandRedshiftSVG {
					if job.Band == nil {
						store(i, nil, fmt.Errorf("%s: no band was located", a.Name))
						return
					}
					data, err := bandSVG(a.Kind, f, job.Band)
					store(i, data, err)
					return
				}
				img, err := drawImage(a, job, &spec)
				encode(i, img, err)
			})
		}
	}

	pool := make(chan struct{})
	go func() {
		defer close(pool)
		workers.Each(ctx, len(tasks), func() *scratch { return &scratch{} }, func(n int, s *scratch) {
			tasks[n].run(s)
			close(tasks[n].done)
		})
	}()
	defer func() {
		cancel()
		<-pool
	}()
	// wait returns once t has run, or ctx.Err() if the pool stopped first.
	wait := func(t *task) error {
		select {
		case <-t.done:
			return nil
		case <-pool:
			select {
			case <-t.done:
				return nil
			default:
				if err := ctx.Err(); err != nil {
					return err
				}
				return errors.New("outputs: a task did not run")
			}
		}
	}

	for i, a := range arts {
		if err := ctx.Err(); err != nil {
			return err
		}
		var write func(io.Writer) error
		switch {
		case isImage(a.Kind):
			if err := wait(producer[i]); err != nil {
				return err
			}
			if errs[i] != nil {
				return errs[i]
			}
			data := encoded[i]
			encoded[i] = nil // put holds the only reference
			write = func(w io.Writer) error { _, err := w.Write(data); return err }
		case a.Kind == ContinuumCSV:
			if err := wait(contTask); err != nil {
				return err
			}
			if contErr != nil {
				return contErr
			}
			write = func(w io.Writer) error { return WriteContinuumCSV(w, &cont, f.Res.Caption(), f.Res) }
		case a.Kind == CombinedCSV:
			if err := wait(specTask); err != nil {
				return err
			}
			if specErr != nil {
				return specErr
			}
			if err := wait(binContTask); err != nil {
				return err
			}
			if binContErr != nil {
				return binContErr
			}
			write = func(w io.Writer) error { return WriteCombinedCSV(w, &spec, &binCont, f.Res.Caption(), f.Res) }
		case a.Kind == SpectrumCSV:
			if err := wait(specTask); err != nil {
				return err
			}
			if specErr != nil {
				return specErr
			}
			fallthrough
		default:
			write = tableWriter(a, job, &spec)
		}
		if err := put(a.Name, write); err != nil {
			return err
		}
	}
	return nil
}

// mapImages draws one map once and makes its artifacts arts[i], i in idx
// (all of the same map), with job.Scales complete.
func mapImages(arts []Artifact, idx []int, job Job, s *scratch, encode func(int, image.Image, error), store func(int, []byte, error)) {
	f := job.Frame
	m, err := maps.Lookup(arts[idx[0]].Map)
	if err != nil {
		for _, i := range idx {
			encode(i, nil, err)
		}
		return
	}
	var img *image.RGBA
	for _, i := range idx {
		a := arts[i]
		if a.Kind == MapIndexed {
			encode(i, m.Indexed(f, job.Scales), nil)
			continue
		}
		if img == nil {
			img = s.image(f.W, f.H)
			m.Draw(img, f, job.Scales)
		}
		if a.Kind == MapBare {
			encode(i, img, nil)
			continue
		}
		if a.Kind == MapSVG {
			var b bytes.Buffer
			err := m.FigureSVG(&b, f, job.Scales, img)
			if err != nil {
				err = fmt.Errorf("%s vector figure: %w", a.Map, err)
			}
			store(i, b.Bytes(), err)
			continue
		}
		fig, err := m.NotedFigure(f, job.Scales, img, job.Note)
		if err != nil {
			err = fmt.Errorf("%s figure: %w", a.Map, err)
		}
		encode(i, fig, err)
	}
}

// keepNames lists the records of k by their Frame field names.
func keepNames(k pixels.Keep) string {
	var out []string
	for _, c := range [...]struct {
		k    pixels.Keep
		name string
	}{{pixels.KeepR, "R"}, {pixels.KeepG, "G"}, {pixels.KeepLine, "Line"}, {pixels.KeepBol, "Bol"}, {pixels.KeepBand, "Band"}, {pixels.KeepBehind, "Behind"}, {pixels.KeepStokes, "Q, U"}} {
		if k&c.k != 0 {
			out = append(out, c.name)
		}
	}
	return strings.Join(out, ", ")
}

func isImage(k Kind) bool {
	switch k {
	case MapFigure, MapBare, MapIndexed, SpectrumFigure, BandBare, BandFigure, BandRedshift, ContinuumFigure, MapSVG, SpectrumSVG, BandSVG, BandRedshiftSVG:
		return true
	}
	return false
}

// drawImage makes the image of an image artifact other than a map's
// (mapImages).
func drawImage(a Artifact, job Job, spec *pixels.Spectrum) (image.Image, error) {
	f := job.Frame
	switch a.Kind {
	case SpectrumFigure:
		pl, err := jobSpectrumPlot(job, spec)
		if err != nil {
			return nil, fmt.Errorf("spectrum figure: %w", err)
		}
		img, err := figure.DrawPlot(pl)
		if err != nil {
			return nil, fmt.Errorf("spectrum figure: %w", err)
		}
		return img, nil
	case BandBare, BandFigure, BandRedshift:
		if job.Band == nil {
			return nil, fmt.Errorf("%s: no band was located", a.Name)
		}
		return bandImage(a.Kind, f, job.Band)
	}
	return nil, fmt.Errorf("%s: not an image", a.Name)
}

// tableWriter returns the writer of a non-image artifact.
func tableWriter(a Artifact, job Job, spec *pixels.Spectrum) func(io.Writer) error {
	f := job.Frame
	switch a.Kind {
	case FITSMaps:
		return func(w io.Writer) error { return writeFITS(w, f, job.Version) }
	case SpectrumCSV:
		return func(w io.Writer) error {
			if err := writeClipComment(w, f); err != nil {
				return err
			}
			if a.Map == scene.PolarisationMap {
				q, u := f.StokesSpectrum()
				return writeCSV(w, spec, &q, &u, f.Res.Caption(), f.Res)
			}
			return WriteCSV(w, spec, f.Res.Caption(), f.Res)
		}
	case Manifest:
		return func(w io.Writer) error { return writeManifest(w, f, job.Version, job.Scales.Fill(f)) }
	case BandJSON, BandText, BandFITS:
		if job.Band == nil {
			return func(io.Writer) error { return fmt.Errorf("no band was located") }
		}
		rep := job.Band.Report
		switch a.Kind {
		case BandJSON:
			return func(w io.Writer) error { return WriteBandJSON(w, rep) }
		case BandText:
			return func(w io.Writer) error { return WriteBandText(w, rep) }
		}
		return func(w io.Writer) error { return writeBandFITS(w, f, job.Band, job.Version) }
	}
	return func(io.Writer) error { return fmt.Errorf("%s: unknown artifact", a.Name) }
}
