package vtu

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

var update = flag.Bool("update", false, "rewrite the testdata/formats/small_*.vtu fixtures")

const formatsDir = "../../testdata/formats"

// smallVariant is one layout of the shared "small" fixture.
type smallVariant struct {
	file  string
	types wTypes
	opts  wOpts
}

// smallVariants lists the committed fixture files. The array types and
// byte orders vary between them so that every numeric type is read. Every
// one is laid out as VTK itself writes and reads it (checked against
// python3-vtk9 by meshio's TestAgainstVTKLibrary): base64 text on one
// line, size header and data as separate base64 streams. The layouts only
// this reader accepts (wrapped or jointly encoded base64) are covered by
// TestLayouts.
func smallVariants() []smallVariant {
	return []smallVariant{
		{"small_ascii.vtu",
			wTypes{points: typeFloat32, conn: typeInt32, offsets: typeInt32, types: typeUInt8, nodeID: typeInt32, elemID: typeInt32, part: typeInt32, thick: typeFloat32},
			wOpts{format: "ascii"}},
		{"small_base64.vtu",
			wTypes{points: typeFloat64, conn: typeInt64, offsets: typeInt64, types: typeUInt8, nodeID: typeInt64, elemID: typeInt64, part: typeInt64, thick: typeFloat64},
			wOpts{format: "binary"}},
		{"small_base64_zlib.vtu",
			wTypes{points: typeFloat32, conn: typeInt32, offsets: typeUInt32, types: typeInt8, nodeID: typeUInt32, elemID: typeUInt16, part: typeUInt8, thick: typeFloat64},
			wOpts{format: "binary", compress: true, bigEndian: true, blockSize: 64}},
		{"small_appended_raw.vtu",
			wTypes{points: typeFloat64, conn: typeInt64, offsets: typeInt64, types: typeUInt8, nodeID: typeInt32, elemID: typeInt32, part: typeInt16, thick: typeFloat32},
			wOpts{format: "appended"}},
		{"small_appended_raw_zlib.vtu",
			wTypes{points: typeFloat64, conn: typeUInt64, offsets: typeInt16, types: typeUInt16, nodeID: typeInt64, elemID: typeUInt64, part: typeFloat32, thick: typeFloat32},
			wOpts{format: "appended", compress: true, bigEndian: true, blockSize: 40}},
		{"small_appended_base64.vtu",
			wTypes{points: typeFloat32, conn: typeInt64, offsets: typeInt32, types: typeUInt8, nodeID: typeInt64, elemID: typeInt32, part: typeInt32, thick: typeFloat64},
			wOpts{format: "appended", encoding: "base64"}},
		{"small_base64_lzma.vtu",
			wTypes{points: typeFloat64, conn: typeInt32, offsets: typeInt64, types: typeUInt8, nodeID: typeInt32, elemID: typeInt64, part: typeInt16, thick: typeFloat32},
			wOpts{format: "binary", compress: true, lzma: true, blockSize: 64}},
		{"small_appended_raw_lzma.vtu",
			wTypes{points: typeFloat32, conn: typeInt64, offsets: typeInt32, types: typeUInt8, nodeID: typeInt64, elemID: typeInt32, part: typeInt32, thick: typeFloat64},
			wOpts{format: "appended", compress: true, lzma: true, header64: true, bigEndian: true}},
		{"small_uint64header.vtu",
			wTypes{points: typeFloat64, conn: typeInt64, offsets: typeInt64, types: typeUInt8, nodeID: typeInt64, elemID: typeInt64, part: typeInt64, thick: typeFloat64},
			wOpts{format: "binary", compress: true, header64: true}},
	}
}

func TestSmallFixtures(t *testing.T) {
	var first *geom.Mesh
	for _, v := range smallVariants() {
		path := filepath.Join(formatsDir, v.file)
		if *update {
			var b bytes.Buffer
			if err := writeVTU(&b, []wPiece{smallPiece(v.types)}, v.opts); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		m, err := ReadFile(path, geom.ReadOptions{})
		if err != nil {
			t.Errorf("%s: %v", v.file, err)
			continue
		}
		if d := geomtest.Diff(m, geomtest.Small(path)); d != "" {
			t.Errorf("%s differs from the fixture specification:\n%s", v.file, d)
		}
		if first == nil {
			first = m
			continue
		}
		m.Sources[0].File = first.Sources[0].File
		if d := geomtest.Diff(m, first); d != "" {
			t.Errorf("%s differs from %s:\n%s", v.file, smallVariants()[0].file, d)
		}
		if id, ok := m.ElemIndex(2001); !ok || id != 4 {
			t.Errorf("%s: ElemIndex(2001) = %d, %v; want 4, true", v.file, id, ok)
		}
	}
}

// TestHandwritten reads a file written by hand after the example layout
// of an unstructured grid in "VTK File Formats" (Kitware, VTK User's
// Guide, XML file formats section) and checks every value.
func TestHandwritten(t *testing.T) {
	path := "../../testdata/vtu/handwritten_ascii.vtu"
	m, err := ReadFile(path, geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// Values as typed into the file.
	want := &geom.Mesh{
		Parts:   []geom.Part{{ID: 7}, {ID: 3}},
		NodeIDs: []int64{11, 12, 13, 14, 15, 16, 17},
		Coords: []r3.Vec{
			{X: 0, Y: 0, Z: 0}, {X: 1, Y: 0, Z: 0}, {X: 2, Y: 0, Z: 0},
			{X: 0, Y: 1, Z: 0}, {X: 1, Y: 1, Z: 0}, {X: 2, Y: 1, Z: 0.5},
			{X: 1, Y: 2, Z: -0.25},
		},
		ElemIDs:       []int64{21, 22, 23},
		ElemPart:      []int32{0, 0, 1},
		ElemStart:     []int32{0, 4, 7, 10},
		Conn:          []int32{0, 1, 4, 3, 1, 2, 5, 3, 4, 6},
		ElemThickness: []float64{0.8, 0.8, 1.2},
		Sources:       []geom.Source{{File: path, Skipped: geom.SkippedCells{3: 1, 12: 1}}},
	}
	if d := geomtest.Diff(m, want); d != "" {
		t.Errorf("handwritten file:\n%s", d)
	}
}

func TestB64Table(t *testing.T) {
	// RFC 4648, table 1: the standard base64 alphabet.
	const alphabet = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/"
	for c := range 256 {
		want := byte(b64Invalid)
		if i := strings.IndexByte(alphabet, byte(c)); i >= 0 {
			want = byte(i)
		}
		switch c {
		case '=':
			want = b64Pad
		case ' ', '\t', '\n', '\r':
			want = b64Space
		}
		if got := b64Table[c]; got != want {
			t.Errorf("b64Table[%q] = %#x, want %#x", byte(c), got, want)
		}
	}
}

// gridCheck checks a mesh read from gridPiece(nx, ny) pieces.
func gridCheck(t *testing.T, m *geom.Mesh, pcs []wPiece) {
	t.Helper()
	var nodeIDs, elemIDs []int64
	var coords []r3.Vec
	var conn []int32
	var thick []float64
	base := int32(0)
	for i := range pcs {
		pc := &pcs[i]
		nodeIDs = append(nodeIDs, pc.pointData[0].ints...)
		elemIDs = append(elemIDs, pc.cellData[0].ints...)
		coords = append(coords, piecePoints(pc)...)
		for _, c := range pc.conn.ints {
			conn = append(conn, int32(c)+base)
		}
		base += int32(pc.np)
		for _, f := range pc.cellData[2].flts {
			thick = append(thick, float64(float32(f)))
		}
	}
	for i := range coords {
		// Points are written as Float32.
		coords[i] = r3.Vec{X: float64(float32(coords[i].X)), Y: float64(float32(coords[i].Y)), Z: float64(float32(coords[i].Z))}
	}
	switch {
	case !reflect.DeepEqual(m.NodeIDs, nodeIDs):
		t.Errorf("node ids differ")
	case !reflect.DeepEqual(m.ElemIDs, elemIDs):
		t.Errorf("element ids differ")
	case !reflect.DeepEqual(m.Coords, coords):
		t.Errorf("coordinates differ")
	case !reflect.DeepEqual(m.Conn, conn):
		t.Errorf("connectivity differs")
	case !reflect.DeepEqual(m.ElemThickness, thick):
		t.Errorf("thickness differs")
	}
	for e := range m.NumElems() {
		if got := m.Parts[m.ElemPart[e]].ID; got < 1 || got > 4 {
			t.Fatalf("element %d: part %d", e, got)
		}
	}
}

// TestLayouts reads a small grid, as one piece and as two, written in
// every combination of layout options.
func TestLayouts(t *testing.T) {
	for _, format := range []string{"ascii", "binary", "appended", "appended-base64"} {
		for _, compress := range []bool{false, true} {
			for _, h64 := range []bool{false, true} {
				for _, big := range []bool{false, true} {
					for _, joint := range []bool{false, true} {
						for _, npieces := range []int{1, 2} {
							o := wOpts{format: format, compress: compress, header64: h64, bigEndian: big, jointB64: joint, blockSize: 100, wrap: 20}
							if format == "appended-base64" {
								o.format, o.encoding = "appended", "base64"
							}
							if format == "ascii" && (compress || h64 || big || joint) {
								continue
							}
							pcs := []wPiece{gridPiece(4, 3)}
							if npieces == 2 {
								pc := gridPiece(3, 5)
								for i := range pc.pointData[0].ints {
									pc.pointData[0].ints[i] += 100
								}
								for i := range pc.cellData[0].ints {
									pc.cellData[0].ints[i] += 100
								}
								pcs = append(pcs, pc)
							}
							name := fmt.Sprintf("%s/z=%v/h64=%v/big=%v/joint=%v/pieces=%d", format, compress, h64, big, joint, npieces)
							var b bytes.Buffer
							if err := writeVTU(&b, pcs, o); err != nil {
								t.Fatal(err)
							}
							m, err := Read(&b, name, geom.ReadOptions{})
							if err != nil {
								t.Errorf("%s: %v", name, err)
								continue
							}
							gridCheck(t, m, pcs)
						}
					}
				}
			}
		}
	}
}

// TestXMLForms checks text forms the XML allows around array data:
// comments, CDATA sections, entity references, child elements holding
// information keys, and self-closing elements.
func TestXMLForms(t *testing.T) {
	const head = `<?xml version="1.0" encoding="UTF-8"?>
<!-- a comment before the root -->
<VTKFile type="UnstructuredGrid" version="0.1" byte_order="LittleEndian">
<UnstructuredGrid>
<FieldData><DataArray type="Float64" Name="TimeValue" NumberOfTuples="1" format="ascii">0</DataArray></FieldData>
<Piece NumberOfPoints="4" NumberOfCells="2">
<PointData/>
<Points>
<DataArray type="Float32" Name="Points" NumberOfComponents="3" format="ascii">
  <InformationKey name="L2_NORM_RANGE" location="vtkDataArray" length="2"><Value index="0">0</Value></InformationKey>
  0 0 0  1 0 0 <!-- inside --> 1 1 0
  0 1 &#x30;
</DataArray>
</Points>
<Cells>
<DataArray type="Int64" Name="connectivity" format="ascii"><![CDATA[0 1 2]]> 0 2 3</DataArray>
<DataArray type="Int64" Name="offsets" format="ascii">3 6</DataArray>
<DataArray type="UInt8" Name="types" format="ascii">5 5</DataArray>
<DataArray type="Int64" Name="faces" format="ascii"/>
</Cells>
<CellData><DataArray type="String" Name="label" format="ascii">abc</DataArray>
<DataArray type="Int32" Name="part" format="ascii">
4
4</DataArray></CellData>
</Piece>
</UnstructuredGrid>
</VTKFile>
`
	m, err := Read(strings.NewReader(head), "forms.vtu", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := &geom.Mesh{
		Parts:     []geom.Part{{ID: 4}},
		NodeIDs:   []int64{1, 2, 3, 4},
		Coords:    []r3.Vec{{X: 0, Y: 0, Z: 0}, {X: 1, Y: 0, Z: 0}, {X: 1, Y: 1, Z: 0}, {X: 0, Y: 1, Z: 0}},
		ElemIDs:   []int64{1, 2},
		ElemPart:  []int32{0, 0},
		ElemStart: []int32{0, 3, 6},
		Conn:      []int32{0, 1, 2, 0, 2, 3},
		Sources:   []geom.Source{{File: "forms.vtu", ImplicitNodeIDs: true, ImplicitElemIDs: true}},
	}
	if d := geomtest.Diff(m, want); d != "" {
		t.Error(d)
	}
}

func TestDefaultPart(t *testing.T) {
	var b bytes.Buffer
	pc := gridPiece(2, 2)
	pc.cellData = pc.cellData[:1]
	if err := writeVTU(&b, []wPiece{pc}, wOpts{format: "appended"}); err != nil {
		t.Fatal(err)
	}
	data := b.Bytes()
	if _, err := Read(bytes.NewReader(data), "nopart.vtu", geom.ReadOptions{}); !errors.Is(err, geom.ErrInput) {
		t.Errorf("no part array and no default part: err = %v, want an input error", err)
	}
	m, err := Read(bytes.NewReader(data), "nopart.vtu", geom.ReadOptions{DefaultPart: 33, HasDefaultPart: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Parts) != 1 || m.Parts[0].ID != 33 || m.ElemThickness != nil {
		t.Errorf("parts %v, thickness %v; want one part 33 and no thickness", m.Parts, m.ElemThickness)
	}
}

func TestReadFileMissing(t *testing.T) {
	_, err := ReadFile(filepath.Join(t.TempDir(), "none.vtu"), geom.ReadOptions{})
	if !errors.Is(err, geom.ErrInput) || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("err = %v, want a not-exist input error", err)
	}
}

// TestVTKWrittenFiles reads the small fixture as VTK's own XML writer
// lays it out with zlib and LZMA compression (python3-vtk9, written by
// testdata/vtu/vtk9_write.py): inline binary with 32- and 64-bit size
// headers and appended base64, where VTK base64-encodes the size header
// and the compressed blocks as two separate streams, and appended raw.
func TestVTKWrittenFiles(t *testing.T) {
	for _, name := range []string{"vtk9_binary_zlib.vtu", "vtk9_binary_zlib_uint64.vtu", "vtk9_appended_base64_zlib.vtu",
		"vtk9_binary_lzma.vtu", "vtk9_appended_base64_lzma_uint64.vtu", "vtk9_appended_raw_lzma.vtu"} {
		path := filepath.Join("../../testdata/vtu", name)
		m, err := ReadFile(path, geom.ReadOptions{})
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if d := geomtest.Diff(m, geomtest.Small(path)); d != "" {
			t.Errorf("%s differs from the fixture specification:\n%s", name, d)
		}
	}
}
