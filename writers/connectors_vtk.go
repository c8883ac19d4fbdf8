package writers

import (
	"fmt"
	"io"
	"strconv"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// VTK cell types used for viewing connectors (VTK file-format
// documentation, Kitware: VTK_VERTEX = 1, VTK_LINE = 3).
const (
	vtkVertex = 1
	vtkLine   = 3
)

// stateCode returns the number that stands for a connector state in the
// cell data "state" (joints.Status.Code: 1 built, 2 flagged, 3
// not-built), 0 for a state this version does not know.
func stateCode(state string) int {
	for _, s := range joints.Statuses() {
		if s.String() == state {
			return s.Code()
		}
	}
	return 0
}

// linkKindCode returns the number that stands for a link kind in the
// cell data "link_kind" (joints.LinkKind.Code), gap for a link without a
// kind (files written before link kinds existed), 0 for a kind this
// version does not know.
func linkKindCode(kind string) int {
	if kind == "" {
		return joints.GapLink.Code()
	}
	for _, k := range joints.LinkKinds() {
		if k.String() == kind {
			return k.Code()
		}
	}
	return 0
}

// ConnectorsVTKTitle returns the title line of connectors.vtk: the
// generator, the run id, the state codes and a pointer to the caution,
// within the 256 characters the legacy format allows (a line of at most
// 255 characters and its newline; VTK file-format documentation,
// Kitware). The run id comes early, so that a long generator name can
// only cut the end.
func ConnectorsVTKTitle(generator, runID string) string {
	t := fmt.Sprintf("joinery connectors (%s; run %s); state 1 built, 2 flagged, 3 not-built; %s", generator, runID, document.ShortCaution)
	if len(t) > 255 {
		t = t[:255]
	}
	return t
}

// RingLineKind is the "link_kind" of the lines connectors.vtk draws from
// a bolt's centre to each node of its ring: not links of
// connectors.json, drawn to show the rings (Joinery's own numbering,
// after joints.LinkKind's codes).
const RingLineKind = 5

// WriteConnectorsVTK writes the connectors for viewing beside the mesh in
// any VTK viewer: a VTK legacy ASCII unstructured grid with one line cell
// per link and one vertex cell at the joint point of every connector that
// was not built. Cell data: "state" (1 built, 2 flagged, 3 not-built),
// "sheets" (stack size), "connector" (index into connectors.json's
// connectors array) and "gap_offset" (the link's square_gap, its gap
// square to the sheets, minus its contact_gap, in the document's length
// unit, as gap-open and gap-closed judge it; 0 on vertices), and, when some link is not a gap link
// (--links offset, bolts), "link_kind" (1 gap, 2 offset, 3 faying, 4
// shank, 5 a line from a bolt's centre to a node of its ring, which
// connectors.json gives as the sheet's nodes; 0 on vertices). Output is
// deterministic.
func WriteConnectorsVTK(w io.Writer, doc *document.ConnectorsDoc) error {
	type cell struct {
		typ       int
		pts       []document.Vec
		state     int
		sheets    int
		connector int
		gap       float64
		kind      int
	}
	var cells []cell
	kinds := false // some link is not a gap link
	for i, c := range doc.Connectors {
		st := stateCode(c.State)
		if len(c.Links) == 0 {
			cells = append(cells, cell{typ: vtkVertex, pts: []document.Vec{c.Point}, state: st, sheets: len(c.Sheets), connector: i})
			continue
		}
		for _, l := range c.Links {
			k := linkKindCode(l.Kind)
			kinds = kinds || k != joints.GapLink.Code()
			cells = append(cells, cell{typ: vtkLine, pts: []document.Vec{l.Start, l.End}, state: st, sheets: len(c.Sheets),
				connector: i, gap: clean(l.Gap() - l.ContactGap), kind: k})
		}
		// A bolt's rings: a line from each centre to each ring node.
		for _, sh := range c.Sheets {
			if sh.EndPoint == nil {
				continue
			}
			for _, q := range sh.NodePoints {
				kinds = true
				cells = append(cells, cell{typ: vtkLine, pts: []document.Vec{*sh.EndPoint, q}, state: st, sheets: len(c.Sheets),
					connector: i, kind: RingLineKind})
			}
		}
	}
	ew := &errWriter{w: w}
	npts, nconn := 0, 0
	for _, c := range cells {
		npts += len(c.pts)
		nconn += len(c.pts) + 1
	}
	ew.printf("# vtk DataFile Version 3.0\n%s\nASCII\nDATASET UNSTRUCTURED_GRID\n", ConnectorsVTKTitle(doc.Generator, doc.RunID))
	ew.printf("POINTS %d double\n", npts)
	// Numbers are appended to a buffer flushed in pieces: the file has a
	// line per point and per cell, too many for a formatted print each.
	var buf []byte
	flush := func(force bool) {
		if force || len(buf) > 1<<16 {
			ew.Write(buf)
			buf = buf[:0]
		}
	}
	num := func(v float64, sep byte) {
		buf = strconv.AppendFloat(buf, v, 'g', -1, 64)
		buf = append(buf, sep)
	}
	for _, c := range cells {
		for _, p := range c.pts {
			num(p[0], ' ')
			num(p[1], ' ')
			num(p[2], '\n')
			flush(false)
		}
	}
	flush(true)
	ew.printf("CELLS %d %d\n", len(cells), nconn)
	k := 0
	for _, c := range cells {
		buf = strconv.AppendInt(buf, int64(len(c.pts)), 10)
		for range c.pts {
			buf = append(buf, ' ')
			buf = strconv.AppendInt(buf, int64(k), 10)
			k++
		}
		buf = append(buf, '\n')
		flush(false)
	}
	flush(true)
	ew.printf("CELL_TYPES %d\n", len(cells))
	for _, c := range cells {
		buf = strconv.AppendInt(buf, int64(c.typ), 10)
		buf = append(buf, '\n')
		flush(false)
	}
	flush(true)
	ew.printf("CELL_DATA %d\n", len(cells))
	ints := func(name string, get func(c cell) int) {
		ew.printf("SCALARS %s int 1\nLOOKUP_TABLE default\n", name)
		for _, c := range cells {
			buf = strconv.AppendInt(buf, int64(get(c)), 10)
			buf = append(buf, '\n')
			flush(false)
		}
		flush(true)
	}
	ints("state", func(c cell) int { return c.state })
	ints("sheets", func(c cell) int { return c.sheets })
	ints("connector", func(c cell) int { return c.connector })
	ew.printf("SCALARS gap_offset double 1\nLOOKUP_TABLE default\n")
	for _, c := range cells {
		num(c.gap, '\n')
		flush(false)
	}
	flush(true)
	if kinds {
		ints("link_kind", func(c cell) int { return c.kind })
	}
	if ew.err != nil {
		return fmt.Errorf("writing connectors VTK: %w", ew.err)
	}
	return nil
}

// clean turns -0 into 0 so equal values print alike.
func clean(v float64) float64 {
	if v == 0 {
		return 0
	}
	return v
}
