package outputs

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
)

// Outputs stages a run's files in a hidden folder inside the output
// directory and moves them into place together when all are written:
// after a failure, an interruption or a crash at any point, the directory
// holds the previous run's files or the new run's, never a mix (see
// DirLock for the recovery after a crash).
type Outputs struct {
	ctx   context.Context
	lock  *DirLock
	set   string
	stage string // the staging folder; its new/ holds the staged files
	files []fileSum
	syncs []pendingSync // files whose final sync Commit waits for
}

// NewOutputs starts staging files for the directory that l holds. set
// names the group of files that a run replaces as a whole: the commit
// then also retires the files that the last run of the same set wrote
// (recorded in a hidden file) and this one does not, if they are
// unchanged. An empty set only adds or replaces files by name. Write
// stops with ctx.Err() once ctx is done.
func NewOutputs(ctx context.Context, l *DirLock, set string) (*Outputs, error) {
	if l == nil || l.f == nil {
		return nil, errors.New("output files need the directory's lock (render.Lock)")
	}
	if set != "" && (!validName(set) || strings.ContainsAny(set, ".")) {
		return nil, fmt.Errorf("output set %q: want a plain name", set)
	}
	stage, err := os.MkdirTemp(l.dir, fmt.Sprintf("%s%d-%s-", stagePrefix, os.Getpid(), hostTag()))
	if err != nil {
		return nil, fmt.Errorf("output directory: %w", err)
	}
	if err := os.Mkdir(filepath.Join(stage, "new"), 0o755); err != nil {
		os.RemoveAll(stage)
		return nil, fmt.Errorf("output directory: %w", err)
	}
	return &Outputs{ctx: ctx, lock: l, set: set, stage: stage}, nil
}

// Write stages one file, produced by write. The file is written, hashed
// and synced to disk on other goroutines while write runs (stagedFile);
// Commit waits for the syncs, and reports a failed one.
func (o *Outputs) Write(name string, write func(io.Writer) error) error {
	if err := o.ctx.Err(); err != nil {
		return err
	}
	if !validName(name) || strings.HasPrefix(name, ".kerrscope-") || slices.ContainsFunc(o.files, func(s fileSum) bool { return s.Name == name }) {
		return fmt.Errorf("output file name %q: not a new plain file name", name)
	}
	f, err := os.OpenFile(filepath.Join(o.stage, "new", name), os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return err
	}
	sf := newStagedFile(f)
	err = write(sf)
	if cerr := sf.Close(); err == nil {
		err = cerr
	}
	o.syncs = append(o.syncs, pendingSync{name: name, done: sf.done})
	if err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	n, sum := sf.sum()
	o.files = append(o.files, fileSum{Name: name, Bytes: n, SHA256: sum})
	return nil
}

// Commit moves every staged file into the output directory and returns
// their paths, sorted. It first checks that every target can be replaced
// (a folder of the same name cannot), then records the moves in a
// journal, synced, so that a crash during the renames is completed by the
// next run; a failure during them puts the previous files back. On any
// error the directory keeps the previous run's files.
func (o *Outputs) Commit() ([]string, error) {
	if err := o.ctx.Err(); err != nil {
		o.Abort()
		return nil, err
	}
	release, err := o.lock.commitLock(o.ctx)
	if err != nil {
		o.Abort()
		return nil, err
	}
	defer release()
	paths, err := o.commit()
	if err != nil {
		return nil, fmt.Errorf("output directory %s: %w", o.lock.dir, err)
	}
	return paths, nil
}

func (o *Outputs) commit() ([]string, error) {
	dir := o.lock.dir
	if err := o.waitSyncs(); err != nil {
		o.Abort()
		return nil, err
	}
	staged := slices.Clone(o.files)
	var retire []fileSum
	if o.set != "" {
		written := map[string]bool{}
		for _, s := range staged {
			written[s.Name] = true
		}
		for _, s := range o.lock.readRecord(o.set) {
			if !written[s.Name] && s.matches(filepath.Join(dir, s.Name)) {
				retire = append(retire, s)
			}
		}
		data, err := json.MarshalIndent(o.files, "", "  ")
		if err != nil {
			o.Abort()
			return nil, err
		}
		data = append(data, '\n')
		rec := recordPrefix + o.set + ".json"
		if err := writeDurable(filepath.Join(o.stage, "new", rec), data); err != nil {
			o.Abort()
			return nil, err
		}
		sum := sha256.Sum256(data)
		staged = append(staged, fileSum{Name: rec, Bytes: int64(len(data)), SHA256: hex.EncodeToString(sum[:])})
	}
	j := journal{Format: journalFormat, Stage: filepath.Base(o.stage), Retire: retire}
	for _, s := range staged {
		st, err := os.Lstat(filepath.Join(dir, s.Name))
		switch {
		case errors.Is(err, os.ErrNotExist):
		case err != nil:
			o.Abort()
			return nil, err
		case st.IsDir():
			o.Abort()
			return nil, fmt.Errorf("cannot put %s in place: a folder of that name is in the way (move it away, or choose another output directory); no file was changed", s.Name)
		case !st.Mode().IsRegular() && st.Mode()&os.ModeSymlink == 0:
			o.Abort()
			return nil, fmt.Errorf("cannot put %s in place: a %v of that name is in the way (move it away, or choose another output directory); no file was changed", s.Name, st.Mode().Type())
		default:
			j.Moves = append(j.Moves, move{fileSum: s, Replaces: true})
			continue
		}
		j.Moves = append(j.Moves, move{fileSum: s})
	}
	data, err := json.MarshalIndent(j, "", "  ")
	if err != nil {
		o.Abort()
		return nil, err
	}
	name := strings.Replace(filepath.Base(o.stage), stagePrefix, journalPrefix, 1) + ".json"
	tmp := filepath.Join(o.stage, "journal.tmp")
	if err := SyncDir(filepath.Join(o.stage, "new")); err != nil {
		o.Abort()
		return nil, err
	}
	if err := writeDurable(tmp, data); err != nil {
		o.Abort()
		return nil, err
	}
	if err := os.Rename(tmp, filepath.Join(dir, name)); err != nil {
		o.Abort()
		return nil, err
	}
	if err := SyncDir(dir); err != nil {
		// Without a journal known to be on disk, no file may move.
		os.Remove(filepath.Join(dir, name))
		o.Abort()
		return nil, err
	}
	if err := o.lock.forward(&j); err != nil {
		if berr := o.lock.back(&j); berr != nil {
			return nil, fmt.Errorf("%w; putting the previous files back failed too (%v): the next run into this directory will finish or undo the change", err, berr)
		}
		o.lock.finish(name, o.stage)
		return nil, fmt.Errorf("%w; the previous files are back in place", err)
	}
	if err := o.lock.finish(name, o.stage); err != nil {
		return nil, err
	}
	var paths []string
	for _, s := range o.files {
		paths = append(paths, filepath.Join(dir, s.Name))
	}
	sort.Strings(paths)
	return paths, nil
}

// Abort discards everything staged.
func (o *Outputs) Abort() {
	o.waitSyncs() // the files are closed before they are removed
	os.RemoveAll(o.stage)
}
