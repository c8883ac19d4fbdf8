package pipeline

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/audit"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// CheckSettings are a check's settings, read from a job and the command
// line, and checked.
type CheckSettings struct {
	// Options: the reach (for the sheets of extra joint points), the gap
	// allowance and the node factor (for node pairs), the nugget rule and
	// the degrees of freedom of node-pair links that give none.
	Options joints.BuildOptions
	// Connectors are the files to check: connectors.json documents or
	// node-pair lists (.csv).
	Connectors []string
	FailOn     joints.Severity
	Fail       bool // false for --fail-on never
	Out        string
}

// CheckSettings reads and checks the job's settings for a check of the
// given connector files, written beside the build's set (CheckSuffix
// appended to the job's out unless OutGiven). Errors are usage errors.
func (job *Job) CheckSettings(connectors []string) (CheckSettings, error) {
	b, err := job.BuildSettings()
	if err != nil {
		return CheckSettings{}, err
	}
	return CheckSettings{Options: b.Options, Connectors: connectors, FailOn: b.FailOn, Fail: b.Fail, Out: job.besideOut(b.Out, CheckSuffix)}, nil
}

// within reports whether path is dir or lies inside it (as written,
// made absolute; links are not followed).
func within(path, dir string) bool {
	p, err1 := filepath.Abs(path)
	d, err2 := filepath.Abs(dir)
	if err1 != nil || err2 != nil {
		return false
	}
	rel, err := filepath.Rel(d, p)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
}

// CheckFiles are the names of the files a check writes, in order.
func CheckFiles() []string { return []string{"report.json", "report.txt", PageFile} }

// Check runs a whole check: load the job's model and joint lists (their
// spot welds are extra points to check against, not built), read the
// connectors, audit them, and write the report set into s.Out.
func Check(ctx context.Context, job *Job, s CheckSettings, env Env) (*Outcome, error) {
	if len(s.Connectors) == 0 {
		return nil, UsageError(errors.New("no connectors given: name a connectors.json or a node-pair list (.csv) with --connectors"))
	}
	for _, c := range s.Connectors {
		if within(c, s.Out) {
			return nil, UsageError(fmt.Errorf("connectors %s lie in the output directory %s, which the check's report set would replace: write the check elsewhere (--out; by default it goes beside the build's set, to the job's out with %s appended)", c, s.Out, CheckSuffix))
		}
	}
	out, err := OpenOutput(s.Out)
	if err != nil {
		return nil, err
	}
	defer out.Close()
	// The connector files need no mesh to be read: read them while the
	// mesh is.
	type parsed struct {
		files []connectorFile
		err   error
	}
	ch := make(chan parsed, 1)
	go func() {
		files, err := parseConnectorFiles(s.Connectors)
		ch <- parsed{files, err}
	}()
	in, err := LoadForSet(ctx, job, env)
	got := <-ch
	if err != nil {
		return nil, err
	}
	if got.err != nil {
		return nil, got.err
	}
	for _, cf := range got.files {
		in.Connectors = append(in.Connectors, cf.path)
		if in.sums != nil {
			in.sums.writer(cf.path).Write(cf.data)
		}
	}
	m := in.Model.Mesh
	if missing := in.Model.MissingThickness(); len(missing) > 0 {
		return nil, geom.FileError(in.Job.Parts, "parts without a thickness: %v (give them one in the parts table)", missing)
	}
	page := startPage(m)
	o := s.Options.Defaults(joints.MaxThickness(m))
	prog := env.progress()
	prog.Start("reading the connectors", 0)
	unit := in.Unit.String()
	conns, err := resolveConnectors(m, got.files, o, &unit, env)
	prog.Done()
	if err != nil {
		return nil, err
	}
	prog.Start("measuring edge distances", 0)
	edgeClose(m, conns, &o)
	prog.Done()
	// The run's own findings first, as a build gives them (units-suspect,
	// thickness-mismatch, cells-skipped), then the connectors'.
	res := &joints.Result{Connectors: conns, Options: o, Findings: in.ModelFindings()}
	for _, c := range conns {
		res.Findings = append(res.Findings, c.Findings...)
	}
	rep, err := audit.Run(ctx, m, conns, in.Joints, o, env.progress())
	if err != nil {
		return nil, err
	}
	res.Findings = append(res.Findings, rep.Findings...)
	res.Kinematics = &rep.Kinematics
	info, err := in.RunInfo(env.Generator, res, RunSettings{Command: "check"})
	if err != nil {
		return nil, err
	}
	for _, p := range in.Connectors {
		info.Connectors = append(info.Connectors, job.RecordedPath(p))
	}
	doc := document.NewReport(res, info)
	doc.Command = "check"
	err = writeSet(env.progress(), out, writers.Set{Job: "check", Generator: env.Generator, RunID: info.RunID}, []writers.File{
		{Name: "report.json", Render: func(w io.Writer) error { return document.EncodeReport(w, doc) }},
		{Name: "report.txt", Render: func(w io.Writer) error { return writers.WriteReportText(w, doc) }},
		page.file(func(o *html.Outline) *html.Page {
			return html.ForCheck(doc, document.NewConnectors(m, res, info), o)
		}),
	})
	if err != nil {
		return nil, err
	}
	return &Outcome{Out: s.Out, Files: CheckFiles(), RunID: info.RunID, Report: doc, Result: res, Reached: s.Fail && res.Reached(s.FailOn)}, nil
}

// edgeClose judges the edge distance of the spot welds read (conns, the
// built ones) as build judges those it makes: each sheet's distance to
// its part's free edge is measured on the mesh (a document's recorded
// edge distances are not trusted: the mesh may have changed), and a
// weld centre closer than the edge limit gets build's edge-close
// warning; a weld so found that was built is flagged.
func edgeClose(m *geom.Mesh, conns []joints.Connector, o *joints.BuildOptions) {
	var pts []r3.Vec
	margin := 0.0
	for i := range conns {
		if c := &conns[i]; weldToJudge(c) {
			pts = append(pts, c.Joint.Point)
			margin = math.Max(margin, spot.EdgeReach(c, o))
		}
	}
	if len(pts) == 0 {
		return
	}
	x := geom.NewIndexNear(m, pts, 1.01*margin, false)
	// Each connector's findings go to its own place: the result does not
	// depend on the goroutines' schedule.
	geom.ParallelEach(len(conns), func(i int) {
		c := &conns[i]
		if !weldToJudge(c) {
			return
		}
		fs := spot.EdgeFindings(x, c, o)
		c.Findings = append(c.Findings, fs...)
		if len(fs) > 0 && c.Status == joints.Built {
			c.Status = joints.Flagged
		}
	})
}

// weldToJudge reports whether c is a built spot weld with a stack.
func weldToJudge(c *joints.Connector) bool {
	return c.Joint.Kind == joints.Spot && c.Status != joints.NotBuilt && len(c.Stack.Sheets) >= 2
}

// connectorFile is a connector file read, not yet resolved against a
// mesh: a connectors.json document or a node-pair list, with its bytes
// (for the run id).
type connectorFile struct {
	path string
	data []byte
	doc  *document.ConnectorsDoc
	// unit is the document's units.length as written, before its
	// lengths were converted to mm.
	unit  string
	welds []audit.NodePairWeld
	warns []joints.InputWarning
}

// readConnectorBytes returns the bytes of a connector file and the name
// to read them as. A directory is a Joinery output set, and its
// connectors.json is read; a file in an output set is read from the set.
// Either way the set is checked whole and of one run first
// (writers.ReadSet), so that a mixed or damaged set is refused.
func readConnectorBytes(p string) ([]byte, string, error) {
	fi, err := os.Stat(p)
	if err != nil {
		return nil, p, geom.FileError(p, "connectors: %w", err)
	}
	dir, name := filepath.Dir(p), filepath.Base(p)
	if fi.IsDir() {
		dir, name = p, "connectors.json"
	} else if _, err := os.Stat(filepath.Join(dir, document.SetMarker)); err != nil {
		data, err := os.ReadFile(p)
		if err != nil {
			return nil, p, geom.FileError(p, "connectors: %w", err)
		}
		return data, p, nil
	}
	set, err := writers.ReadSetFile(dir, name)
	if err != nil {
		return nil, p, err
	}
	data, ok := set.Files[name]
	if !ok {
		if len(set.Marker.Sets) > 0 {
			return nil, p, geom.FileError(filepath.Join(dir, name), "not a file of the output set of run %s (%s wrote it): a sweep's connectors are in its variants' folders; name one of them, as %s", set.Marker.RunID, set.Marker.Job, filepath.Join(dir, set.Marker.Sets[0].Name))
		}
		return nil, p, geom.FileError(filepath.Join(dir, name), "not a file of the output set of run %s (%s wrote it)", set.Marker.RunID, set.Marker.Job)
	}
	return data, filepath.Join(dir, name), nil
}

// parseConnectorFiles reads connector files (see ReadConnectors) without
// the mesh, so that it can run while the mesh is read.
func parseConnectorFiles(paths []string) ([]connectorFile, error) {
	var out []connectorFile
	// The files read, by what was given for them: an output directory
	// and its connectors.json, or a file and a link to it, are one file.
	type read struct {
		given string
		info  os.FileInfo
	}
	var seen []read
	for _, p := range paths {
		data, name, err := readConnectorBytes(p)
		if err != nil {
			return nil, err
		}
		if fi, err := os.Stat(name); err == nil {
			for _, r := range seen {
				if os.SameFile(r.info, fi) {
					return nil, geom.FileError(p, "connector file given twice (as %s too)", r.given)
				}
			}
			seen = append(seen, read{p, fi})
		}
		cf := connectorFile{path: p, data: data}
		switch ext := strings.ToLower(filepath.Ext(name)); ext {
		case ".json":
			if cf.doc, err = document.ParseConnectors(data, name); err != nil {
				return nil, err
			}
			cf.unit = cf.doc.Units.Length
			if err = cf.doc.ToMillimetres(); err != nil {
				return nil, geom.FileError(name, "%w", err)
			}
		case ".csv":
			if cf.welds, cf.warns, err = audit.ReadNodePairs(bytes.NewReader(data), name); err != nil {
				return nil, err
			}
		default:
			return nil, geom.FileError(p, "unknown connector file type %q (want .json: a connectors.json, or .csv: a node-pair list; or an output directory)", ext)
		}
		out = append(out, cf)
	}
	return out, nil
}

// ReadConnectors reads connector files against mesh m: connectors.json
// documents (read back through the document types that write them) and
// node-pair lists (.csv, see audit.ReadNodePairs). Node-pair connectors
// of a document are rebuilt from their node pairs as those of a list
// are, keeping their weld point and nugget diameter, so that both forms
// give the same findings. Connector ids must be unique across files.
// The connectors come sorted by id.
func ReadConnectors(m *geom.Mesh, paths []string, o joints.BuildOptions, env Env) ([]joints.Connector, error) {
	files, err := parseConnectorFiles(paths)
	if err != nil {
		return nil, err
	}
	return resolveConnectors(m, files, o, nil, env)
}

// resolveConnectors turns connector files read into connectors of m.
// The ends of a document's connectors are compared with m as they are
// recorded, before node-pair ones are rebuilt (audit.EndsMoved: the
// end-moved errors join the connectors' findings); unit, when known, is
// the unit m was read in, for the findings' messages.
func resolveConnectors(m *geom.Mesh, files []connectorFile, o joints.BuildOptions, unit *string, env Env) ([]joints.Connector, error) {
	n := 0
	for fi := range files {
		if files[fi].doc != nil {
			n += len(files[fi].doc.Connectors)
		} else {
			n += len(files[fi].welds)
		}
	}
	conns := make([]joints.Connector, 0, n)
	// Where each id was first seen: its file and the index of the
	// connector there (lines are looked up only for a message).
	type place struct {
		file *connectorFile
		i    int
	}
	where := make(map[string]place, n)
	lineOf := func(pl place) int {
		if pl.file.doc != nil {
			return pl.file.doc.ConnectorLine(pl.i)
		}
		return pl.file.welds[pl.i].Line
	}
	add := func(c joints.Connector, pl place) error {
		if prev, dup := where[c.Joint.ID]; dup {
			return geom.LineError(pl.file.path, lineOf(pl), "connector id %q already used at %s:%d", geom.Excerpt(c.Joint.ID), prev.file.path, lineOf(prev))
		}
		where[c.Joint.ID] = pl
		conns = append(conns, c)
		return nil
	}
	for fi := range files {
		cf := &files[fi]
		for _, w := range cf.warns {
			env.note("warning: %s", w)
		}
		if cf.doc == nil {
			cs, err := audit.NodePairConnectors(m, cf.welds, o)
			if err != nil {
				return nil, err
			}
			for i, c := range cs {
				if err := add(c, place{cf, i}); err != nil {
					return nil, err
				}
			}
			continue
		}
		doc, p := cf.doc, cf.path
		cs, err := doc.ToConnectors(m, p)
		if err != nil {
			return nil, err
		}
		moved := endsMoved(m, doc, cs, movedCause(cf.unit, unit))
		var pairs []audit.NodePairWeld
		var pairIdx []int
		for i := range doc.Connectors {
			d := &doc.Connectors[i]
			links, ok := d.NodePairs()
			if !ok {
				continue
			}
			w := audit.NodePairWeld{ID: d.ID, DOFs: cs[i].DOFs, Point: cs[i].Joint.Point, HasPoint: true, Group: d.Group,
				File: p, Line: doc.ConnectorLine(i)}
			if d.Diameter != nil {
				w.Diameter = *d.Diameter
			}
			for _, l := range links {
				w.Links = append(w.Links, audit.NodePairLink{A: l[0], B: l[1], Line: w.Line})
			}
			pairs = append(pairs, w)
			pairIdx = append(pairIdx, i)
		}
		if len(pairs) > 0 {
			rebuilt, err := audit.NodePairConnectors(m, pairs, o)
			if err != nil {
				return nil, err
			}
			for k, i := range pairIdx {
				rebuilt[k].Joint.Parts, rebuilt[k].Joint.Tags = cs[i].Joint.Parts, cs[i].Joint.Tags
				cs[i] = rebuilt[k]
			}
		}
		for i := range cs {
			cs[i].Findings = append(cs[i].Findings, moved[i]...)
		}
		for i, c := range cs {
			if err := add(c, place{cf, i}); err != nil {
				return nil, err
			}
		}
	}
	slices.SortStableFunc(conns, func(a, b joints.Connector) int { return joints.CompareIDs(a.Joint.ID, b.Joint.ID) })
	return conns, nil
}

// endsMoved returns, per connector of cs (doc's, as ToConnectors
// resolved them against m), its end-moved findings (audit.EndsMoved),
// each connector on its own (in parallel, each into its place).
func endsMoved(m *geom.Mesh, doc *document.ConnectorsDoc, cs []joints.Connector, cause string) [][]joints.Finding {
	out := make([][]joints.Finding, len(cs))
	geom.ParallelEach(len(cs), func(i int) {
		c := &cs[i]
		if len(c.Ends) == 0 {
			return
		}
		var rings []audit.RecordedRing
		if c.Bolt != nil {
			rings = make([]audit.RecordedRing, len(doc.Connectors[i].Sheets))
			for k, s := range doc.Connectors[i].Sheets {
				rings[k].Kind = s.Ring
				for _, v := range s.NodePoints {
					rings[k].Points = append(rings[k].Points, r3.Vec{X: v[0], Y: v[1], Z: v[2]})
				}
			}
		}
		out[i] = audit.EndsMoved(m, c, rings, cause)
	})
	return out
}

// movedCause returns what end-moved findings give as the cause when the
// document's unit (units.length as written) differs from the unit the
// mesh was read in (nil: not known): "" (the mesh changed) otherwise.
func movedCause(doc string, mesh *string) string {
	if mesh == nil || doc == *mesh {
		return ""
	}
	if u, err := joints.ParseUnit(doc); err != nil || u.String() == *mesh {
		return ""
	}
	return fmt.Sprintf("the connectors were written in %s and this check reads the mesh in %s: if the mesh is the build's, check with --units %s; else the mesh changed since the build, and the connectors must be built again", doc, *mesh, doc)
}

// CheckConnectors is a build's check step: it audits the connectors of
// res (the same checks as Check, on what the build made) and adds the
// findings and kinematic counts to res. The build's own node-pair checks
// are not repeated.
func CheckConnectors(ctx context.Context, in *Inputs, res *joints.Result, env Env) error {
	rep, err := audit.Run(ctx, in.Model.Mesh, res.Connectors, nil, res.Options, env.progress())
	if err != nil {
		return err
	}
	res.Findings = append(res.Findings, rep.Findings...)
	res.Kinematics = &rep.Kinematics
	return nil
}
