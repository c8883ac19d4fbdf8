package document

import (
	"bytes"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// ToConnectors converts the connectors of a decoded document back into
// the domain types, resolved against mesh m: node and element ids become
// indices, normals come from the mesh. name is the document's file, for
// errors: a node, element or part that is not in the mesh, a sheet
// whose element lies on another part than the sheet's, an end tied to a
// node that no element of its sheet's part uses, or a field out of
// range, is an input error naming the connector's line (the checks take
// a sheet's part as stated: an end on another part's nodes would tie
// parts the document does not say it ties). Findings are not carried
// over (a check makes its own).
func (doc *ConnectorsDoc) ToConnectors(m *geom.Mesh, name string) ([]joints.Connector, error) {
	n := len(doc.Connectors)
	out := make([]joints.Connector, n)
	errs := make([]error, n)
	// Blocks of connectors are converted side by side, each into its
	// place; the first error in document order is the one reported.
	const block = 512
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), (n+block-1)/block) {
		wg.Go(func() {
			for {
				lo := int(next.Add(block)) - block
				if lo >= n {
					return
				}
				for i := lo; i < min(n, lo+block); i++ {
					out[i], errs[i] = doc.Connectors[i].toConnector(m)
					out[i].Joint.File = name
				}
			}
		})
	}
	wg.Wait()
	for i, err := range errs {
		if err != nil {
			return nil, geom.LineError(name, doc.ConnectorLine(i), "connector %q: %w", geom.Excerpt(doc.Connectors[i].ID), err)
		}
	}
	if i, err := endsOnParts(m, out); err != nil {
		return nil, geom.LineError(name, doc.ConnectorLine(i), "connector %q: %w", geom.Excerpt(doc.Connectors[i].ID), err)
	}
	if i, err := doc.newNodeClash(m); err != nil {
		return nil, geom.LineError(name, doc.ConnectorLine(i), "connector %q: %w", geom.Excerpt(doc.Connectors[i].ID), err)
	}
	return out, nil
}

// newNodeClash returns the index of the first connector bringing a new
// node (a sheet's end_node, a link's end_node marked new) whose id is a
// node of the mesh or a new node of an earlier connector, and the error
// saying so: a solver would take the two for one node and tie what the
// document does not tie.
func (doc *ConnectorsDoc) newNodeClash(m *geom.Mesh) (int, error) {
	seen := map[int64]string{}
	claim := func(id int64, what, conn string) error {
		if _, ok := m.NodeIndex(id); ok {
			return fmt.Errorf("%s: new node %d is a node of the mesh; a connector's new nodes need ids of their own", what, id)
		}
		if other, ok := seen[id]; ok {
			return fmt.Errorf("%s: new node %d is a new node of connector %q too", what, id, geom.Excerpt(other))
		}
		seen[id] = conn
		return nil
	}
	for i := range doc.Connectors {
		d := &doc.Connectors[i]
		if d.State == "not-built" {
			continue
		}
		for si, s := range d.Sheets {
			if s.EndNode != nil && s.EndPoint != nil {
				if err := claim(*s.EndNode, fmt.Sprintf("sheet %d", si), d.ID); err != nil {
					return i, err
				}
			}
		}
		for _, l := range d.Links {
			if l.NewNode {
				if err := claim(l.EndNode, fmt.Sprintf("link %d", l.ID), d.ID); err != nil {
					return i, err
				}
			}
		}
	}
	return 0, nil
}

// endsOnParts returns the index of the first connector of cs with an
// end tied to a node that no element of its sheet's part uses, and the
// error saying so. The parts of the nodes tied are found in one pass
// over the elements.
func endsOnParts(m *geom.Mesh, cs []joints.Connector) (int, error) {
	// first[n] is the first part index found among the elements of tied
	// node n (-1 none yet, -2 not tied); more holds any further ones (a
	// node shared by parts), so that the pass over the elements touches
	// arrays only.
	first := make([]int32, m.NumNodes())
	for n := range first {
		first[n] = -2
	}
	tied := false
	for i := range cs {
		for _, e := range cs[i].Ends {
			for _, n := range e.Nodes {
				first[n], tied = -1, true
			}
		}
	}
	if !tied {
		return 0, nil
	}
	more := map[int32][]int32{}
	for e := range m.NumElems() {
		pi := m.ElemPart[e]
		for _, n := range m.ElemNodes(e) {
			switch f := first[n]; {
			case f == -2 || f == pi:
			case f == -1:
				first[n] = pi
			case !slices.Contains(more[n], pi):
				more[n] = append(more[n], pi)
			}
		}
	}
	for i := range cs {
		c := &cs[i]
		for si, e := range c.Ends {
			part := c.Stack.Sheets[si].Part
			pi, _ := m.PartIndex(part)
			for _, n := range e.Nodes {
				if first[n] == pi || slices.Contains(more[n], pi) {
					continue
				}
				var ids []int64
				if first[n] >= 0 {
					for _, p := range append([]int32{first[n]}, more[n]...) {
						ids = append(ids, m.Parts[p].ID)
					}
				}
				slices.Sort(ids)
				on := "no element"
				switch {
				case len(ids) == 1:
					on = fmt.Sprintf("elements of part %s only", joinIDs(ids))
				case len(ids) > 1:
					on = fmt.Sprintf("elements of parts %s only", joinIDs(ids))
				}
				return i, fmt.Errorf("sheet %d: node %d, tied to the end on part %d, belongs to %s", si, m.NodeIDs[n], part, on)
			}
		}
	}
	return 0, nil
}

// joinIDs writes ids as "1", "1 and 2" or "1, 2 and 3".
func joinIDs(ids []int64) string {
	s := make([]string, len(ids))
	for i, id := range ids {
		s[i] = strconv.FormatInt(id, 10)
	}
	if len(s) == 1 {
		return s[0]
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// maxCoordinate bounds the coordinates and lengths a document may give,
// mm: far beyond any model, far below the range where products of them
// overflow.
const maxCoordinate = 1e12

func (d *ConnectorDoc) toConnector(m *geom.Mesh) (joints.Connector, error) {
	if err := d.checkNumbers(); err != nil {
		return joints.Connector{}, err
	}
	kind, err := joints.ParseKind(d.Kind)
	if err != nil {
		return joints.Connector{}, err
	}
	var st joints.Status
	switch d.State {
	case "built":
		st = joints.Built
	case "flagged":
		st = joints.Flagged
	case "not-built":
		st = joints.NotBuilt
	default:
		return joints.Connector{}, fmt.Errorf("unknown state %q (want built, flagged or not-built)", geom.Excerpt(d.State))
	}
	c := joints.Connector{
		Joint:  joints.Joint{ID: d.ID, Kind: kind, Point: d.Point.r3(), Group: d.Group, Parts: d.Listed, Tags: d.Tags},
		Status: st, DiameterSource: d.DiameterSource,
	}
	if kind == joints.Bolt {
		if c.Bolt, err = d.boltData(); err != nil {
			return c, err
		}
	} else if c.Attach, err = joints.ParseAttach(d.Attach); err != nil {
		return c, err
	}
	if len(d.DOFs) > 0 {
		if c.DOFs, err = joints.ParseDOFs(d.DOFs...); err != nil {
			return c, err
		}
	}
	if d.Diameter != nil {
		c.Diameter = *d.Diameter
	}
	if st == joints.NotBuilt {
		return c, nil
	}
	if d.Axis != nil {
		c.Stack.Axis = d.Axis.r3()
	}
	node := func(id int64) (int32, error) {
		n, ok := m.NodeIndex(id)
		if !ok {
			return 0, fmt.Errorf("node %d is not in the mesh", id)
		}
		return n, nil
	}
	// Slices sized once: a document holds thousands of connectors.
	if len(d.Sheets) > 0 {
		c.Stack.Sheets = make([]joints.Sheet, 0, len(d.Sheets))
	}
	if len(d.Links) > 0 {
		c.Links = make([]joints.Link, 0, len(d.Links))
	}
	for si, s := range d.Sheets {
		if _, ok := m.PartIndex(s.Part); !ok {
			return c, fmt.Errorf("sheet %d: part %d is not in the mesh", si, s.Part)
		}
		e, ok := m.ElemIndex(s.Element)
		if !ok {
			return c, fmt.Errorf("sheet %d: element %d is not in the mesh", si, s.Element)
		}
		if on := m.Part(int(e)).ID; on != s.Part {
			return c, fmt.Errorf("sheet %d: element %d lies on part %d, not on the sheet's part %d", si, s.Element, on, s.Part)
		}
		sh := joints.Sheet{
			Part: s.Part, Thickness: s.Thickness, Position: s.Position, Lateral: s.Lateral, EdgeDistance: math.Inf(1),
			Proj: geom.Projection{Elem: int(e), Point: s.Point.r3(), Dist: s.Distance, Normal: m.Normal(int(e))},
		}
		if s.EdgeDistance != nil {
			sh.EdgeDistance = *s.EdgeDistance
		}
		c.Stack.Sheets = append(c.Stack.Sheets, sh)
		if s.EndPoint == nil {
			continue
		}
		if len(s.Nodes) != len(s.Weights) || len(s.Nodes) == 0 {
			return c, fmt.Errorf("sheet %d: %d nodes and %d weights", si, len(s.Nodes), len(s.Weights))
		}
		end := joints.End{Point: s.EndPoint.r3(), NodeIndex: -1, Weights: s.Weights, Nodes: make([]int32, 0, len(s.Nodes))}
		for _, id := range s.Nodes {
			n, err := node(id)
			if err != nil {
				return c, fmt.Errorf("sheet %d: %w", si, err)
			}
			end.Nodes = append(end.Nodes, n)
		}
		var endID int64
		switch {
		case s.EndNode != nil:
			endID = *s.EndNode
		case len(end.Nodes) == 1:
			end.NodeIndex = end.Nodes[0]
		}
		if c.Ends == nil {
			c.Ends = make([]joints.End, 0, len(d.Sheets))
			c.EndIDs = make([]int64, 0, len(d.Sheets))
		}
		c.Ends = append(c.Ends, end)
		c.EndIDs = append(c.EndIDs, endID)
	}
	if len(c.Ends) != 0 && len(c.Ends) != len(c.Stack.Sheets) {
		return c, fmt.Errorf("%d of %d sheets have an end", len(c.Ends), len(c.Stack.Sheets))
	}
	for _, l := range d.Links {
		if l.From < 0 || l.To < 0 || l.From >= len(c.Ends) || l.To >= len(c.Ends) || l.From == l.To {
			return c, fmt.Errorf("link %d joins sheets %d and %d, not two of the %d ends", l.ID, l.From, l.To, len(c.Ends))
		}
		link := joints.Link{ID: l.ID, From: l.From, To: l.To, Start: l.Start.r3(), End: l.End.r3(),
			Length: l.Length, Direction: l.Direction.r3(), Contact: l.ContactGap, MidGap: l.MidGap}
		if l.SquareGap != nil {
			link.SquareGap = *l.SquareGap
		} else {
			// A file written before square_gap: square to the sheets
			// from the host elements' normals, as build judged it.
			a, b := c.Stack.Sheets[min(l.From, l.To)], c.Stack.Sheets[max(l.From, l.To)]
			link.SquareGap = joints.SquareGap(l.MidGap, a.Thickness, b.Thickness, a.Proj.Normal, b.Proj.Normal, c.Stack.Axis)
		}
		c.Links = append(c.Links, link)
	}
	return c, nil
}

// boltData returns the bolt fields of a bolt's document, those the
// checks need: the coupling and the support (its sheet and DOFs; its
// node is the centre's).
func (d *ConnectorDoc) boltData() (*joints.BoltData, error) {
	b := &joints.BoltData{Support: -1}
	if d.Bolt == nil {
		return b, nil
	}
	var err error
	if b.Coupling, err = joints.ParseBoltCoupling(d.Bolt.Coupling); err != nil {
		return nil, err
	}
	if b.Shank, err = joints.ParseShankForm(d.Bolt.Shank); err != nil {
		return nil, err
	}
	if s := d.Bolt.Support; s != nil {
		if s.Sheet < 0 || s.Sheet >= len(d.Sheets) {
			return nil, fmt.Errorf("bolt support at sheet %d of %d", s.Sheet, len(d.Sheets))
		}
		b.Support = s.Sheet
		if b.SupportDOFs, err = joints.ParseDOFs(s.DOFs...); err != nil {
			return nil, fmt.Errorf("bolt support: %w", err)
		}
	}
	return b, nil
}

// axisUnitTolerance is how far a connector's axis may be from unit
// length: far above the rounding of 15 significant digits (about 1e-15),
// far below any axis meant otherwise.
const axisUnitTolerance = 1e-9

// checkNumbers refuses coordinates, lengths and weights out of range.
func (d *ConnectorDoc) checkNumbers() error {
	bad := func(v float64) bool { return !(math.Abs(v) <= maxCoordinate) }
	vec := func(v *Vec) bool { return v != nil && (bad(v[0]) || bad(v[1]) || bad(v[2])) }
	if vec(&d.Point) || vec(d.Axis) || d.Diameter != nil && bad(*d.Diameter) {
		return fmt.Errorf("a point, axis or diameter beyond %g mm", maxCoordinate)
	}
	// Joinery writes unit axes (to 15 significant digits); gaps judged
	// square to the sheets take cosines against it.
	if a := d.Axis; a != nil {
		if n := math.Sqrt(a[0]*a[0] + a[1]*a[1] + a[2]*a[2]); n != 0 && math.Abs(n-1) > axisUnitTolerance {
			return fmt.Errorf("axis [%g, %g, %g] is not a unit vector (length %g)", a[0], a[1], a[2], n)
		}
	}
	for i, s := range d.Sheets {
		if vec(&s.Point) || vec(s.EndPoint) || bad(s.Thickness) || bad(s.Position) || bad(s.Lateral) || bad(s.Distance) {
			return fmt.Errorf("sheet %d: a value beyond %g mm", i, maxCoordinate)
		}
		for _, w := range s.Weights {
			if bad(w) {
				return fmt.Errorf("sheet %d: a weight beyond %g", i, maxCoordinate)
			}
		}
	}
	for _, l := range d.Links {
		if vec(&l.Start) || vec(&l.End) || vec(&l.Direction) || bad(l.Length) || bad(l.ContactGap) || bad(l.MidGap) || l.SquareGap != nil && bad(*l.SquareGap) {
			return fmt.Errorf("link %d: a value beyond %g mm", l.ID, maxCoordinate)
		}
	}
	return nil
}

// NodePairs returns the mesh node ids each link of a node-pair
// connector joins (the single node of the end on each of its sheets),
// and false when the connector is not a built node-pair spot weld.
func (d *ConnectorDoc) NodePairs() ([][2]int64, bool) {
	if d.Attach != joints.NodePair.String() || d.State == joints.NotBuilt.String() || d.Kind != joints.Spot.String() {
		return nil, false
	}
	var out [][2]int64
	for _, l := range d.Links {
		if l.From < 0 || l.To < 0 || l.From >= len(d.Sheets) || l.To >= len(d.Sheets) ||
			len(d.Sheets[l.From].Nodes) != 1 || len(d.Sheets[l.To].Nodes) != 1 {
			return nil, false
		}
		out = append(out, [2]int64{d.Sheets[l.From].Nodes[0], d.Sheets[l.To].Nodes[0]})
	}
	return out, len(out) > 0
}

func (v Vec) r3() r3.Vec { return r3.Vec{X: v[0], Y: v[1], Z: v[2]} }

// ConnectorLine returns the line on which connector i of a decoded
// document starts in its file, 0 when unknown. The lines are found on
// first use, in one pass over the file.
func (doc *ConnectorsDoc) ConnectorLine(i int) int {
	if doc.lines == nil && doc.starts != nil {
		doc.lines = make([]int, len(doc.starts))
		line, seen := 1, 0
		for k, off := range doc.starts {
			line += bytes.Count(doc.raw[seen:off], []byte("\n"))
			seen = off
			doc.lines[k] = line
		}
	}
	if i < 0 || i >= len(doc.lines) {
		return 0
	}
	return doc.lines[i]
}
