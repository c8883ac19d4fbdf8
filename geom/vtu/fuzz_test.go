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
	geomtest.AddFiles(f, "../../testdata/formats/small_*.vtu", "../../testdata/vtu/*.vtu")
	f.Add([]byte(errTemplate))
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := geomtest.CheckRead(Read(bytes.NewReader(data), "fuzz.vtu", geom.ReadOptions{DefaultPart: 1, HasDefaultPart: true})); err != nil {
			t.Fatal(err)
		}
	})
}
