package sweep

import (
	"context"
	"fmt"
	"io"
	"slices"
	"strings"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
	"kerrscope/render/pixels"
)

// hookStaged, if set (by tests), is called after each file of a frame is
// staged.
var hookStaged func(index int, name string)

// writeFrame renders point pt and commits its files (Plan.artifacts) into
// the output directory, which lk holds, through outputs.Outputs, so that
// an error or a cancelled ctx leaves none of them behind. It returns
// their records, sorted by name, and the estimate of the line flux
// outside the window when the frame's disk image touches its border
// (pixels.EstimateClip; the files record it too), else nil.
func (p *Plan) writeFrame(ctx context.Context, lk *outputs.DirLock, pt Point, sc maps.Scales, version string) ([]fileRecord, *pixels.Clip, error) {
	if p.spot != nil {
		files, err := p.writeSpotFrame(ctx, lk, pt, sc)
		return files, nil, err
	}
	f, err := pixels.RenderChecked(ctx, pt.Scene, nil, outputs.Needs(p.artifacts(pt.Index)))
	if err != nil {
		return nil, nil, err
	}
	job := outputs.Job{Frame: f, Scales: sc, Version: version, Note: p.figureNote(pt.Values),
		SpectrumTitle: fmt.Sprintf("line profile collapsed from the image, frame %d of %d: %s", pt.Index, len(p.Points), p.valueLabel(pt.Values))}
	files, err := p.commitFrame(ctx, lk, pt.Index, func(put outputs.Put) error {
		return outputs.Write(ctx, p.artifacts(pt.Index), job, put)
	})
	return files, f.Clip, err
}

// commitFrame stages the files of frame index that write puts, hashing
// each, and commits them together; an error or a cancelled ctx leaves
// none of them behind. It returns their records, sorted by name.
func (p *Plan) commitFrame(ctx context.Context, lk *outputs.DirLock, index int, write func(outputs.Put) error) ([]fileRecord, error) {
	out, err := outputs.NewOutputs(ctx, lk, "")
	if err != nil {
		return nil, err
	}
	var recs []fileRecord
	put := func(name string, write func(io.Writer) error) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		var hw *hashingWriter
		err := out.Write(name, func(w io.Writer) error {
			hw = newHashingWriter(w)
			return write(hw)
		})
		if err != nil {
			return err
		}
		recs = append(recs, hw.record(name))
		if hookStaged != nil {
			hookStaged(index, name)
		}
		return nil
	}
	if err := write(put); err != nil {
		out.Abort()
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		out.Abort()
		return nil, err
	}
	if _, err := out.Commit(); err != nil {
		return nil, err
	}
	slices.SortFunc(recs, func(a, b fileRecord) int { return strings.Compare(a.Name, b.Name) })
	return recs, nil
}
