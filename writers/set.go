package writers

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"sync"
)

// ErrOutput marks failures to write outputs (a directory that cannot be
// made, a full disk, a lock held by another run): not the input's fault.
var ErrOutput = errors.New("output not written")

// outputError wraps an error in writing outputs so that errors.Is(err,
// ErrOutput) holds.
type outputError struct{ err error }

func (e *outputError) Error() string        { return e.err.Error() }
func (e *outputError) Unwrap() error        { return e.err }
func (e *outputError) Is(target error) bool { return target == ErrOutput }

// OutputError marks err as a failure to write outputs.
func OutputError(err error) error {
	if err == nil {
		return nil
	}
	return &outputError{err}
}

// File is one output file of a set: its name in the output directory and
// the function that renders it.
type File struct {
	Name   string
	Render func(w io.Writer) error
}

// Rendered is a file rendered in memory.
type Rendered struct {
	Name string
	Data []byte
	// SHA256 is the SHA-256 of Data in hex, as Render found it while the
	// file was still in cache; "" when the file was made otherwise, and
	// then computed where it is needed (the set marker).
	SHA256 string
}

// sum returns the SHA-256 of the file's data in hex.
func (r *Rendered) sum() string {
	if r.SHA256 != "" {
		return r.SHA256
	}
	return hashHex(r.Data)
}

// hashHex returns the SHA-256 of data in hex.
func hashHex(data []byte) string {
	s := sha256.Sum256(data)
	return hex.EncodeToString(s[:])
}

// Render renders every file in memory, concurrently (they are
// independent), and returns them in the order given, each with its
// SHA-256; the first error stops the set, so that nothing is written.
func Render(files []File) ([]Rendered, error) { return RenderInto(files, nil) }

// RenderInto renders as Render does, into buffers lent by bufs (nil:
// new ones). Give the files back with bufs.Release once they are
// written and nothing holds their data.
func RenderInto(files []File, bufs *Buffers) ([]Rendered, error) {
	out := make([]Rendered, len(files))
	errs := make([]error, len(files))
	var wg sync.WaitGroup
	for i := range files {
		wg.Go(func() {
			buf := bufs.get(files[i].Name)
			errs[i] = files[i].Render(buf)
			out[i] = Rendered{Name: files[i].Name, Data: buf.Bytes()}
			if errs[i] == nil {
				out[i].SHA256 = hashHex(out[i].Data)
			}
		})
	}
	wg.Wait()
	for i, err := range errs {
		if err != nil {
			bufs.Release(out)
			return nil, fmt.Errorf("writers: rendering %s: %w", files[i].Name, err)
		}
	}
	return out, nil
}

// Buffers lends rendering buffers by file name, so that runs rendering
// the same files many times (a sweep's variants) reuse the memory of
// those already written instead of growing new buffers each time. Safe
// for concurrent use; a nil *Buffers lends new buffers and takes none
// back.
type Buffers struct {
	mu   sync.Mutex
	free map[string][]*bytes.Buffer
	most map[string]int // the largest file of each name taken back
}

// NewBuffers returns an empty set of buffers.
func NewBuffers() *Buffers {
	return &Buffers{free: map[string][]*bytes.Buffer{}, most: map[string]int{}}
}

func (b *Buffers) get(name string) *bytes.Buffer {
	if b == nil {
		return new(bytes.Buffer)
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	buf := new(bytes.Buffer)
	if n := len(b.free[name]); n > 0 {
		buf = b.free[name][n-1]
		b.free[name] = b.free[name][:n-1]
		buf.Reset()
	}
	// Room for the largest file of the name so far and an eighth more
	// (variants differ in size): one allocation where growing by
	// doubling would copy the file several times over.
	buf.Grow(b.most[name] + b.most[name]/8)
	return buf
}

// Release takes back the buffers of files rendered by RenderInto:
// their Data must not be used afterwards. Files not rendered into b are
// left alone.
func (b *Buffers) Release(files []Rendered) {
	if b == nil {
		return
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	for i := range files {
		f := &files[i]
		if cap(f.Data) == 0 {
			continue
		}
		b.most[f.Name] = max(b.most[f.Name], len(f.Data))
		b.free[f.Name] = append(b.free[f.Name], bytes.NewBuffer(f.Data[:0]))
		f.Data = nil
	}
}
