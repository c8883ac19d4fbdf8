package vtk

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/joinery-cae/joinery/geom"
)

// Write writes m as a VTK legacy unstructured grid: file version 3.0
// with the classic CELLS layout (the point count of each cell inline),
// which every VTK version reads. binary selects the BINARY encoding
// (big-endian, as the format specifies) over ASCII.
//
// Elements are written as VTK cells of types 5, 9, 22, 23 and 28
// (geom.VTKCellType). Points are written as double, in ASCII with the
// shortest decimal form that reads back to the same float64. POINT_DATA holds "node_id";
// CELL_DATA holds "part" (the part id), "thickness" (double: the
// element's own thickness, else its part's) and "element_id". The id
// arrays are of type int when every value fits in 32 bits, vtktypeint64
// otherwise. The thickness array is left out unless every element has a
// positive, finite thickness, so that the file always reads back.
// The output depends only on m.
func Write(w io.Writer, m *geom.Mesh, binary bool) error {
	vw := vtkWriter{w: w, binary: binary, buf: make([]byte, 0, 1<<16)}
	if err := vw.mesh(m); err != nil {
		return fmt.Errorf("vtk: writing: %w", err)
	}
	return nil
}

// vtkWriter buffers the output of Write and keeps its first error.
type vtkWriter struct {
	w      io.Writer
	binary bool
	buf    []byte
	err    error
}

// flush writes the buffer out when it is full, or always when force is set.
func (vw *vtkWriter) flush(force bool) {
	if vw.err != nil || (!force && len(vw.buf) < 1<<16) {
		return
	}
	_, vw.err = vw.w.Write(vw.buf)
	vw.buf = vw.buf[:0]
}

// line writes a text line.
func (vw *vtkWriter) line(format string, args ...any) {
	vw.buf = fmt.Appendf(vw.buf, format, args...)
	vw.buf = append(vw.buf, '\n')
	vw.flush(false)
}

// endData ends a block of values: a newline after binary data (the
// format's convention) or after the last ASCII line.
func (vw *vtkWriter) endData() {
	if vw.binary {
		vw.buf = append(vw.buf, '\n')
	}
	vw.flush(false)
}

// ints writes n integer values of a 32- or 64-bit type, one per line in
// ASCII.
func (vw *vtkWriter) ints(n int, wide bool, at func(i int) int64) {
	for i := 0; i < n; i++ {
		v := at(i)
		switch {
		case !vw.binary:
			vw.buf = strconv.AppendInt(vw.buf, v, 10)
			vw.buf = append(vw.buf, '\n')
		case wide:
			vw.buf = binary.BigEndian.AppendUint64(vw.buf, uint64(v))
		default:
			vw.buf = binary.BigEndian.AppendUint32(vw.buf, uint32(int32(v)))
		}
		vw.flush(false)
	}
	vw.endData()
}

// idArray writes an integer attribute array as SCALARS.
func (vw *vtkWriter) idArray(name string, ids []int64) {
	wide := false
	for _, id := range ids {
		if id < math.MinInt32 || id > math.MaxInt32 {
			wide = true
			break
		}
	}
	typ := "int"
	if wide {
		typ = "vtktypeint64"
	}
	vw.line("SCALARS %s %s 1", name, typ)
	vw.line("LOOKUP_TABLE default")
	vw.ints(len(ids), wide, func(i int) int64 { return ids[i] })
}

// float appends one double.
func (vw *vtkWriter) float(v float64, sep byte) {
	if vw.binary {
		vw.buf = binary.BigEndian.AppendUint64(vw.buf, math.Float64bits(v))
		return
	}
	vw.buf = strconv.AppendFloat(vw.buf, v, 'g', -1, 64)
	vw.buf = append(vw.buf, sep)
}

// mesh writes the whole file.
func (vw *vtkWriter) mesh(m *geom.Mesh) error {
	nn, ne := m.NumNodes(), m.NumElems()
	vw.line("# vtk DataFile Version 3.0")
	vw.line("Joinery mesh")
	if vw.binary {
		vw.line("BINARY")
	} else {
		vw.line("ASCII")
	}
	vw.line("DATASET UNSTRUCTURED_GRID")
	vw.line("POINTS %d double", nn)
	for _, p := range m.Coords {
		vw.float(p.X, ' ')
		vw.float(p.Y, ' ')
		vw.float(p.Z, '\n')
		vw.flush(false)
	}
	vw.endData()

	types := make([]int64, ne)
	for e := range types {
		t, ok := geom.VTKCellType(m.Type(e))
		if !ok {
			return fmt.Errorf("element %d has %d nodes; only 3, 4, 6, 8 and 9 can be written", m.ElemIDs[e], len(m.ElemNodes(e)))
		}
		types[e] = int64(t)
	}
	vw.line("CELLS %d %d", ne, ne+len(m.Conn))
	for e := 0; e < ne; e++ {
		nodes := m.ElemNodes(e)
		if vw.binary {
			vw.buf = binary.BigEndian.AppendUint32(vw.buf, uint32(len(nodes)))
			for _, n := range nodes {
				vw.buf = binary.BigEndian.AppendUint32(vw.buf, uint32(n))
			}
		} else {
			vw.buf = strconv.AppendInt(vw.buf, int64(len(nodes)), 10)
			for _, n := range nodes {
				vw.buf = append(vw.buf, ' ')
				vw.buf = strconv.AppendInt(vw.buf, int64(n), 10)
			}
			vw.buf = append(vw.buf, '\n')
		}
		vw.flush(false)
	}
	vw.endData()
	vw.line("CELL_TYPES %d", ne)
	vw.ints(ne, false, func(i int) int64 { return types[i] })

	if ne > 0 {
		vw.line("CELL_DATA %d", ne)
		parts := make([]int64, ne)
		for e := range parts {
			parts[e] = m.Part(e).ID
		}
		vw.idArray("part", parts)
		if hasThickness(m) {
			vw.line("SCALARS thickness double 1")
			vw.line("LOOKUP_TABLE default")
			for e := 0; e < ne; e++ {
				vw.float(m.Thickness(e), '\n')
				vw.flush(false)
			}
			vw.endData()
		}
		vw.idArray("element_id", m.ElemIDs)
	}
	if nn > 0 {
		vw.line("POINT_DATA %d", nn)
		vw.idArray("node_id", m.NodeIDs)
	}
	vw.flush(true)
	return vw.err
}

// hasThickness reports whether every element of m has a positive, finite
// thickness.
func hasThickness(m *geom.Mesh) bool {
	for e := range m.NumElems() {
		if t := m.Thickness(e); !(t > 0) || math.IsInf(t, 0) {
			return false
		}
	}
	return m.NumElems() > 0
}
