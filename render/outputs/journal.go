package outputs

import (
	"bytes"
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
	"strconv"
	"strings"
	"syscall"
	"time"
)

// The hidden files kerrscope keeps in an output directory.
const (
	lockName      = ".kerrscope-lock"        // advisory lock of the writers (flock)
	commitName    = ".kerrscope-commit-lock" // advisory lock of one commit at a time
	stagePrefix   = ".kerrscope-partial-"    // staging folders, .kerrscope-partial-PID-HOST-N
	journalPrefix = ".kerrscope-journal-"    // commits in progress, .kerrscope-journal-PID-HOST-N.json
	recordPrefix  = ".kerrscope-record-"     // what a run wrote, .kerrscope-record-SET.json
	journalFormat = "kerrscope commit journal 1"
)

// commitWait bounds the wait for another process's commit (a few renames)
// before Commit gives up.
const commitWait = 2 * time.Minute

// hookRenamed, if set (by tests), is called after each rename of a
// commit or of its recovery, with the number of renames so far.
var hookRenamed func(n int)

// DirLock is this process's advisory lock (flock) on an output directory.
// Every writer takes it once for its whole run: exclusively (Lock) for a
// render or a merge, shared (LockShared) for the shards of one sweep,
// which write disjoint files. Taking it first completes or undoes any
// commit that a killed process left half done, and removes the staging
// folders of processes that are gone.
type DirLock struct {
	dir     string
	f       *os.File
	shared  bool
	created bool // the directory did not exist before
}

// BusyError reports an output directory locked by another writer.
type BusyError struct {
	Dir  string
	PID  int    // the holder's process id, 0 if not recorded
	Host string // the holder's host, if recorded
}

func (e *BusyError) Error() string {
	who := "another kerrscope process"
	switch {
	case e.PID == os.Getpid() && e.Host == hostTag():
		who = fmt.Sprintf("another run in this process (pid %d)", e.PID)
	case e.PID > 0 && e.Host != "" && e.Host != hostTag():
		who = fmt.Sprintf("kerrscope process %d on host %s", e.PID, e.Host)
	case e.PID > 0:
		who = fmt.Sprintf("kerrscope process %d", e.PID)
	}
	return fmt.Sprintf("output directory %s is busy: %s is writing into it (wait for it to finish, or choose another output directory)", e.Dir, who)
}

// Lock creates dir if needed and takes its lock exclusively; a directory
// that another process writes into gives a *BusyError.
func Lock(dir string) (*DirLock, error) { return lockDir(dir, false) }

// LockShared is Lock for writers that cooperate (the shards of a sweep):
// any number of them may hold it at once, but not together with Lock.
func LockShared(dir string) (*DirLock, error) { return lockDir(dir, true) }

func lockDir(dir string, shared bool) (*DirLock, error) {
	if strings.TrimSpace(dir) == "" {
		return nil, errors.New("output directory: the name is empty")
	}
	_, err := os.Stat(dir)
	created := errors.Is(err, os.ErrNotExist)
	how := syscall.LOCK_EX
	if shared {
		how = syscall.LOCK_SH
	}
	// A finished run that created an empty directory removes it with its
	// lock file; an opener that lost that race sees another file (or
	// none) at the path and tries again.
	for attempt := 0; ; attempt++ {
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return nil, fmt.Errorf("output directory: %w", err)
		}
		path := filepath.Join(dir, lockName)
		f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o644)
		if errors.Is(err, os.ErrNotExist) && attempt < 10 {
			continue
		}
		if err != nil {
			return nil, fmt.Errorf("output directory: %w", err)
		}
		if err := flock(f, how|syscall.LOCK_NB); err != nil {
			f.Close()
			if errors.Is(err, syscall.EWOULDBLOCK) {
				be := &BusyError{Dir: dir}
				be.PID, be.Host = readHolder(path)
				return nil, be
			}
			return nil, fmt.Errorf("output directory %s: lock: %w", dir, err)
		}
		if !sameFile(f, path) {
			f.Close()
			if attempt < 10 {
				continue
			}
			return nil, fmt.Errorf("output directory %s: its lock file keeps changing", dir)
		}
		// Record the holder for the message another writer gets.
		if err := f.Truncate(0); err == nil {
			f.WriteAt([]byte(fmt.Sprintf("%d %s\n", os.Getpid(), hostTag())), 0)
		}
		l := &DirLock{dir: dir, f: f, shared: shared, created: created}
		if err := l.recover(); err != nil {
			l.Unlock()
			return nil, err
		}
		return l, nil
	}
}

// Dir returns the locked directory.
func (l *DirLock) Dir() string { return l.dir }

// Unlock releases the lock. A directory that the lock created and that
// holds nothing else is removed again, so a run that wrote nothing leaves
// nothing.
func (l *DirLock) Unlock() {
	if l == nil || l.f == nil {
		return
	}
	if l.created && flock(l.f, syscall.LOCK_EX|syscall.LOCK_NB) == nil && onlyLockFiles(l.dir) {
		os.Remove(filepath.Join(l.dir, commitName))
		os.Remove(filepath.Join(l.dir, lockName))
		os.Remove(l.dir)
	}
	l.f.Close()
	l.f = nil
}

func flock(f *os.File, how int) error {
	for {
		err := syscall.Flock(int(f.Fd()), how)
		if !errors.Is(err, syscall.EINTR) {
			return err
		}
	}
}

// sameFile reports whether path still names the open file f.
func sameFile(f *os.File, path string) bool {
	a, err1 := f.Stat()
	b, err2 := os.Stat(path)
	return err1 == nil && err2 == nil && os.SameFile(a, b)
}

// readHolder reads the pid and host a lock file records.
func readHolder(path string) (int, string) {
	data, err := os.ReadFile(path)
	if err != nil || len(data) > 256 {
		return 0, ""
	}
	f := strings.Fields(string(data))
	if len(f) != 2 {
		return 0, ""
	}
	pid, err := strconv.Atoi(f[0])
	if err != nil || pid <= 0 {
		return 0, ""
	}
	return pid, f[1]
}

func onlyLockFiles(dir string) bool {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return false
	}
	for _, e := range ents {
		if e.Name() != lockName && e.Name() != commitName {
			return false
		}
	}
	return true
}

// hostTag is this host's name reduced to letters, digits and dots (so
// that it can stand between dashes in a file name); staging folders carry
// it because a process id means nothing on another host of a shared file
// system.
func hostTag() string {
	h, _ := os.Hostname()
	var b strings.Builder
	for _, r := range h {
		if b.Len() >= 40 {
			break
		}
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '.':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	if b.Len() == 0 {
		return "host"
	}
	return b.String()
}

// commitLock takes the directory's commit lock, waiting (polling, until
// ctx is done or commitWait has passed) while another process commits.
// Every commit and every recovery happens under it, so a journal found
// by its holder belongs to a process that died in the middle of a commit.
func (l *DirLock) commitLock(ctx context.Context) (func(), error) {
	f, err := os.OpenFile(filepath.Join(l.dir, commitName), os.O_RDWR|os.O_CREATE, 0o644)
	if err != nil {
		return nil, fmt.Errorf("output directory %s: %w", l.dir, err)
	}
	deadline := time.Now().Add(commitWait)
	for {
		err := flock(f, syscall.LOCK_EX|syscall.LOCK_NB)
		if err == nil {
			return func() { f.Close() }, nil
		}
		if !errors.Is(err, syscall.EWOULDBLOCK) {
			f.Close()
			return nil, fmt.Errorf("output directory %s: commit lock: %w", l.dir, err)
		}
		if cerr := ctx.Err(); cerr != nil {
			f.Close()
			return nil, cerr
		}
		if time.Now().After(deadline) {
			f.Close()
			return nil, fmt.Errorf("output directory %s: another process has been moving its files into place for %v; is it stopped?", l.dir, commitWait)
		}
		time.Sleep(5 * time.Millisecond)
	}
}

// fileSum is a file's name, size and SHA-256 (hex).
type fileSum struct {
	Name   string `json:"name"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// matches reports whether path is a regular file with the size and
// SHA-256 of s.
func (s fileSum) matches(path string) bool {
	st, err := os.Lstat(path)
	if err != nil || !st.Mode().IsRegular() || st.Size() != s.Bytes {
		return false
	}
	_, sum, err := HashFile(path)
	return err == nil && sum == s.SHA256
}

// HashFile returns the size of the file at path and its SHA-256 (hex).
func HashFile(path string) (int64, string, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, "", err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return 0, "", err
	}
	return n, hex.EncodeToString(h.Sum(nil)), nil
}

// move is one staged file of a commit.
type move struct {
	fileSum
	Replaces bool `json:"replaces"` // a file of that name was there before
}

// journal describes a commit: the staged files to move from the staging
// folder's new/ into the directory, and the files of the previous run of
// the same set to retire. Files that are replaced or retired are first
// moved into the staging folder's old/, so that the commit can be undone
// until the journal is removed.
type journal struct {
	Format string    `json:"format"`
	Stage  string    `json:"stage"`
	Moves  []move    `json:"moves"`
	Retire []fileSum `json:"retire"`
}

// validName reports whether a recorded name is a plain file name of the
// directory (nothing else is ever moved or removed).
func validName(n string) bool {
	return n != "" && n != "." && n != ".." && !strings.ContainsAny(n, "/\x00") && len(n) <= 255
}

// stageOwner parses .kerrscope-partial-PID-HOST-N (or the older
// .kerrscope-partial-PID-N) into its pid and host ("" for this host).
func stageOwner(name string) (pid int, host string, ok bool) {
	rest, found := strings.CutPrefix(name, stagePrefix)
	if !found {
		return 0, "", false
	}
	parts := strings.Split(rest, "-")
	pid, err := strconv.Atoi(parts[0])
	if err != nil || pid <= 0 || len(parts) < 2 || len(parts) > 3 {
		return 0, "", false
	}
	if len(parts) == 3 {
		host = parts[1]
	}
	return pid, host, true
}

// recover completes or undoes the commits of processes that died during
// them, then removes the staging folders of processes that are gone.
func (l *DirLock) recover() error {
	release, err := l.commitLock(context.Background())
	if err != nil {
		return err
	}
	defer release()
	ents, err := os.ReadDir(l.dir)
	if err != nil {
		return fmt.Errorf("output directory: %w", err)
	}
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), journalPrefix) && strings.HasSuffix(e.Name(), ".json") && e.Type().IsRegular() {
			if err := l.replay(e.Name()); err != nil {
				return err
			}
		}
	}
	if ents, err = os.ReadDir(l.dir); err != nil {
		return fmt.Errorf("output directory: %w", err)
	}
	me := hostTag()
	for _, e := range ents {
		pid, host, ok := stageOwner(e.Name())
		if !ok || !e.IsDir() || (host != "" && host != me) || pid == os.Getpid() {
			continue
		}
		if errors.Is(syscall.Kill(pid, 0), syscall.ESRCH) {
			if err := os.RemoveAll(filepath.Join(l.dir, e.Name())); err != nil {
				return fmt.Errorf("output directory: stale staging folder: %w", err)
			}
		}
	}
	return nil
}

// replay finishes the commit a journal describes when every staged file
// is intact (in the staging folder or already moved), and otherwise puts
// the previous files back; either way the directory then holds the files
// of one run only.
func (l *DirLock) replay(name string) error {
	path := filepath.Join(l.dir, name)
	bad := func(why string) error {
		return fmt.Errorf("%s: the record of an interrupted commit cannot be read (%s); the directory may hold files of two runs: check them, then remove it", path, why)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return bad(err.Error())
	}
	var j journal
	d := json.NewDecoder(bytes.NewReader(data))
	d.DisallowUnknownFields()
	if err := d.Decode(&j); err != nil {
		return bad(err.Error())
	}
	if j.Format != journalFormat {
		return bad(fmt.Sprintf("format %q", j.Format))
	}
	if _, _, ok := stageOwner(j.Stage); !ok || !validName(j.Stage) {
		return bad(fmt.Sprintf("staging folder %q", j.Stage))
	}
	for _, m := range j.Moves {
		if !validName(m.Name) {
			return bad(fmt.Sprintf("file name %q", m.Name))
		}
	}
	for _, r := range j.Retire {
		if !validName(r.Name) {
			return bad(fmt.Sprintf("file name %q", r.Name))
		}
	}
	stage := filepath.Join(l.dir, j.Stage)
	complete := true
	for _, m := range j.Moves {
		staged := filepath.Join(stage, "new", m.Name)
		if _, err := os.Lstat(staged); err == nil {
			complete = complete && m.matches(staged)
		} else {
			complete = complete && m.matches(filepath.Join(l.dir, m.Name))
		}
	}
	if complete {
		err = l.forward(&j)
	} else {
		err = l.back(&j)
	}
	if err != nil {
		return fmt.Errorf("output directory %s: completing an interrupted commit: %w", l.dir, err)
	}
	return l.finish(name, stage)
}

// finish removes a carried-out journal and its staging folder.
func (l *DirLock) finish(journalName, stage string) error {
	if err := SyncDir(l.dir); err != nil {
		return err
	}
	if err := os.Remove(filepath.Join(l.dir, journalName)); err != nil {
		return err
	}
	if err := SyncDir(l.dir); err != nil {
		return err
	}
	return os.RemoveAll(stage)
}

func exists(path string) bool {
	_, err := os.Lstat(path)
	return err == nil
}

// forward carries out a journal; it may be run again after an
// interruption at any point and ends in the same state.
func (l *DirLock) forward(j *journal) error {
	stage := filepath.Join(l.dir, j.Stage)
	if err := os.MkdirAll(filepath.Join(stage, "old"), 0o755); err != nil {
		return err
	}
	n := 0
	renamed := func() {
		n++
		if hookRenamed != nil {
			hookRenamed(n)
		}
	}
	type step struct {
		name   string
		move   *move
		retire *fileSum
	}
	var steps []step
	for i := range j.Moves {
		steps = append(steps, step{name: j.Moves[i].Name, move: &j.Moves[i]})
	}
	for i := range j.Retire {
		steps = append(steps, step{name: j.Retire[i].Name, retire: &j.Retire[i]})
	}
	slices.SortFunc(steps, func(a, b step) int { return strings.Compare(a.name, b.name) })
	for _, s := range steps {
		dst := filepath.Join(l.dir, s.name)
		old := filepath.Join(stage, "old", s.name)
		if s.retire != nil {
			if !exists(old) && s.retire.matches(dst) {
				if err := os.Rename(dst, old); err != nil {
					return err
				}
				renamed()
			}
			continue
		}
		staged := filepath.Join(stage, "new", s.name)
		if !exists(staged) {
			continue // moved already
		}
		if s.move.Replaces && !exists(old) && exists(dst) {
			if err := os.Rename(dst, old); err != nil {
				return err
			}
			renamed()
		}
		if err := os.Rename(staged, dst); err != nil {
			return err
		}
		renamed()
	}
	return nil
}

// back undoes a journal, partly or wholly carried out: the previous files
// return from old/ and new files that replaced nothing are removed.
func (l *DirLock) back(j *journal) error {
	stage := filepath.Join(l.dir, j.Stage)
	var errs []error
	for _, m := range j.Moves {
		dst := filepath.Join(l.dir, m.Name)
		old := filepath.Join(stage, "old", m.Name)
		switch {
		case m.Replaces && exists(old):
			errs = append(errs, os.Rename(old, dst))
		case !m.Replaces && m.matches(dst):
			errs = append(errs, os.Remove(dst))
		}
	}
	for _, r := range j.Retire {
		dst := filepath.Join(l.dir, r.Name)
		old := filepath.Join(stage, "old", r.Name)
		if exists(old) && !exists(dst) {
			errs = append(errs, os.Rename(old, dst))
		}
	}
	return errors.Join(errs...)
}

// SyncDir flushes a directory's entries to disk.
func SyncDir(dir string) error {
	f, err := os.Open(dir)
	if err != nil {
		return err
	}
	err = f.Sync()
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}

// writeDurable writes data to path (a new file in a staging folder) and
// syncs it.
func writeDurable(path string, data []byte) error {
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return err
	}
	_, err = f.Write(data)
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}

// readRecord returns what the last run of a set wrote into the
// directory; a missing or unreadable record names nothing.
func (l *DirLock) readRecord(set string) []fileSum {
	data, err := os.ReadFile(filepath.Join(l.dir, recordPrefix+set+".json"))
	if err != nil {
		return nil
	}
	var rec []fileSum
	if json.Unmarshal(data, &rec) != nil {
		return nil
	}
	return slices.DeleteFunc(rec, func(s fileSum) bool { return !validName(s.Name) || strings.HasPrefix(s.Name, ".") })
}

// RemoveSet removes the files that the record of a set (see NewOutputs)
// names and that are unchanged since they were written, then the record
// itself, and returns the paths removed. Files changed since, or never
// recorded, are left alone.
func RemoveSet(l *DirLock, set string) ([]string, error) {
	if l == nil || l.f == nil {
		return nil, errors.New("RemoveSet needs the directory's lock")
	}
	release, err := l.commitLock(context.Background())
	if err != nil {
		return nil, err
	}
	defer release()
	var removed []string
	for _, s := range l.readRecord(set) {
		p := filepath.Join(l.dir, s.Name)
		if s.matches(p) {
			if err := os.Remove(p); err != nil {
				return removed, err
			}
			removed = append(removed, p)
		}
	}
	if err := os.Remove(filepath.Join(l.dir, recordPrefix+set+".json")); err != nil && !errors.Is(err, os.ErrNotExist) {
		return removed, err
	}
	return removed, SyncDir(l.dir)
}
