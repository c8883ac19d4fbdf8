//go:build linux

package geom

import (
	"errors"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"sync"

	"golang.org/x/sys/unix"
)

const (
	// releaseStep: pages the reader has passed are given back in runs of
	// at least this many bytes, so that system calls do not show.
	releaseStep = 4 << 20
	// hashAhead is how far the digest may run ahead of the reader: the
	// pages between them are resident.
	hashAhead = 8 << 20
	// hashChunk is how much the digest takes at a time.
	hashChunk = 1 << 20
)

// errClosed stops the digest of data closed before it was read to its end.
var errClosed = errors.New("closed before the end")

// mapping is a file mapped read-only into memory, with the state of the
// digest that goes through it beside the reader.
type mapping struct {
	data []byte
	path string
	page int

	mu       sync.Mutex
	cond     *sync.Cond
	read     int  // the reader is done with data[:read]
	hashed   int  // the digest has taken data[:hashed]; len(data) without one
	released int  // data[:released] has been given back
	finished bool // the reader is done: the digest goes to the end
	closed   bool
	herr     error
	hdone    chan struct{} // closed when the digest stops; nil without one
}

// mapData maps the file f; ok is false when it cannot be mapped (an
// empty file, a file system that does not allow it) and must be read.
func mapData(f *File, path string, digest io.Writer) (*InputData, bool) {
	size := int(f.Size())
	if size == 0 {
		return nil, false
	}
	data, err := unix.Mmap(int(f.f.Fd()), 0, size, unix.PROT_READ, unix.MAP_PRIVATE)
	if err != nil {
		return nil, false
	}
	m := &mapping{data: data, path: path, page: os.Getpagesize(), hashed: size}
	m.cond = sync.NewCond(&m.mu)
	if digest != nil {
		m.hashed = 0
		m.hdone = make(chan struct{})
		go m.hash(digest)
	}
	return &InputData{Data: data, path: path, m: m}, true
}

// hash feeds the data to the digest, at most hashAhead bytes ahead of
// the reader.
func (m *mapping) hash(w io.Writer) {
	defer close(m.hdone)
	err := m.hashAll(w)
	m.mu.Lock()
	m.herr = err
	m.hashed = len(m.data) // nothing more to wait for before giving pages back
	m.releaseLocked()
	m.mu.Unlock()
}

func (m *mapping) hashAll(w io.Writer) (err error) {
	debug.SetPanicOnFault(true)
	defer func() {
		if r := recover(); r != nil {
			if _, ok := r.(interface{ Addr() uintptr }); !ok {
				panic(r)
			}
			err = FileError(m.path, errShrank)
		}
	}()
	for pos := 0; pos < len(m.data); {
		m.mu.Lock()
		for !m.closed && !m.finished && pos >= m.read+hashAhead {
			m.cond.Wait()
		}
		closed := m.closed
		m.mu.Unlock()
		if closed {
			return errClosed
		}
		end := min(pos+hashChunk, len(m.data))
		if _, err := w.Write(m.data[pos:end]); err != nil {
			return fmt.Errorf("%s: %w", m.path, err)
		}
		pos = end
		m.mu.Lock()
		m.hashed = pos
		m.releaseLocked()
		m.mu.Unlock()
	}
	return nil
}

func (m *mapping) done(n int) {
	m.mu.Lock()
	if n > m.read {
		m.read = min(n, len(m.data))
		m.cond.Broadcast()
		m.releaseLocked()
	}
	m.mu.Unlock()
}

// releaseLocked gives back the pages both the reader and the digest are
// done with, in steps of releaseStep.
func (m *mapping) releaseLocked() {
	upto := min(m.read, m.hashed)
	upto -= upto % m.page
	if upto-m.released < releaseStep && (upto < len(m.data)-m.page || upto <= m.released) {
		return
	}
	// Giving pages back is only a saving: an error leaves them resident.
	_ = unix.Madvise(m.data[m.released:upto], unix.MADV_DONTNEED)
	m.released = upto
}

func (m *mapping) finish() error {
	if m.hdone == nil {
		return nil
	}
	m.mu.Lock()
	m.finished = true
	m.cond.Broadcast()
	m.mu.Unlock()
	<-m.hdone
	return m.herr
}

func (m *mapping) close() {
	m.mu.Lock()
	m.closed = true
	m.cond.Broadcast()
	m.mu.Unlock()
	if m.hdone != nil {
		<-m.hdone
	}
	_ = unix.Munmap(m.data)
}
