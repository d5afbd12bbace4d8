package outputs

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"kerrscope/scene"
)

// readTable reads a CSV table of kerrscope: its column names and rows of
// numbers (empty cells as NaN), skipping the # comments.
func readTable(t *testing.T, path string) ([]string, [][]float64) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var head []string
	var rows [][]float64
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		if strings.HasPrefix(line, "#") {
			continue
		}
		cols := strings.Split(line, ",")
		if head == nil {
			head = cols
			continue
		}
		row := make([]float64, len(cols))
		for i, c := range cols {
			v, err := strconv.ParseFloat(c, 64)
			if err != nil {
				v = math.NaN()
			}
			row[i] = v
		}
		rows = append(rows, row)
	}
	return head, rows
}

// TestLineListFiles renders a thermal disk in physical units with three
// iron lines (one of its own law): spectrum.csv has a column per line
// whose sum is the total; lines-continuum.csv has the lines as in
// spectrum.csv and the continuum, which agrees with continuum.csv (its
// own log-spaced energies, interpolated in log N_E – log E) at the bin
// centres, and their sum; the run's effective scene loads again with the
// same lines.
func TestLineListFiles(t *testing.T) {
	dir := t.TempDir()
	w := func(v float64) *float64 { return &v }
	law := "broken"
	r := resolve(t, func(s *scene.Scene) {
		s.Hole.MassSolar, s.Hole.DistanceKpc, s.Thermal.EddingtonRatio = w(10), w(8), w(0.1)
		s.Emission.LineLuminosityErgS = w(1e36)
		s.Screen.Width, s.Screen.Height, s.Screen.FieldOfView = 48, 40, 70
		s.Spectrum.MinKeV, s.Spectrum.MaxKeV = w(0.5), w(12)
		s.Output.Directory = dir
		s.Lines = []scene.Line{{EnergyKeV: 6.4, Weight: w(2)}, {EnergyKeV: 6.7}, {EnergyKeV: 6.97, Emissivity: &law, IndexInner: w(5)}}
	})
	if _, err := Run(context.Background(), r, Options{Version: "test"}); err != nil {
		t.Fatal(err)
	}
	head, rows := readTable(t, filepath.Join(dir, "spectrum.csv"))
	cols := map[string]int{}
	for i, h := range head {
		cols[h] = i
	}
	for _, c := range []string{"flux_total", "flux_order_0", "flux_line_1", "flux_line_2", "flux_line_3"} {
		if _, ok := cols[c]; !ok {
			t.Fatalf("spectrum.csv has no %s (columns %v)", c, head)
		}
	}
	lines := make([]float64, len(rows))
	top := 0.0
	for k, row := range rows {
		sum := row[cols["flux_line_1"]] + row[cols["flux_line_2"]] + row[cols["flux_line_3"]]
		tot := row[cols["flux_total"]]
		top = math.Max(top, tot)
		if math.Abs(sum-tot) > 1e-9*math.Abs(tot)+1e-300 {
			t.Errorf("bin %d: lines sum to %v, total %v", k, sum, tot)
		}
		lines[k] = tot
	}
	if !(top > 0) {
		t.Fatal("no line flux")
	}

	ch, crow := readTable(t, filepath.Join(dir, "continuum.csv"))
	if ch[0] != "energy_kev" || ch[1] != "flux_total" {
		t.Fatalf("continuum.csv columns %v", ch)
	}
	logE, logN := []float64{}, []float64{}
	for _, row := range crow {
		if row[1] > 0 {
			logE, logN = append(logE, math.Log(row[0])), append(logN, math.Log(row[1]))
		}
	}
	interp := func(e float64) (float64, bool) {
		x := math.Log(e)
		i, _ := slices.BinarySearch(logE, x)
		if i == 0 || i == len(logE) {
			return 0, false
		}
		f := (x - logE[i-1]) / (logE[i] - logE[i-1])
		return math.Exp(logN[i-1] + f*(logN[i]-logN[i-1])), true
	}

	bh, brow := readTable(t, filepath.Join(dir, "lines-continuum.csv"))
	want := []string{"energy_kev", "energy_lo_kev", "energy_hi_kev", "flux_total", "flux_continuum", "flux_lines", "flux_line_1", "flux_line_2", "flux_line_3"}
	if !slices.Equal(bh, want) {
		t.Fatalf("lines-continuum.csv columns %v, want %v", bh, want)
	}
	if len(brow) != len(rows) {
		t.Fatalf("%d rows, spectrum.csv has %d", len(brow), len(rows))
	}
	cpeak, checked := 0.0, 0
	for _, row := range brow {
		cpeak = math.Max(cpeak, row[4])
	}
	for k, row := range brow {
		if row[0] != rows[k][0] || row[5] != lines[k] {
			t.Errorf("bin %d: energy %v and lines %v, spectrum.csv %v and %v", k, row[0], row[5], rows[k][0], lines[k])
		}
		if math.Abs(row[3]-row[4]-row[5]) > 1e-9*row[3] {
			t.Errorf("bin %d: total %v is not continuum %v + lines %v", k, row[3], row[4], row[5])
		}
		if c, ok := interp(row[0]); ok && row[4] > 1e-3*cpeak {
			checked++
			if math.Abs(row[4]/c-1) > 0.01 {
				t.Errorf("%.4g keV: continuum %v, continuum.csv interpolated %v", row[0], row[4], c)
			}
		}
	}
	if checked < 20 {
		t.Errorf("only %d bins compared with continuum.csv", checked)
	}

	back, err := scene.Load(filepath.Join(dir, "kerrscope-run.toml"))
	if err != nil {
		t.Fatal(err)
	}
	rb, err := back.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if len(rb.RestLines.Lines) != 3 || rb.RestLines.Lines[2] != r.RestLines.Lines[2] {
		t.Errorf("the effective scene reads back %+v", rb.RestLines.Lines)
	}
}
