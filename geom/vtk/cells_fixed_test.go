package vtk

import (
	"encoding/binary"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// binaryCells writes a binary VTK file of points along a line and the
// given classic cells (each its point indices), with a part array.
func binaryCells(npoints int, cells [][]int32, types []int32) []byte {
	var b []byte
	b = append(b, fmt.Sprintf("# vtk DataFile Version 3.0\nt\nBINARY\nDATASET UNSTRUCTURED_GRID\nPOINTS %d double\n", npoints)...)
	for i := range npoints {
		for _, v := range []float64{float64(i % 7), float64(i / 7), 0} {
			b = binary.BigEndian.AppendUint64(b, math.Float64bits(v))
		}
	}
	size := 0
	for _, c := range cells {
		size += 1 + len(c)
	}
	b = append(b, fmt.Sprintf("\nCELLS %d %d\n", len(cells), size)...)
	for _, c := range cells {
		b = binary.BigEndian.AppendUint32(b, uint32(len(c)))
		for _, v := range c {
			b = binary.BigEndian.AppendUint32(b, uint32(v))
		}
	}
	b = append(b, fmt.Sprintf("\nCELL_TYPES %d\n", len(cells))...)
	for _, t := range types {
		b = binary.BigEndian.AppendUint32(b, uint32(t))
	}
	b = append(b, fmt.Sprintf("\nCELL_DATA %d\nSCALARS part int 1\nLOOKUP_TABLE default\n", len(cells))...)
	for range cells {
		b = binary.BigEndian.AppendUint32(b, 1)
	}
	return append(b, '\n')
}

// TestCellsFixedSize reads classic binary cells that all have the first
// cell's point count (decoded by chunks at fixed places), cells whose
// counts differ though their total matches that pattern, and bad points
// in both, against the reading in order.
func TestCellsFixedSize(t *testing.T) {
	const np = 5000
	quads := make([][]int32, 3*chunk+17) // more than two chunks
	types := make([]int32, len(quads))
	for c := range quads {
		a := int32(c % (np - 8))
		quads[c] = []int32{a, a + 1, a + 8, a + 7}
		types[c] = 9
	}
	check := func(name string, data []byte, want [][]int32, wantErr string) {
		t.Helper()
		m, err := Parse(data, "c.vtk", geom.ReadOptions{})
		if wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), wantErr) {
				t.Errorf("%s: got %v, want an error with %q", name, err, wantErr)
			}
			return
		}
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if m.NumElems() != len(want) {
			t.Fatalf("%s: %d elements, want %d", name, m.NumElems(), len(want))
		}
		for e, c := range want {
			if got := m.ElemNodes(e); !slices.Equal(got, c) {
				t.Fatalf("%s: element %d has nodes %v, want %v", name, e, got, c)
			}
		}
	}
	check("quads", binaryCells(np, quads, types), quads, "")

	bad := make([][]int32, len(quads))
	copy(bad, quads)
	bad[2*chunk+5] = []int32{1, 2, np + 3, 4}
	check("bad point", binaryCells(np, bad, types), nil, fmt.Sprintf("cell %d references point %d", 2*chunk+5, np+3))

	// A quad, a triangle and a pentagon: 5 + 4 + 6 = 3 x 5 values.
	mixed := [][]int32{{0, 1, 8, 7}, {1, 2, 9}, {2, 3, 10, 9, 4}}
	m, err := Parse(binaryCells(np, mixed, []int32{9, 5, 7}), "c.vtk", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if m.NumElems() != 2 || fmt.Sprint(m.ElemNodes(1)) != "[1 2 9]" {
		t.Errorf("mixed: %d elements, second %v; want 2, [1 2 9]", m.NumElems(), m.ElemNodes(1))
	}
}
