package exio

import (
	"bytes"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
)

func TestYAMLString(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"floor-001", "floor-001"},
		{"rear cross member", "rear cross member"},
		{"DC04", "DC04"},
		{"1.5", `"1.5"`},
		{"yes", `"yes"`},
		{"a: b", `"a: b"`},
		{"x #1", `"x #1"`},
		{"trailing ", `"trailing "`},
		{"", `""`},
		{`q"uote`, `"q\"uote"`},
	} {
		if got := yamlString(c.in); got != c.want {
			t.Errorf("yamlString(%q) = %s, want %s", c.in, got, c.want)
		}
	}
}

// TestPartsRoundTrip reads the written table back with the parts-table
// reader.
func TestPartsRoundTrip(t *testing.T) {
	parts := []geom.Part{
		{ID: 100, Name: "floor panel", Thickness: 0.8, Material: "DC04"},
		{ID: 200, Name: "yes", Thickness: 1.5, Material: "HC340LA", Surface: geom.SurfaceTop},
		{ID: 300, Name: "plate: end", Thickness: 1.2, Mesh: "closing-plate.jmesh"},
	}
	var buf bytes.Buffer
	if err := WriteParts(&buf, parts, "parts of a test\nsecond line"); err != nil {
		t.Fatal(err)
	}
	got, err := meshio.ReadPartsYAML(&buf, "parts.yaml")
	if err != nil {
		t.Fatalf("%v\n%s", err, buf.String())
	}
	if !reflect.DeepEqual(got, parts) {
		t.Errorf("read back %+v, want %+v", got, parts)
	}
}

// TestJointsRoundTrip reads the written list back with the joint-list
// reader.
func TestJointsRoundTrip(t *testing.T) {
	js := []joints.Joint{
		{ID: "W1", Point: r3.Vec{X: 1.5, Y: -2, Z: 0.575}, Group: "flange-front"},
		{ID: "W2", Point: r3.Vec{X: 31.5, Y: -2, Z: 0.575}, Parts: []int64{100, 200}, Diameter: 5.5, Group: "a,b"},
		{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{X: 40, Y: 25, Z: 31}, Parts: []int64{200, 400}, Diameter: 10, Washer: 20, Hole: 11},
	}
	var buf bytes.Buffer
	if err := WriteJoints(&buf, js, "joints"); err != nil {
		t.Fatal(err)
	}
	got, warns, err := joints.ReadJointsCSV(&buf, "welds.csv")
	if err != nil || len(warns) > 0 {
		t.Fatalf("%v %v\n%s", err, warns, buf.String())
	}
	for i := range got {
		got[i].File, got[i].Line, got[i].Tags = "", 0, nil
	}
	if !reflect.DeepEqual(got, js) {
		t.Errorf("read back %+v, want %+v", got, js)
	}
}
