package vtu

import (
	"bytes"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// FuzzRead checks that no input makes Read panic, that every failure is an
// input error, and that every mesh it returns is consistent.
func FuzzRead(f *testing.F) {
	geomtest.AddFiles(f, "../../testdata/formats/small_*.vtu", "../../testdata/vtu/*.vtu", "../../testdata/polydata/*.vtp")
	f.Add([]byte(errTemplate))
	// Hostile inputs of issue 7: compressed blocks that declare far more
	// than the arrays need, or inflate past what they declare, and
	// appended data without its closing tags.
	z := compressZeros(f, false, 1<<16)
	x := compressZeros(f, true, 1<<16)
	f.Add(bombFile("vtkZLibDataCompressor", 12, 4, 1<<16, z))
	f.Add(bombFile("vtkZLibDataCompressor", 12, 1, 288, z))
	f.Add(bombFile("vtkZLibDataCompressor", 4*(1<<16)/24, 4, 1<<16, z))
	f.Add(bombFile("vtkLZMADataCompressor", 12, 4, 1<<16, x))
	f.Add(bombFile("vtkLZMADataCompressor", 12, 1, 288, compressZeros(f, true, 288)))
	f.Add(bytes.TrimSuffix(bombFile("vtkLZMADataCompressor", 12, 1, 288, compressZeros(f, true, 288)), []byte("</VTKFile>\n")))
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := geomtest.CheckRead(Read(bytes.NewReader(data), "fuzz.vtu", geom.ReadOptions{DefaultPart: 1, HasDefaultPart: true})); err != nil {
			t.Fatal(err)
		}
	})
}
