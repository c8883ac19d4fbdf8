package meshio

import (
	"errors"
	"io/fs"
	"path/filepath"
	"strings"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/geom/vtk"
	"github.com/joinery-cae/joinery/geom/vtu"
)

// ReadMesh reads the mesh in the named file, choosing the reader by the
// file's extension (in any case): .vtk (an unstructured grid or a
// polydata set), .vtu or .vtp (VTK XML unstructured grid or polydata)
// or .jmesh. Any other
// extension is an input error.
func ReadMesh(path string, opt geom.ReadOptions) (*geom.Mesh, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".vtk":
		return vtk.ReadFile(path, opt)
	case ".vtu", ".vtp":
		return vtu.ReadFile(path, opt)
	case ".jmesh":
		return native.ReadFile(path, opt)
	default:
		if err := geom.StatRegular(path); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return nil, err // a directory says so first
		}
		return nil, geom.FileError(path, "unknown mesh file type %q (want .vtk, .vtu, .vtp or .jmesh)", geom.Excerpt(ext))
	}
}
