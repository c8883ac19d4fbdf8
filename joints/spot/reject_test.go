package spot

import (
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// tilted returns m with the nodes of part index pi rotated by deg degrees
// about the line through (y, z) = (yc, zc) parallel to x.
func tilted(m *geom.Mesh, pi int32, deg, yc, zc float64) *geom.Mesh {
	s, c := math.Sincos(deg * math.Pi / 180)
	moved := map[int32]bool{}
	for e := range m.ElemIDs {
		if m.ElemPart[e] != pi {
			continue
		}
		for _, n := range m.ElemNodes(e) {
			if moved[n] {
				continue
			}
			moved[n] = true
			v := m.Coords[n]
			y, z := v.Y-yc, v.Z-zc
			m.Coords[n] = r3.Vec{X: v.X, Y: yc + c*y - s*z, Z: zc + s*y + c*z}
		}
	}
	return m
}

// withElem appends to m an element of part index pi with new nodes at
// the corners and the given id, and re-indexes m.
func withElem(t *testing.T, m *geom.Mesh, pi int32, id int64, corners ...r3.Vec) *geom.Mesh {
	t.Helper()
	for _, c := range corners {
		m.NodeIDs = append(m.NodeIDs, 900000+int64(len(m.Coords)))
		m.Conn = append(m.Conn, int32(len(m.Coords)))
		m.Coords = append(m.Coords, c)
	}
	m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
	m.ElemIDs = append(m.ElemIDs, id)
	m.ElemPart = append(m.ElemPart, pi)
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	return m
}

// messages returns the messages of c's findings with the given code.
func messages(c joints.Connector, code string) []string {
	var out []string
	for _, f := range c.Findings {
		if f.Code == code {
			out = append(out, f.Message)
		}
	}
	return out
}

// TestRejectedSheets checks that a sheet within reach that the automatic
// choice leaves out is named with the reason. 1 mm sheets: nugget 5 mm
// (5 sqrt(t), common practice), lateral limit half its radius, 1.25 mm;
// angle limit 20 degrees; reach 4.5 mm.
func TestRejectedSheets(t *testing.T) {
	at := r3.Vec{X: 25, Y: 25, Z: 0.5}
	cases := []struct {
		name  string
		mesh  func(t *testing.T) *geom.Mesh
		joint joints.Joint
		code  string
		parts []int64 // the finding's parts
		want  string  // in the finding's message
	}{
		{
			name: "weld 1.5 mm past a sheet's edge",
			mesh: func(*testing.T) *geom.Mesh {
				return plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 5, NY: 10, H: 5})
			},
			joint: joints.Joint{ID: "W1", Point: r3.Vec{X: 26.5, Y: 25, Z: 0.5}},
			code:  joints.CodeSingleSheet, parts: []int64{1, 2},
			want: "only part 1 lies under the weld within 4.5 mm: nothing to join; also within reach: part 2, 1.5 mm off the weld axis (limit 1.25 mm)",
		},
		{
			name: "weld past the edges of both sheets",
			mesh: func(*testing.T) *geom.Mesh {
				return plates(plate{Part: 1, T: 1, NX: 5, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 5, NY: 10, H: 5})
			},
			joint: joints.Joint{ID: "W2", Point: r3.Vec{X: 27, Y: 25, Z: 0.5}},
			code:  joints.CodeNoSheet, parts: []int64{1, 2},
			want: "no sheet lies under the weld within 4.5 mm; within reach: part 1, 2 mm off the weld axis (limit 1.25 mm); part 2, 2 mm off the weld axis (limit 1.25 mm)",
		},
		{
			// Part 2 at z = 2 turned 45 degrees about a line of its own
			// above the weld: 1.06 mm from the weld, farther than part 1.
			name: "sheet crossing the weld at 45 degrees",
			mesh: func(*testing.T) *geom.Mesh {
				m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 2, NX: 10, NY: 10, H: 5})
				return tilted(m, 1, 45, 25, 2)
			},
			joint: joints.Joint{ID: "W3", Point: at},
			code:  joints.CodeSingleSheet, parts: []int64{1, 2},
			want: "only part 1 lies under the weld within 4.5 mm: nothing to join; also within reach: part 2, its normal 45 degrees off the weld axis (limit 20 degrees)",
		},
		{
			// Part 2 upright, in the plane y = 25.8, reaching below the
			// weld.
			name: "sheet crossing the weld at 90 degrees",
			mesh: func(*testing.T) *geom.Mesh {
				m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 0, Y0: 15.8, NX: 10, NY: 4, H: 5})
				return tilted(m, 1, 90, 25.8, 0)
			},
			joint: joints.Joint{ID: "W4", Point: at},
			code:  joints.CodeSingleSheet, parts: []int64{1, 2},
			want: "also within reach: part 2, its normal 90 degrees off the weld axis (limit 20 degrees)",
		},
		{
			// Part 2 is one element whose corners lie on a line through
			// the point above the weld: no area, no normal.
			name: "weld on a degenerate host",
			mesh: func(t *testing.T) *geom.Mesh {
				m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, X0: 100, NX: 1, NY: 1, H: 5})
				return withElem(t, m, 1, 200009, r3.Vec{X: 20, Y: 25, Z: 1}, r3.Vec{X: 25, Y: 25, Z: 1}, r3.Vec{X: 30, Y: 25, Z: 1})
			},
			joint: joints.Joint{ID: "W5", Point: at},
			code:  joints.CodeDegenerate, parts: []int64{2},
			want: "the element of part 2 under the weld (id 200009) is degenerate: too little area for a normal to build on",
		},
		{
			// A third sheet above a sound pair lies under the weld on a
			// degenerate element: building the pair would leave it out
			// unseen.
			name: "degenerate host in a stack of three",
			mesh: func(t *testing.T) *geom.Mesh {
				m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5}, plate{Part: 3, T: 1, Z: 2, X0: 100, NX: 1, NY: 1, H: 5})
				return withElem(t, m, 2, 300009, r3.Vec{X: 20, Y: 20, Z: 2}, r3.Vec{X: 30, Y: 30, Z: 2}, r3.Vec{X: 20, Y: 20, Z: 2}, r3.Vec{X: 30, Y: 30, Z: 2})
			},
			joint: joints.Joint{ID: "W6", Point: at},
			code:  joints.CodeDegenerate, parts: []int64{3},
			want: "the element of part 3 under the weld (id 300009) is degenerate",
		},
		{
			// A listed part on a degenerate element.
			name: "listed part on a degenerate host",
			mesh: func(t *testing.T) *geom.Mesh {
				m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, X0: 100, NX: 1, NY: 1, H: 5})
				return withElem(t, m, 1, 200009, r3.Vec{X: 20, Y: 25, Z: 1}, r3.Vec{X: 25, Y: 25, Z: 1}, r3.Vec{X: 30, Y: 25, Z: 1})
			},
			joint: joints.Joint{ID: "W7", Point: at, Parts: []int64{1, 2}},
			code:  joints.CodeDegenerate, parts: []int64{2},
			want: "the element of part 2 under the weld (id 200009) is degenerate",
		},
		{
			// Part 2 is one quad with a corner lifted 8 mm: warped by far
			// more than the angle limit, its normal under the weld tilts
			// beyond it.
			name: "strongly warped host",
			mesh: func(t *testing.T) *geom.Mesh {
				m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, X0: 100, NX: 1, NY: 1, H: 5})
				return withElem(t, m, 1, 200009, r3.Vec{X: 20, Y: 20, Z: 1}, r3.Vec{X: 30, Y: 20, Z: 1}, r3.Vec{X: 30, Y: 30, Z: 9}, r3.Vec{X: 20, Y: 30, Z: 1})
			},
			joint: joints.Joint{ID: "W8", Point: at},
			code:  joints.CodeSingleSheet, parts: []int64{1, 2},
			want: "degrees) on an element warped by",
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			con := buildOne1(t, c.mesh(t), c.joint, joints.BuildOptions{})
			if con.Status != joints.NotBuilt {
				t.Errorf("state %v, want not-built", con.Status)
			}
			var f *joints.Finding
			for i := range con.Findings {
				if con.Findings[i].Code == c.code {
					f = &con.Findings[i]
				}
			}
			if f == nil {
				t.Fatalf("no %s finding: %v", c.code, con.Findings)
			}
			if !strings.Contains(f.Message, c.want) {
				t.Errorf("message %q\nwant it to hold %q", f.Message, c.want)
			}
			if !slices.Equal(f.Parts, c.parts) {
				t.Errorf("finding parts %v, want %v", f.Parts, c.parts)
			}
			if c.code == joints.CodeDegenerate && len(messages(con, joints.CodeSingleSheet)) > 0 {
				t.Errorf("single-sheet beside degenerate-host: %v", con.Findings)
			}
		})
	}
}

// TestSliverBesideSoundElement checks that a zero-area element along an
// edge the weld lies over, tied with the sound elements beside it and
// with the lowest id, does not become the host.
func TestSliverBesideSoundElement(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5})
	// The edge x = 25 of part 2, from y = 20 to 30, carries a sliver on
	// the plate's own nodes (column i = 5, rows j = 4, 5, 6).
	node := func(i, j int) int32 { return int32(121 + j*11 + i) }
	m.Conn = append(m.Conn, node(5, 4), node(5, 5), node(5, 6))
	m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
	m.ElemIDs = append(m.ElemIDs, 200000)
	m.ElemPart = append(m.ElemPart, 1)
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	c := buildOne1(t, m, joints.Joint{ID: "W1", Point: r3.Vec{X: 25, Y: 23, Z: 0.5}}, joints.BuildOptions{})
	if c.Status == joints.NotBuilt || !slices.Equal(c.Stack.Parts(), []int64{1, 2}) {
		t.Fatalf("state %v stack %v findings %v", c.Status, c.Stack.Parts(), c.Findings)
	}
	if host := m.ElemIDs[c.Stack.Sheets[1].Proj.Elem]; host == 200000 {
		t.Errorf("host of part 2 is the sliver")
	}
	if got := messages(c, joints.CodeDegenerate); len(got) > 0 {
		t.Errorf("degenerate-host: %v", got)
	}
}

// A weld whose every sheet within reach lies on a degenerate element (a
// quad 10 mm long and 1e-6 mm wide: area under 1e-6 times its longest
// edge squared, geom.DegenerateAreaRatio, yet with a normal) 0.5 mm
// beside it is stopped by degenerate-host, as when a sound sheet is
// there too: the lateral limit is then that of all the sheets as one
// stack (1 mm sheets: 0.25*5*sqrt(1) = 1.25 mm, common practice), not 0.
func TestOnlyDegenerateHosts(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, X0: 100, NX: 1, NY: 1, H: 5}, plate{Part: 2, T: 1, Z: 1, X0: 200, NX: 1, NY: 1, H: 5})
	m = withElem(t, m, 0, 100009, r3.Vec{X: 20, Y: 25}, r3.Vec{X: 30, Y: 25}, r3.Vec{X: 30, Y: 25 + 1e-6}, r3.Vec{X: 20, Y: 25 + 1e-6})
	m = withElem(t, m, 1, 200009, r3.Vec{X: 20, Y: 25, Z: 1}, r3.Vec{X: 30, Y: 25, Z: 1}, r3.Vec{X: 30, Y: 25 + 1e-6, Z: 1}, r3.Vec{X: 20, Y: 25 + 1e-6, Z: 1})
	c := buildOne1(t, m, joints.Joint{ID: "W1", Point: r3.Vec{X: 25, Y: 25.5, Z: 0.5}}, joints.BuildOptions{})
	if got := len(messages(c, joints.CodeDegenerate)); got != 2 || c.Status != joints.NotBuilt {
		t.Errorf("state %v, %d degenerate-host findings, want not-built and 2: %v", c.Status, got, c.Findings)
	}
}
