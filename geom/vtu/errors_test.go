package vtu

import (
	"bytes"
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// errTemplate is a valid ascii file; the error cases edit it. Line numbers
// in the expected messages refer to it.
const errTemplate = `<?xml version="1.0"?>
<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt32">
  <UnstructuredGrid>
    <Piece NumberOfPoints="4" NumberOfCells="2">
      <PointData>
        <DataArray type="Int32" Name="node_id" format="ascii">
          1 2 3 4
        </DataArray>
      </PointData>
      <CellData>
        <DataArray type="Int32" Name="part" format="ascii">5 5</DataArray>
        <DataArray type="Float32" Name="thickness" format="ascii">1 1</DataArray>
      </CellData>
      <Points>
        <DataArray type="Float32" NumberOfComponents="3" format="ascii">
          0 0 0 1 0 0
          1 1 0 0 1 0
        </DataArray>
      </Points>
      <Cells>
        <DataArray type="Int32" Name="connectivity" format="ascii">0 1 2 0 2 3</DataArray>
        <DataArray type="Int32" Name="offsets" format="ascii">3 6</DataArray>
        <DataArray type="UInt8" Name="types" format="ascii">5 5</DataArray>
      </Cells>
    </Piece>
  </UnstructuredGrid>
</VTKFile>
`

func TestErrTemplateValid(t *testing.T) {
	m, err := Read(strings.NewReader(errTemplate), "ok.vtu", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if m.NumElems() != 2 || m.NumNodes() != 4 {
		t.Errorf("%d elements, %d nodes; want 2 and 4", m.NumElems(), m.NumNodes())
	}
}

func TestASCIIErrors(t *testing.T) {
	for _, c := range []struct {
		name     string
		old, new string // replace the first old by new in errTemplate
		want     string // substring of the error message
	}{
		{"not xml", errTemplate, "hello", "bad.vtu: no VTKFile element"},
		{"empty", errTemplate, "", "bad.vtu: no VTKFile element"},
		{"other root", "<VTKFile type", "<VTKFilf type", "bad.vtu:2: root element is <VTKFilf>"},
		{"image data", `type="UnstructuredGrid"`, `type="ImageData"`, `bad.vtu:2: VTKFile type "ImageData": want UnstructuredGrid or PolyData`},
		{"poly data holding a grid", `type="UnstructuredGrid"`, `type="PolyData"`, `bad.vtu:27: no PolyData element`},
		{"byte order", `"LittleEndian"`, `"Middle"`, `bad.vtu:2: byte_order "Middle"`},
		{"header type", `header_type="UInt32"`, `header_type="Int8"`, `bad.vtu:2: header_type "Int8"`},
		{"compressor", `header_type="UInt32"`, `compressor="vtkLZ4DataCompressor"`, `bad.vtu:2: compressor "vtkLZ4DataCompressor" is not supported`},
		{"xml mismatch", "</Points>", "</Pointz>", "bad.vtu:19: xml: element <Points> closed by </Pointz>"},
		{"truncated xml", "      </Cells>", "", "bad.vtu:25: xml: element <Cells> closed by </Piece>"},
		{"truncated inside text", errTemplate, errTemplate[:strings.Index(errTemplate, "1 1 0 0")], "bad.vtu:17: xml: unexpected EOF"},
		{"truncated after root", errTemplate, errTemplate[:strings.Index(errTemplate, "  <Unstr")], "bad.vtu:3: xml: unexpected EOF"},
		{"no grid", errTemplate, "<VTKFile type=\"UnstructuredGrid\">\n</VTKFile>", "bad.vtu:2: no UnstructuredGrid element"},
		{"no piece", errTemplate, "<VTKFile type=\"UnstructuredGrid\">\n<UnstructuredGrid/></VTKFile>", "bad.vtu:2: UnstructuredGrid has no Piece"},
		{"bad count", `NumberOfPoints="4"`, `NumberOfPoints="four"`, `bad.vtu:4: Piece NumberOfPoints="four" is not a valid count`},
		{"negative count", `NumberOfCells="2"`, `NumberOfCells="-2"`, `bad.vtu:4: Piece NumberOfCells="-2" is not a valid count`},
		{"no count", `NumberOfCells="2"`, ``, `bad.vtu:4: Piece needs NumberOfPoints and NumberOfCells`},
		{"non-numeric", "1 1 0 0 1 0", "1 1 0 0 x 0", `bad.vtu:17: array "Points": value 10: "x" is not a number`},
		{"non-numeric int", "1 2 3 4", "1 2 3 4a", `bad.vtu:7: array "node_id": value 3: "4a" is not a number`},
		{"float in int array", `ascii">5 5<`, `ascii">5 5.5<`, `bad.vtu:11: array "part": value 1: "5.5" is not an integer, as type Int32 requires`},
		{"float in float-typed int array", `type="Int32" Name="part" format="ascii">5 5<`, `type="Float64" Name="part" format="ascii">5 5.5<`, `bad.vtu:11: array "part": value 1: "5.5" is not an integer`},
		{"out of range", `ascii">5 5</DataArray>
      </Cells>`, `ascii">5 300</DataArray>
      </Cells>`, `bad.vtu:23: array "types": value 1: 300 is out of range for UInt8`},
		{"too many points", `NumberOfPoints="4"`, `NumberOfPoints="5"`, `bad.vtu:15: array "Points" has 12 values, want 5 tuples of 3 (NumberOfPoints=5)`},
		{"too few points", `NumberOfPoints="4"`, `NumberOfPoints="3"`, `bad.vtu:15: array "Points" has 12 values, want 3 tuples of 3 (NumberOfPoints=3)`},
		{"huge point count", `NumberOfPoints="4"`, `NumberOfPoints="1000000000"`, `bad.vtu:15: array "Points" has 12 values, want 1000000000 tuples of 3`},
		{"too many cells", `NumberOfCells="2"`, `NumberOfCells="3"`, `bad.vtu:22: array "offsets" has 2 values, want 3 (NumberOfCells=3)`},
		{"connectivity short", `ascii">0 1 2 0 2 3<`, `ascii">0 1 2 0 2<`, `bad.vtu:21: array "connectivity" has 5 values, want 6 (the last offset, 6)`},
		{"missing point", "0 1 2 0 2 3", "0 1 2 0 2 4", `bad.vtu:21: connectivity value 5 (cell 1) refers to point 4; the piece has 4 points`},
		{"negative point", "0 1 2 0 2 3", "0 1 -2 0 2 3", `bad.vtu:21: connectivity value 2 (cell 0) refers to point -2`},
		{"offsets decrease", `ascii">3 6<`, `ascii">6 3<`, `bad.vtu:22: offsets: cell 1 ends at 3, before its start 6`},
		{"NaN", "1 1 0 0 1 0", "1 1 0 0 nan 0", `bad.vtu:17: point 3 has a non-finite coordinate (0, NaN, 0)`},
		{"Inf", "0 0 0 1 0 0", "0 0 0 1 0 -inf", `bad.vtu:16: point 1 has a non-finite coordinate (1, 0, -Inf)`},
		{"float32 overflow", "0 0 0 1 0 0", "0 0 0 1 0 1e39", `bad.vtu:16: array "Points": value 5: "1e39" is out of range for Float32`},
		{"no points", errTemplate[strings.Index(errTemplate, "      <Points>"):strings.Index(errTemplate, "      <Cells>")], "", `bad.vtu:4: Piece has 4 points but no Points array`},
		{"no types", `Name="types"`, `Name="kinds"`, `bad.vtu:4: Piece has 2 cells but no "types" array in Cells`},
		{"two components", `<DataArray type="Float32" NumberOfComponents="3"`, `<DataArray type="Float32" NumberOfComponents="2"`, `bad.vtu:15: Points array has 2 components, want 3`},
		{"part components", `Name="part" format`, `Name="part" NumberOfComponents="2" format`, `bad.vtu:11: array "part" has 2 components, want 1`},
		{"bad components", `Name="part" format`, `Name="part" NumberOfComponents="x" format`, `bad.vtu:11: DataArray "part": NumberOfComponents="x"`},
		{"unknown format", `Name="part" format="ascii"`, `Name="part" format="hex"`, `bad.vtu:11: DataArray "part": unknown format "hex"`},
		{"no type", `type="Int32" Name="part"`, `Name="part"`, `bad.vtu:11: DataArray "part" has no type attribute`},
		{"string part", `type="Int32" Name="part"`, `type="String" Name="part"`, `bad.vtu:11: array "part" has a type Joinery cannot read as numbers`},
		{"two parts", `<DataArray type="Float32" Name="thickness"`, `<DataArray type="Int32" Name="part"`, `bad.vtu:12: second CellData array "part" in one piece (first at line 11)`},
		{"appended without data", `Name="part" format="ascii">5 5<`, `Name="part" format="appended" offset="0"><`, `bad.vtu:11: array "part" is appended but the file has no AppendedData`},
		{"appended without offset", `Name="part" format="ascii">5 5<`, `Name="part" format="appended"><`, `bad.vtu:11: appended DataArray "part" has no offset attribute`},
		// Values found wrong once the mesh is built: at the line of the value.
		{"part not positive", `ascii">5 5<`, `ascii">5 0<`, `bad.vtu:11: cell 1: part id 0 is not positive`},
		{"duplicate node id", "1 2 3 4", "1 2 3 3", `bad.vtu:7: node id 3 appears twice (points 2 and 3; first at line 7)`},
		{"duplicate node id, two lines", "1 2 3 4", "1 2\n3 2", `bad.vtu:8: node id 2 appears twice (points 1 and 3; first at line 7)`},
		{"node id not positive", "1 2 3 4", "1 2\n3 0", `bad.vtu:8: point 3: node id 0 is not positive`},
		{"thickness negative", `ascii">1 1<`, "ascii\">1\n-1<", `bad.vtu:13: cell 1: thickness -1 is not a positive number`},
		{"thickness NaN", `ascii">1 1<`, `ascii">NaN 1<`, `bad.vtu:12: cell 0: thickness NaN is not a positive number`},
		{"element id not positive", thickArray, thickArray + elemArray("7\n-7"), `bad.vtu:15: cell 1: element id -7 is not positive`},
		{"duplicate element id", thickArray, thickArray + elemArray("7\n7"), `bad.vtu:15: element id 7 appears twice (cells 0 and 1; first at line 14)`},
		{"missing point, second line", "0 1 2 0 2 3", "0 1 2\n0 2 9", `bad.vtu:22: connectivity value 5 (cell 1) refers to point 9; the piece has 4 points`},
		{"type needs points", `ascii">5 5</DataArray>
      </Cells>`, `ascii">5 9</DataArray>
      </Cells>`, `bad.vtu:23: cell 1: type 9 (quad) needs 4 points, has 3`},
		{"types out of range", `ascii">5 5</DataArray>
      </Cells>`, "ascii\">5\n-1</DataArray>\n      </Cells>", `bad.vtu:24: array "types": value 1: -1 is out of range for UInt8`},
	} {
		t.Run(c.name, func(t *testing.T) {
			in := strings.Replace(errTemplate, c.old, c.new, 1)
			if in == errTemplate {
				t.Fatalf("%q not found in the template", c.old)
			}
			_, err := Read(strings.NewReader(in), "bad.vtu", geom.ReadOptions{})
			checkErr(t, err, c.want)
		})
	}
}

// thickArray is the thickness array of errTemplate; elemArray returns an
// element_id array over three lines holding text.
const thickArray = `<DataArray type="Float32" Name="thickness" format="ascii">1 1</DataArray>`

func elemArray(text string) string {
	return "\n        <DataArray type=\"Int64\" Name=\"element_id\" format=\"ascii\">\n" + text + "\n</DataArray>"
}

func checkErr(t *testing.T, err error, want string) {
	t.Helper()
	if err == nil {
		t.Fatalf("no error, want %q", want)
	}
	if !errors.Is(err, geom.ErrInput) {
		t.Errorf("%v: not an input error", err)
	}
	if !strings.Contains(err.Error(), want) {
		t.Errorf("error %q\n  does not contain %q", err, want)
	}
}

// appendedFile writes the small fixture with appended data and returns it
// with a function giving the file offset of a named array's data.
func appendedFile(t *testing.T, types wTypes, o wOpts) ([]byte, func(name string) int) {
	t.Helper()
	var b bytes.Buffer
	if err := writeVTU(&b, []wPiece{smallPiece(types)}, o); err != nil {
		t.Fatal(err)
	}
	data := b.Bytes()
	start := bytes.Index(data, []byte("<AppendedData"))
	if start >= 0 {
		start += bytes.IndexByte(data[start:], '_') + 1
	}
	return data, func(name string) int {
		m := regexp.MustCompile(`Name="` + name + `"[^>]* offset="(\d+)"`).FindSubmatch(data)
		if m == nil {
			t.Fatalf("no appended array %q", name)
		}
		off, _ := strconv.Atoi(string(m[1]))
		return start + off
	}
}

var smallTypes = wTypes{points: typeFloat64, conn: typeInt64, offsets: typeInt64, types: typeUInt8, nodeID: typeInt64, elemID: typeInt64, part: typeInt32, thick: typeFloat64}

func TestBinaryErrors(t *testing.T) {
	le := binary.LittleEndian
	type tc struct {
		name string
		data []byte
		want string
	}
	var cases []tc
	add := func(name string, data []byte, want string, args ...any) {
		cases = append(cases, tc{name, data, fmt.Sprintf(want, args...)})
	}

	// Raw appended, uncompressed, UInt32 headers.
	raw, at := appendedFile(t, smallTypes, wOpts{format: "appended"})
	pts := at("Points")
	add("truncated raw", raw[:pts+100], `bad.vtu: byte %d: array "Points": truncated: needs 288 bytes, the file has 96 left`, pts+4)
	add("truncated header", raw[:pts+2], `bad.vtu: byte %d: array "Points": truncated: needs 4 bytes, the file has 2 left`, pts)
	d := bytes.Clone(raw)
	le.PutUint32(d[pts:], 0xfffffff0)
	add("lying size", d, `bad.vtu:15: array "Points" has 536870910 values, want 12 tuples of 3 (NumberOfPoints=12)`)
	d = bytes.Clone(raw)
	le.PutUint32(d[pts:], 280)
	add("size not whole", d, `bad.vtu:15: array "Points" has 35 values, want 12 tuples of 3 (NumberOfPoints=12)`)
	d = bytes.Clone(raw)
	le.PutUint32(d[pts:], 284)
	add("size not a multiple", d, `bad.vtu:15: array "Points": 284 bytes is not a whole number of 8-byte Float64 values`)
	d = bytes.Clone(raw)
	le.PutUint32(d[at("part"):], 7)
	add("bytes not whole", d, `bad.vtu:10: array "part": 7 bytes is not a whole number of 4-byte Int32 values`)
	d = bytes.Clone(raw)
	le.PutUint64(d[pts+4+8*7:], 0x7ff0000000000000) // +Inf, IEEE 754
	add("raw inf", d, `bad.vtu:15: point 2 has a non-finite coordinate (21.25, +Inf, 0)`)
	d = bytes.Clone(raw)
	le.PutUint64(d[at("connectivity")+4+8*3:], 12)
	add("raw missing point", d, `bad.vtu:18: connectivity value 3 (cell 0) refers to point 12; the piece has 12 points`)
	ptsAttr := fmt.Sprintf(`format="appended" offset="%d"/>`, pts-at("node_id")+mustOffset(t, raw, "node_id"))
	d = []byte(strings.Replace(string(raw), ptsAttr, `format="appended" offset="100000"/>`, 1))
	add("offset beyond", d, `bad.vtu:15: array "Points": offset 100000 is beyond the`)
	d = []byte(strings.Replace(string(raw), `<AppendedData encoding="raw">`, `<AppendedData encoding="raw">x`, 1))
	add("no underscore", d, `bad.vtu:24: AppendedData does not start with '_'`)
	d = []byte(strings.Replace(string(raw), `<AppendedData encoding="raw">`, `<AppendedData encoding="hex">`, 1))
	add("appended encoding", d, `bad.vtu:24: AppendedData encoding "hex"`)
	// Values found wrong once the mesh is built: binary data names the record.
	d = bytes.Clone(raw)
	le.PutUint32(d[at("part")+4+4*2:], 0)
	add("raw part not positive", d, `bad.vtu: record 2: cell 2: part id 0 is not positive`)
	d = bytes.Clone(raw)
	le.PutUint64(d[at("node_id")+4+8*5:], 101)
	add("raw duplicate node id", d, `bad.vtu: record 5: node id 101 appears twice (points 0 and 5)`)

	// UInt64 values that do not fit int64, and floats that are not whole.
	u64, at64 := appendedFile(t, wTypes{points: typeFloat64, conn: typeInt64, offsets: typeInt64, types: typeUInt8, nodeID: typeUInt64, elemID: typeFloat32, part: typeInt32, thick: typeFloat64}, wOpts{format: "appended"})
	d = bytes.Clone(u64)
	le.PutUint64(d[at64("node_id")+4+8*2:], 1<<63)
	add("uint64 overflow", d, `bad.vtu:7: array "node_id": value 2: 9223372036854775808 does not fit a signed 64-bit integer`)
	d = bytes.Clone(u64)
	le.PutUint32(d[at64("element_id")+4+4*1:], 0x3fc00000) // 1.5 as IEEE 754 single
	add("float not whole", d, `bad.vtu:12: array "element_id": value 1: 1.5 is not an integer`)

	// Raw appended, compressed, UInt64 headers.
	z, atz := appendedFile(t, smallTypes, wOpts{format: "appended", compress: true, header64: true, blockSize: 40})
	zp := atz("Points") // 288 bytes in 8 blocks: header of 11 words
	d = bytes.Clone(z)
	d[zp+88] ^= 0xff
	add("zlib header", d, `bad.vtu: byte %d: array "Points": zlib block 0: zlib: invalid header`, zp+88)
	d = bytes.Clone(z)
	c0 := int(le.Uint64(z[zp+24:]))
	d[zp+88+c0-1] ^= 0xff
	add("zlib checksum", d, `bad.vtu: byte %d: array "Points": zlib block 0: zlib: invalid checksum`, zp+88)
	d = bytes.Clone(z)
	le.PutUint64(d[zp+8:], 1<<30)
	add("zlib lying block size", d, `bad.vtu:15: array "Points" has 939524097 values, want 12 tuples of 3 (NumberOfPoints=12)`)
	d = bytes.Clone(z)
	le.PutUint64(d[zp:], 1<<39)
	add("zlib lying block count", d, `bad.vtu: byte %d: array "Points": 549755813888 blocks of 40 bytes are more than the input allows`, zp)
	d = bytes.Clone(z)
	le.PutUint64(d[zp:], 1<<50)
	add("zlib huge word", d, `bad.vtu: byte %d: array "Points": block count 1125899906842624 is larger than the input allows`, zp)
	d = bytes.Clone(z)
	le.PutUint64(d[zp+16:], 4)
	add("zlib short last block", d, `bad.vtu:15: array "Points": 284 bytes is not a whole number of 8-byte Float64 values`)
	// Sizes that add up to what the array needs, but blocks that do not
	// inflate to them: found while inflating, never past a block's size.
	d = bytes.Clone(z)
	le.PutUint64(d[zp+8:], 36)
	le.PutUint64(d[zp+16:], 288-7*36)
	add("zlib block too long", d, `bad.vtu: byte %d: array "Points": zlib block 0: inflates to more than the declared 36 bytes`, zp+88)
	d = bytes.Clone(z)
	le.PutUint64(d[zp+16:], 41)
	add("zlib last above block", d, `bad.vtu: byte %d: array "Points": last block size 41 exceeds the block size 40`, zp)
	d = bytes.Clone(z)
	le.PutUint64(d[zp+8:], 48)
	add("zlib declares too many bytes", d, `bad.vtu:15: array "Points" has 43 values, want 12 tuples of 3 (NumberOfPoints=12)`)
	d = bytes.Clone(z)
	le.PutUint64(d[zp+8:], 41)
	le.PutUint64(d[zp+16:], 288-7*41)
	add("zlib too few bytes", d, `bad.vtu: byte %d: array "Points": zlib block 0: inflates to fewer than the declared 41 bytes`, zp+88)
	add("zlib truncated", z[:zp+100], `bad.vtu: byte %d: array "Points": truncated: blocks 0..2 need`, zp)

	// Inline base64.
	b64, _ := appendedFile(t, smallTypes, wOpts{format: "binary"})
	i := bytes.Index(b64, []byte(`Name="part" format="binary">`))
	i += bytes.Index(b64[i:], []byte(">")) + 1
	i += bytes.IndexAny(b64[i:], "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/")
	d = bytes.Clone(b64)
	d[i+10] = '!'
	add("bad base64", d, `bad.vtu: byte %d: array "part": invalid base64 character '!'`, i+10)
	d = bytes.Clone(b64)
	d[i+1] = '='
	add("bad padding", d, `bad.vtu: byte %d: array "part": misplaced base64 padding`, i+1)
	partB64 := func(header, body []byte) []byte {
		s := base64.StdEncoding.EncodeToString(header) + base64.StdEncoding.EncodeToString(body)
		j := i + bytes.IndexByte(b64[i:], '<')
		return append(append(append([]byte{}, b64[:i]...), s...), b64[j:]...)
	}
	add("base64 size below need", partB64(le.AppendUint32(nil, 4), make([]byte, 8)), `bad.vtu:14: array "part" has 1 values, want 6 (NumberOfCells=6)`)
	add("base64 too long", partB64(le.AppendUint32(nil, 24), make([]byte, 28)), `bad.vtu: byte %d: array "part": base64 text holds more bytes than its size header declares`, i+40)
	add("base64 too short", partB64(le.AppendUint32(nil, 24), make([]byte, 8)), `bad.vtu: byte %d: array "part": truncated: needs 24 bytes, the base64 text holds at most 9`, i+8)
	add("base64 size lies", partB64(le.AppendUint32(nil, 1<<31), make([]byte, 8)), `bad.vtu:14: array "part" has 536870912 values, want 6 (NumberOfCells=6)`)
	d = append(append(append([]byte{}, b64[:i]...), "GAAAAA=="+strings.Repeat("A", 30)...), b64[i+bytes.IndexByte(b64[i:], '<'):]...)
	add("base64 half group", d, `bad.vtu: byte %d: array "part": base64 text ends inside a group`, i+38)
	add("base64 not whole", partB64(le.AppendUint32(nil, 6), make([]byte, 6)), `bad.vtu:14: array "part": 6 bytes is not a whole number of 4-byte Int32 values`)
	add("base64 count", partB64(le.AppendUint32(nil, 12), make([]byte, 12)), `bad.vtu:14: array "part" has 3 values, want 6 (NumberOfCells=6)`)

	// Appended base64.
	a64, ata := appendedFile(t, smallTypes, wOpts{format: "appended", encoding: "base64"})
	d = bytes.Clone(a64)
	d[ata("Points")+3] = '*'
	add("appended base64 char", d, `bad.vtu: byte %d: array "Points": invalid base64 character '*'`, ata("Points")+3)

	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Read(bytes.NewReader(c.data), "bad.vtu", geom.ReadOptions{})
			checkErr(t, err, c.want)
		})
	}
}

// mustOffset returns the offset attribute of a named appended array.
func mustOffset(t *testing.T, data []byte, name string) int {
	m := regexp.MustCompile(`Name="` + name + `"[^>]* offset="(\d+)"`).FindSubmatch(data)
	if m == nil {
		t.Fatalf("no appended array %q", name)
	}
	off, _ := strconv.Atoi(string(m[1]))
	return off
}

func TestPieceErrors(t *testing.T) {
	pc := smallPiece(smallTypes)
	other := smallPiece(smallTypes)
	other.cellData = other.cellData[:2] // no element_id
	var b bytes.Buffer
	if err := writeVTU(&b, []wPiece{pc, other}, wOpts{format: "ascii"}); err != nil {
		t.Fatal(err)
	}
	_, err := Read(&b, "bad.vtu", geom.ReadOptions{})
	checkErr(t, err, `bad.vtu:41: piece 1 has no array "element_id" and the first piece has`)

	// Connectivity that is valid for the whole file but not for its piece.
	small := smallPiece(smallTypes)
	small.conn.ints = append([]int64{}, small.conn.ints...)
	small.conn.ints[0] = 13
	b.Reset()
	if err := writeVTU(&b, []wPiece{smallPiece(smallTypes), small}, wOpts{format: "ascii"}); err != nil {
		t.Fatal(err)
	}
	_, err = Read(&b, "bad.vtu", geom.ReadOptions{})
	checkErr(t, err, `bad.vtu:68: piece 1: connectivity value 0 (cell 0) refers to point 13; the piece has 12 points`)

	// Values found wrong once the pieces are joined: cells and points are
	// counted over the file, lines are those of the piece holding them.
	bad := smallPiece(smallTypes)
	bad.cellData = append([]wArray{}, bad.cellData...)
	for i, a := range bad.cellData {
		if a.name == "part" {
			a.ints = append([]int64{}, a.ints...)
			a.ints[3] = -1
			bad.cellData[i] = a
		}
	}
	b.Reset()
	if err := writeVTU(&b, []wPiece{smallPiece(smallTypes), bad}, wOpts{format: "ascii"}); err != nil {
		t.Fatal(err)
	}
	_, err = Read(&b, "bad.vtu", geom.ReadOptions{})
	checkErr(t, err, `bad.vtu:52: cell 9: part id -1 is not positive`)
	b.Reset()
	if err := writeVTU(&b, []wPiece{smallPiece(smallTypes), smallPiece(smallTypes)}, wOpts{format: "ascii"}); err != nil {
		t.Fatal(err)
	}
	_, err = Read(&b, "bad.vtu", geom.ReadOptions{})
	checkErr(t, err, `bad.vtu:47: node id 101 appears twice (points 0 and 12; first at line 10)`)
}

// A file whose appended data is not followed by </AppendedData> and
// </VTKFile> is refused (issue: a .vtu missing its final </VTKFile> was
// accepted), while white space after them is not an error.
func TestAppendedEnd(t *testing.T) {
	for _, enc := range []string{"raw", "base64"} {
		data, _ := appendedFile(t, smallTypes, wOpts{format: "appended", encoding: enc})
		body := strings.TrimRight(string(data), " \t\r\n")
		if !strings.HasSuffix(body, "</AppendedData>\n</VTKFile>") {
			t.Fatalf("%s: unexpected end of the writer's file: %q", enc, body[len(body)-40:])
		}
		noFile := strings.TrimSuffix(body, "</VTKFile>")
		noBoth := strings.TrimSuffix(strings.TrimRight(noFile, "\n"), "</AppendedData>")
		for name, c := range map[string]struct {
			data string
			want string
		}{
			"no </VTKFile>":  {noFile, "does not end with </AppendedData> and </VTKFile>"},
			"no end tags":    {noBoth, "does not end with </AppendedData> and </VTKFile>"},
			"text after end": {body + "\n<extra/>\n", "does not end with </AppendedData> and </VTKFile>"},
			"white space":    {body + "\n\n  \n", ""},
		} {
			t.Run(enc+"/"+name, func(t *testing.T) {
				_, err := Read(strings.NewReader(c.data), "bad.vtu", geom.ReadOptions{})
				if c.want == "" {
					if err != nil {
						t.Fatal(err)
					}
					return
				}
				checkErr(t, err, c.want)
			})
		}
	}
}

func TestInlineEnd(t *testing.T) {
	data, _ := appendedFile(t, smallTypes, wOpts{format: "binary"})
	body := strings.TrimSuffix(strings.TrimRight(string(data), " \t\r\n"), "</VTKFile>")
	_, err := Read(strings.NewReader(body), "bad.vtu", geom.ReadOptions{})
	checkErr(t, err, "bad.vtu:42: xml: unexpected EOF")
}
