package geom

import (
	"errors"
	"fmt"
)

// ErrInput marks every error caused by the content of an input file, so a
// command can tell bad input (exit status 2) from other failures with
// errors.Is(err, ErrInput).
var ErrInput = errors.New("bad input")

// InputError is an error located in an input file. Text formats set Line
// (1-based); binary formats set Offset (byte offset) or Record (0-based
// index of the record, e.g. a cell or a point) instead.
type InputError struct {
	File   string
	Line   int   // 1-based line number, 0 when unknown
	Offset int64 // byte offset, -1 when unknown
	Record int   // record index, -1 when unknown
	Err    error
}

// Error formats the location first: "file:12: msg", "file: byte 4096: msg"
// or "file: record 7: msg".
func (e *InputError) Error() string {
	switch {
	case e.Line > 0:
		return fmt.Sprintf("%s:%d: %v", e.File, e.Line, e.Err)
	case e.Offset >= 0:
		return fmt.Sprintf("%s: byte %d: %v", e.File, e.Offset, e.Err)
	case e.Record >= 0:
		return fmt.Sprintf("%s: record %d: %v", e.File, e.Record, e.Err)
	case e.File != "":
		return fmt.Sprintf("%s: %v", e.File, e.Err)
	}
	return e.Err.Error()
}

// Unwrap returns the underlying error.
func (e *InputError) Unwrap() error { return e.Err }

// Is reports ErrInput so that errors.Is(err, ErrInput) holds for every
// InputError.
func (e *InputError) Is(target error) bool { return target == ErrInput }

// LineError returns an InputError at a 1-based line of a text file.
func LineError(file string, line int, format string, args ...any) error {
	return &InputError{File: file, Line: line, Offset: -1, Record: -1, Err: fmt.Errorf(format, args...)}
}

// OffsetError returns an InputError at a byte offset of a binary file.
func OffsetError(file string, offset int64, format string, args ...any) error {
	return &InputError{File: file, Offset: offset, Record: -1, Err: fmt.Errorf(format, args...)}
}

// RecordError returns an InputError at a 0-based record index.
func RecordError(file string, record int, format string, args ...any) error {
	return &InputError{File: file, Offset: -1, Record: record, Err: fmt.Errorf(format, args...)}
}

// FileError returns an InputError that concerns a whole file.
func FileError(file string, format string, args ...any) error {
	return &InputError{File: file, Offset: -1, Record: -1, Err: fmt.Errorf(format, args...)}
}
