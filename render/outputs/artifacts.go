package outputs

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"io"

	"kerrscope/render/internal/figure"
	"kerrscope/render/internal/workers"
	"kerrscope/render/maps"
	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// Kind is what an artifact holds.
type Kind uint8

const (
	FITSMaps       Kind = iota + 1 // every map as a FITS image extension (maps.fits)
	SpectrumCSV                    // the collapsed line spectrum (spectrum.csv)
	MapFigure                      // decorated figure of one map (<map>.png)
	MapBare                        // pixel-exact PNG of one map (<map>-bare.png)
	MapIndexed                     // 8-bit palette PNG of one map (<map>-indexed.png), the source of sweep GIFs
	SpectrumFigure                 // plot of the spectrum (spectrum.png)
	BandJSON                       // band report for scripts (band.json)
	BandText                       // band report for people (band.txt)
	BandFITS                       // band masks per image order (band.fits)
	BandBare                       // pixel-exact band image (band-bare.png)
	BandFigure                     // decorated band figure (band.png)
	BandRedshift                   // redshift factor of the band's light (band-redshift.png)
	Manifest                       // the effective scene (manifest.toml)
)

// Artifact is one file a run writes.
type Artifact struct {
	Name string // file name in the output directory
	Kind Kind
	Map  string // the map, for MapFigure, MapBare and MapIndexed
}

// Set chooses the artifacts a run writes besides those the scene's
// output formats ask for.
type Set struct {
	Prefix   string // put before every file name (a sweep's "frame-0007-")
	Indexed  bool   // an 8-bit palette PNG of every map
	Band     bool   // the band report, masks and figures
	Manifest bool   // manifest.toml
}

// Artifacts lists the files a run of a scene with outputs o writes, in
// the order they are written. It is the one list of a run's files: render
// runs write it, sweeps write and verify it for every frame.
func Artifacts(o scene.Output, s Set) []Artifact {
	var out []Artifact
	add := func(name string, k Kind, m string) {
		out = append(out, Artifact{Name: s.Prefix + name, Kind: k, Map: m})
	}
	if o.Has("fits") {
		add("maps.fits", FITSMaps, "")
	}
	if o.Has("csv") {
		add("spectrum.csv", SpectrumCSV, "")
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
	}
	if o.Has("png") && o.Has("csv") {
		add("spectrum.png", SpectrumFigure, "")
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
	}
	if s.Manifest {
		add("manifest.toml", Manifest, "")
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
	// Band is the located band (pixels.Frame.LocateBand), for the band
	// artifacts.
	Band *Band
}

// Band is a located band of source radii: the report and its mask per
// image order.
type Band struct {
	Report pixels.BandReport
	Mask   [][]bool
}

// Put stores one file, produced by write; Outputs.Write is one.
type Put func(name string, write func(io.Writer) error) error

// Write produces every artifact of the job and hands each to put, in the
// order of arts. Images (figures, pixel-exact and palette PNGs) are drawn
// and encoded on all cores at once; tables (FITS, CSV, reports) are
// streamed. It stops with ctx.Err() once ctx is cancelled.
func Write(ctx context.Context, arts []Artifact, job Job, put Put) error {
	f := job.Frame
	var spec pixels.Spectrum
	for _, a := range arts {
		if a.Kind == SpectrumCSV || a.Kind == SpectrumFigure {
			spec = f.Spectrum()
			break
		}
	}
	// Draw and encode every image at once.
	encoded := make([][]byte, len(arts))
	errs := make([]error, len(arts))
	var images []int
	for i, a := range arts {
		if isImage(a.Kind) {
			images = append(images, i)
		}
	}
	workers.Each(ctx, len(images), func() struct{} { return struct{}{} }, func(n int, _ struct{}) {
		i := images[n]
		img, err := drawImage(arts[i], job, &spec)
		if err == nil {
			var b bytes.Buffer
			err = figure.EncodePNG(&b, img)
			encoded[i] = b.Bytes()
		}
		errs[i] = err
	})
	if err := ctx.Err(); err != nil {
		return err
	}
	for i, a := range arts {
		if err := ctx.Err(); err != nil {
			return err
		}
		if errs[i] != nil {
			return errs[i]
		}
		var write func(io.Writer) error
		if isImage(a.Kind) {
			data := encoded[i]
			write = func(w io.Writer) error { _, err := w.Write(data); return err }
		} else {
			write = tableWriter(a, job, &spec)
		}
		if err := put(a.Name, write); err != nil {
			return err
		}
	}
	return nil
}

func isImage(k Kind) bool {
	switch k {
	case MapFigure, MapBare, MapIndexed, SpectrumFigure, BandBare, BandFigure, BandRedshift:
		return true
	}
	return false
}

// drawImage makes the image of an image artifact.
func drawImage(a Artifact, job Job, spec *pixels.Spectrum) (image.Image, error) {
	f := job.Frame
	switch a.Kind {
	case MapFigure, MapBare, MapIndexed:
		m, err := maps.Lookup(a.Map)
		if err != nil {
			return nil, err
		}
		switch a.Kind {
		case MapFigure:
			img, err := figure.DrawPanel(m.Panel(f, job.Scales), 0)
			if err != nil {
				return nil, fmt.Errorf("%s figure: %w", a.Map, err)
			}
			return img, nil
		case MapBare:
			return m.Image(f, job.Scales), nil
		}
		return m.Indexed(f, job.Scales), nil
	case SpectrumFigure:
		title := job.SpectrumTitle
		if title == "" {
			title = "line profile collapsed from the image"
		}
		img, err := figure.DrawPlot(SpectrumPlot(spec, title, f.Res.Caption(), job.Scales.FluxMax))
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
		return func(w io.Writer) error { return WriteCSV(w, spec, f.Res.Caption()) }
	case Manifest:
		return func(w io.Writer) error { return WriteManifest(w, f.Res.Scene, job.Version) }
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
