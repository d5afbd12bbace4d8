package sweep

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"

	"kerrscope/render/internal/figure"
	"kerrscope/render/maps"
)

// continuaPlots returns one plot of all frames' thermal continua, E² N_E
// against log₁₀ E, coloured by the first axis as spectraPlots colours the
// line profiles; for a grid, one plot per value of the second axis.
// Frames without a thermal disk are left out; nil when none has one.
func (p *Plan) continuaPlots() ([]namedPlot, error) {
	fam := p.curveFamily()
	var out []namedPlot
	for j, g := range fam.groups {
		pl := figure.Plot{
			Title:    "thermal continua over the sweep",
			Subtitle: p.familySubtitle(g),
			XLabel:   "log₁₀ (observed energy *{E}_{obs} / keV)",
			YLabel:   "*{E}^{2} *{N}_{E} [keV cm⁻² s⁻¹]",
			LogY:     true,
			Bar:      fam.bar,
			Size:     maps.FigureSize(p.Points[0].Scene.Output),
		}
		peak := 0.0
		for _, pt := range g {
			if !pt.Scene.Thermal.On {
				continue
			}
			name := p.framePrefix(pt.Index) + "-continuum.csv"
			x, y, err := readContinuum(filepath.Join(p.Dir(), name))
			if err != nil {
				return nil, fmt.Errorf("%s: %w", name, err)
			}
			for _, v := range y {
				peak = math.Max(peak, v)
			}
			pl.Series = append(pl.Series, figure.Series{X: x, Y: y, Width: 1.5,
				Color: fam.color(pt.Values[0])})
		}
		if len(pl.Series) == 0 {
			continue
		}
		if peak > 0 {
			pl.YMin, pl.YMax = peak*1e-4, peak*2
		}
		out = append(out, namedPlot{p.familyName("sweep-continua", j), pl})
	}
	return out, nil
}

// readContinuum reads a continuum CSV written by
// outputs.WriteContinuumCSV: log₁₀ of the energies and the E² N_E column.
func readContinuum(path string) (logE, e2n []float64, err error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, err
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		return nil, nil, err
	}
	if len(rows) < 2 || len(rows[0]) < 3 || rows[0][0] != "energy_kev" || rows[0][len(rows[0])-1] != "e2n_total" {
		return nil, nil, errors.New("not a continuum table (energy_kev, flux_total, ..., e2n_total)")
	}
	last := len(rows[0]) - 1
	for i, row := range rows[1:] {
		e, err1 := strconv.ParseFloat(row[0], 64)
		v, err2 := strconv.ParseFloat(row[last], 64)
		if err := errors.Join(err1, err2); err != nil || !(e > 0) {
			return nil, nil, fmt.Errorf("row %d: energy %q, E² N_E %q", i+1, row[0], row[last])
		}
		logE, e2n = append(logE, math.Log10(e)), append(e2n, v)
	}
	return logE, e2n, nil
}
