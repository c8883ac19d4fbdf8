package audit

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

func TestReadNodePairs(t *testing.T) {
	in := "# exported from a model\nID,Node_A,node_b,dofs,element\nW1,1,2,tx+ty+tz,90\nW2,3,4,,91\nW1,2,5,tx+ty+tz,92\n\nW3,7,8,TX+TY+TZ+RX+RY+RZ,93\n"
	welds, warns, err := ReadNodePairs(strings.NewReader(in), "w.csv")
	if err != nil || len(warns) != 0 {
		t.Fatal(err, warns)
	}
	if len(welds) != 3 {
		t.Fatalf("%d welds", len(welds))
	}
	w := welds[0]
	if w.ID != "W1" || len(w.Links) != 2 || w.Links[1].A != 2 || w.Links[1].B != 5 || w.Links[1].Line != 5 || w.Line != 3 || w.DOFs != joints.Translations {
		t.Errorf("%+v", w)
	}
	if welds[1].DOFs != 0 || welds[2].DOFs != joints.AllDOFs {
		t.Errorf("dofs %v %v", welds[1].DOFs, welds[2].DOFs)
	}
}

// Bad node-pair lists are input errors naming file and line.
func TestReadNodePairsErrors(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"", "w.csv: empty table"},
		{"id,node_a\nW1,1\n", `w.csv:1: missing required column "node_b"`},
		{"id,node_a,node_b\nW1,1,x\n", `w.csv:2: node_b: "x" is not an integer`},
		{"id,node_a,node_b\nW1,1,1\n", "w.csv:2: weld \"W1\": the link joins node 1 to itself"},
		{"id,node_a,node_b\n,1,2\n", "w.csv:2: id is empty"},
		{"id,node_a,node_b\nW1,1,2\nW1,2,1\n", "w.csv:3: weld \"W1\": link 2-1 already given at line 2"},
		{"id,node_a,node_b,dofs\nW1,1,2,tx\nW1,2,3,ty\n", "w.csv:3: weld \"W1\": dofs ty differ from those at line 2 (tx)"},
		{"id,node_a,node_b,dofs\nW1,1,2,tq\n", "w.csv:2: dofs: unknown degree of freedom"},
		{"id,node_a,node_b\nW1,1,2,3\n", "w.csv:2: row has 4 fields"},
	} {
		_, _, err := ReadNodePairs(strings.NewReader(tc.in), "w.csv")
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) || !errors.Is(err, geom.ErrInput) {
			t.Errorf("%q: %v, want an input error starting %q", tc.in, err, tc.want)
		}
	}
	_, warns, err := ReadNodePairs(strings.NewReader("id,node_a,node_b,dof\nW1,1,2,tx\n"), "w.csv")
	if err != nil || len(warns) != 1 || !strings.Contains(warns[0].Message, `did you mean "dofs"`) {
		t.Errorf("%v %v", err, warns)
	}
}

// Node ids must exist in the mesh and belong to elements; a link must
// join two parts.
func TestNodePairConnectorsErrors(t *testing.T) {
	m := plates(flangeMesh()...)
	a, b := itoa(nodeAt(m, 1, 50, 25)), itoa(nodeAt(m, 2, 50, 25))
	a2, b2 := itoa(nodeAt(m, 1, 55, 25)), itoa(nodeAt(m, 2, 55, 25))
	for _, tc := range []struct{ in, want string }{
		{"id,node_a,node_b\nW1," + a + "," + b + "\nW2," + a + ",999\n", `w.csv:3: weld "W2": node 999 is not in the mesh`},
		{"id,node_a,node_b\nW1," + a + "," + a2 + "\n", `w.csv:2: weld "W1": link ` + a + "-" + a2 + " joins two nodes of part 1"},
		// One id on welds at neighbouring nodes (as some exports reuse
		// them): a weld has one node per sheet.
		{"id,node_a,node_b\nW1," + a + "," + b + "\nW1," + a2 + "," + b2 + "\n", `w.csv:3: weld "W1": nodes ` + a + " and " + a2 + " both lie on part 1"},
		{"id,node_a,node_b\nW1," + a + "," + b + "\nW1," + b2 + "," + a2 + "\n", `w.csv:3: weld "W1": nodes ` + b + " and " + b2 + " both lie on part 2"},
	} {
		welds, _, err := ReadNodePairs(strings.NewReader(tc.in), "w.csv")
		if err != nil {
			t.Fatal(err)
		}
		_, err = NodePairConnectors(m, welds, joints.BuildOptions{})
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) || !errors.Is(err, geom.ErrInput) {
			t.Errorf("%v, want an input error starting %q", err, tc.want)
		}
	}
}

// The rows of one weld chain its sheets: two links on four sheets that
// share no node are two welds under one id.
func TestNodePairRowsChain(t *testing.T) {
	m := plates(
		plate{Part: 1, T: 1, NX: 20, NY: 10, H: 5},
		plate{Part: 2, T: 1, Z: 1, NX: 20, NY: 10, H: 5},
		plate{Part: 3, T: 1, Z: 2, NX: 20, NY: 10, H: 5},
		plate{Part: 4, T: 1, Z: 3, NX: 20, NY: 10, H: 5},
	)
	n := func(p int64) string { return itoa(nodeAt(m, p, 50, 25)) }
	for _, tc := range []struct{ in, want string }{
		{"id,node_a,node_b\nW1," + n(1) + "," + n(2) + "\nW1," + n(3) + "," + n(4) + "\n",
			`w.csv:3: weld "W1": link ` + n(3) + "-" + n(4) + " shares no node with the weld's other rows"},
		{"id,node_a,node_b\nW1," + n(1) + "," + n(2) + "\nW1," + n(3) + "," + n(4) + "\nW1," + n(2) + "," + n(3) + "\n", ""},
		{"id,node_a,node_b\nW1," + n(2) + "," + n(3) + "\nW1," + n(1) + "," + n(2) + "\n", ""},
	} {
		welds, _, err := ReadNodePairs(strings.NewReader(tc.in), "w.csv")
		if err != nil {
			t.Fatal(err)
		}
		conns, err := NodePairConnectors(m, welds, joints.BuildOptions{})
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%q: %v", tc.in, err)
		case tc.want == "" && len(conns[0].Stack.Sheets) != len(welds[0].Links)+1:
			t.Errorf("%q: stack %v", tc.in, conns[0].Stack.Parts())
		case tc.want != "" && (err == nil || !strings.HasPrefix(err.Error(), tc.want) || !errors.Is(err, geom.ErrInput)):
			t.Errorf("%v, want an input error starting %q", err, tc.want)
		}
	}
}

// Node-pair connectors read from a list get the checks a build makes of
// node pairs: nodes that do not face each other, a gap off contact.
func TestNodePairChecks(t *testing.T) {
	m := plates(
		plate{Part: 1, T: 1, NX: 20, NY: 10, H: 5},
		plate{Part: 2, T: 1, Z: 1, NX: 20, NY: 10, H: 5},
		plate{Part: 3, T: 1, Z: 4, NX: 20, NY: 10, H: 5},
	)
	n := func(p int64, x float64) string { return itoa(nodeAt(m, p, x, 25)) }
	csv := "id,node_a,node_b\n" +
		"W1," + n(1, 20) + "," + n(2, 20) + "\n" + // facing, in contact
		"W2," + n(1, 50) + "," + n(2, 60) + "\n" + // 10 mm apart across the stack
		"W3," + n(2, 80) + "," + n(3, 80) + "\n" // mid-surfaces 3 mm apart, contact 1 mm
	conns := fromCSV(t, m, csv, joints.BuildOptions{})
	got := map[string][]string{}
	for _, c := range conns {
		for _, f := range c.Findings {
			got[c.Joint.ID] = append(got[c.Joint.ID], f.Code)
		}
	}
	if len(got["W1"]) != 0 || !strings.Contains(strings.Join(got["W2"], " "), joints.CodeNodesApart) || strings.Join(got["W3"], " ") != joints.CodeGapOpen {
		t.Errorf("%v", got)
	}
	if conns[0].Status != joints.Built || conns[1].Status != joints.Flagged {
		t.Errorf("states %v %v", conns[0].Status, conns[1].Status)
	}
}

// FuzzReadNodePairs checks that no input makes the node-pair reader
// panic, and that what it accepts is well formed.
func FuzzReadNodePairs(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "nodepairs", "*.csv"))
	for _, s := range seeds {
		b, err := os.ReadFile(s)
		if err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte("id,node_a,node_b,dofs\nW1,1,2,tx+ty\nW1,2,3,tx+ty\n"))
	f.Add([]byte("id,node_a,node_b\n\"W,1\",1,2\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		welds, _, err := ReadNodePairs(strings.NewReader(string(data)), "f.csv")
		if err != nil {
			if !errors.Is(err, geom.ErrInput) {
				t.Fatalf("not an input error: %v", err)
			}
			return
		}
		for _, w := range welds {
			if w.ID == "" || len(w.Links) == 0 {
				t.Fatalf("weld %+v", w)
			}
			for _, l := range w.Links {
				if l.A == l.B {
					t.Fatalf("link %+v", l)
				}
			}
		}
	})
}

// FuzzAuditNodePairs runs the whole audit on node-pair lists against a
// fixed three-sheet mesh: whatever the list, no panic, and errors are
// input errors.
func FuzzAuditNodePairs(f *testing.F) {
	m := plates(
		plate{Part: 1, T: 1, NX: 8, NY: 4, H: 5},
		plate{Part: 2, T: 1, Z: 1, NX: 8, NY: 4, H: 5},
		plate{Part: 3, T: 1.5, Z: 2.25, NX: 4, NY: 2, H: 10},
	)
	f.Add([]byte("id,node_a,node_b,dofs\nW1,100001,200001,tx+ty+tz\nW2,100002,200002,\nW2,200002,300002,\nW3,100003,200003,rz\n"))
	f.Add([]byte("id,node_a,node_b\nW1,100001,200002\nW1,200002,300003\nW2,100001,200002\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		welds, _, err := ReadNodePairs(strings.NewReader(string(data)), "f.csv")
		if err != nil {
			return
		}
		conns, err := NodePairConnectors(m, welds, joints.BuildOptions{})
		if err != nil {
			if !errors.Is(err, geom.ErrInput) {
				t.Fatalf("not an input error: %v", err)
			}
			return
		}
		if _, err := Run(context.Background(), m, conns, nil, joints.BuildOptions{}, nil); err != nil {
			t.Fatal(err)
		}
	})
}
