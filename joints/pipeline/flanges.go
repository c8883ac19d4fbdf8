package pipeline

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/flange"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// FlangeSettings are a flanges run's settings, read from a job and
// checked.
type FlangeSettings struct {
	BuildSettings
	Flanges joints.FlangeOptions
}

// FlangeSettings reads and checks the job's flanges and build settings;
// the set goes beside the build's (FlangesSuffix appended to the job's
// out unless OutGiven). Errors are usage errors.
func (job *Job) FlangeSettings() (FlangeSettings, error) {
	var s FlangeSettings
	var err error
	if s.BuildSettings, err = job.BuildSettings(); err != nil {
		return s, err
	}
	if err := job.Flanges.Apply(&s.Flanges); err != nil {
		return s, UsageError(err)
	}
	if err := s.Flanges.Validate(); err != nil {
		return s, UsageError(err)
	}
	s.Out = job.besideOut(s.Out, FlangesSuffix)
	return s, nil
}

// FlangesFiles are the names of the files a flanges run writes, in
// order. joints.csv is written on every run, empty when no pitch was
// asked for, so that the set never holds welds of an earlier run.
func FlangesFiles() []string {
	return []string{"flanges.json", "joints.csv", "flanges.vtk", "report.json", "report.txt", PageFile}
}

// FlangesOutcome is what a flanges run reports.
type FlangesOutcome struct {
	Outcome
	Flanges *document.FlangesDoc
}

// Flanges runs joinery flanges: load the job's meshes and parts, find
// every flange of the part pairs asked for (all pairs in contact by
// default) with its facing node pairs, place welds at the pitch asked
// for, check them with the spot-weld builder's own rules (so that the
// report says how build will take them) and audit them as build does
// (CheckConnectors), and write the set into s.Out.
func Flanges(ctx context.Context, job *Job, s FlangeSettings, env Env) (*FlangesOutcome, error) {
	job.Joints = nil // flanges reads no joint list
	dir, err := OpenOutput(s.Out)
	if err != nil {
		return nil, err
	}
	defer dir.Close()
	in, err := LoadForSet(ctx, job, env)
	if err != nil {
		return nil, err
	}
	m := in.Model.Mesh
	if missing := in.Model.MissingThickness(); len(missing) > 0 {
		return nil, geom.FileError(in.Job.Parts, "parts without a thickness: %v (give them one in the parts table)", missing)
	}
	var unknown []string
	for _, p := range s.Flanges.Pairs {
		for _, id := range p {
			if _, ok := m.PartIndex(id); !ok {
				unknown = append(unknown, fmt.Sprint(id))
			}
		}
	}
	if len(unknown) > 0 {
		return nil, UsageError(fmt.Errorf("pair: part(s) %s not in the model", strings.Join(unknown, ", ")))
	}
	page := startPage(m)
	o := s.Options.Defaults(joints.MaxThickness(m))
	fo := s.Flanges.Defaults()
	prog := env.progress()
	prog.Start("indexing elements", 0)
	idx := geom.NewElemIndex(m)
	prog.Done()
	// Only placing welds needs the index after the contacts: without a
	// pitch nothing here holds it past FindContacts (idx is not used
	// again), so that its memory (a sixth of the mesh's) can serve the
	// contacts' later steps instead of fresh memory.
	var x *geom.Index
	if fo.Pitch.Set() {
		x = idx
	}
	prog.Start("finding flanges", 0)
	c, err := geom.FindContacts(ctx, idx, flange.Rule(m, &o, &fo))
	if err != nil {
		prog.Done()
		return nil, fmt.Errorf("pipeline: %w", err)
	}
	set, err := flange.Find(ctx, c, fo)
	prog.Done()
	if err != nil {
		return nil, err
	}
	var run []joints.Finding
	for _, p := range fo.Pairs {
		k := joints.PairKey(p[0], p[1])
		found := false
		for _, f := range set.Flanges {
			found = found || f.Parts == k
		}
		if !found {
			run = append(run, joints.Finding{Severity: joints.Warning, Code: joints.CodeNoFlange, Parts: []int64{k[0], k[1]},
				Message: fmt.Sprintf("parts %d and %d have no flange: their sheets do not come within contact of each other", k[0], k[1])})
		}
	}
	var conns []joints.Connector
	if fo.Pitch.Set() {
		prog.Start("placing welds", 0)
		fs, err := set.Place(ctx, x, o)
		prog.Done()
		if err != nil {
			return nil, err
		}
		run = append(run, fs...)
		var welds []joints.Joint
		for _, f := range set.Flanges {
			for _, w := range f.Welds {
				welds = append(welds, w.Joint)
			}
		}
		// Check the welds as build will take them.
		if conns, err = spot.Build(ctx, x, welds, o, prog); err != nil {
			return nil, err
		}
	}
	res, err := joints.NewResult(m, conns, run, o)
	if err != nil {
		return nil, UsageError(err)
	}
	if fo.Pitch.Set() {
		// Audit the welds placed as build does what it makes: seams,
		// duplicates, short pitch, free parts, mechanisms.
		if err := CheckConnectors(ctx, in, res, env); err != nil {
			return nil, err
		}
	}
	info, err := in.RunInfo(env.Generator, res, RunSettings{Command: "flanges", Flanges: &fo})
	if err != nil {
		return nil, err
	}
	fl := document.NewFlanges(m, set.Flanges, o, fo, info)
	rep := document.NewReport(res, info)
	rep.Command = "flanges"
	node := func(id int64) ([3]float64, bool) {
		i, ok := m.NodeIndex(id)
		if !ok {
			return [3]float64{}, false
		}
		p := m.Coords[i]
		return document.VecInUnit([3]float64{p.X, p.Y, p.Z}, info.Unit), true
	}
	files := []writers.File{
		{Name: "flanges.json", Render: func(w io.Writer) error { return document.EncodeFlanges(w, fl) }},
		{Name: "joints.csv", Render: func(w io.Writer) error { return writers.WriteFlangeJointsCSV(w, fl) }},
		{Name: "flanges.vtk", Render: func(w io.Writer) error { return writers.WriteFlangesVTK(w, fl, node) }},
		{Name: "report.json", Render: func(w io.Writer) error { return document.EncodeReport(w, rep) }},
		{Name: "report.txt", Render: func(w io.Writer) error { return writers.WriteReportText(w, rep) }},
		page.file(func(o *html.Outline) *html.Page {
			return html.ForFlanges(rep, fl, document.NewConnectors(m, res, info), o, node)
		}),
	}
	if err := writeSet(prog, dir, writers.Set{Job: "flanges", Generator: env.Generator, RunID: info.RunID}, files); err != nil {
		return nil, err
	}
	return &FlangesOutcome{
		Outcome: Outcome{Out: s.Out, Files: FlangesFiles(), RunID: info.RunID, Report: rep, Result: res, Reached: s.Fail && res.Reached(s.FailOn)},
		Flanges: fl,
	}, nil
}

// FlangesSummary writes the few lines a flanges run prints on stdout.
func (o *FlangesOutcome) FlangesSummary(w io.Writer) error {
	return writers.WriteFlangesSummary(w, o.Flanges, o.Report, o.Out, o.Files)
}
