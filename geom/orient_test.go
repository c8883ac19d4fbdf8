package geom

import (
	"slices"
	"testing"
)

// flipElems reverses the node order of the listed elements.
func flipElems(m *Mesh, es ...int) {
	for _, e := range es {
		slices.Reverse(m.Conn[m.ElemStart[e]:m.ElemStart[e+1]])
	}
}

func flippedIDs(m *Mesh, o Orientation) []int64 {
	var ids []int64
	for e, f := range o.Flip {
		if f {
			ids = append(ids, m.ElemIDs[e])
		}
	}
	return ids
}

func TestOrientNormals(t *testing.T) {
	tests := []struct {
		name string
		flip []int   // element indices reversed in a 4x3 grid (ids are index+1)
		want []int64 // ids reported
	}{
		{"consistent", nil, nil},
		{"one element", []int{5}, []int64{6}},
		{"a few", []int{0, 1, 11}, []int64{1, 2, 12}},
		// More than half flipped: the others are reported.
		{"most", []int{0, 1, 2, 3, 4, 5, 6, 7}, []int64{9, 10, 11, 12}},
		// Exactly half (equal area and count): the half without the
		// lowest id is reported.
		{"half", []int{6, 7, 8, 9, 10, 11}, []int64{7, 8, 9, 10, 11, 12}},
		{"half, other way", []int{0, 1, 2, 3, 4, 5}, []int64{7, 8, 9, 10, 11, 12}},
		{"all", []int{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11}, nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m := quadGrid(4, 3, 1, nil)
			flipElems(m, tt.flip...)
			o := OrientNormals(m, NodeElements(m))
			if got := flippedIDs(m, o); !slices.Equal(got, tt.want) {
				t.Errorf("flipped %v, want %v", got, tt.want)
			}
			if o.Conflicts[0] != 0 || o.Pieces[0] != 1 {
				t.Errorf("conflicts %d pieces %d, want 0 and 1", o.Conflicts[0], o.Pieces[0])
			}
			// Reversing the reported elements leaves nothing to report.
			var rep []int
			for e, f := range o.Flip {
				if f {
					rep = append(rep, e)
				}
			}
			flipElems(m, rep...)
			if again := flippedIDs(m, OrientNormals(m, NodeElements(m))); again != nil {
				t.Errorf("after turning them, still %v", again)
			}
		})
	}
}

// Pieces are oriented on their own; edges of other parts join nothing.
func TestOrientNormalsPiecesAndParts(t *testing.T) {
	// A 6x2 grid; columns 0-2 part 0, columns 3-5 part 1; in part 1,
	// column 3 reversed. Part 0 is right, part 1 has two of six flipped.
	m := quadGrid(6, 2, 1, nil)
	m.Parts = append(m.Parts, Part{ID: 2, Thickness: 1})
	for e := range m.ElemIDs {
		if e%6 >= 3 {
			m.ElemPart[e] = 1
		}
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	flipElems(m, 3, 9, 0, 1, 2, 6, 7, 8) // all of part 0, column 3 of part 1
	o := OrientNormals(m, NodeElements(m))
	if got := flippedIDs(m, o); !slices.Equal(got, []int64{4, 10}) {
		t.Errorf("flipped %v, want [4 10]", got)
	}
	if o.Pieces[0] != 1 || o.Pieces[1] != 1 {
		t.Errorf("pieces %v", o.Pieces)
	}
	// Cut the grid in two pieces by dropping column 3: the second piece
	// (columns 4 and 5), all reversed, is consistent on its own.
	skip := func(i, _ int) bool { return i == 3 }
	m = quadGrid(6, 2, 1, skip)
	flipElems(m, 3, 4, 8, 9) // columns 4 and 5 (five elements per row)
	o = OrientNormals(m, NodeElements(m))
	if got := flippedIDs(m, o); got != nil {
		t.Errorf("flipped %v, want none (two pieces, each consistent)", got)
	}
	if o.Pieces[0] != 2 {
		t.Errorf("pieces %d, want 2", o.Pieces[0])
	}
}

// A strip closed with a half twist (a Möbius strip) cannot be oriented:
// one shared edge disagrees whichever way it is turned.
func TestOrientNormalsMoebius(t *testing.T) {
	// A ring of 8 quads between two rows of 8 nodes; the last quad joins
	// the end to the start with the rows swapped.
	m := &Mesh{Parts: []Part{{ID: 1, Thickness: 1}}, ElemStart: []int32{0}}
	for i := range 16 {
		m.NodeIDs = append(m.NodeIDs, int64(i+1))
		m.Coords = append(m.Coords, v3(float64(i%8), float64(i/8), 0))
	}
	for i := range 8 {
		a, b := int32(i), int32((i+1)%8)
		c, d := b+8, a+8
		if i == 7 {
			b, c = 8, 0 // the twist
		}
		m.Conn = append(m.Conn, a, b, c, d)
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		m.ElemIDs = append(m.ElemIDs, int64(i+1))
		m.ElemPart = append(m.ElemPart, 0)
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	o := OrientNormals(m, NodeElements(m))
	if o.Conflicts[0] != 1 {
		t.Errorf("conflicts %d, want 1", o.Conflicts[0])
	}
}
