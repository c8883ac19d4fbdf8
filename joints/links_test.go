package joints

import (
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// The offset of a sheet is the distance from its meshed surface to its
// faying face: t/2 from the mid-surface (half the thickness to either
// face, shell geometry), 0 from the faying face itself, t from the far
// face.
func TestNewOffsetLink(t *testing.T) {
	const th = 1.2
	n := r3.Vec{Z: 1}
	at := r3.Vec{X: 3, Y: 4, Z: 5}
	for _, tc := range []struct {
		s      geom.Surface
		side   int
		offset float64 // signed, along n
	}{
		{geom.SurfaceMid, 1, th / 2}, {geom.SurfaceMid, -1, -th / 2},
		{geom.SurfaceTop, 1, 0}, {geom.SurfaceTop, -1, -th},
		{geom.SurfaceBottom, 1, th}, {geom.SurfaceBottom, -1, 0},
	} {
		l := NewOffsetLink(at, n, th, tc.s, tc.side)
		wantDir := r3.Vec{}
		switch {
		case tc.offset > 0:
			wantDir = n
		case tc.offset < 0:
			wantDir = r3.Scale(-1, n)
		}
		if l.Kind != OffsetLink || !l.NewEnd || l.DOFs != AllDOFs || l.Start != at ||
			l.End != r3.Add(at, r3.Scale(tc.offset, n)) || l.Length != max(tc.offset, -tc.offset) || l.Direction != wantDir {
			t.Errorf("%s side %d: %+v, want offset %g", tc.s, tc.side, l, tc.offset)
		}
	}
	if FayingSide(n, r3.Vec{Z: -2}) != -1 || FayingSide(n, r3.Vec{Z: 2}) != 1 || FayingSide(n, r3.Vec{X: 1}) != 1 {
		t.Error("FayingSide")
	}
}

func TestParseLinkForm(t *testing.T) {
	for in, want := range map[string]LinkForm{"": GapLinks, "gap": GapLinks, "offset": OffsetLinks} {
		if got, err := ParseLinkForm(in); err != nil || got != want {
			t.Errorf("ParseLinkForm(%q) = %v, %v", in, got, err)
		}
	}
	if _, err := ParseLinkForm("rigid"); err == nil {
		t.Error("ParseLinkForm(rigid) gave no error")
	}
	if DefaultLinks.String() != "gap" || OffsetLinks.String() != "offset" {
		t.Error("names")
	}
}

// Per connector, NewResult hands out its new end nodes, then the nodes
// its links bring, then its link elements, and resolves every link's
// node ids.
func TestNewResultLinkNodes(t *testing.T) {
	m := &geom.Mesh{Parts: []geom.Part{{ID: 1}}, NodeIDs: []int64{7, 8}, Coords: make([]r3.Vec, 2), ElemIDs: []int64{1}, ElemPart: []int32{0}, ElemStart: []int32{0, 0}}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	la := Link{Kind: OffsetLink, From: 0, To: 1, NewEnd: true, StartAt: SheetEnd(0), EndAt: LinkNode(0)}
	lb := Link{Kind: OffsetLink, From: 1, To: 0, NewEnd: true, StartAt: SheetEnd(1), EndAt: LinkNode(1)}
	fj := Link{Kind: FayingJoint, From: 0, To: 1, StartAt: LinkNode(0), EndAt: LinkNode(1)}
	conns := []Connector{
		{Joint: Joint{ID: "B"}, Ends: []End{{NodeIndex: -1}, {NodeIndex: 1}}, Links: []Link{la, lb, fj}},
		{Joint: Joint{ID: "A"}, Ends: []End{{NodeIndex: -1}, {NodeIndex: -1}},
			Links: []Link{{Kind: GapLink, From: 0, To: 1, StartAt: SheetEnd(0), EndAt: SheetEnd(1)}}},
	}
	res, err := NewResult(m, conns, nil, BuildOptions{IDStart: 100})
	if err != nil {
		t.Fatal(err)
	}
	a, b := res.Connectors[0], res.Connectors[1]
	// A: ends 100, 101; link 102.
	if a.EndIDs[0] != 100 || a.EndIDs[1] != 101 || a.Links[0].ID != 102 || a.Links[0].StartNode != 100 || a.Links[0].EndNode != 101 {
		t.Errorf("A: ends %v link %+v", a.EndIDs, a.Links[0])
	}
	// B: end 103 (the other is mesh node 8); faying nodes 104, 105;
	// links 106, 107, 108.
	l := b.Links
	if b.EndIDs[0] != 103 || b.EndIDs[1] != 0 || l[0].NewNode != 104 || l[1].NewNode != 105 ||
		l[0].ID != 106 || l[1].ID != 107 || l[2].ID != 108 || res.NextID != 109 {
		t.Errorf("B: ends %v links %+v next %d", b.EndIDs, l, res.NextID)
	}
	if l[0].StartNode != 103 || l[0].EndNode != 104 || l[1].StartNode != 8 || l[1].EndNode != 105 || l[2].StartNode != 104 || l[2].EndNode != 105 {
		t.Errorf("B: link nodes %d>%d %d>%d %d-%d", l[0].StartNode, l[0].EndNode, l[1].StartNode, l[1].EndNode, l[2].StartNode, l[2].EndNode)
	}
	// A reference to a link that brings no node is the builder's error.
	bad := []Connector{{Joint: Joint{ID: "C"}, Ends: []End{{NodeIndex: 0}}, Links: []Link{{StartAt: SheetEnd(0), EndAt: LinkNode(0)}}}}
	if _, err := NewResult(m, bad, nil, BuildOptions{IDStart: 100}); err == nil {
		t.Error("no error for a dangling link reference")
	}
}
