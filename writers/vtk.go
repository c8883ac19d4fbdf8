package writers

import (
	"errors"
	"io"

	"github.com/joinery-cae/joinery/geom"
)

// WriteVTK writes m as a VTK legacy unstructured grid (stub).
func WriteVTK(w io.Writer, m *geom.Mesh, binary bool) error { return errors.New("writers: not implemented") }
