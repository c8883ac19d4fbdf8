package joints

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// BodyKind says what a body of a kinematic description stands for.
type BodyKind int8

// Body kinds.
const (
	// PartBody is a part of the mesh, treated as rigid.
	PartBody BodyKind = iota
	// NodeBody is a node that a connector creates (the end node of an
	// interpolated or patch spot weld, a bolt's centre node), with its six
	// degrees of freedom.
	NodeBody
	// GroundBody is the fixed surroundings (a stiff fixture outside the
	// model, a support); it never moves.
	GroundBody
)

// String returns "part", "node" or "ground".
func (k BodyKind) String() string {
	switch k {
	case NodeBody:
		return "node"
	case GroundBody:
		return "ground"
	}
	return "part"
}

// Body is one body of a kinematic description.
type Body struct {
	Kind BodyKind
	// Part is the part id of a PartBody.
	Part int64
	// Node is the id of a NodeBody's node; 0 before ids are handed out.
	Node int64
	// Point is where a NodeBody's node lies, mm.
	Point r3.Vec
	// Joint is the connector that made a NodeBody.
	Joint string
}

// Tie joins two bodies at a point on a set of degrees of freedom.
//
// Every body moves rigidly, by a small translation and rotation: a
// PartBody as the rigid part; a NodeBody as a rigid body fixed to its
// node, so that its displacement at a point r is t + w × (r − x), with
// x the node's position, t its translation and w its rotation; a
// GroundBody not at all. d_A(p) is the displacement of body A at point
// p and w_A its rotation. A tie between A and B at point p on DOFs D
// means exactly:
//
//   - for each translation tx, ty, tz in D: that component of
//     d_B(p) − d_A(p) is zero (the bodies move alike at p along that axis);
//   - for each rotation rx, ry, rz in D: that component of w_B − w_A is
//     zero (the bodies turn alike about that axis).
//
// A tie on tx,ty,tz is a ball joint at p: the bodies may still turn
// about p relative to each other. A tie on all six holds them rigidly
// together, wherever p lies. Ties are independent: several at different
// points combine (three ball joints at points not on one line hold two
// bodies rigidly; ball joints on one line leave a turn about it free).
//
// The connectors Joinery builds are described by ties as follows (see
// AddSpotWeld and AddBolt):
//
//   - an end that is a mesh node (node-pair attachment) moves with its
//     part: the link ties the part itself;
//   - an end that is a new node tied to three or more nodes of its part
//     not on one line (interpolated and patch attachment) follows the
//     part's rigid motion: a tie between the part and the end's NodeBody
//     at the end point on all six degrees of freedom; tied to fewer (or
//     collinear) nodes it follows only the part's translation at the end
//     point: a tie on tx,ty,tz, leaving the end's rotations to the link;
//   - a link between the ends on sheets From and To ties the two ends'
//     bodies at the link's midpoint on the connector's DOFs: the two ends
//     move alike there, where the link crosses the faying surfaces (the
//     nugget), on the tied translations, and turn alike on the tied
//     rotations. For a link on all six degrees of freedom this is a rigid
//     link; for a link on translations only it is a ball joint at the
//     nugget, so that a row of such welds is a hinge about the row
//     whichever way each stack is ordered;
//   - a ring coupled to a centre node in the rigid form (each ring node i
//     follows the centre's rigid motion, u_i = u_c + w_c × r_i on the tied
//     DOFs) is one tie per ring node, between the ring's part and the
//     centre's NodeBody, at the ring node, on the tied DOFs;
//   - a centre that follows the weighted mean of its ring (the averaging
//     form) is one tie between the ring's part and the centre's NodeBody at
//     the centre, on the tied DOFs: exact for a rigid part when the ring's
//     weighted centroid is the centre; the centre's rotations are held only
//     when rotations are among the tied DOFs;
//   - a rigid shank, or a beam shank (which resists every relative motion,
//     elastically), between two centres is a tie on all six degrees of
//     freedom; a support to ground is a tie between the GroundBody and the
//     supported node on the supported DOFs.
type Tie struct {
	A, B  int    // indices into Constraints.Bodies
	Point r3.Vec // where the bodies are compared, mm
	DOFs  DOFs
	Joint string // the connector that makes the tie
}

// Constraints is the kinematic description of an assembly: its bodies
// and the ties between them. Build one with NewConstraints and add
// connectors with AddConnector (or bodies and ties directly).
type Constraints struct {
	Bodies []Body
	Ties   []Tie
	part   map[int64]int
	ground int
}

// NewConstraints returns a description with one PartBody per part id,
// in the order given (duplicates are added once).
func NewConstraints(parts []int64) *Constraints {
	k := &Constraints{part: make(map[int64]int, len(parts)), ground: -1}
	for _, p := range parts {
		k.Part(p)
	}
	return k
}

// Part returns the body of part id, adding it when it is new.
func (k *Constraints) Part(id int64) int {
	if b, ok := k.part[id]; ok {
		return b
	}
	k.Bodies = append(k.Bodies, Body{Kind: PartBody, Part: id})
	k.part[id] = len(k.Bodies) - 1
	return len(k.Bodies) - 1
}

// Ground returns the ground body, adding it on first use.
func (k *Constraints) Ground() int {
	if k.ground < 0 {
		k.Bodies = append(k.Bodies, Body{Kind: GroundBody})
		k.ground = len(k.Bodies) - 1
	}
	return k.ground
}

// AddNode adds the NodeBody of a node that connector joint creates at p
// (id 0 when ids are not handed out yet) and returns it.
func (k *Constraints) AddNode(id int64, p r3.Vec, joint string) int {
	k.Bodies = append(k.Bodies, Body{Kind: NodeBody, Node: id, Point: p, Joint: joint})
	return len(k.Bodies) - 1
}

// Tie adds a tie between bodies a and b at p on d; a tie on no degree
// of freedom, or of a body to itself, is left out.
func (k *Constraints) Tie(a, b int, p r3.Vec, d DOFs, joint string) {
	if d&AllDOFs == 0 || a == b {
		return
	}
	k.Ties = append(k.Ties, Tie{A: a, B: b, Point: p, DOFs: d & AllDOFs, Joint: joint})
}

// AddConnector adds the ties of a connector. Connectors not built add
// nothing; spot welds add the ties of AddSpotWeld, bolts those of
// AddBolt.
func (k *Constraints) AddConnector(m *geom.Mesh, c *Connector) {
	if c.Status == NotBuilt {
		return
	}
	switch c.Joint.Kind {
	case Spot:
		k.AddSpotWeld(m, c)
	case Bolt:
		k.AddBolt(m, c)
	}
}

// AddBolt adds the ties of a bolt connector, as Tie describes: a
// NodeBody per centre (one per sheet); in the rigid coupling one tie per
// ring node between the sheet's part and the centre, at the node, on
// the bolt's DOFs (one tie on all six at the centre when those hold
// every translation and the ring spans a plane: the same constraint); in the averaging form one tie at the centre on the
// same DOFs; the shank between consecutive centres on all six (a rigid
// link, or a beam, which resists every relative motion; with offset
// links the chain centre, offset link, rigid shank, offset link, centre
// is rigid the same way; a beam shank joins the centres directly); a support of the grounded centre on the
// supported DOFs.
func (k *Constraints) AddBolt(m *geom.Mesh, c *Connector) {
	if c.Bolt == nil || len(c.Ends) != len(c.Stack.Sheets) {
		return
	}
	centre := make([]int, len(c.Ends))
	for i, e := range c.Ends {
		part := k.Part(c.Stack.Sheets[i].Part)
		var id int64
		if i < len(c.EndIDs) {
			id = c.EndIDs[i]
		}
		centre[i] = k.AddNode(id, e.Point, c.Joint.ID)
		if c.Bolt.Coupling == AveragingCoupling {
			k.Tie(part, centre[i], e.Point, c.DOFs, c.Joint.ID)
			continue
		}
		if c.DOFs&Translations == Translations && SpanPlane(m, e.Nodes) {
			// Translations tied at three points not on a line hold the
			// centre rigidly to the part: the same as one tie on all six.
			k.Tie(part, centre[i], e.Point, AllDOFs, c.Joint.ID)
			continue
		}
		for _, n := range e.Nodes {
			k.Tie(part, centre[i], m.Coords[n], c.DOFs, c.Joint.ID)
		}
	}
	for i := 0; i+1 < len(centre); i++ {
		mid := r3.Scale(0.5, r3.Add(c.Ends[i].Point, c.Ends[i+1].Point))
		k.Tie(centre[i], centre[i+1], mid, AllDOFs, c.Joint.ID)
	}
	if s := c.Bolt.Support; s >= 0 && s < len(centre) {
		k.Tie(k.Ground(), centre[s], c.Ends[s].Point, c.Bolt.SupportDOFs, c.Joint.ID)
	}
}

// AddSpotWeld adds the ties of a spot-weld connector, as Tie describes:
// ends that are mesh nodes are their parts; other ends are NodeBodies
// tied to their part (on all six degrees of freedom when their nodes
// span a plane, else on translations); each link ties its ends at its
// midpoint on c.DOFs.
func (k *Constraints) AddSpotWeld(m *geom.Mesh, c *Connector) {
	body := make([]int, len(c.Ends))
	for i, e := range c.Ends {
		if i >= len(c.Stack.Sheets) {
			return
		}
		part := k.Part(c.Stack.Sheets[i].Part)
		if e.NodeIndex >= 0 {
			body[i] = part
			continue
		}
		var id int64
		if i < len(c.EndIDs) {
			id = c.EndIDs[i]
		}
		body[i] = k.AddNode(id, e.Point, c.Joint.ID)
		d := Translations
		if SpanPlane(m, e.Nodes) {
			d = AllDOFs
		}
		k.Tie(part, body[i], e.Point, d, c.Joint.ID)
	}
	for _, l := range c.Links {
		if l.From < 0 || l.To < 0 || l.From >= len(body) || l.To >= len(body) {
			continue
		}
		mid := r3.Scale(0.5, r3.Add(c.Ends[l.From].Point, c.Ends[l.To].Point))
		k.Tie(body[l.From], body[l.To], mid, c.DOFs, c.Joint.ID)
	}
}

// CollinearTolerance is the relative distance below which nodes count
// as lying on one line: a node's distance from the line through the
// first node and the node farthest from it, over that farthest distance
// (our choice: far below the shape of any usable element, far above the
// rounding of coordinates).
const CollinearTolerance = 1e-6

// SpanPlane reports whether three of nodes (indices into m) lie on no
// common line, within CollinearTolerance.
func SpanPlane(m *geom.Mesh, nodes []int32) bool {
	if len(nodes) < 3 {
		return false
	}
	a := m.Coords[nodes[0]]
	// b: the node farthest from a; then the node farthest from line ab.
	b, db := a, 0.0
	for _, n := range nodes[1:] {
		if d := r3.Norm(r3.Sub(m.Coords[n], a)); d > db {
			b, db = m.Coords[n], d
		}
	}
	if !(db > 0) {
		return false
	}
	u := r3.Scale(1/db, r3.Sub(b, a))
	far := 0.0
	for _, n := range nodes {
		far = math.Max(far, r3.Norm(r3.Cross(u, r3.Sub(m.Coords[n], a))))
	}
	return far > CollinearTolerance*db
}

// Kinematics counts what the kinematic checks found in an assembly.
type Kinematics struct {
	// Groups is the number of connected groups of parts (ties join them;
	// a part tied to nothing is a group of its own).
	Groups int
	// Grounded is the number of groups tied to ground.
	Grounded int
	// RigidBodyModes is the number of independent free motions of the
	// whole assembly: 6 for each group not tied to ground, plus every
	// free motion within a group (Mechanisms and Unrestrained).
	RigidBodyModes int
	// Mechanisms counts the free motions of parts relative to each other.
	Mechanisms int
	// Unrestrained counts the free motions of nodes that connectors
	// create, with every part held.
	Unrestrained int
}
