package meshio

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"unicode/utf8"

	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio/tabular"
)

// partKeys returns the keys of a parts table entry, which are also the
// columns of its CSV form.
func partKeys() []string {
	return []string{"id", "name", "thickness", "material", "surface", "mesh", "offset"}
}

// ReadParts reads the parts table in the named file: YAML for .yaml and
// .yml, CSV for .csv (see the package documentation for both forms).
// Parts are returned in file order.
func ReadParts(path string) ([]geom.Part, error) { return readParts(path, nil, 1) }

// readParts reads the parts table in the named file, passing every byte
// to digest (when not nil) as it is read; its thicknesses are in a unit
// of scale mm (see geom.ReadOptions.Scale).
func readParts(path string, digest io.Writer, scale float64) ([]geom.Part, error) {
	var read func(io.Reader, string, float64) ([]geom.Part, error)
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".yaml", ".yml":
		read = readPartsYAML
	case ".csv":
		read = readPartsCSV
	default:
		return nil, geom.FileError(path, "unknown parts table type %q (want .yaml, .yml or .csv)", geom.Excerpt(ext))
	}
	f, err := geom.OpenRegular(path)
	if err != nil {
		return nil, fmt.Errorf("meshio: reading parts table: %w", err)
	}
	defer f.Close()
	if digest == nil {
		return read(f, path, scale)
	}
	r := io.TeeReader(f, digest)
	parts, err := read(r, path, scale)
	if err == nil {
		// The digest covers the whole file, whatever the parser left unread.
		if _, err = io.Copy(io.Discard, r); err != nil {
			err = fmt.Errorf("meshio: reading parts table: %w", err)
		}
	}
	return parts, err
}

// ReadPartsYAML reads a parts table in YAML from r; name is the file name
// used in errors. The document is a map with the single key "parts"
// holding a list of maps; an empty document or list is an empty table.
func ReadPartsYAML(r io.Reader, name string) ([]geom.Part, error) { return readPartsYAML(r, name, 1) }

func readPartsYAML(r io.Reader, name string, scale float64) ([]geom.Part, error) {
	y := tabular.YAML{File: name}
	root, err := y.Parse(r)
	if err != nil {
		return nil, err
	}
	var items []*yaml.Node
	err = y.Map(root, "parts table", []string{"parts"}, func(_ string, _, v *yaml.Node) error {
		items, err = y.List(v, "parts")
		return err
	})
	if err != nil {
		return nil, err
	}
	t := newPartTable(name, len(items))
	keys := partKeys()
	// at locates a field check's error at node v.
	at := func(v *yaml.Node, err error) error {
		if err != nil {
			return y.Errorf(v, "%w", err)
		}
		return nil
	}
	for _, it := range items {
		var (
			p               geom.Part
			hasID, hasT     bool
			hasSurf, hasOff bool
			off             float64
			idLine, meshLn  int
			offNode         *yaml.Node
		)
		err := y.Map(it, "part", keys, func(key string, _, v *yaml.Node) (err error) {
			switch key {
			case "id":
				hasID, idLine = true, v.Line
				if p.ID, err = y.Int(v, "id"); err == nil {
					err = at(v, checkID(p.ID))
				}
			case "name":
				p.Name, err = y.String(v, "name")
			case "thickness":
				hasT = true
				if p.Thickness, err = y.Float(v, "thickness"); err == nil {
					err = at(v, checkThickness(p.Thickness, scale))
				}
			case "material":
				p.Material, err = y.String(v, "material")
			case "offset":
				hasOff, offNode = true, v
				off, err = y.Float(v, "offset")
			case "surface":
				hasSurf = true
				var s string
				if s, err = y.String(v, "surface"); err == nil {
					p.Surface, err = parseSurface(s)
					err = at(v, err)
				}
			case "mesh":
				meshLn = v.Line
				if p.Mesh, err = y.String(v, "mesh"); err == nil {
					err = at(v, checkMeshName(p.Mesh))
				}
			}
			return err
		})
		if err != nil {
			return nil, err
		}
		if !hasID {
			return nil, y.Errorf(it, "part has no id")
		}
		if !hasT {
			return nil, y.Errorf(it, "part %d has no thickness", p.ID)
		}
		if hasOff {
			if err := combineOffset(&p, hasSurf, off, scale); err != nil {
				return nil, y.Errorf(offNode, "%w", err)
			}
		}
		if err := t.add(p, idLine, meshLn); err != nil {
			return nil, err
		}
	}
	return t.parts, nil
}

// ReadPartsCSV reads a parts table in CSV from r; name is the file name
// used in errors. The header names the columns in any order and case;
// id and thickness are required, the other columns optional, and an
// empty cell of an optional column means not given.
func ReadPartsCSV(r io.Reader, name string) ([]geom.Part, error) { return readPartsCSV(r, name, 1) }

func readPartsCSV(r io.Reader, name string, scale float64) ([]geom.Part, error) {
	c, err := tabular.NewCSV(r, name)
	if err != nil {
		return nil, err
	}
	keys := partKeys()
	at, unknown := c.Columns(keys)
	if len(unknown) > 0 {
		return nil, c.UnknownColumn(unknown[0], keys)
	}
	const (
		kID = iota
		kName
		kThickness
		kMaterial
		kSurface
		kMesh
		kOffset
	)
	if err := c.Require(at, keys, kID, kThickness); err != nil {
		return nil, err
	}
	t := newPartTable(name, 0)
	for {
		rec, err := c.Read()
		if err == io.EOF {
			return t.parts, nil
		}
		if err != nil {
			return nil, err
		}
		var p geom.Part
		ci, ct := at[kID], at[kThickness]
		if p.ID, err = c.Int(rec, ci); err != nil {
			return nil, err
		}
		if err := checkID(p.ID); err != nil {
			return nil, c.Errorf(ci, "%w", err)
		}
		if rec[ct] == "" {
			return nil, c.Errorf(ct, "part %d has no thickness", p.ID)
		}
		if p.Thickness, err = c.Float(rec, ct); err != nil {
			return nil, err
		}
		if err := checkThickness(p.Thickness, scale); err != nil {
			return nil, c.Errorf(ct, "%w", err)
		}
		for _, k := range []int{kName, kMaterial, kSurface, kMesh} {
			if col := at[k]; col >= 0 && !utf8.ValidString(rec[col]) {
				return nil, c.Errorf(col, "%s: %q is not valid UTF-8 text: save the table as UTF-8", keys[k], geom.Excerpt(rec[col]))
			}
		}
		if col := at[kName]; col >= 0 {
			p.Name = rec[col]
		}
		if col := at[kMaterial]; col >= 0 {
			p.Material = rec[col]
		}
		if col := at[kSurface]; col >= 0 {
			if p.Surface, err = parseSurface(rec[col]); err != nil {
				return nil, c.Errorf(col, "%w", err)
			}
		}
		if col := at[kOffset]; col >= 0 && rec[col] != "" {
			off, err := c.Float(rec, col)
			if err != nil {
				return nil, err
			}
			if err := combineOffset(&p, at[kSurface] >= 0 && rec[at[kSurface]] != "", off, scale); err != nil {
				return nil, c.Errorf(col, "%w", err)
			}
		}
		if col := at[kMesh]; col >= 0 {
			p.Mesh = rec[col]
			if err := checkMeshName(p.Mesh); err != nil {
				return nil, c.Errorf(col, "%w", err)
			}
		}
		if err := t.add(p, c.Line(ci), c.Line(max(at[kMesh], 0))); err != nil {
			return nil, err
		}
	}
}

// Checks of table fields shared by the YAML and CSV forms; the caller
// adds the location.

func checkID(id int64) error {
	if id <= 0 {
		return fmt.Errorf("id: part id %d is not positive", id)
	}
	return nil
}

func checkThickness(t, scale float64) error {
	if t <= 0 {
		return fmt.Errorf("thickness: %g mm is not positive", t)
	}
	if err := geom.CheckThickness(t, scale); err != nil {
		return fmt.Errorf("thickness: %w", err)
	}
	return nil
}

func parseSurface(s string) (geom.Surface, error) {
	surf, err := geom.ParseSurface(strings.ToLower(s))
	if err != nil {
		return surf, fmt.Errorf("surface: %w", err)
	}
	return surf, nil
}

// combineOffset applies the offset an entry gives to its part: the
// signed distance from the meshed surface to the mid-surface along the
// element normals, in the table's unit of scale mm like the thickness,
// which must be that of mid (0), top (-t/2) or bottom (+t/2) to within
// geom.OffsetTolerance, compared in mm whatever the unit. Alone it sets
// the surface; given with a surface, the two must agree.
func combineOffset(p *geom.Part, hasSurface bool, off, scale float64) error {
	if scale <= 0 {
		scale = 1
	}
	t := p.Thickness * scale
	s, ok := geom.SurfaceForOffset(off*scale, t)
	switch {
	case !ok:
		return fmt.Errorf("offset: %s for thickness %s is none of 0 (mid), %g mm (top) or %g mm (bottom): Joinery places a sheet's mid-surface on its meshed surface or half its thickness to either side",
			geom.InMM(off, scale), geom.InMM(p.Thickness, scale), geom.SurfaceTop.MidOffset(t), geom.SurfaceBottom.MidOffset(t))
	case hasSurface && s != p.Surface:
		return fmt.Errorf("offset: %s is the offset of surface %s, but the entry gives surface %s (offset %g mm for thickness %s)",
			geom.InMM(off, scale), s, p.Surface, p.Surface.MidOffset(t), geom.InMM(p.Thickness, scale))
	}
	p.Surface = s
	return nil
}

// checkMeshName accepts "" and file base names.
func checkMeshName(s string) error {
	if strings.ContainsAny(s, `/\`) {
		return fmt.Errorf("mesh: %q is not a file base name (write floor.vtk, not a path)", geom.Excerpt(s))
	}
	return nil
}

// partTable collects parts and checks that ids and mesh names are unique.
type partTable struct {
	file     string
	parts    []geom.Part
	idLine   map[int64]int
	meshLine map[string]int
}

func newPartTable(file string, n int) *partTable {
	return &partTable{
		file:     file,
		parts:    make([]geom.Part, 0, n),
		idLine:   make(map[int64]int, n),
		meshLine: map[string]int{},
	}
}

func (t *partTable) add(p geom.Part, idLine, meshLine int) error {
	if prev, dup := t.idLine[p.ID]; dup {
		return geom.LineError(t.file, idLine, "part id %d given twice (lines %d and %d)", p.ID, prev, idLine)
	}
	t.idLine[p.ID] = idLine
	if p.Mesh != "" {
		if prev, dup := t.meshLine[p.Mesh]; dup {
			return geom.LineError(t.file, meshLine, "mesh %q given to two parts (lines %d and %d)", geom.Excerpt(p.Mesh), prev, meshLine)
		}
		t.meshLine[p.Mesh] = meshLine
	}
	t.parts = append(t.parts, p)
	return nil
}
