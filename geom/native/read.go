package native

import (
	"errors"
	"io"

	"github.com/joinery-cae/joinery/geom"
)

// Read reads a mesh from r; name is used in error messages.
func Read(r io.Reader, name string, opt geom.ReadOptions) (*geom.Mesh, error) {
	return nil, errors.New("native: not implemented")
}

// ReadFile reads the mesh in the named file.
func ReadFile(path string, opt geom.ReadOptions) (*geom.Mesh, error) {
	return nil, errors.New("native: not implemented")
}
