//go:build !linux

package geom

import "io"

// mapping is a mapped file; on this system files are read whole.
type mapping struct{}

func mapData(*File, string, io.Writer) (*InputData, bool) { return nil, false }

func (*mapping) done(int)      {}
func (*mapping) finish() error { return nil }
func (*mapping) close()        {}
