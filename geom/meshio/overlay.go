package meshio

import (
	"io"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
)

// Overlay applies further parts tables to a loaded model, in order, each
// over what the tables before it gave. Such a table (for instance the
// surfaces.yaml that joinery offsets writes) lists parts whose reference
// surface it sets, entry by entry:
//
//   - surface and offset replace the part's reference surface (mid when
//     the entry gives neither; see the package documentation for how the
//     two combine);
//   - thickness, which every entry gives, must equal the part's (to
//     within geom.OffsetTolerance, in mm: both are in the inputs' unit
//     of scale mm): a table of surfaces inferred for
//     other thicknesses is out of date;
//   - name and material replace the part's where the entry gives them;
//   - mesh may not be given: it decides how files are read, which only
//     the first table does.
//
// Entries for parts the model does not have, or has without elements,
// are added to UnusedParts.
// digest, when not nil, gives the writer each table's bytes go to as it
// is read (as LoadOptions.Digest).
func (md *Model) Overlay(paths []string, digest func(path string) io.Writer, scale float64) error {
	m := md.Mesh
	inUse := m.PartsInUse()
	for _, path := range paths {
		var dw io.Writer
		if digest != nil {
			dw = digest(path)
		}
		table, err := readParts(path, dw, scale)
		if err != nil {
			return err
		}
		for _, t := range table {
			i, ok := m.PartIndex(t.ID)
			if !ok || !inUse[i] {
				if !slices.Contains(md.UnusedParts, t.ID) {
					md.UnusedParts = append(md.UnusedParts, t.ID)
				}
				if !ok {
					continue
				}
			}
			p := &m.Parts[i]
			switch {
			case t.Mesh != "":
				return geom.FileError(path, "part %d: mesh %q: only the first parts table may assign mesh files to parts", t.ID, t.Mesh)
			case p.Thickness > 0 && math.Abs(t.Thickness-p.Thickness)*scale > geom.OffsetTolerance:
				return geom.FileError(path, "part %d has thickness %s here and %s in the tables before it: this table was made for other thicknesses (rerun joinery offsets)", t.ID, geom.InMM(t.Thickness, scale), geom.InMM(p.Thickness, scale))
			}
			p.Surface = t.Surface
			if t.Name != "" {
				p.Name = t.Name
			}
			if t.Material != "" {
				p.Material = t.Material
			}
		}
	}
	slices.Sort(md.UnusedParts)
	return nil
}
