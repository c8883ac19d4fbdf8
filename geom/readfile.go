package geom

import (
	"io"
	"os"
)

// readChunk is how much ReadFile reads at a time when it feeds a digest:
// small enough that a chunk is still in the processor's cache when the
// digest reads it, large enough that system calls do not show.
const readChunk = 1 << 20

// ReadFile reads the named file whole, as os.ReadFile does, but only a
// regular file (OpenRegular: a device or a named pipe is an input error)
// and no more than the size it had when opened. When digest is not nil,
// every byte also goes to digest as the read buffer fills (see
// ReadOptions.Digest): a goroutine hashes each chunk while the next one
// is read, so hashing the inputs costs no second pass over the file and
// mostly overlaps the read. An error of digest is returned as ReadFile's
// error.
func ReadFile(path string, digest io.Writer) ([]byte, error) {
	f, err := OpenRegular(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	if int64(int(f.Size())) != f.Size() || f.Size() > int64(^uint(0)>>2) {
		return nil, FileError(path, "%d bytes is more than this machine can hold", f.Size())
	}
	size := int(f.Size())
	if digest == nil {
		data := make([]byte, size)
		if _, err := io.ReadFull(f, data); err != nil {
			return nil, &os.PathError{Op: "read", Path: path, Err: err}
		}
		return data, nil
	}
	data := make([]byte, 0, size+1) // +1: the read that meets the end fits
	chunks := make(chan []byte, 4)
	hashed := make(chan error, 1)
	go func() {
		var err error
		for c := range chunks {
			if err == nil {
				_, err = digest.Write(c)
			}
		}
		hashed <- err
	}()
	for {
		if len(data) == cap(data) {
			// Chunks already sent keep the old array alive and unchanged.
			data = append(data, 0)[:len(data)]
		}
		end := min(cap(data), len(data)+readChunk)
		n, rerr := f.Read(data[len(data):end])
		if n > 0 {
			chunks <- data[len(data) : len(data)+n]
			data = data[:len(data)+n]
		}
		if rerr != nil {
			close(chunks)
			herr := <-hashed
			switch {
			case rerr != io.EOF:
				return nil, &os.PathError{Op: "read", Path: path, Err: rerr}
			case herr != nil:
				return nil, herr
			}
			return data, nil
		}
	}
}
