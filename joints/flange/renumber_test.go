package flange

import (
	"cmp"
	"fmt"
	"reflect"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// renumbered returns a copy of m with every part id passed through id
// and the parts put in id order, as the loader leaves them
// (geom.Mesh.SortByID); node and element ids are kept.
func renumbered(t *testing.T, m *geom.Mesh, id func(int64) int64) *geom.Mesh {
	t.Helper()
	r := &geom.Mesh{
		Parts: slices.Clone(m.Parts), NodeIDs: slices.Clone(m.NodeIDs), Coords: slices.Clone(m.Coords),
		ElemIDs: slices.Clone(m.ElemIDs), ElemPart: slices.Clone(m.ElemPart), ElemStart: slices.Clone(m.ElemStart),
		Conn: slices.Clone(m.Conn),
	}
	for i := range r.Parts {
		r.Parts[i].ID = id(r.Parts[i].ID)
	}
	if _, err := r.SortByID(); err != nil {
		t.Fatal(err)
	}
	if err := r.Index(); err != nil {
		t.Fatal(err)
	}
	return r
}

// flangeView is what a flange says, in part and node ids, with its
// parts in the order of the ids inv gives them: the form two runs on one
// model numbered two ways are compared in.
type flangeView struct {
	Parts      [2]int64
	Host       int64
	Thickness  [2]float64
	Match      joints.Match
	Closed     bool
	Area       float64
	Length     float64
	Width      joints.Span
	Centreline []r3.Vec
	Normal     r3.Vec
	Nodes      int
	Facing     [][4]float64 // node ids (on Parts[0], Parts[1]), separation, lateral
	Tolerance  joints.Span
	Pitch      float64
	Welds      []string
}

func viewFlanges(m *geom.Mesh, fs []joints.Flange, inv func(int64) int64) []flangeView {
	var out []flangeView
	for _, f := range fs {
		v := flangeView{Parts: [2]int64{inv(f.Parts[0]), inv(f.Parts[1])}, Host: inv(f.Host), Thickness: f.Thickness,
			Match: f.Match, Closed: f.Closed, Area: f.Area, Length: f.Length, Width: f.Width, Centreline: f.Centreline,
			Normal: f.Normal, Nodes: f.Nodes, Tolerance: f.FacingTolerance, Pitch: f.Pitch}
		swap := v.Parts[0] > v.Parts[1]
		for _, fp := range f.Facing {
			a, b := float64(m.NodeIDs[fp.A]), float64(m.NodeIDs[fp.B])
			if swap {
				a, b = b, a
			}
			v.Facing = append(v.Facing, [4]float64{a, b, fp.Separation, fp.Lateral})
		}
		if swap {
			v.Parts[0], v.Parts[1] = v.Parts[1], v.Parts[0]
			v.Thickness[0], v.Thickness[1] = v.Thickness[1], v.Thickness[0]
		}
		slices.SortFunc(v.Facing, func(x, y [4]float64) int { return cmp.Compare(x[0], y[0]) })
		for _, w := range f.Welds {
			parts := slices.Clone(w.Joint.Parts)
			for i := range parts {
				parts[i] = inv(parts[i])
			}
			v.Welds = append(v.Welds, fmt.Sprintf("station %d s %v at %v parts %v d %v", w.Station, w.S, w.Joint.Point, parts, w.Joint.Diameter))
		}
		out = append(out, v)
	}
	slices.SortStableFunc(out, func(x, y flangeView) int {
		return cmp.Or(cmp.Compare(x.Parts[0], y.Parts[0]), cmp.Compare(x.Parts[1], y.Parts[1]))
	})
	return out
}

// TestFindIndependentOfPartIDs finds and places (30 mm pitch) the
// flanges of overlapping plates whose meshes differ (other element
// sizes, grids of one size shifted against each other, triangles
// against quads, a third plate stacked on the overlap), then again with
// the parts renumbered so that the order of their ids reverses: every
// flange must be the same once the ids are mapped back (host, areas,
// widths, centrelines, facing pairs with their separations and lateral
// offsets, weld stations, points and stacks). Where the two meshes are
// of one element size the host used to be the part of lower id, and the
// welds of two flanges of one width through one stack went to the pair
// of lower ids.
func TestFindIndependentOfPartIDs(t *testing.T) {
	// Plate 10 (1 mm) from x = 0 to 100; plate 20 (1.5 mm) over it from
	// x = 80, mid-surfaces 1.25 mm apart (in contact): a 20 mm strip by
	// 200 (less where shifted).
	models := []struct {
		name   string
		sheets []sheet
	}{
		{"sizes", []sheet{plate(10, 1, 0, 0, 0, 20, 40, 5), plate(20, 1.5, 80, 0, 1.25, 25, 50, 4)}},
		{"shifted", []sheet{plate(10, 1, 0, 0, 0, 20, 40, 5), plate(20, 1.5, 82.5, 2.5, 1.25, 20, 40, 5)}},
		{"tri-quad", []sheet{plate(10, 1, 0, 0, 0, 20, 40, 5), triPlate(plate(20, 1.5, 80, 0, 1.25, 20, 40, 5))}},
		{"stack", []sheet{plate(10, 1, 0, 0, 0, 20, 40, 5), plate(20, 1.5, 80, 0, 1.25, 20, 40, 5), plate(30, 1, 80, 0, 2.5, 4, 40, 5)}},
	}
	flip := func(id int64) int64 { return 40 - id } // 10, 20, 30 -> 30, 20, 10
	flip2 := func(id int64) int64 { return 30 - id }
	for _, md := range models {
		t.Run(md.name, func(t *testing.T) {
			m := mesh(md.sheets...)
			f := flip2
			if len(md.sheets) == 3 {
				f = flip
			}
			r := renumbered(t, m, f)
			want, _ := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
			got, _ := place(t, r, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
			wv := viewFlanges(m, want.Flanges, func(id int64) int64 { return id })
			gv := viewFlanges(r, got.Flanges, f)
			if len(wv) == 0 {
				t.Fatal("no flange")
			}
			welds := 0
			for _, v := range wv {
				welds += len(v.Welds)
			}
			if welds == 0 {
				t.Error("no weld placed")
			}
			if !reflect.DeepEqual(wv, gv) {
				t.Errorf("renumbered, the flanges differ:\n got %+v\nwant %+v", gv, wv)
			}
		})
	}
}

// triPlate returns s meshed with triangles (each quad split in two).
func triPlate(s sheet) sheet {
	s.Tri = true
	return s
}
