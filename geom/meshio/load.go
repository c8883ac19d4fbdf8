package meshio

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sync"

	"github.com/joinery-cae/joinery/geom"
)

// LoadOptions say which files make up a model.
type LoadOptions struct {
	// Meshes are the mesh files, merged in this order.
	Meshes []string
	// Parts is the parts table; "" for none.
	Parts string
	// Renumber shifts the ids of files whose ids clash with earlier files
	// instead of failing (see geom.Merge).
	Renumber bool
	// PartArray names the cell array of VTK files that holds part ids;
	// "" means geom.DefaultPartArray (see geom.ReadOptions).
	PartArray string
	// Scale is the number of millimetres in the unit of the files'
	// lengths, meshes and parts table alike; 0 means 1. Load does not
	// scale: the readers hold values to their plausible ranges with it
	// (geom.ReadOptions.Scale).
	Scale float64
	// Workers bounds the number of files read at once; 0 means
	// runtime.GOMAXPROCS(0).
	Workers int
	// Read reads one mesh file; nil means ReadMesh. Tests and callers with
	// meshes from elsewhere may replace it.
	Read func(path string, opt geom.ReadOptions) (*geom.Mesh, error)
	// Progress, when not nil, follows the reading of the mesh files: one
	// step "reading mesh files" whose work is the files' total size in
	// bytes, advanced by each file's size once it is read (one goroutine
	// at a time).
	Progress geom.Progress
	// Digest, when not nil, is called once for the parts table and once
	// for each mesh file, with its path, before the file is read; the
	// bytes read go to the writer it returns (nil for none), so that the
	// caller can hash the inputs as they stream in (see
	// geom.ReadOptions.Digest). Mesh files are read concurrently: Digest
	// must be safe for concurrent use.
	Digest func(path string) io.Writer
}

// Model is a loaded model: one merged mesh and what happened on the way.
type Model struct {
	Mesh *geom.Mesh
	// Renumbered lists the id shifts applied to files (LoadOptions.Renumber).
	Renumbered []geom.Renumbering
	// Skipped lists, per mesh file in argument order, the cells its
	// reader skipped; files that skipped none are left out.
	Skipped []FileCells
	// UnusedParts lists, in increasing order, the ids of parts in the
	// parts table that no element belongs to.
	UnusedParts []int64
}

// FileCells counts the cells of one file by VTK cell type.
type FileCells struct {
	File  string
	Cells geom.SkippedCells
}

// Load reads the parts table (when given) and every mesh file, merges the
// meshes with geom.Merge, and applies the table.
//
// A part whose Mesh is the base name of a mesh file becomes that file's
// default part (geom.ReadOptions.DefaultPart), so files without a part
// array can still be loaded. Files are read concurrently, but results and
// errors are those of a sequential read in argument order.
//
// With a parts table, each part of the mesh takes its name, thickness,
// material, reference surface and mesh name from the table, replacing
// what the mesh files said; a part of the mesh missing from the table is
// an error naming the part and a file it appears in. Without a table,
// parts keep what the files gave, thickness 0 meaning unknown; a part that
// two files give different thicknesses is an error.
//
// Load does not require thicknesses: commands that need them call
// Model.MissingThickness.
func Load(opts LoadOptions) (*Model, error) {
	if len(opts.Meshes) == 0 {
		return nil, errors.New("meshio: no mesh files given")
	}
	if i, j, ok := geom.SameFiles(opts.Meshes); ok {
		p, q := opts.Meshes[i], opts.Meshes[j]
		if filepath.Clean(p) == filepath.Clean(q) {
			return nil, geom.FileError(q, "mesh file given twice (meshes %d and %d)", i+1, j+1)
		}
		return nil, geom.FileError(q, "mesh file given twice (meshes %d and %d): the same file as %s", i+1, j+1, p)
	}
	var table []geom.Part
	defaults := map[string]int64{}
	if opts.Parts != "" {
		var err error
		var digest io.Writer
		if opts.Digest != nil {
			digest = opts.Digest(opts.Parts)
		}
		if table, err = readParts(opts.Parts, digest, opts.Scale); err != nil {
			return nil, err
		}
		for _, p := range table {
			if p.Mesh != "" {
				defaults[p.Mesh] = p.ID
			}
		}
	}
	meshes, err := readAll(opts, defaults)
	if err != nil {
		return nil, err
	}
	if table == nil {
		if err := checkPartConflicts(meshes); err != nil {
			return nil, err
		}
	}
	m, shifts, err := geom.Merge(meshes, opts.Renumber)
	if err != nil {
		return nil, err
	}
	model := &Model{Mesh: m, Renumbered: shifts}
	for _, s := range m.Sources {
		if len(s.Skipped) > 0 {
			model.Skipped = append(model.Skipped, FileCells{File: s.File, Cells: s.Skipped})
		}
	}
	if table != nil {
		if model.UnusedParts, err = applyTable(m, table, opts.Parts); err != nil {
			return nil, err
		}
	}
	return model, nil
}

// readAll reads the mesh files with at most opts.Workers at a time and
// returns them in argument order, or the error of the first file that
// failed.
func readAll(opts LoadOptions, defaults map[string]int64) ([]*geom.Mesh, error) {
	read := opts.Read
	if read == nil {
		read = ReadMesh
	}
	workers := opts.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(opts.Meshes))
	meshes := make([]*geom.Mesh, len(opts.Meshes))
	errs := make([]error, len(opts.Meshes))
	prog := opts.Progress
	if prog == nil {
		prog = geom.NoProgress{}
	}
	sizes := make([]int64, len(opts.Meshes))
	var total int64
	for i, p := range opts.Meshes {
		if fi, err := os.Stat(p); err == nil {
			sizes[i] = max(fi.Size(), 1)
		} else {
			sizes[i] = 1 // the read reports the error
		}
		total += sizes[i]
	}
	prog.Start("reading mesh files", total)
	defer prog.Done()
	var progMu sync.Mutex
	next := make(chan int)
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for i := range next {
				path := opts.Meshes[i]
				ro := geom.ReadOptions{PartArray: opts.PartArray, Scale: opts.Scale}
				if id, ok := defaults[filepath.Base(path)]; ok {
					ro.DefaultPart, ro.HasDefaultPart = id, true
				}
				if opts.Digest != nil {
					ro.Digest = opts.Digest(path)
				}
				meshes[i], errs[i] = read(path, ro)
				if errs[i] == nil && meshes[i] == nil {
					errs[i] = fmt.Errorf("meshio: reading %s returned no mesh", path)
				}
				if errs[i] == nil {
					// Id order, not line order, from here on: no result
					// may depend on how a file's lines are arranged.
					if _, err := meshes[i].SortByID(); err != nil {
						errs[i] = geom.FileError(path, "%w", err)
					}
				}
				progMu.Lock()
				prog.Add(sizes[i])
				progMu.Unlock()
			}
		})
	}
	for i := range opts.Meshes {
		next <- i
	}
	close(next)
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	for i, m := range meshes {
		if m.NumElems() == 0 {
			skipped := 0
			for _, s := range m.Sources {
				for _, n := range s.Skipped {
					skipped += n
				}
			}
			what := ""
			if skipped > 0 {
				what = fmt.Sprintf(" (%d cells of other types skipped)", skipped)
			}
			return nil, geom.FileError(opts.Meshes[i], "no triangles or quads%s: a mesh file must hold shell elements", what)
		}
	}
	return meshes, nil
}

// checkPartConflicts fails when two files give one part different
// positive thicknesses, which Merge would silently resolve to the first.
func checkPartConflicts(meshes []*geom.Mesh) error {
	type origin struct {
		thickness float64
		file      string
	}
	first := map[int64]origin{}
	for _, m := range meshes {
		file := "input"
		if len(m.Sources) > 0 {
			file = m.Sources[0].File
		}
		for _, p := range m.Parts {
			if p.Thickness <= 0 {
				continue
			}
			o, ok := first[p.ID]
			if !ok {
				first[p.ID] = origin{p.Thickness, file}
				continue
			}
			if o.thickness != p.Thickness {
				return geom.FileError(file, "part %d has thickness %g mm here and %g mm in %s; give the thickness in a parts table", p.ID, p.Thickness, o.thickness, o.file)
			}
		}
	}
	return nil
}

// applyTable copies the table's data into the parts of m and returns the
// ids of table parts no element of m belongs to (not in m, or declared by
// a mesh file without elements).
func applyTable(m *geom.Mesh, table []geom.Part, tableFile string) ([]int64, error) {
	byID := make(map[int64]int, len(table))
	for i, p := range table {
		byID[p.ID] = i
	}
	for i := range m.Parts {
		p := &m.Parts[i]
		t, ok := byID[p.ID]
		if !ok {
			return nil, geom.FileError(partFile(m, i), "part %d is not in the parts table %s", p.ID, tableFile)
		}
		p.Name = table[t].Name
		p.Thickness = table[t].Thickness
		p.Material = table[t].Material
		p.Surface = table[t].Surface
		p.Mesh = table[t].Mesh
	}
	var unused []int64
	inUse := m.PartsInUse()
	for _, p := range table {
		if i, ok := m.PartIndex(p.ID); !ok || !inUse[i] { // a part a mesh file declares without elements too
			unused = append(unused, p.ID)
		}
	}
	slices.Sort(unused)
	return unused, nil
}

// partFile returns the file of the first element of part index pi.
func partFile(m *geom.Mesh, pi int) string {
	e := slices.Index(m.ElemPart, int32(pi))
	file := "input"
	for _, s := range m.Sources {
		if e >= 0 && s.ElemStart <= e {
			file = s.File
		}
	}
	return file
}

// SkippedTotal returns the cells skipped in all files together, nil when
// none were.
func (md *Model) SkippedTotal() geom.SkippedCells {
	var all geom.SkippedCells
	for _, f := range md.Skipped {
		all = all.Add(f.Cells)
	}
	return all
}

// PartFiles returns, for each part id, the first mesh file holding an
// element of that part ("input" when the mesh records no file).
func (md *Model) PartFiles(ids []int64) []string {
	out := make([]string, len(ids))
	for i, id := range ids {
		out[i] = "input"
		if pi, ok := md.Mesh.PartIndex(id); ok {
			out[i] = partFile(md.Mesh, int(pi))
		}
	}
	return out
}

// MissingThickness returns, in increasing order, the ids of parts with at
// least one element that has no positive thickness of its own or from
// its part.
func (md *Model) MissingThickness() []int64 { return md.Mesh.PartsWithoutThickness() }
