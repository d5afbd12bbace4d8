package outputs

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// stagedBytes is n pseudo-random bytes (a fixed seed).
func stagedBytes(n int, seed uint64) []byte {
	r := rand.New(rand.NewPCG(seed, 1))
	b := make([]byte, n)
	for i := range b {
		b[i] = byte(r.Uint32())
	}
	return b
}

// The staged files are written by a pipeline of goroutines (stagedFile):
// every file must come out whole, in order, with the size and SHA-256 the
// run's record gives it, whatever the sizes of the writes: none, one
// byte at a time, odd pieces that straddle the buffers, and more than a
// sync step (syncStep) in one call. The hashes are checked against
// SHA-256 of the files read back from disk after the commit.
func TestStagedFilesWholeAndHashed(t *testing.T) {
	big := syncStep + 3*stageBufSize + 12345
	if testing.Short() {
		big = 2*stageBufSize + 777
	}
	files := []struct {
		name  string
		data  []byte
		piece int // bytes per Write; 0: all at once
	}{
		{"empty.bin", nil, 0},
		{"tiny.txt", []byte("a short table\n"), 1},
		{"odd.bin", stagedBytes(3*stageBufSize+1, 1), 7919},
		{"big.bin", stagedBytes(big, 2), 0},
		{"exact.bin", stagedBytes(2*stageBufSize, 3), stageBufSize},
	}
	dir, out := stagingOutputs(t)
	for _, f := range files {
		err := out.Write(f.name, func(w io.Writer) error {
			if f.piece == 0 {
				_, err := w.Write(f.data)
				return err
			}
			for p := f.data; len(p) > 0; {
				k := min(f.piece, len(p))
				if _, err := w.Write(p[:k]); err != nil {
					return err
				}
				p = p[k:]
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
	}
	if _, err := out.Commit(); err != nil {
		t.Fatal(err)
	}
	rec, err := os.ReadFile(filepath.Join(dir, recordPrefix+"test.json"))
	if err != nil {
		t.Fatal(err)
	}
	var sums []fileSum
	if err := json.Unmarshal(rec, &sums); err != nil {
		t.Fatal(err)
	}
	if len(sums) != len(files) {
		t.Fatalf("the record names %d files, want %d", len(sums), len(files))
	}
	for i, f := range files {
		got, err := os.ReadFile(filepath.Join(dir, f.name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, f.data) {
			t.Errorf("%s: %d bytes on disk differ from the %d written", f.name, len(got), len(f.data))
		}
		h := sha256.Sum256(got)
		if s := sums[i]; s.Name != f.name || s.Bytes != int64(len(got)) || s.SHA256 != hex.EncodeToString(h[:]) {
			t.Errorf("record %+v, want %s, %d bytes, sha256 %x", s, f.name, len(got), h)
		}
	}
}

// A file whose writer fails after writing part of it is an error naming
// the file; aborting the run leaves no staged file behind.
func TestStagedFileWriterError(t *testing.T) {
	dir, out := stagingOutputs(t)
	if err := out.Write("first.bin", func(w io.Writer) error { _, err := w.Write(stagedBytes(1000, 4)); return err }); err != nil {
		t.Fatal(err)
	}
	stop := errors.New("the table cannot be made")
	err := out.Write("broken.bin", func(w io.Writer) error {
		if _, err := w.Write(stagedBytes(3*stageBufSize, 5)); err != nil {
			return err
		}
		return stop
	})
	if !errors.Is(err, stop) || !strings.Contains(err.Error(), "broken.bin") {
		t.Fatalf("error %v, want %q naming broken.bin", err, stop)
	}
	out.Abort()
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("after the abort the directory holds %v", l)
	}
	if ents, _ := os.ReadDir(dir); len(ents) > 0 {
		for _, e := range ents {
			if !strings.HasPrefix(e.Name(), ".kerrscope-") {
				t.Errorf("after the abort the directory holds %s", e.Name())
			}
		}
	}
}

// stagingOutputs locks a fresh folder and opens Outputs in it; the lock
// is released when the test ends.
func stagingOutputs(t *testing.T) (string, *Outputs) {
	t.Helper()
	dir := t.TempDir()
	lk, err := Lock(dir)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { lk.Unlock() })
	out, err := NewOutputs(context.Background(), lk, "test")
	if err != nil {
		t.Fatal(err)
	}
	return dir, out
}

// A staged file's full buffers go without the page cache, once its first
// directAfter bytes are written, where the file system takes O_DIRECT; a
// direct write it refuses (here one from a buffer off the block boundary,
// which O_DIRECT rejects with EINVAL) must still reach the file, through
// the cache, and so must the tail that is not a whole number of blocks.
func TestStagedFileDirectFallback(t *testing.T) {
	f, err := os.Create(filepath.Join(t.TempDir(), "direct.bin"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := setDirect(f, true); err != nil {
		t.Skipf("no direct writes on this file system: %v", err)
	}
	if err := setDirect(f, false); err != nil {
		t.Fatal(err)
	}
	aligned := alignedBuffer()[:stageBufSize]
	copy(aligned, stagedBytes(stageBufSize, 5))
	raw := make([]byte, stageBufSize+1)
	off := raw[1:] // not on a block boundary
	copy(off, stagedBytes(stageBufSize, 6))
	tail := stagedBytes(1000, 7)
	// Before directAfter bytes a full buffer stays in the cache.
	early := &stagedFile{f: f}
	if err := early.write(aligned); err != nil || early.direct != directUntried {
		t.Fatalf("first buffer of a file: %v, direct state %v, want untried", err, early.direct)
	}
	if err := f.Truncate(0); err != nil {
		t.Fatal(err)
	}
	if _, err := f.Seek(0, io.SeekStart); err != nil {
		t.Fatal(err)
	}
	s := &stagedFile{f: f, wn: directAfter} // as if past the threshold, at an aligned offset
	for i, b := range [][]byte{aligned, off, aligned, tail} {
		if err := s.write(b); err != nil {
			t.Fatalf("write %d: %v", i, err)
		}
		if i == 0 && s.direct != directOn {
			t.Fatalf("after a full aligned buffer: direct state %v, want on", s.direct)
		}
	}
	if s.direct != directOff {
		t.Errorf("after the refused write and the tail: direct state %v, want off", s.direct)
	}
	got, err := os.ReadFile(f.Name())
	if err != nil {
		t.Fatal(err)
	}
	want := bytes.Join([][]byte{aligned, off, aligned, tail}, nil)
	if !bytes.Equal(got, want) {
		t.Errorf("file holds %d bytes, want %d (equal: %v)", len(got), len(want), bytes.Equal(got, want))
	}
}
