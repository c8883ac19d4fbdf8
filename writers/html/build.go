package html

import (
	"strings"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// ForBuild returns the page of a build: its header from the two
// documents, then the overview (with the model's outline, which may be
// nil), the findings table, the plots and the part pairs.
func ForBuild(rep *document.ReportDoc, conn *document.ConnectorsDoc, outline *Outline) *Page {
	p, an, outline := connectorsPage(rep, conn, outline)
	p.Sections = []Section{
		&Overview{Outline: outline},
		FindingsTable{},
		&BuildPlots{an: an},
		&PartPairs{an: an, outline: outline},
	}
	return p
}

// connectorsPage returns the header of a page about connectors (a
// build's or a check's), without sections, the analysis of its part
// pairs, and the outline (in mm, or nil) in the documents' unit.
func connectorsPage(rep *document.ReportDoc, conn *document.ConnectorsDoc, outline *Outline) (*Page, *buildAnalysis, *Outline) {
	_, mm := unitOf(conn.Units.Length)
	outline = outline.In(mm)
	p := &Page{
		Title:     "Joinery build report",
		Generator: rep.Generator,
		RunID:     rep.RunID,
		Caution:   rep.Caution,
		Inputs:    rep.Inputs,
		Settings:  BuildSettings(conn),
		Counts:    CountConnectors(conn),
		Marks:     MarksOf(conn, rep.Findings),
		PartNames: PartNames(outline),
		Findings:  rep.Findings,
		Unit:      rep.Units.Length,
	}
	return p, analyse(conn, rep.Findings), outline
}

// BuildSettings lists the options recorded in a connectors document.
func BuildSettings(conn *document.ConnectorsDoc) []Setting {
	o := conn.Options
	u, _ := unitOf(conn.Units.Length)
	gap := joints.MM(joints.DefaultGapAllowanceFactor) + " (t1+t2)/2 of each pair"
	if o.GapAllowance != nil {
		gap = joints.MM(*o.GapAllowance) + " " + u
	}
	s := []Setting{
		{"reach", joints.MM(o.Reach) + " " + u, "sheets farther from a joint are not considered"},
		{"gap allowance", gap, "deviation of a gap from contact before it is reported"},
		{"angle limit", joints.MM(o.AngleLimit) + "°", "sheet normals farther from the stack axis are left out"},
		{"lateral factor", joints.MM(o.LateralFactor), "times the nugget radius: a sheet's distance from the weld axis"},
		{"edge factor", joints.MM(o.EdgeFactor), "nugget diameters: least distance from a weld centre to a free edge"},
		{"node factor", joints.MM(o.NodeFactor), "times the nugget radius: node-pair ends apart"},
		{"attach", o.Attach, ""},
	}
	if len(o.GroupAttach) > 0 {
		var gs []string
		for _, g := range sortedKeys(o.GroupAttach) {
			gs = append(gs, g+": "+o.GroupAttach[g])
		}
		s = append(s, Setting{"group attach", strings.Join(gs, ", "), ""})
	}
	s = append(s,
		Setting{"spot-weld degrees of freedom", strings.Join(o.SpotDOFs, " "), ""},
		Setting{"nugget rule", o.NuggetRule, "where the list gives no diameter"},
	)
	if b := o.Bolts; b != nil {
		s = append(s,
			Setting{"bolt degrees of freedom", strings.Join(b.DOFs, " "), "coupled at each ring and held by a support"},
			Setting{"bolt coupling", b.Coupling, "rigid: the ring follows the centre; averaging: the centre follows the ring"},
			Setting{"shank", b.Shank, ""},
			Setting{"bolt ring", b.Ring, "nodes of a meshed hole the centre couples"},
			Setting{"hole tolerance", joints.MM(b.HoleTolerance) + " mm", "measured hole against declared"},
		)
	}
	s = append(s,
		Setting{"new ids", itoa64(conn.IDs.First) + " to " + itoa64(conn.IDs.Next-1), "nodes and elements"},
	)
	return s
}

// CountConnectors counts a connectors document's joints by kind and
// state; every known state appears for every kind, with 0 where none.
func CountConnectors(conn *document.ConnectorsDoc) []Count {
	n := map[[2]string]int{}
	kinds := map[string]bool{}
	var states []string
	for _, c := range conn.Connectors {
		n[[2]string{c.Kind, c.State}]++
		kinds[c.Kind] = true
		states = append(states, c.State)
	}
	var out []Count
	for _, k := range sortedKeys(kinds) {
		for _, s := range orderStates(states) {
			out = append(out, Count{Kind: k, State: s, N: n[[2]string{k, s}]})
		}
	}
	return out
}

// MarksOf returns the marks of a connectors document's joints, in its
// order, with the number of findings about each.
func MarksOf(conn *document.ConnectorsDoc, findings []document.FindingDoc) []Mark {
	per := map[string]int{}
	for _, f := range findings {
		if f.Joint != nil {
			per[*f.Joint]++
		}
	}
	out := make([]Mark, len(conn.Connectors))
	for i, c := range conn.Connectors {
		out[i] = Mark{Joint: c.ID, Kind: c.Kind, State: c.State, Point: c.Point, Findings: per[c.ID]}
	}
	return out
}

// PartNames returns the names of the outline's parts (nil for none).
func PartNames(o *Outline) map[int64]string {
	if o == nil {
		return nil
	}
	m := make(map[int64]string, len(o.Parts))
	for _, p := range o.Parts {
		m[p.ID] = p.Name
	}
	return m
}
