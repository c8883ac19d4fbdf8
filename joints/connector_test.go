package joints

import (
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// twoTriangles returns a mesh of two triangles whose largest node id is
// maxID.
func twoTriangles(t *testing.T, maxID int64) *geom.Mesh {
	t.Helper()
	m, err := geom.MeshFromCells(&geom.CellSet{
		File:    "m.vtk",
		Points:  []r3.Vec{{}, {X: 1}, {Y: 1}, {X: 1, Y: 1}},
		NodeIDs: []int64{1, 2, 3, maxID},
		Types:   []uint8{geom.VTKTriangle, geom.VTKTriangle},
		Offsets: []int64{0, 3, 6},
		Conn:    []int64{0, 1, 2, 1, 3, 2},
		Part:    []int64{100, 200},
	}, geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// builtConnector is a built connector with two new end nodes and one
// link: three new ids.
func builtConnector(id string) Connector {
	return Connector{Joint: Joint{ID: id}, Status: Built,
		Ends:  []End{{NodeIndex: -1}, {NodeIndex: -1}},
		Links: []Link{{From: 0, To: 1}}}
}

func TestNewResultIDFindings(t *testing.T) {
	tests := []struct {
		name    string
		maxID   int64
		idStart int64
		codes   []string
		want    []string // in the messages, in order
	}{
		// 2,147,483,647 = 2^31 - 1, the largest 32-bit signed integer.
		{"below 2^31 - 1", 2_000_000_000, 2_147_483_640, nil, nil},
		{"last id at 2^31 - 1", 2_000_000_000, 2_147_483_642, nil, nil},
		{"last id past 2^31 - 1", 2_000_000_000, 2_147_483_646, []string{CodeIDRange},
			[]string{"new ids 2147483646 to 2147483651 exceed 2147483647"}},
		{"default start above a large mesh", 2_147_483_600, 0, []string{CodeIDRange},
			[]string{"new ids 3000000000 to 3000000005 exceed 2147483647"}},
		{"a digit more", 99_990, 0, []string{CodeIDDigits},
			[]string{"new ids 100000 to 100005 have up to 6 digits, the mesh's ids at most 5 (largest 99990)"}},
		{"both", 999_999_999, 2_147_483_647, []string{CodeIDRange, CodeIDDigits},
			[]string{"new ids 2147483647 to 2147483652 exceed", "up to 10 digits, the mesh's ids at most 9"}},
		{"same digits", 412_345, 0, nil, nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m := twoTriangles(t, tt.maxID)
			conns := []Connector{builtConnector("W1"), builtConnector("W2")}
			res, err := NewResult(m, conns, nil, BuildOptions{IDStart: tt.idStart})
			if err != nil {
				t.Fatal(err)
			}
			var codes []string
			for i, f := range res.Findings {
				if f.Joint != "" || f.HasPoint || f.Severity != map[string]Severity{CodeIDRange: Warning, CodeIDDigits: Info}[f.Code] {
					t.Errorf("finding %+v: want a run finding, warning for id-range, info for id-digits", f)
				}
				codes = append(codes, f.Code)
				if i < len(tt.want) && !strings.Contains(f.Message, tt.want[i]) {
					t.Errorf("message %q lacks %q", f.Message, tt.want[i])
				}
			}
			if !slices.Equal(codes, tt.codes) {
				t.Errorf("codes %v, want %v", codes, tt.codes)
			}
		})
	}
	// No id handed out: no finding, whatever the start.
	m := twoTriangles(t, 2_147_483_600)
	res, err := NewResult(m, []Connector{{Joint: Joint{ID: "W1"}, Status: NotBuilt}}, nil, BuildOptions{})
	if err != nil || len(res.Findings) != 0 {
		t.Errorf("no new ids: findings %v, %v", res.Findings, err)
	}
}
