package sweep

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"kerrscope/render/maps"
	"kerrscope/render/outputs"
)

// Shard is process K of N (1 ≤ K ≤ N): it renders the frames whose index
// k has k mod N = K − 1 and records them in its own manifest.
type Shard struct {
	K int `json:"k"`
	N int `json:"n"`
}

// MaxShards bounds N.
const MaxShards = 100000

// ParseShard reads "K/N".
func ParseShard(s string) (Shard, error) {
	ks, ns, ok := strings.Cut(strings.TrimSpace(s), "/")
	k, err1 := strconv.Atoi(strings.TrimSpace(ks))
	n, err2 := strconv.Atoi(strings.TrimSpace(ns))
	if !ok || err1 != nil || err2 != nil {
		return Shard{}, fmt.Errorf("%q: want K/N, e.g. 3/8 for the third of eight processes", s)
	}
	sh := Shard{K: k, N: n}
	return sh, sh.Validate()
}

// Validate checks 1 ≤ K ≤ N ≤ MaxShards.
func (s Shard) Validate() error {
	if s.N < 1 || s.N > MaxShards {
		return fmt.Errorf("%d/%d: N must be between 1 and %d", s.K, s.N, MaxShards)
	}
	if s.K < 1 || s.K > s.N {
		return fmt.Errorf("%d/%d: K must be between 1 and N = %d", s.K, s.N, s.N)
	}
	return nil
}

// Owns reports whether frame k belongs to the shard.
func (s Shard) Owns(k int) bool { return k%s.N == s.K-1 }

// String returns "K/N".
func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.K, s.N) }

// ManifestName returns the shard's manifest file name,
// sweep-shard-K-of-N.json.
func (s Shard) ManifestName() string { return fmt.Sprintf("sweep-shard-%d-of-%d.json", s.K, s.N) }

// manifestFormat names the manifest layout.
const manifestFormat = "kerrscope sweep manifest 1"

// manifestPattern matches manifest file names.
var manifestPattern = regexp.MustCompile(`^sweep-shard-([0-9]+)-of-([0-9]+)\.json$`)

// manifest is one shard's record of a sweep: what is swept, with which
// scales, and every finished frame with its files.
type manifest struct {
	Format     string        `json:"format"`
	Program    string        `json:"program"`
	Definition definition    `json:"definition"`
	Scales     scaleRecord   `json:"scales"`
	Window     Window        `json:"window"`
	Shard      Shard         `json:"shard"`
	Frames     []frameRecord `json:"frames"`

	name string // file name, when loaded
}

// definition is what makes two sweeps the same: the base scene (without
// its output directory, and with the swept values at their first value),
// the axes and the scales the user fixed.
type definition struct {
	Scene string      `json:"scene_toml"`
	Axes  []Axis      `json:"axes"`
	Fixed scaleRecord `json:"fixed_scales"`
}

// scaleRecord is maps.Scales in the manifest (0 = not fixed).
type scaleRecord struct {
	GMin     float64 `json:"g_min"`
	GMax     float64 `json:"g_max"`
	IMax     float64 `json:"intensity_max"`
	IDecades float64 `json:"intensity_decades"`
	RMin     float64 `json:"radius_min"`
	RMax     float64 `json:"radius_max"`
	FluxMax  float64 `json:"flux_max_per_kev"`
}

func toRecord(s maps.Scales) scaleRecord {
	return scaleRecord{s.GMin, s.GMax, s.IMax, s.IDecades, s.RMin, s.RMax, s.FluxMax}
}

func (s scaleRecord) scales() maps.Scales {
	return maps.Scales{GMin: s.GMin, GMax: s.GMax, IMax: s.IMax, IDecades: s.IDecades, RMin: s.RMin, RMax: s.RMax, FluxMax: s.FluxMax}
}

// frameRecord is one finished frame.
type frameRecord struct {
	Index  int           `json:"index"`
	Values []valueRecord `json:"values"`
	Files  []fileRecord  `json:"files"`
}

type valueRecord struct {
	Key   string  `json:"key"`
	Value float64 `json:"value"`
}

// fileRecord is one file of a frame with its size and SHA-256.
type fileRecord struct {
	Name   string `json:"name"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// definition returns the plan's definition.
func (p *Plan) definition() (definition, error) {
	s := p.Base
	s.Output.Directory = ""
	for _, a := range p.Axes {
		if a.Key == SpotTime {
			continue
		}
		f, _ := numericField(a.Key)
		if err := f.Set(&s, formatValue(a.From)); err != nil {
			return definition{}, err
		}
	}
	text, err := s.TOML()
	if err != nil {
		return definition{}, err
	}
	return definition{Scene: string(text), Axes: p.Axes, Fixed: toRecord(p.Fixed)}, nil
}

// same reports whether two definitions are equal, and if not, names the
// part that differs.
func (d definition) same(o definition) (bool, string) {
	switch {
	case d.Scene != o.Scene:
		return false, "the scene"
	case !slices.Equal(d.Axes, o.Axes):
		return false, "the list of swept values"
	case d.Fixed != o.Fixed:
		return false, "the set of fixed scales"
	}
	return true, ""
}

// loadManifests reads every shard manifest in dir, sorted by name. A
// missing directory has none; an unreadable manifest is an error.
func loadManifests(dir string) ([]*manifest, error) {
	ms, bad, err := readManifests(dir)
	if err == nil && len(bad) > 0 {
		err = bad[0]
	}
	return ms, err
}

// readManifests reads every shard manifest in dir, sorted by name, and
// reports the unreadable ones (truncated, not JSON, another layout, or
// another shard's name) apart.
func readManifests(dir string) (ms []*manifest, bad []*badManifest, err error) {
	ents, err := os.ReadDir(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil, nil
	}
	if err != nil {
		return nil, nil, err
	}
	for _, e := range ents {
		m := manifestPattern.FindStringSubmatch(e.Name())
		if m == nil || e.IsDir() {
			continue
		}
		data, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			return nil, nil, err
		}
		var mf manifest
		d := json.NewDecoder(bytes.NewReader(data))
		d.DisallowUnknownFields()
		if err := d.Decode(&mf); err != nil || mf.Format != manifestFormat {
			bad = append(bad, &badManifest{e.Name(), "is not a sweep manifest this program reads", data})
			continue
		}
		if mf.Shard.ManifestName() != e.Name() {
			bad = append(bad, &badManifest{e.Name(), "records shard " + mf.Shard.String(), data})
			continue
		}
		mf.name = e.Name()
		ms = append(ms, &mf)
	}
	return ms, bad, nil
}

// badManifest is a manifest file that cannot be read.
type badManifest struct {
	name, why string
	data      []byte
}

// fileRecordText matches one whole file record as manifest.write lays it
// out.
var fileRecordText = regexp.MustCompile(`\{\s*"name": "([^"\\/]+)",\s*"bytes": ([0-9]{1,18}),\s*"sha256": "([0-9a-f]{64})"\s*\}`)

// salvage returns the whole file records left in an unreadable manifest
// (one cut short by a full disk, say): each names a file with the size
// and SHA-256 this program wrote.
func (b *badManifest) salvage() []fileRecord {
	var out []fileRecord
	for _, m := range fileRecordText.FindAllSubmatch(b.data, -1) {
		n, err := strconv.ParseInt(string(m[2]), 10, 64)
		if err == nil {
			out = append(out, fileRecord{Name: string(m[1]), Bytes: n, SHA256: string(m[3])})
		}
	}
	return out
}

func (b *badManifest) Error() string {
	return fmt.Sprintf("%s %s (remove it, or start over with --restart)", b.name, b.why)
}

// manifestTemp is the name prefix of a shard's temporary manifest files.
func manifestTemp(s Shard) string { return "." + s.ManifestName() + ".tmp-" }

// write stores the manifest atomically as dir/name: a temporary file in
// the same directory, synced, then renamed over the old one.
func (m *manifest) write(dir string) error {
	data, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return err
	}
	data = append(data, '\n')
	tmp, err := os.CreateTemp(dir, manifestTemp(m.Shard)+"*")
	if err != nil {
		return err
	}
	_, err = tmp.Write(data)
	if err == nil {
		err = tmp.Chmod(0o644)
	}
	if err == nil {
		err = tmp.Sync()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp.Name(), filepath.Join(dir, m.Shard.ManifestName()))
	}
	if err == nil {
		err = outputs.SyncDir(dir)
	}
	if err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("manifest: %w", err)
	}
	return nil
}

// verify reports whether rec describes frame pt of the plan and all its
// files are in dir with the recorded sizes and hashes.
func (p *Plan) verify(rec frameRecord, pt Point) bool {
	if rec.Index != pt.Index || len(rec.Values) != len(pt.Values) {
		return false
	}
	for i, v := range rec.Values {
		if v.Key != p.Axes[i].Key || v.Value != pt.Values[i] {
			return false
		}
	}
	want := p.fileNames(pt.Index)
	if len(rec.Files) != len(want) {
		return false
	}
	for i, f := range rec.Files {
		if f.Name != want[i] {
			return false
		}
		n, sum, err := outputs.HashFile(filepath.Join(p.Dir(), f.Name))
		if err != nil || n != f.Bytes || sum != f.SHA256 {
			return false
		}
	}
	return true
}

// valuesRecord returns the record of a point's values.
func (p *Plan) valuesRecord(pt Point) []valueRecord {
	out := make([]valueRecord, len(pt.Values))
	for i, v := range pt.Values {
		out[i] = valueRecord{p.Axes[i].Key, v}
	}
	return out
}

// hashingWriter passes writes on and keeps their SHA-256 and length.
type hashingWriter struct {
	w io.Writer
	n int64
	s interface {
		io.Writer
		Sum([]byte) []byte
	}
}

func newHashingWriter(w io.Writer) *hashingWriter { return &hashingWriter{w: w, s: sha256.New()} }

func (hw *hashingWriter) Write(b []byte) (int, error) {
	n, err := hw.w.Write(b)
	hw.s.Write(b[:n])
	hw.n += int64(n)
	return n, err
}

func (hw *hashingWriter) record(name string) fileRecord {
	return fileRecord{Name: name, Bytes: hw.n, SHA256: hex.EncodeToString(hw.s.Sum(nil))}
}
