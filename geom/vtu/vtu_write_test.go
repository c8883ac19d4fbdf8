package vtu

import (
	"bytes"
	"compress/zlib"
	"encoding/base64"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/ulikunitz/xz"
	"gonum.org/v1/gonum/spatial/r3"
)

// This file holds a test-only .vtu writer that can emit every layout the
// reader accepts, following the VTK file-format documentation (Kitware).

// wArray is one DataArray to write. Values come from ints or floats,
// whichever is set, and are converted to typ.
type wArray struct {
	name  string
	typ   dtype
	ncomp int
	ints  []int64
	flts  []float64
}

func (a *wArray) len() int {
	if a.ints != nil {
		return len(a.ints)
	}
	return len(a.flts)
}

func (a *wArray) float(i int) float64 {
	if a.ints != nil {
		return float64(a.ints[i])
	}
	return a.flts[i]
}

func (a *wArray) int(i int) int64 {
	if a.ints != nil {
		return a.ints[i]
	}
	return int64(a.flts[i])
}

// wPiece is one Piece to write. offsets holds the cell end offsets, as in
// the file.
type wPiece struct {
	np, nc                        int
	points                        wArray
	conn, offsets, types          wArray
	pointData, cellData           []wArray
	omitPoints, omitCellArrays    bool
	numberOfPoints, numberOfCells string // override the attributes when set
}

// wOpts selects the layout.
type wOpts struct {
	format    string // "ascii", "binary" or "appended"
	encoding  string // appended: "raw" (default) or "base64"
	compress  bool
	lzma      bool // with compress: LZMA (.xz streams) instead of zlib
	header64  bool
	bigEndian bool
	blockSize int // compression block size; 0 means 32768
	// jointB64 encodes the size header and the data as one base64 stream.
	// VTK writes them as two (header, then data, each padded), and VTK 9
	// reads only that when the header length is not a multiple of 3.
	jointB64 bool
	// wrap breaks base64 and ascii text into lines of about this length;
	// 0 = one line, as VTK writes it. VTK 9 does not read line breaks
	// inside base64 text.
	wrap int
}

// encodeValues returns the binary form of a's values.
func encodeValues(a *wArray, big bool) []byte {
	ord := appendOrder(big)
	n := a.len()
	b := make([]byte, 0, n*a.typ.size())
	for i := range n {
		switch a.typ {
		case typeInt8, typeUInt8:
			b = append(b, byte(a.int(i)))
		case typeInt16, typeUInt16:
			b = ord.AppendUint16(b, uint16(a.int(i)))
		case typeInt32, typeUInt32:
			b = ord.AppendUint32(b, uint32(a.int(i)))
		case typeInt64, typeUInt64:
			b = ord.AppendUint64(b, uint64(a.int(i)))
		case typeFloat32:
			b = ord.AppendUint32(b, math.Float32bits(float32(a.float(i))))
		case typeFloat64:
			b = ord.AppendUint64(b, math.Float64bits(a.float(i)))
		}
	}
	return b
}

// appendOrder returns the byte order of binary data for appending.
func appendOrder(big bool) binary.AppendByteOrder {
	if big {
		return binary.BigEndian
	}
	return binary.LittleEndian
}

// appendWord appends a size-header word.
func (o *wOpts) appendWord(b []byte, v int) []byte {
	if o.header64 {
		return appendOrder(o.bigEndian).AppendUint64(b, uint64(v))
	}
	return appendOrder(o.bigEndian).AppendUint32(b, uint32(v))
}

// block returns the size header and the (possibly compressed) data of a
// binary payload.
func (o *wOpts) block(data []byte) (header, body []byte) {
	if !o.compress {
		return o.appendWord(nil, len(data)), data
	}
	bs := o.blockSize
	if bs == 0 {
		bs = 32768
	}
	nb := (len(data) + bs - 1) / bs
	last := len(data) % bs
	header = o.appendWord(header, nb)
	header = o.appendWord(header, bs)
	header = o.appendWord(header, last)
	var sizes []int
	for i := 0; i < len(data); i += bs {
		var z bytes.Buffer
		var zw io.WriteCloser = zlib.NewWriter(&z)
		if o.lzma {
			zw, _ = xz.NewWriter(&z)
		}
		zw.Write(data[i:min(i+bs, len(data))])
		zw.Close()
		sizes = append(sizes, z.Len())
		body = append(body, z.Bytes()...)
	}
	for _, s := range sizes {
		header = o.appendWord(header, s)
	}
	return header, body
}

// b64 returns the base64 text of a payload: header and body encoded
// separately, as VTK writes them, or jointly.
func (o *wOpts) b64(header, body []byte) string {
	if o.jointB64 {
		return base64.StdEncoding.EncodeToString(append(header[:len(header):len(header)], body...))
	}
	return base64.StdEncoding.EncodeToString(header) + base64.StdEncoding.EncodeToString(body)
}

func wrapText(s string, n int, indent string) string {
	if n <= 0 || len(s) <= n {
		return s
	}
	var b bytes.Buffer
	for i := 0; i < len(s); i += n {
		b.WriteString("\n" + indent)
		b.WriteString(s[i:min(i+n, len(s))])
	}
	b.WriteString("\n" + indent)
	return b.String()
}

// asciiText returns the values of a as text.
func asciiText(a *wArray) []byte {
	var b []byte
	for i := range a.len() {
		if i > 0 {
			b = append(b, ' ')
		}
		switch a.typ {
		case typeFloat32:
			b = strconv.AppendFloat(b, a.float(i), 'g', -1, 32)
		case typeFloat64:
			b = strconv.AppendFloat(b, a.float(i), 'g', -1, 64)
		default:
			b = strconv.AppendInt(b, a.int(i), 10)
		}
	}
	return b
}

// writeVTU writes pieces as a .vtu file in the layout o.
func writeVTU(w io.Writer, pieces []wPiece, o wOpts) error {
	var (
		out      bytes.Buffer
		appended bytes.Buffer
	)
	bo := "LittleEndian"
	if o.bigEndian {
		bo = "BigEndian"
	}
	ht := "UInt32"
	if o.header64 {
		ht = "UInt64"
	}
	out.WriteString("<?xml version=\"1.0\"?>\n")
	fmt.Fprintf(&out, "<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" byte_order=%q header_type=%q", bo, ht)
	switch {
	case o.compress && o.lzma:
		out.WriteString(" compressor=\"vtkLZMADataCompressor\"")
	case o.compress:
		out.WriteString(" compressor=\"vtkZLibDataCompressor\"")
	}
	out.WriteString(">\n  <UnstructuredGrid>\n")
	array := func(a *wArray, indent string) {
		fmt.Fprintf(&out, "%s<DataArray type=%q", indent, a.typ.String())
		if a.name != "" {
			fmt.Fprintf(&out, " Name=%q", a.name)
		}
		if a.ncomp > 1 {
			fmt.Fprintf(&out, " NumberOfComponents=\"%d\"", a.ncomp)
		}
		switch o.format {
		case "ascii":
			out.WriteString(" format=\"ascii\">\n" + indent + "  ")
			out.Write(asciiText(a))
			out.WriteString("\n" + indent + "</DataArray>\n")
		case "binary":
			h, body := o.block(encodeValues(a, o.bigEndian))
			out.WriteString(" format=\"binary\">\n" + indent + "  ")
			out.WriteString(wrapText(o.b64(h, body), o.wrap, indent+"  "))
			out.WriteString("\n" + indent + "</DataArray>\n")
		case "appended":
			fmt.Fprintf(&out, " format=\"appended\" offset=\"%d\"/>\n", appended.Len())
			h, body := o.block(encodeValues(a, o.bigEndian))
			if o.encoding == "base64" {
				appended.WriteString(o.b64(h, body))
			} else {
				appended.Write(h)
				appended.Write(body)
			}
		}
	}
	for _, pc := range pieces {
		np, nc := strconv.Itoa(pc.np), strconv.Itoa(pc.nc)
		if pc.numberOfPoints != "" {
			np = pc.numberOfPoints
		}
		if pc.numberOfCells != "" {
			nc = pc.numberOfCells
		}
		fmt.Fprintf(&out, "    <Piece NumberOfPoints=%q NumberOfCells=%q>\n", np, nc)
		out.WriteString("      <PointData>\n")
		for i := range pc.pointData {
			array(&pc.pointData[i], "        ")
		}
		out.WriteString("      </PointData>\n      <CellData>\n")
		for i := range pc.cellData {
			array(&pc.cellData[i], "        ")
		}
		out.WriteString("      </CellData>\n")
		if !pc.omitPoints {
			out.WriteString("      <Points>\n")
			array(&pc.points, "        ")
			out.WriteString("      </Points>\n")
		}
		out.WriteString("      <Cells>\n")
		if !pc.omitCellArrays {
			array(&pc.conn, "        ")
			array(&pc.offsets, "        ")
			array(&pc.types, "        ")
		}
		out.WriteString("      </Cells>\n    </Piece>\n")
	}
	out.WriteString("  </UnstructuredGrid>\n")
	if o.format == "appended" {
		enc := o.encoding
		if enc == "" {
			enc = "raw"
		}
		fmt.Fprintf(&out, "  <AppendedData encoding=%q>\n   _", enc)
		out.Write(appended.Bytes())
		out.WriteString("\n  </AppendedData>\n")
	}
	out.WriteString("</VTKFile>\n")
	_, err := w.Write(out.Bytes())
	return err
}

// Types of the arrays of a piece, so that tests can vary them.
type wTypes struct {
	points, conn, offsets, types, nodeID, elemID, part, thick dtype
}

// smallPiece returns the shared "small" fixture (see the package tests)
// with the given array types, plus an array the reader must skip.
func smallPiece(t wTypes) wPiece {
	pts := []float64{
		0, 0, 0, 10.5, 0, 0, 21.25, 0, 0,
		0, 10.5, 0, 10.5, 10.5, 0.125, 21.25, 10.5, 0,
		0, 21.25, 0, 10.5, 21.25, 0, 21.25, 21.25, 0,
		0, 0, 2.5, 10.5, 0, 2.5, 0, 10.5, 2.5,
	}
	return wPiece{
		np:      12,
		nc:      6,
		points:  wArray{name: "Points", typ: t.points, ncomp: 3, flts: pts},
		conn:    wArray{name: "connectivity", typ: t.conn, ints: []int64{0, 1, 4, 3, 1, 2, 5, 4, 3, 4, 7, 6, 4, 5, 8, 7, 9, 10, 11, 0}},
		offsets: wArray{name: "offsets", typ: t.offsets, ints: []int64{4, 8, 12, 16, 19, 20}},
		types:   wArray{name: "types", typ: t.types, ints: []int64{9, 9, 9, 9, 5, 1}},
		pointData: []wArray{
			{name: "temperature", typ: typeFloat32, flts: []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}},
			{name: "node_id", typ: t.nodeID, ints: []int64{101, 102, 103, 104, 105, 106, 107, 108, 109, 110, 111, 112}},
		},
		cellData: []wArray{
			{name: "part", typ: t.part, ints: []int64{10, 10, 10, 10, 20, 20}},
			{name: "thickness", typ: t.thick, flts: []float64{1, 1, 1, 1, 1.5, 1.5}},
			{name: "element_id", typ: t.elemID, ints: []int64{1001, 1002, 1003, 1004, 2001, 9001}},
		},
	}
}

// gridPiece returns a flat grid of nx by ny quads with the four arrays
// Joinery reads, in the types VTK writes by default (Float32 points, Int64
// ids and offsets, UInt8 types).
func gridPiece(nx, ny int) wPiece {
	np := (nx + 1) * (ny + 1)
	nc := nx * ny
	pts := make([]float64, 0, 3*np)
	nodeID := make([]int64, 0, np)
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			pts = append(pts, 5*float64(i), 5*float64(j), 0.25*float64((i+j)%3))
			nodeID = append(nodeID, int64(len(nodeID))+1000001)
		}
	}
	conn := make([]int64, 0, 4*nc)
	offs := make([]int64, 0, nc)
	types := make([]int64, nc)
	elemID := make([]int64, 0, nc)
	part := make([]int64, 0, nc)
	thick := make([]float64, 0, nc)
	for j := range ny {
		for i := range nx {
			a := int64(j*(nx+1) + i)
			conn = append(conn, a, a+1, a+int64(nx)+2, a+int64(nx)+1)
			offs = append(offs, int64(len(conn)))
			types[len(elemID)] = 9
			elemID = append(elemID, int64(len(elemID))+5000001)
			part = append(part, int64(1+j*4/ny))
			thick = append(thick, 0.75+0.25*float64(j*4/ny))
		}
	}
	return wPiece{
		np: np, nc: nc,
		points:    wArray{name: "Points", typ: typeFloat32, ncomp: 3, flts: pts},
		conn:      wArray{name: "connectivity", typ: typeInt64, ints: conn},
		offsets:   wArray{name: "offsets", typ: typeInt64, ints: offs},
		types:     wArray{name: "types", typ: typeUInt8, ints: types},
		pointData: []wArray{{name: "node_id", typ: typeInt64, ints: nodeID}},
		cellData: []wArray{
			{name: "element_id", typ: typeInt64, ints: elemID},
			{name: "part", typ: typeInt32, ints: part},
			{name: "thickness", typ: typeFloat32, flts: thick},
		},
	}
}

// piecePoints returns the points of a piece as vectors.
func piecePoints(pc *wPiece) []r3.Vec {
	v := make([]r3.Vec, pc.np)
	for i := range v {
		v[i] = r3.Vec{X: pc.points.float(3 * i), Y: pc.points.float(3*i + 1), Z: pc.points.float(3*i + 2)}
	}
	return v
}
