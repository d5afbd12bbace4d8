package outputs

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"os"
	"sync"
	"syscall"
	"unsafe"
)

// The staging of one file is a pipeline, so that the goroutine making the
// file's bytes (a FITS conversion, a CSV table) only fills buffers: a
// second goroutine writes each full buffer to the file, a third feeds it
// to the file's SHA-256 (the two run side by side, each buffer passing
// both in order), and a fourth asks the disk to take the data it has so
// far (a sync) each time syncStep more bytes are in the file, so that the
// final sync, which the commit waits for, has only the tail left.
//
// Beyond its first directAfter bytes a file is written without the page
// cache where the system allows it (setDirect, O_DIRECT on Linux): its
// full buffers are whole aligned blocks, and only the tail goes through
// the cache. For the large FITS files that saves a copy of every byte
// into the cache, and the cache pages themselves, which on a virtual
// machine whose free memory the host has taken back cost a fault each: a
// 250 MB FITS file took 0.7 s of system time that way, 0.04 s direct
// (both with their final sync). Smaller files, a sweep's frames among
// them, stay in the cache, where sweep-merge reads them back to check
// their hashes.
const (
	stageBufSize = 1 << 19 // bytes of one buffer
	stageBufs    = 4       // buffers per file: filling, writing, hashing, spare
	syncStep     = 32 << 20
	directAlign  = 4096     // alignment of direct writes: address, length and offset
	directAfter  = syncStep // bytes written through the cache before direct writes
)

// stageBuffers are the buffers of the files being staged, reused from
// file to file, each starting on a directAlign boundary.
var stageBuffers = sync.Pool{New: func() any { b := alignedBuffer(); return &b }}

// alignedBuffer returns an empty buffer of capacity stageBufSize whose
// first byte lies on a directAlign boundary.
func alignedBuffer() []byte {
	b := make([]byte, stageBufSize+directAlign)
	off := (directAlign - int(uintptr(unsafe.Pointer(&b[0]))%directAlign)) % directAlign
	return b[off : off : off+stageBufSize]
}

// directState: whether a staged file's writes bypass the page cache.
type directState int8

const (
	directUntried directState = iota
	directOn
	directOff
)

// stagedFile is the writer of one staged file (Outputs.Write): Write
// buffers; full buffers go to the writing goroutine. Close hands over
// the last buffer and waits until all is written and hashed; the file's
// final sync and close go on in the background (done).
type stagedFile struct {
	f      *os.File
	buf    []byte      // being filled
	spare  int         // buffers not yet taken from the pool (of stageBufs)
	full   chan []byte // to the writing goroutine
	hashed chan []byte // from it to the hashing goroutine
	free   chan []byte // back from that
	// failed is set, with err, by the writing goroutine when a write to
	// the file fails; err may be read only after written is closed, or
	// after failed is seen set under mu.
	mu      sync.Mutex
	failed  bool
	err     error
	written chan struct{} // closed when the writing and hashing goroutines are done
	n       int64         // bytes written to the file
	h       hash.Hash
	kick    chan struct{} // asks the syncer for a sync (capacity 1)
	done    chan error    // the final sync and close: one value
	direct  directState   // writeLoop's only, as is wn
	wn      int64         // bytes written so far
}

// newStagedFile starts the pipeline of f, which it closes at the end.
func newStagedFile(f *os.File) *stagedFile {
	s := &stagedFile{f: f, full: make(chan []byte, stageBufs), hashed: make(chan []byte, stageBufs), free: make(chan []byte, stageBufs),
		written: make(chan struct{}), h: sha256.New(), kick: make(chan struct{}, 1), done: make(chan error, 1)}
	// One buffer to start with; the others only once it fills, so that
	// the many small files cost one buffer each.
	s.buf = (*stageBuffers.Get().(*[]byte))[:0]
	s.spare = stageBufs - 1
	go s.writeLoop()
	go s.hashLoop()
	go s.syncLoop()
	return s
}

// writeLoop writes the full buffers to the file in order and passes
// them on to hashLoop. After a failed write it only passes them on, so
// that Write does not block.
func (s *stagedFile) writeLoop() {
	defer close(s.hashed)
	var since int64
	for b := range s.full {
		if !s.hasFailed() {
			if err := s.write(b); err != nil {
				s.mu.Lock()
				s.failed, s.err = true, err
				s.mu.Unlock()
			} else if since += int64(len(b)); since >= syncStep {
				since = 0
				select {
				case s.kick <- struct{}{}:
				default: // a sync is pending already
				}
			}
		}
		s.hashed <- b
	}
}

// write writes b to the file: the first full buffer after directAfter
// bytes (all full buffers before it, so at an aligned offset) turns direct
// writes on if the system allows them, a shorter one (the tail, not a
// whole number of blocks) turns them off again, and a direct write the
// file system refuses is made through the cache.
func (s *stagedFile) write(b []byte) error {
	if s.direct == directUntried && len(b) != stageBufSize {
		s.direct = directOff // a short buffer before the tail: offsets no longer aligned
	}
	if s.direct == directUntried && s.wn >= directAfter {
		s.direct = directOff
		if setDirect(s.f, true) == nil {
			s.direct = directOn
		}
	}
	if s.direct == directOn && len(b)%directAlign != 0 {
		s.direct = directOff
		if err := setDirect(s.f, false); err != nil {
			return err
		}
	}
	_, err := s.f.Write(b)
	if err != nil && s.direct == directOn && errors.Is(err, syscall.EINVAL) {
		s.direct = directOff
		if err := setDirect(s.f, false); err != nil {
			return err
		}
		_, err = s.f.Write(b)
	}
	if err == nil {
		s.wn += int64(len(b))
	}
	return err
}

// hashLoop feeds the written buffers to the hash, in order, and frees
// them.
func (s *stagedFile) hashLoop() {
	defer close(s.written)
	for b := range s.hashed {
		s.h.Write(b)
		s.n += int64(len(b))
		s.free <- b[:0]
	}
}

// syncLoop syncs the file when asked, and once more, then closes it,
// when kick is closed; the result goes to done.
func (s *stagedFile) syncLoop() {
	var err error
	for range s.kick {
		if err == nil {
			err = s.f.Sync()
		}
	}
	if err == nil && !s.hasFailed() {
		err = s.f.Sync()
	}
	if cerr := s.f.Close(); err == nil {
		err = cerr
	}
	s.done <- err
}

func (s *stagedFile) hasFailed() bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.failed
}

// Write buffers p, handing each full buffer to the writing goroutine.
func (s *stagedFile) Write(p []byte) (int, error) {
	n := 0
	for len(p) > 0 {
		if len(s.buf) == cap(s.buf) {
			if err := s.handOver(); err != nil {
				return n, err
			}
		}
		k := copy(s.buf[len(s.buf):cap(s.buf)], p)
		s.buf = s.buf[:len(s.buf)+k]
		n += k
		p = p[k:]
	}
	return n, nil
}

// handOver sends the buffer being filled to the writing goroutine and
// takes a free one.
func (s *stagedFile) handOver() error {
	s.mu.Lock()
	failed, err := s.failed, s.err
	s.mu.Unlock()
	if failed {
		return err
	}
	s.full <- s.buf
	if s.spare > 0 {
		select {
		case s.buf = <-s.free:
		default:
			s.spare--
			s.buf = (*stageBuffers.Get().(*[]byte))[:0]
		}
		return nil
	}
	s.buf = <-s.free
	return nil
}

// Close writes what is buffered, waits until the file holds every byte
// and the hash has them, and returns the first write error. The final
// sync and close continue in the background; done reports them.
func (s *stagedFile) Close() error {
	if len(s.buf) > 0 {
		s.full <- s.buf
		s.buf = nil
	}
	close(s.full)
	<-s.written
	close(s.kick)
	s.release()
	return s.err
}

// release returns the file's buffers to the pool (after written).
func (s *stagedFile) release() {
	if s.buf != nil {
		stageBuffers.Put(&s.buf)
		s.buf = nil
	}
	for {
		select {
		case b := <-s.free:
			stageBuffers.Put(&b)
		default:
			return
		}
	}
}

// sum is the file's size and SHA-256 (after Close).
func (s *stagedFile) sum() (int64, string) {
	return s.n, hex.EncodeToString(s.h.Sum(nil))
}

// pendingSync is a staged file whose final sync has not been seen yet.
type pendingSync struct {
	name string
	done chan error
}

// waitSyncs waits for the final syncs of every file staged and returns
// their errors, each naming its file.
func (o *Outputs) waitSyncs() error {
	var errs []error
	for _, p := range o.syncs {
		if err := <-p.done; err != nil {
			errs = append(errs, fmt.Errorf("%s: %w", p.name, err))
		}
	}
	o.syncs = nil
	return errors.Join(errs...)
}
