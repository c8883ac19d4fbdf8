package inspect

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Options set what Inspect looks at. Start from
// DefaultOptions: zero values are taken as given.
type Options struct {
	// Deep adds free-edge loops and element-quality findings per part.
	Deep bool
	// WarpLimit is the warp angle, degrees, above which Deep lists a quad
	// as warped. Default 10 degrees: a limit commonly used for shell
	// meshes of sheet metal (common practice; limits from 5 to 15 degrees
	// are seen).
	WarpLimit float64
	// BoxMargin, mm, grows every part's bounding box before joints are
	// tested against it, so a weld lying between two flat sheets (whose
	// boxes have no thickness) still counts as inside. Default 5 mm, our
	// own choice: a few sheet thicknesses.
	BoxMargin float64
	// MaxListed caps the elements listed per part.
	MaxListed int
}

// DefaultOptions returns the documented defaults.
func DefaultOptions() Options {
	return Options{WarpLimit: 10, BoxMargin: 5, MaxListed: 10}
}

// Validate checks that the limits are finite and not negative, the warp
// limit at most 180 degrees (the largest angle between two normals) and
// the box margin at most joints.MaxReach.
func (o Options) Validate() error {
	if math.IsNaN(o.WarpLimit) || math.IsInf(o.WarpLimit, 0) || o.WarpLimit < 0 || o.WarpLimit > 180 {
		return fmt.Errorf("warp-limit %g: want a finite angle from 0 to 180 degrees", o.WarpLimit)
	}
	if math.IsNaN(o.BoxMargin) || math.IsInf(o.BoxMargin, 0) || o.BoxMargin < 0 || o.BoxMargin > joints.MaxReach {
		return fmt.Errorf("box-margin %g: want a finite length from 0 to %g mm", o.BoxMargin, float64(joints.MaxReach))
	}
	if o.MaxListed < 0 {
		return fmt.Errorf("max-listed %d: want 0 or more", o.MaxListed)
	}
	return nil
}

// Inspection is what `joinery inspect` reports about a model and its joints.
type Inspection struct {
	Files        []FileSummary `json:"files"`
	Nodes        int           `json:"nodes"`
	Elements     int           `json:"elements"`
	Triangles    int           `json:"triangles"`
	Quads        int           `json:"quads"`
	SecondOrder  int           `json:"second_order"` // of the elements, Tri6, Quad8 and Quad9
	Skipped      []CellCount   `json:"skipped_cells"`
	Parts        []PartSummary `json:"parts"`
	Renumbered   []Shift       `json:"renumbered,omitempty"`
	Joints       JointSummary  `json:"joints"`
	Deep         bool          `json:"deep"`
	WarpLimit    *float64      `json:"warp_limit_deg,omitempty"` // set with Deep
	BoxMarginMM  float64       `json:"box_margin_mm"`
	MemoryBytes  int           `json:"mesh_bytes"`
	UnusedParts  []int64       `json:"unused_table_parts,omitempty"`
	MissingThick []int64       `json:"parts_without_thickness,omitempty"`
	// Warnings are the run-level warnings a build of the same inputs
	// reports about the model (thickness-mismatch).
	Warnings []Warning `json:"warnings,omitempty"`
}

// CellCount is the number of cells of one VTK cell type a reader skipped.
type CellCount struct {
	VTKType uint8  `json:"vtk_type"`
	Kind    string `json:"kind"` // the type's name in words, e.g. "polygon"
	Cells   int    `json:"cells"`
}

// cellCounts lists s by increasing VTK type.
func cellCounts(s geom.SkippedCells) []CellCount {
	out := make([]CellCount, 0, len(s))
	for _, t := range s.Types() {
		out = append(out, CellCount{VTKType: t, Kind: geom.VTKCellName(t), Cells: s[t]})
	}
	return out
}

// Warning is a warning about the model, with its finding code.
type Warning struct {
	Code    string  `json:"code"`
	Parts   []int64 `json:"parts"`
	Message string  `json:"message"`
}

// FileSummary describes one mesh file.
type FileSummary struct {
	File     string      `json:"file"`
	Nodes    int         `json:"nodes"`
	Elements int         `json:"elements"`
	Skipped  []CellCount `json:"skipped_cells,omitempty"`
}

// Shift is a renumbering applied to one file's ids.
type Shift struct {
	File       string `json:"file"`
	NodeOffset int64  `json:"node_offset"`
	ElemOffset int64  `json:"element_offset"`
}

// PartSummary describes one part.
type PartSummary struct {
	ID        int64   `json:"id"`
	Name      string  `json:"name,omitempty"`
	Material  string  `json:"material,omitempty"`
	Surface   string  `json:"surface"`
	Thickness float64 `json:"thickness"` // the part's own (parts table), 0 when unknown
	// ThicknessMin and ThicknessMax are the range of the thicknesses a
	// build uses on the part's elements: an element's own where its
	// file gives one, else the part's.
	ThicknessMin float64     `json:"thickness_min"`
	ThicknessMax float64     `json:"thickness_max"`
	Elements     int         `json:"elements"`
	Triangles    int         `json:"triangles"`
	Quads        int         `json:"quads"`
	Area         float64     `json:"area_mm2"`
	BoxMin       *[3]float64 `json:"box_min"` // null for a part without elements
	BoxMax       *[3]float64 `json:"box_max"`
	Deep         *PartDeep   `json:"deep,omitempty"`
}

// PartDeep is the deeper look at one part.
type PartDeep struct {
	Loops      []LoopSummary `json:"free_edge_loops"`
	Warped     int           `json:"warped"`
	Degenerate int           `json:"degenerate"`
	WorstWarp  float64       `json:"worst_warp_deg"`
	WorstElem  int64         `json:"worst_warp_element,omitempty"`
	MaxAspect  float64       `json:"worst_aspect"`
	MinEdge    float64       `json:"shortest_edge_mm"`
	Listed     []ElemQuality `json:"listed,omitempty"`
	// Flipped counts the elements whose normals are opposite to their
	// neighbours' across shared edges (geom.OrientNormals, as joinery
	// offsets reports them: normals-flipped); FlipElems lists the first
	// MaxListed of their ids; Unorientable counts the shared edges that
	// disagree whichever way the part is turned.
	Flipped      int     `json:"normals_flipped"`
	FlipElems    []int64 `json:"flip_elements,omitempty"`
	Unorientable int     `json:"unorientable_edges,omitempty"`
}

// LoopSummary describes one free-edge loop.
type LoopSummary struct {
	Kind   string  `json:"kind"` // "outline", "hole" or "open"
	Nodes  int     `json:"nodes"`
	Length float64 `json:"length_mm"`
}

// ElemQuality lists one warped or degenerate element.
type ElemQuality struct {
	Element int64   `json:"element"`
	Problem string  `json:"problem"` // "warped" or "degenerate"
	Warp    float64 `json:"warp_deg"`
	Aspect  float64 `json:"aspect"` // longest over shortest edge; -1 for a zero-length edge (infinite)
	MinEdge float64 `json:"shortest_edge_mm"`
}

// JointSummary counts joints.
type JointSummary struct {
	Total   int            `json:"total"`
	ByKind  map[string]int `json:"by_kind"`
	Outside []string       `json:"outside_every_part_box"`
}

// ModelInfo is what Inspect needs to know of how the model was loaded.
type ModelInfo struct {
	Mesh        *geom.Mesh
	Renumbered  []geom.Renumbering
	UnusedParts []int64
	// PartsTable is set when the parts' thicknesses come from a parts
	// table, so that element thicknesses that disagree are reported.
	PartsTable bool
}

// Run summarises a model and its joints.
func Run(mi ModelInfo, js []joints.Joint, opt Options) *Inspection {
	m := mi.Mesh
	in := &Inspection{
		Nodes:       m.NumNodes(),
		Elements:    m.NumElems(),
		Deep:        opt.Deep,
		BoxMarginMM: opt.BoxMargin,
		MemoryBytes: m.Bytes(),
		UnusedParts: mi.UnusedParts,
	}
	if opt.Deep {
		w := opt.WarpLimit
		in.WarpLimit = &w
	}
	var skipped geom.SkippedCells
	for i, s := range m.Sources {
		nEnd, eEnd := m.NumNodes(), m.NumElems()
		if i+1 < len(m.Sources) {
			nEnd, eEnd = m.Sources[i+1].NodeStart, m.Sources[i+1].ElemStart
		}
		fs := FileSummary{File: s.File, Nodes: nEnd - s.NodeStart, Elements: eEnd - s.ElemStart}
		if len(s.Skipped) > 0 {
			fs.Skipped = cellCounts(s.Skipped)
		}
		in.Files = append(in.Files, fs)
		skipped = skipped.Add(s.Skipped)
	}
	in.Skipped = cellCounts(skipped)
	for _, r := range mi.Renumbered {
		in.Renumbered = append(in.Renumbered, Shift{File: r.File, NodeOffset: r.NodeOffset, ElemOffset: r.ElemOffset})
	}
	stats := m.PartStats()
	for i, p := range m.Parts {
		s := stats[i]
		in.Triangles += s.Tris
		in.Quads += s.Quads
		in.SecondOrder += s.SecondOrder
		ps := PartSummary{
			ID: p.ID, Name: p.Name, Material: p.Material, Surface: p.Surface.String(), Thickness: p.Thickness,
			ThicknessMin: s.ThicknessMin, ThicknessMax: s.ThicknessMax,
			Elements: s.Elems, Triangles: s.Tris, Quads: s.Quads, Area: s.Area,
		}
		if s.Elems > 0 {
			ps.BoxMin = &[3]float64{s.Box.Min.X, s.Box.Min.Y, s.Box.Min.Z}
			ps.BoxMax = &[3]float64{s.Box.Max.X, s.Box.Max.Y, s.Box.Max.Z}
		}
		in.Parts = append(in.Parts, ps)
	}
	in.MissingThick = m.PartsWithoutThickness()
	if mi.PartsTable {
		for _, f := range joints.ThicknessMismatches(m) {
			in.Warnings = append(in.Warnings, Warning{Code: f.Code, Parts: f.Parts, Message: f.Message})
		}
	}
	if opt.Deep {
		deepLook(m, in, opt)
	}
	slices.SortFunc(in.Parts, func(a, b PartSummary) int { return cmp.Compare(a.ID, b.ID) })

	in.Joints.ByKind = map[string]int{}
	in.Joints.Outside = []string{}
	for _, j := range js {
		in.Joints.Total++
		in.Joints.ByKind[j.Kind.String()]++
		inside := false
		for i := range m.Parts {
			if stats[i].Elems > 0 && geom.BoxContains(stats[i].Box, j.Point, opt.BoxMargin) {
				inside = true
				break
			}
		}
		if !inside {
			in.Joints.Outside = append(in.Joints.Outside, j.ID)
		}
	}
	slices.SortFunc(in.Joints.Outside, joints.CompareIDs)
	return in
}

func deepLook(m *geom.Mesh, in *Inspection, opt Options) {
	adj := geom.NodeElements(m)
	loops := geom.FreeEdgeLoops(m, geom.FreeEdges(m, adj))
	orient := geom.OrientNormals(m, adj)
	deep := make([]PartDeep, len(m.Parts))
	for i := range deep {
		deep[i].MinEdge = math.Inf(1)
	}
	for _, lp := range loops {
		kind := "hole"
		switch {
		case !lp.Closed:
			kind = "open"
		case lp.Outline:
			kind = "outline"
		}
		deep[lp.Part].Loops = append(deep[lp.Part].Loops, LoopSummary{Kind: kind, Nodes: len(lp.Nodes), Length: lp.Length})
	}
	for e := range m.ElemIDs {
		d := &deep[m.ElemPart[e]]
		if orient.Flip[e] {
			d.Flipped++
			if len(d.FlipElems) < opt.MaxListed {
				d.FlipElems = append(d.FlipElems, m.ElemIDs[e])
			}
		}
		q := m.ElemQuality(e)
		if q.Warp > d.WorstWarp {
			d.WorstWarp, d.WorstElem = q.Warp, m.ElemIDs[e]
		}
		if !math.IsInf(q.Aspect, 1) {
			d.MaxAspect = math.Max(d.MaxAspect, q.Aspect)
		}
		d.MinEdge = math.Min(d.MinEdge, q.MinEdge)
		problem := ""
		switch {
		case q.Degenerate:
			d.Degenerate++
			problem = "degenerate"
		case q.Warp > opt.WarpLimit:
			d.Warped++
			problem = "warped"
		}
		if problem != "" && len(d.Listed) < opt.MaxListed {
			d.Listed = append(d.Listed, ElemQuality{Element: m.ElemIDs[e], Problem: problem, Warp: q.Warp, Aspect: finiteOr(q.Aspect, -1), MinEdge: q.MinEdge})
		}
	}
	for i := range in.Parts {
		d := deep[i]
		d.Unorientable = orient.Conflicts[i]
		slices.Sort(d.FlipElems)
		if math.IsInf(d.MinEdge, 1) {
			d.MinEdge = 0
		}
		slices.SortStableFunc(d.Loops, func(a, b LoopSummary) int {
			return cmp.Or(cmp.Compare(kindRank(a.Kind), kindRank(b.Kind)), cmp.Compare(b.Length, a.Length))
		})
		in.Parts[i].Deep = &d
	}
}

func kindRank(k string) int {
	switch k {
	case "outline":
		return 0
	case "hole":
		return 1
	}
	return 2
}

func finiteOr(v, alt float64) float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return alt
	}
	return v
}
