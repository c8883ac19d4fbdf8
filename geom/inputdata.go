package geom

import "io"

// errShrank is the message for a mapped file that shrank while it was
// read.
const errShrank = "the file shrank while it was read; read it again once it is written whole"

// InputData is the whole content of an input file, for a reader that
// goes through it once from its start to its end (OpenData). Where the
// system allows (Linux), the file is mapped into memory instead of read
// into a buffer: no copy is made, and the pages the reader has passed
// (Done) are given back as it goes, so the file's bytes are never
// resident whole beside the arrays decoded from them. Elsewhere the file
// is read whole (ReadFile).
//
// A mapped file that shrinks while it is read makes the bytes past its
// new end unreadable: the reader's goroutine must run with
// debug.SetPanicOnFault(true) and turn the fault into an error with
// Fault.
type InputData struct {
	// Data holds the file's bytes, as many as it had when opened. It is
	// valid until Close. Bytes given back by Done can still be read (a
	// message may count the lines before an offset): they are read again
	// from the file.
	Data []byte
	path string
	m    *mapping // nil when the file was read whole
}

// OpenData opens the named file for one pass through its content (a
// regular file only, as OpenRegular). When digest is not nil every byte
// also goes to it, hashed by a goroutine a little ahead of the reader
// (see ReadOptions.Digest); Finish returns the digest's error. Close the
// data when done.
func OpenData(path string, digest io.Writer) (*InputData, error) {
	f, err := OpenRegular(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	if int64(int(f.Size())) != f.Size() || f.Size() > int64(^uint(0)>>2) {
		return nil, FileError(path, "%d bytes is more than this machine can hold", f.Size())
	}
	if d, ok := mapData(f, path, digest); ok {
		return d, nil
	}
	data, err := ReadFile(path, digest)
	if err != nil {
		return nil, err
	}
	return &InputData{Data: data, path: path}, nil
}

// Done tells that the reader has no more use for Data[:n], so that its
// pages can be given back.
func (d *InputData) Done(n int) {
	if d.m != nil {
		d.m.done(n)
	}
}

// Finish waits until the digest has taken every byte of the file and
// returns its error (nil without a digest). Call it once the reader
// has read the whole file.
func (d *InputData) Finish() error {
	if d.m != nil {
		return d.m.finish()
	}
	return nil
}

// Close gives the data back. Data must not be used afterwards.
func (d *InputData) Close() {
	if d.m != nil {
		d.m.close()
		d.m = nil
	}
	d.Data = nil
}

// Fault turns the value r recovered from a panic of a reader of d into
// an input error when it is a memory fault on a mapped file (the file
// shrank while it was read); any other panic goes on.
func (d *InputData) Fault(r any) error {
	if _, ok := r.(interface{ Addr() uintptr }); ok && d.m != nil {
		return FileError(d.path, errShrank)
	}
	panic(r)
}
