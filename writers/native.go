package writers

import (
	"errors"
	"io"

	"github.com/joinery-cae/joinery/geom"
)

// WriteNative writes m in Joinery's native mesh format (stub).
func WriteNative(w io.Writer, m *geom.Mesh) error { return errors.New("writers: not implemented") }
