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
func Render(files []File) ([]Rendered, error) {
	out := make([]Rendered, len(files))
	errs := make([]error, len(files))
	var wg sync.WaitGroup
	for i := range files {
		wg.Go(func() {
			var buf bytes.Buffer
			errs[i] = files[i].Render(&buf)
			out[i] = Rendered{Name: files[i].Name, Data: buf.Bytes()}
			if errs[i] == nil {
				out[i].SHA256 = hashHex(out[i].Data)
			}
		})
	}
	wg.Wait()
	for i, err := range errs {
		if err != nil {
			return nil, fmt.Errorf("writers: rendering %s: %w", files[i].Name, err)
		}
	}
	return out, nil
}
