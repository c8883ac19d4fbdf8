package audit

import (
	"cmp"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio/tabular"
	"github.com/joinery-cae/joinery/joints"
)

// NodePairLink is one link of a node-pair weld: two mesh node ids.
type NodePairLink struct {
	A, B int64
	Line int // line of the link in its file, for messages; 0 when unknown
}

// NodePairWeld is a spot weld given as links between mesh nodes, as
// existing models define them: read from a node-pair list
// (ReadNodePairs) or from the node-pair connectors of a connectors.json.
type NodePairWeld struct {
	ID    string
	Links []NodePairLink
	// DOFs the links couple; 0 means the default (BuildOptions.SpotDOFs).
	DOFs joints.DOFs
	// Diameter is the nugget diameter, mm; 0 means the nugget rule
	// applied to the governing thickness.
	Diameter float64
	// Point is the weld point; when HasPoint is false the mean of the
	// weld's nodes stands for it.
	Point    r3.Vec
	HasPoint bool
	Group    string
	File     string
	Line     int // line of the weld's first link
}

// nodePairKeys are the columns of a node-pair list.
func nodePairKeys() []string { return []string{"id", "node_a", "node_b", "dofs"} }

// ReadNodePairsFile reads the node-pair list in the named file (see
// ReadNodePairs).
func ReadNodePairsFile(path string) ([]NodePairWeld, []joints.InputWarning, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, geom.FileError(path, "node-pair list: %w", err)
	}
	defer f.Close()
	return ReadNodePairs(f, path)
}

// ReadNodePairs reads a node-pair list, the form in which a model made
// elsewhere defines its spot welds: CSV with a header row, then one row
// per link.
//
//	id      required; the weld's id; rows sharing an id form one weld
//	        (a three-sheet weld is two rows)
//	node_a  required; mesh node id of one end of the link
//	node_b  required; mesh node id of the other end
//	dofs    optional; what the link couples, e.g. tx+ty+tz (names from
//	        tx ty tz rx ry rz joined by '+'); empty: the default
//
// Header names are compared without regard to case; other columns are
// ignored (one resembling a known name gives a warning). Lines starting
// with '#' and blank lines are skipped. A link joining a node to itself,
// a link given twice in one weld, and rows of one weld with different
// dofs are errors naming file and line. Whether the nodes exist is
// checked against the mesh by NodePairConnectors. Welds come in the
// order of their first rows.
func ReadNodePairs(r io.Reader, name string) ([]NodePairWeld, []joints.InputWarning, error) {
	c, err := tabular.NewCSV(r, name)
	if err != nil {
		return nil, nil, err
	}
	keys := nodePairKeys()
	at, other := c.Columns(keys)
	var warns []joints.InputWarning
	for _, col := range other {
		if s := tabular.Suggest(c.Header[col], keys); s != "" {
			warns = append(warns, joints.InputWarning{File: name, Line: c.HeaderLine,
				Message: fmt.Sprintf("column %q is not a known column (did you mean %q?); it is ignored", c.Header[col], s)})
		}
	}
	if err := c.Require(at, keys, 0, 1, 2); err != nil {
		return nil, warns, err
	}
	var welds []NodePairWeld
	byID := map[string]int{}
	dofsLine := map[string]int{}
	for {
		rec, err := c.Read()
		if err == io.EOF {
			return welds, warns, nil
		}
		if err != nil {
			return nil, warns, err
		}
		id := rec[at[0]]
		if id == "" {
			return nil, warns, c.Errorf(at[0], "id is empty")
		}
		var ab [2]int64
		for k := range 2 {
			col := at[1+k]
			if rec[col] == "" {
				return nil, warns, c.Errorf(col, "%s is empty", c.Header[col])
			}
			if ab[k], err = c.Int(rec, col); err != nil {
				return nil, warns, err
			}
		}
		if ab[0] == ab[1] {
			return nil, warns, c.Errorf(at[1], "weld %q: the link joins node %d to itself", excerpt(id), ab[0])
		}
		var d joints.DOFs
		if col := at[3]; col >= 0 && rec[col] != "" {
			if d, err = joints.ParseDOFs(rec[col]); err != nil {
				return nil, warns, c.Errorf(col, "dofs: %w", err)
			}
		}
		link := NodePairLink{A: ab[0], B: ab[1], Line: c.Line(0)}
		i, seen := byID[id]
		if !seen {
			id = strings.Clone(id)
			byID[id] = len(welds)
			dofsLine[id] = link.Line
			welds = append(welds, NodePairWeld{ID: id, Links: []NodePairLink{link}, DOFs: d, File: name, Line: link.Line})
			continue
		}
		w := &welds[i]
		if d != w.DOFs {
			return nil, warns, c.Errorf(max(at[3], 0), "weld %q: dofs %s differ from those at line %d (%s); one weld couples one set",
				excerpt(id), dofsText(d), dofsLine[id], dofsText(w.DOFs))
		}
		for _, l := range w.Links {
			if l.A == link.A && l.B == link.B || l.A == link.B && l.B == link.A {
				return nil, warns, c.Errorf(at[1], "weld %q: link %d-%d already given at line %d", excerpt(id), link.A, link.B, l.Line)
			}
		}
		w.Links = append(w.Links, link)
	}
}

func dofsText(d joints.DOFs) string {
	if d == 0 {
		return "none given"
	}
	return strings.Join(d.Names(), "+")
}

// excerpt cuts a text echoed in a message to a readable length.
func excerpt(s string) string {
	const limit = 40
	if len(s) <= limit {
		return s
	}
	return s[:limit] + "..."
}

// nodeInfo is what the node-pair resolution needs of a node: the parts
// of the elements that use it, with the lowest-id element of each.
type nodeInfo struct {
	parts []int32 // part indices, sorted by part id
	host  []int32 // per part, the element (index) of lowest id using the node
}

// NodePairConnectors resolves node-pair welds against mesh m and returns
// their connectors, in the order given, as a node-pair build would make
// them: each node is an end on the sheet of its part, the sheets ordered
// along the stack axis (the normal of the first node's element), each
// link between its two ends. The nugget diameter is the weld's, else o's
// rule applied to the governing thickness; the weld point is the weld's,
// else the mean of its nodes. The checks a build makes of node-pair
// connectors run with the same rules (CheckFacing: nodes-apart; GapFinding
// on each link: gap-open, gap-closed) and set each connector's state.
//
// A node id that is not in the mesh or belongs to no element, a link
// whose two nodes lie on one part, two nodes of one part in a weld and
// rows of a weld that share no node with its others are input errors
// naming file and line.
// A node that several parts share is taken on the part that the weld's
// other nodes do not use (the lowest id among them when that leaves a
// choice).
func NodePairConnectors(m *geom.Mesh, welds []NodePairWeld, o joints.BuildOptions) ([]joints.Connector, error) {
	o = o.Defaults(joints.MaxThickness(m))
	info, err := nodeInfos(m, welds)
	if err != nil {
		return nil, err
	}
	out := make([]joints.Connector, 0, len(welds))
	for wi := range welds {
		c, err := nodePairConnector(m, &welds[wi], info, &o)
		if err != nil {
			return nil, err
		}
		out = append(out, c)
	}
	return out, nil
}

// nodeInfos looks up every node of welds and finds its parts in one pass
// over the elements.
func nodeInfos(m *geom.Mesh, welds []NodePairWeld) (map[int32]*nodeInfo, error) {
	info := map[int32]*nodeInfo{}
	for _, w := range welds {
		for _, l := range w.Links {
			for _, id := range [2]int64{l.A, l.B} {
				n, ok := m.NodeIndex(id)
				if !ok {
					return nil, geom.LineError(w.File, l.Line, "weld %q: node %d is not in the mesh", excerpt(w.ID), id)
				}
				if info[n] == nil {
					info[n] = &nodeInfo{}
				}
			}
		}
	}
	if len(info) == 0 {
		return info, nil
	}
	mark := make([]bool, m.NumNodes())
	for n := range info {
		mark[n] = true
	}
	for e := range m.NumElems() {
		for _, n := range m.ElemNodes(e) {
			if !mark[n] {
				continue
			}
			ni := info[n]
			pi := m.ElemPart[e]
			k := slices.Index(ni.parts, pi)
			if k < 0 {
				ni.parts = append(ni.parts, pi)
				ni.host = append(ni.host, int32(e))
				continue
			}
			if m.ElemIDs[e] < m.ElemIDs[ni.host[k]] {
				ni.host[k] = int32(e)
			}
		}
	}
	for _, ni := range info {
		if len(ni.parts) > 1 {
			idx := make([]int, len(ni.parts))
			for i := range idx {
				idx[i] = i
			}
			slices.SortFunc(idx, func(a, b int) int { return cmp.Compare(m.Parts[ni.parts[a]].ID, m.Parts[ni.parts[b]].ID) })
			ps, hs := make([]int32, len(idx)), make([]int32, len(idx))
			for i, k := range idx {
				ps[i], hs[i] = ni.parts[k], ni.host[k]
			}
			ni.parts, ni.host = ps, hs
		}
	}
	return info, nil
}

// chained returns an input error, at the first row that stands apart,
// when the links of w do not join all its nodes into one piece.
func chained(m *geom.Mesh, w *NodePairWeld) error {
	root := map[int64]int64{}
	find := func(id int64) int64 {
		for {
			r, ok := root[id]
			if !ok || r == id {
				return id
			}
			root[id] = root[r]
			id = r
		}
	}
	for _, l := range w.Links {
		a, b := find(l.A), find(l.B)
		root[a], root[b] = a, a
	}
	first := find(w.Links[0].A)
	for _, l := range w.Links[1:] {
		if find(l.A) != first {
			return geom.LineError(w.File, l.Line, "weld %q: link %d-%d shares no node with the weld's other rows: the rows of one weld chain its sheets (a-b then b-c); give each weld its own id",
				excerpt(w.ID), l.A, l.B)
		}
	}
	return nil
}

// nodePairConnector builds the connector of one weld.
func nodePairConnector(m *geom.Mesh, w *NodePairWeld, info map[int32]*nodeInfo, o *joints.BuildOptions) (joints.Connector, error) {
	// The weld's distinct nodes in order of appearance, with the line
	// that names each first.
	var nodes []int32
	lineOf := map[int32]int{}
	for _, l := range w.Links {
		for _, id := range [2]int64{l.A, l.B} {
			n, _ := m.NodeIndex(id)
			if _, ok := lineOf[n]; !ok {
				lineOf[n] = l.Line
				nodes = append(nodes, n)
			}
		}
	}
	// Each node's part: the one no other node of the weld uses alone.
	partOf := map[int32]int{} // node -> index into its nodeInfo.parts
	for _, n := range nodes {
		ni := info[n]
		if len(ni.parts) == 0 {
			return joints.Connector{}, geom.LineError(w.File, lineOf[n], "weld %q: node %d belongs to no element", excerpt(w.ID), m.NodeIDs[n])
		}
		pick := 0
		if len(ni.parts) > 1 {
			for k, p := range ni.parts {
				used := false
				for _, other := range nodes {
					if other != n && len(info[other].parts) == 1 && info[other].parts[0] == p {
						used = true
					}
				}
				if !used {
					pick = k
					break
				}
			}
		}
		partOf[n] = pick
	}
	// One node per sheet: a second node of a part in one weld is another
	// weld under the same id (or two links on one sheet), and its rows
	// must chain the sheets (a-b, b-c), not stand apart.
	partIdx := func(id int64) int32 {
		n, _ := m.NodeIndex(id)
		return info[n].parts[partOf[n]]
	}
	for _, l := range w.Links {
		if p := partIdx(l.A); p == partIdx(l.B) {
			return joints.Connector{}, geom.LineError(w.File, l.Line, "weld %q: link %d-%d joins two nodes of part %d", excerpt(w.ID), l.A, l.B, m.Parts[p].ID)
		}
	}
	nodeOnPart := map[int32]int32{}
	for _, n := range nodes {
		p := info[n].parts[partOf[n]]
		if first, ok := nodeOnPart[p]; ok {
			return joints.Connector{}, geom.LineError(w.File, lineOf[n],
				"weld %q: nodes %d and %d both lie on part %d: a weld has one node per sheet (the rows of a three-sheet weld chain its sheets, a-b then b-c); give each weld its own id",
				excerpt(w.ID), m.NodeIDs[first], m.NodeIDs[n], m.Parts[p].ID)
		}
		nodeOnPart[p] = n
	}
	if err := chained(m, w); err != nil {
		return joints.Connector{}, err
	}
	j := joints.Joint{ID: w.ID, Kind: joints.Spot, Point: w.Point, Group: w.Group, File: w.File, Line: w.Line}
	if !w.HasPoint {
		var sum r3.Vec
		for _, n := range nodes {
			sum = r3.Add(sum, m.Coords[n])
		}
		j.Point = r3.Scale(1/float64(len(nodes)), sum)
	}
	// Sheets: one per node, on its part, at the node.
	sheets := make([]joints.Sheet, len(nodes))
	for i, n := range nodes {
		ni := info[n]
		e := int(ni.host[partOf[n]])
		sheets[i] = joints.Sheet{
			Part:         m.Parts[ni.parts[partOf[n]]].ID,
			Proj:         geom.Projection{Elem: e, Point: m.Coords[n], Normal: m.Normal(e), Dist: r3.Norm(r3.Sub(m.Coords[n], j.Point))},
			Thickness:    m.Thickness(e),
			EdgeDistance: math.Inf(1),
		}
	}
	axis := sheets[0].Proj.Normal
	if r3.Norm2(axis) == 0 {
		axis = r3.Vec{Z: 1}
	}
	for i := range sheets {
		s := &sheets[i]
		v := r3.Sub(s.Proj.Point, j.Point)
		along := r3.Dot(v, axis)
		s.Lateral = r3.Norm(r3.Sub(v, r3.Scale(along, axis)))
		off := m.Part(s.Proj.Elem).Surface.MidOffset(s.Thickness)
		s.Position = along + off*r3.Dot(s.Proj.Normal, axis)
	}
	order := make([]int, len(nodes))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		return cmp.Or(cmp.Compare(sheets[a].Position, sheets[b].Position), cmp.Compare(sheets[a].Part, sheets[b].Part))
	})
	c := joints.Connector{Joint: j, Attach: joints.NodePair, DOFs: w.DOFs}
	if c.DOFs == 0 {
		c.DOFs = o.SpotDOFs
	}
	c.Stack.Axis = axis
	sheetOf := map[int32]int{}
	for k, i := range order {
		c.Stack.Sheets = append(c.Stack.Sheets, sheets[i])
		n := nodes[i]
		sheetOf[n] = k
		c.Ends = append(c.Ends, joints.End{Point: m.Coords[n], NodeIndex: n, Nodes: []int32{n}, Weights: []float64{1}})
	}
	c.EndIDs = make([]int64, len(c.Ends))
	for _, l := range w.Links {
		na, _ := m.NodeIndex(l.A)
		nb, _ := m.NodeIndex(l.B)
		from, to := sheetOf[na], sheetOf[nb] // on two parts: checked above
		if from > to {
			from, to = to, from
		}
		a, b := c.Ends[from].Point, c.Ends[to].Point
		d := r3.Sub(b, a)
		length := r3.Norm(d)
		dir := r3.Vec{}
		if length > 0 {
			dir = r3.Scale(1/length, d)
		}
		s, t := c.Stack.Sheets[from], c.Stack.Sheets[to]
		gap, square := c.Stack.Gaps(from, to)
		c.Links = append(c.Links, joints.Link{From: from, To: to, Start: a, End: b, Length: length, Direction: dir,
			Contact: (s.Thickness + t.Thickness) / 2, MidGap: gap, SquareGap: square})
	}
	slices.SortStableFunc(c.Links, func(a, b joints.Link) int { return cmp.Or(cmp.Compare(a.From, b.From), cmp.Compare(a.To, b.To)) })
	c.Diameter, c.DiameterSource = w.Diameter, "list"
	if !(c.Diameter > 0) {
		c.Diameter = o.Rule.Diameter(joints.GoverningThickness(c.Stack.Thicknesses()))
		c.DiameterSource = o.Rule.String()
	}
	c.Findings = append(c.Findings, spotFacing(&c, o)...)
	for _, l := range c.Links {
		if f, ok := spotGap(&c.Joint, c.Stack.Axis, c.Stack.Sheets[l.From], c.Stack.Sheets[l.To], o); ok {
			c.Findings = append(c.Findings, f)
		}
	}
	c.SetStatus()
	return c, nil
}
