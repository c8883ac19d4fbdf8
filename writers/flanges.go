package writers

import (
	"encoding/csv"
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/joinery-cae/joinery/writers/document"
)

// WriteFlangeJointsCSV writes the welds placed on flanges as a joint
// list that build reads: a comment line with the generator and the
// caution, the header id,x,y,z,kind,parts,diameter,group, then one row
// per weld in the order of the flanges and along each centreline. parts
// lists the sheets of the weld's stack ('; '-separated), group is the
// flange's id.
func WriteFlangeJointsCSV(w io.Writer, doc *document.FlangesDoc) error {
	if _, err := fmt.Fprintf(w, "# joinery flanges welds (%s; run %s); CAUTION: %s\n", doc.Generator, doc.RunID, document.Caution); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"id", "x", "y", "z", "kind", "parts", "diameter", "group"}); err != nil {
		return err
	}
	for _, f := range doc.Flanges {
		for _, wd := range f.Welds {
			parts := make([]string, len(wd.Parts))
			for i, p := range wd.Parts {
				parts[i] = strconv.FormatInt(p, 10)
			}
			if err := cw.Write([]string{wd.ID, f64(wd.Point[0]), f64(wd.Point[1]), f64(wd.Point[2]), "spot",
				strings.Join(parts, ";"), f64(wd.Diameter), f.ID}); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// VTK cell type of a polyline (VTK file-format documentation, Kitware:
// VTK_POLY_LINE = 4).
const vtkPolyLine = 4

// Kinds of cells in flanges.vtk (cell data "kind").
const (
	flangeCentreline = 1
	flangeFacing     = 2
	flangeWeld       = 3
)

// WriteFlangesVTK writes the flanges for viewing beside the mesh: a VTK
// legacy ASCII unstructured grid with a polyline per centreline (closed
// ones end at their first point), a line per facing node pair (between
// the two nodes' positions, given in the mesh passed as coords), and a
// vertex per weld. Cell data: "kind" (1 centreline, 2 facing pair, 3
// weld) and "flange" (index into flanges.json's flanges array).
func WriteFlangesVTK(w io.Writer, doc *document.FlangesDoc, node func(id int64) ([3]float64, bool)) error {
	type cell struct {
		typ, kind, flange int
		pts               []document.Vec
	}
	var cells []cell
	for i, f := range doc.Flanges {
		pts := append([]document.Vec(nil), f.Centreline...)
		if f.Shape == "closed" && len(pts) > 0 {
			pts = append(pts, pts[0])
		}
		cells = append(cells, cell{vtkPolyLine, flangeCentreline, i, pts})
		for _, fp := range f.Facing {
			a, okA := node(int64(fp[0]))
			b, okB := node(int64(fp[1]))
			if okA && okB {
				cells = append(cells, cell{vtkLine, flangeFacing, i, []document.Vec{a, b}})
			}
		}
		for _, wd := range f.Welds {
			cells = append(cells, cell{vtkVertex, flangeWeld, i, []document.Vec{wd.Point}})
		}
	}
	ew := &errWriter{w: w}
	npts, nconn := 0, 0
	for _, c := range cells {
		npts += len(c.pts)
		nconn += len(c.pts) + 1
	}
	title := fmt.Sprintf("joinery flanges (%s; run %s); kind 1 centreline, 2 facing pair, 3 weld; %s", doc.Generator, doc.RunID, document.ShortCaution)
	if len(title) > 255 {
		title = title[:255]
	}
	ew.printf("# vtk DataFile Version 3.0\n%s\nASCII\nDATASET UNSTRUCTURED_GRID\n", title)
	ew.printf("POINTS %d double\n", npts)
	for _, c := range cells {
		for _, p := range c.pts {
			ew.printf("%s %s %s\n", f64(p[0]), f64(p[1]), f64(p[2]))
		}
	}
	ew.printf("CELLS %d %d\n", len(cells), nconn)
	k := 0
	for _, c := range cells {
		ew.printf("%d", len(c.pts))
		for range c.pts {
			ew.printf(" %d", k)
			k++
		}
		ew.printf("\n")
	}
	ew.printf("CELL_TYPES %d\n", len(cells))
	for _, c := range cells {
		ew.printf("%d\n", c.typ)
	}
	ew.printf("CELL_DATA %d\n", len(cells))
	ew.printf("SCALARS kind int 1\nLOOKUP_TABLE default\n")
	for _, c := range cells {
		ew.printf("%d\n", c.kind)
	}
	ew.printf("SCALARS flange int 1\nLOOKUP_TABLE default\n")
	for _, c := range cells {
		ew.printf("%d\n", c.flange)
	}
	if ew.err != nil {
		return fmt.Errorf("writing flanges VTK: %w", ew.err)
	}
	return nil
}

// WriteFlangesSummary writes the few lines a flanges run prints on
// stdout.
func WriteFlangesSummary(w io.Writer, doc *document.FlangesDoc, rep *document.ReportDoc, outDir string, files []string) error {
	ew := &errWriter{w: w}
	open, closed, congruent, facing, welds := 0, 0, 0, 0, 0
	pairs := map[[2]int64]bool{}
	for _, f := range doc.Flanges {
		if f.Shape == "closed" {
			closed++
		} else {
			open++
		}
		if f.Match == "congruent" {
			congruent++
		}
		pairs[f.Parts] = true
		facing += len(f.Facing)
		welds += len(f.Welds)
	}
	asked := ""
	if n := len(doc.Options.Pairs); n > 0 {
		asked = fmt.Sprintf(" of the %d asked for", n)
	}
	pairWord := "part pairs"
	if len(pairs) == 1 {
		pairWord = "part pair"
	}
	ew.printf("flanges     %d on %d %s%s (%d open, %d closed; %d congruent, %d projected)\n",
		len(doc.Flanges), len(pairs), pairWord, asked, open, closed, congruent, len(doc.Flanges)-congruent)
	ew.printf("facing      %d node pairs\n", facing)
	if doc.Options.Pitch != nil || doc.Options.PitchFromTable {
		s := rep.Summary
		ew.printf("welds       %d placed; by build's rules %d built (%d flagged), %d not built\n",
			welds, s.ByState["built"]+s.ByState["flagged"], s.ByState["flagged"], s.ByState["not-built"])
	}
	s := rep.Summary
	ew.printf("findings    %d error, %d warning, %d info\n", s.BySev["error"], s.BySev["warning"], s.BySev["info"])
	if len(s.ByCode) > 0 {
		ew.printf("by code     %s\n", countList(s.ByCode))
	}
	ew.printf("written     %s/{%s}\n", filepath.ToSlash(filepath.Clean(outDir)), strings.Join(files, ","))
	ew.printf("run id      %s\n", doc.RunID)
	ew.printf("CAUTION: %s\n", doc.Caution)
	return ew.err
}
