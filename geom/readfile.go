package geom

import (
	"io"
	"os"
)

// readChunk is how much ReadFile reads at a time when it feeds a digest:
// small enough that a chunk is still in the processor's cache when the
// digest reads it, large enough that system calls do not show.
const readChunk = 1 << 20

// ReadFile reads the named file whole, as os.ReadFile does. When digest
// is not nil, every byte also goes to digest as the read buffer fills
// (see ReadOptions.Digest): a goroutine hashes each chunk while the next
// one is read, so hashing the inputs costs no second pass over the file
// and mostly overlaps the read. An error of digest is returned as
// ReadFile's error.
func ReadFile(path string, digest io.Writer) ([]byte, error) {
	if digest == nil {
		return os.ReadFile(path)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	size := 0
	if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() < int64(^uint(0)>>2) {
		size = int(fi.Size())
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
