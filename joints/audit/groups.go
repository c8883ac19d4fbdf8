package audit

import (
	"cmp"
	"fmt"
	"slices"

	"gonum.org/v1/gonum/graph/simple"
	"gonum.org/v1/gonum/graph/topo"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Group is one connected group of the bodies of a kinematic description.
type Group struct {
	Bodies []int   // body indices, increasing
	Parts  []int64 // part ids of its part bodies, increasing
	Ground bool    // it holds the ground body
	Ties   []int   // indices of the ties within it, increasing
}

// Groups returns the connected groups of k's bodies, ties joining them
// (connected components by gonum's graph/topo over a graph/simple
// undirected graph). Their order is ours, as the library's is not
// stable: groups with the most parts first, then by smallest part id;
// groups without parts (nodes tied to no part) last, by smallest body.
func Groups(k *joints.Constraints) []Group {
	// Bodies tied on all six degrees of freedom are one vertex of the
	// graph (a connector's end nodes and their parts, mostly), so that
	// the graph stays as small as the assembly's parts.
	uf := newUnionFind(len(k.Bodies))
	for _, t := range k.Ties {
		if t.DOFs&joints.AllDOFs == joints.AllDOFs {
			uf.union(t.A, t.B)
		}
	}
	g := simple.NewUndirectedGraph()
	for i := range k.Bodies {
		if uf.find(i) == i {
			g.AddNode(simple.Node(i))
		}
	}
	for _, t := range k.Ties {
		a, b := uf.find(t.A), uf.find(t.B)
		if a != b && !g.HasEdgeBetween(int64(a), int64(b)) {
			g.SetEdge(g.NewEdge(simple.Node(a), simple.Node(b)))
		}
	}
	comps := topo.ConnectedComponents(g)
	compOf := make(map[int]int, len(k.Bodies))
	for ci, c := range comps {
		for _, n := range c {
			compOf[int(n.ID())] = ci
		}
	}
	groupOf := make([]int, len(k.Bodies))
	groups := make([]Group, len(comps))
	for b := range k.Bodies {
		ci := compOf[uf.find(b)]
		groupOf[b] = ci
		gr := &groups[ci]
		gr.Bodies = append(gr.Bodies, b) // increasing: b counts up
		switch body := k.Bodies[b]; body.Kind {
		case joints.PartBody:
			gr.Parts = append(gr.Parts, body.Part)
		case joints.GroundBody:
			gr.Ground = true
		}
	}
	for ci := range groups {
		slices.Sort(groups[ci].Parts)
	}
	for ti, t := range k.Ties {
		gr := &groups[groupOf[t.A]]
		gr.Ties = append(gr.Ties, ti)
	}
	slices.SortFunc(groups, func(a, b Group) int {
		if c := cmp.Compare(len(b.Parts), len(a.Parts)); c != 0 {
			return c
		}
		if len(a.Parts) > 0 {
			return cmp.Compare(a.Parts[0], b.Parts[0])
		}
		return cmp.Compare(a.Bodies[0], b.Bodies[0])
	})
	return groups
}

// freeParts reports every group of parts but the largest (groups[0]):
// parts joined to it by no connector, free to move as a whole. A group
// tied to ground is held and not reported. The finding lists the
// group's parts, the connectors within it, and the centre of the group's
// bounding box.
func freeParts(m *geom.Mesh, k *joints.Constraints, groups []Group) []joints.Finding {
	if len(groups) < 2 || len(groups[0].Parts) == 0 {
		return nil
	}
	var loose []*Group
	for i := 1; i < len(groups); i++ {
		if g := &groups[i]; len(g.Parts) > 0 && !g.Ground {
			loose = append(loose, g)
		}
	}
	if len(loose) == 0 {
		return nil
	}
	boxes := partBoxes(m, loose)
	main := groups[0]
	mainText := fmt.Sprintf("the largest group (%s)", partsWord(main.Parts))
	if len(main.Parts) > 6 {
		mainText = fmt.Sprintf("the largest group (%d parts: %d, %d, %d, ...)", len(main.Parts), main.Parts[0], main.Parts[1], main.Parts[2])
	}
	var fs []joints.Finding
	for _, g := range loose {
		var ids []string
		for _, ti := range g.Ties {
			ids = append(ids, k.Ties[ti].Joint)
		}
		ids = sortIDs(ids)
		f := joints.Finding{Severity: FreePartSeverity, Code: joints.CodeFreePart, Parts: g.Parts, Joints: ids}
		if len(ids) > 0 {
			f.Joint = ids[0]
		}
		box := geom.EmptyBox()
		for _, p := range g.Parts {
			if b, ok := boxes[p]; ok {
				box = r3.Box{Min: minVec(box.Min, b.Min), Max: maxVec(box.Max, b.Max)}
			}
		}
		if box.Min.X <= box.Max.X {
			f.Point, f.HasPoint = roundVec(r3.Scale(0.5, r3.Add(box.Min, box.Max)), 1e-6), true
		}
		if len(g.Parts) == 1 {
			f.Message = fmt.Sprintf("part %d is joined by no connector to %s: it is free to move as a whole (intended if the model loads it on its own)",
				g.Parts[0], mainText)
		} else {
			f.Message = fmt.Sprintf("parts %s are joined to each other (%d connectors) but by no connector to %s: the group is free to move as a whole (intended if the model loads it on its own)",
				partList(g.Parts), len(ids), mainText)
		}
		fs = append(fs, f)
	}
	slices.SortFunc(fs, func(a, b joints.Finding) int { return slices.Compare(a.Parts, b.Parts) })
	return fs
}

// partBoxes returns the bounding boxes of the parts of groups, in one
// pass over the elements.
func partBoxes(m *geom.Mesh, groups []*Group) map[int64]r3.Box {
	want := make([]bool, len(m.Parts))
	for _, g := range groups {
		for _, p := range g.Parts {
			if pi, ok := m.PartIndex(p); ok {
				want[pi] = true
			}
		}
	}
	boxes := map[int64]r3.Box{}
	for e := range m.NumElems() {
		pi := m.ElemPart[e]
		if !want[pi] {
			continue
		}
		id := m.Parts[pi].ID
		b, ok := boxes[id]
		if !ok {
			b = geom.EmptyBox()
		}
		eb := m.ElemBox(e)
		boxes[id] = r3.Box{Min: minVec(b.Min, eb.Min), Max: maxVec(b.Max, eb.Max)}
	}
	return boxes
}

func minVec(a, b r3.Vec) r3.Vec {
	return r3.Vec{X: min(a.X, b.X), Y: min(a.Y, b.Y), Z: min(a.Z, b.Z)}
}

func maxVec(a, b r3.Vec) r3.Vec {
	return r3.Vec{X: max(a.X, b.X), Y: max(a.Y, b.Y), Z: max(a.Z, b.Z)}
}
