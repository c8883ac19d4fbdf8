package vtu

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"runtime"
	"strings"
	"testing"
	"time"

	"github.com/ulikunitz/xz"

	"github.com/joinery-cae/joinery/geom"
)

// compressZeros returns one zlib or .xz stream of n zero bytes.
func compressZeros(t testing.TB, lzma bool, n int) []byte {
	t.Helper()
	var b bytes.Buffer
	var w io.WriteCloser
	var err error
	if lzma {
		w, err = xz.NewWriter(&b)
	} else {
		w, err = zlib.NewWriterLevel(&b, zlib.BestCompression)
	}
	if err != nil {
		t.Fatal(err)
	}
	zeros := make([]byte, 1<<20)
	for n > 0 {
		k := min(n, len(zeros))
		if _, err := w.Write(zeros[:k]); err != nil {
			t.Fatal(err)
		}
		n -= k
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// bombFile returns a .vtu file of np points and no cells whose Points
// array (Float64, 24 bytes a point) is appended raw data in nb blocks that
// declare bs bytes each, every block being the stream block.
func bombFile(comp string, np int64, nb, bs int, block []byte) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, `<?xml version="1.0"?>
<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt32" compressor="%s">
  <UnstructuredGrid>
    <Piece NumberOfPoints="%d" NumberOfCells="0">
      <Points>
        <DataArray type="Float64" NumberOfComponents="3" format="appended" offset="0"/>
      </Points>
    </Piece>
  </UnstructuredGrid>
  <AppendedData encoding="raw">
   _`, comp, np)
	le := binary.LittleEndian
	h := le.AppendUint32(nil, uint32(nb))
	h = le.AppendUint32(h, uint32(bs))
	h = le.AppendUint32(h, 0) // the last block is full
	for range nb {
		h = le.AppendUint32(h, uint32(len(block)))
	}
	b.Write(h)
	for range nb {
		b.Write(block)
	}
	b.WriteString("\n  </AppendedData>\n</VTKFile>\n")
	return b.Bytes()
}

// readBounded reads data and returns the error, the bytes allocated and
// the time taken.
func readBounded(t *testing.T, data []byte) (error, uint64, time.Duration) {
	t.Helper()
	runtime.GC()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	start := time.Now()
	_, err := Read(bytes.NewReader(data), "bomb.vtu", geom.ReadOptions{})
	took := time.Since(start)
	runtime.ReadMemStats(&after)
	return err, after.TotalAlloc - before.TotalAlloc, took
}

// Compressed arrays that inflate to far more than the file can hold are
// refused before they are inflated, or as soon as a block passes its
// declared size, with memory bounded by the file and the array sizes its
// counts give (issue: a 5.6 MB .vtu whose zlib blocks inflate to 4 GB
// cost 4.2 GB and 10 s before the refusal).
func TestCompressionBombs(t *testing.T) {
	const mib = 1 << 20
	zlib64 := compressZeros(t, false, 64*mib) // about 64 KB
	xz16 := compressZeros(t, true, 16*mib)
	cases := []struct {
		name string
		data []byte
		want string
	}{
		// 64 blocks declaring 64 MiB each, 4 GiB in all, for 12 points.
		{"zlib, sizes above the counts", bombFile("vtkZLibDataCompressor", 12, 64, 64*mib, zlib64),
			`array "Points" has 536870912 values, want 12 tuples of 3 (NumberOfPoints=12)`},
		{"lzma, sizes above the counts", bombFile("vtkLZMADataCompressor", 12, 256, 16*mib, xz16),
			`array "Points" has 536870912 values, want 12 tuples of 3 (NumberOfPoints=12)`},
		// Sizes that agree with the counts (12 points, 288 bytes) but a
		// block that goes on inflating: stopped one byte past its size.
		{"zlib, block inflates past its size", bombFile("vtkZLibDataCompressor", 12, 1, 288, zlib64),
			`zlib block 0: inflates to more than the declared 288 bytes`},
		{"lzma, block inflates past its size", bombFile("vtkLZMADataCompressor", 12, 1, 288, xz16),
			`its index gives 16777216 uncompressed bytes, the size header 288`},
		// Counts as large as the sizes: 176 million points, 4 GiB from
		// a 4 MB file, more than mesh data compresses.
		{"zlib, counts as large as the sizes", bombFile("vtkZLibDataCompressor", 63*64*mib/24, 63, 64*mib, zlib64),
			`more than 128 times the file's`},
		{"lzma, counts as large as the sizes", bombFile("vtkLZMADataCompressor", 255*16*mib/24, 255, 16*mib, xz16),
			`more than 128 times the file's`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err, alloc, took := readBounded(t, c.data)
			if !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("err = %v, want an input error containing %q", err, c.want)
			}
			// Bounded: a few times the file (which Read copies once),
			// nothing like the gigabytes declared.
			if limit := 4*uint64(len(c.data)) + 16*mib; alloc > limit {
				t.Errorf("allocated %d MB to refuse a %d KB file (limit %d MB)", alloc/mib, len(c.data)/1024, limit/mib)
			}
			if took > 5*time.Second {
				t.Errorf("took %v to refuse a %d KB file", took, len(c.data)/1024)
			}
			t.Logf("%d KB file: refused after %v, %d KB allocated: %v", len(c.data)/1024, took.Round(time.Millisecond), alloc/1024, err)
		})
	}
}

// An .xz block whose data goes on past what its index says is stopped
// by the xz package's checks, one byte past the declared size at most.
func TestLZMABlockLongerThanDeclared(t *testing.T) {
	block := compressZeros(t, true, 288)
	// Lie in the index: say 288 bytes, carry 289.
	long := compressZeros(t, true, 289)
	if bytes.Equal(block, long) {
		t.Fatal("streams equal")
	}
	data := bombFile("vtkLZMADataCompressor", 12, 1, 288, long)
	_, err := Read(bytes.NewReader(data), "long.vtu", geom.ReadOptions{})
	if !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), "LZMA block 0") {
		t.Fatalf("err = %v, want an input error about LZMA block 0", err)
	}
	data = bombFile("vtkLZMADataCompressor", 12, 1, 288, block)
	m, err := Read(bytes.NewReader(data), "ok.vtu", geom.ReadOptions{})
	if err != nil || len(m.Coords) != 12 {
		t.Fatalf("honest block: %v", err)
	}
}

// A block header may ask for a dictionary of up to 4 GiB whatever the
// size of its data; the reader gives it no more than the block's size.
func TestLZMAHugeDictionary(t *testing.T) {
	block := compressZeros(t, true, 288)
	// The block header follows the 12-byte stream header; its LZMA2
	// filter flags are the filter id 0x21, the property size 1 and the
	// dictionary-size code ("The .xz File Format" 1.0.4, 3.1.4 and 5.3.1).
	hs := (int(block[12]) + 1) * 4
	h := block[12 : 12+hs]
	i := bytes.Index(h, []byte{0x21, 0x01})
	if i < 0 {
		t.Fatal("no LZMA2 filter flags in the block header")
	}
	h[i+2] = 40 // 4 GiB
	binary.LittleEndian.PutUint32(h[hs-4:], crc32.ChecksumIEEE(h[:hs-4]))
	data := bombFile("vtkLZMADataCompressor", 12, 1, 288, block)
	err, alloc, _ := readBounded(t, data)
	if err != nil {
		t.Fatal(err)
	}
	if alloc > 4<<20 {
		t.Errorf("allocated %d KB to read 288 bytes", alloc/1024)
	}
}

func TestXZDictSize(t *testing.T) {
	// "The .xz File Format" 1.0.4, 5.3.1: code 0 is 4 KiB, odd codes add
	// half, 22 is 8 MiB (the preset of xz -6), 40 is the largest.
	for code, want := range map[byte]uint64{0: 4 << 10, 1: 6 << 10, 2: 8 << 10, 22: 8 << 20, 23: 12 << 20, 40: 4 << 30} {
		if got := xzDictSize(code); got != want {
			t.Errorf("xzDictSize(%d) = %d, want %d", code, got, want)
		}
	}
}
