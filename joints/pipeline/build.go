package pipeline

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/bolt"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// DefaultOut is the output directory when neither the job nor a flag
// names one.
const DefaultOut = "joinery-out"

// BuildSettings are a build's settings, read from a job and checked.
type BuildSettings struct {
	Options joints.BuildOptions
	FailOn  joints.Severity
	Fail    bool // false for --fail-on never
	Out     string
	// NoPage leaves report.html out of the set: a developer switch (the
	// hidden flag --no-html) to measure what the page costs.
	NoPage bool
	// NoCheck leaves the check step out (CheckConnectors): a developer
	// switch (the hidden flag --no-check) to measure what it costs.
	NoCheck bool
}

// BuildSettings reads and checks the job's build settings. Errors are
// usage errors.
func (job *Job) BuildSettings() (BuildSettings, error) {
	var s BuildSettings
	if err := job.Build.Apply(&s.Options); err != nil {
		return s, UsageError(err)
	}
	if err := s.Options.Validate(); err != nil {
		return s, UsageError(err)
	}
	var err error
	if s.FailOn, s.Fail, err = joints.ParseFailOn(job.Build.FailOn); err != nil {
		return s, UsageError(err)
	}
	s.Out = job.Out
	if s.Out == "" {
		s.Out = DefaultOut
	}
	return s, nil
}

// Outcome is what a command reports of a run.
type Outcome struct {
	Out        string   // output directory
	Files      []string // names of the files written there
	RunID      string   // the run id every file carries
	Report     *document.ReportDoc
	Connectors *document.ConnectorsDoc
	Result     *joints.Result
	// Reached is set when findings reached the settings' failure level.
	Reached bool
}

// BuildFiles are the names of the files a build writes, in order.
func BuildFiles() []string {
	return []string{"connectors.json", "connectors.csv", "connectors.vtk", "report.json", "report.txt", "report.html"}
}

// Build runs a whole build: load the job's inputs, build the connectors,
// render the documents and write them as one set into s.Out.
func Build(ctx context.Context, job *Job, s BuildSettings, env Env) (*Outcome, error) {
	if len(job.Joints) == 0 {
		return nil, UsageError(errors.New("no joint list given: name one with --joints or in the job file's joints"))
	}
	out, err := OpenOutput(s.Out)
	if err != nil {
		return nil, err
	}
	defer out.Close()
	in, err := LoadForSet(ctx, job, env)
	if err != nil {
		return nil, err
	}
	// The page's outline of the model needs only the mesh: find it while
	// the connectors are built.
	var page *pageJob
	if !s.NoPage {
		page = startPage(in.Model.Mesh)
	}
	res, err := BuildConnectors(ctx, in, s.Options, env)
	if err != nil {
		return nil, err
	}
	if !s.NoCheck {
		if err := CheckConnectors(ctx, in, res, env); err != nil {
			return nil, err
		}
	}
	info, err := in.RunInfo(env.Generator, res, RunSettings{Command: "build", NoCheck: s.NoCheck, NoPage: s.NoPage})
	if err != nil {
		return nil, err
	}
	conn := document.NewConnectors(in.Model.Mesh, res, info)
	rep := document.NewReport(res, info)
	files := buildFiles(conn, rep)
	if !s.NoPage {
		// Rendered beside the other files, the page waits there for the
		// outline.
		files = append(files, page.file(func(o *html.Outline) *html.Page { return html.ForBuild(rep, conn, o) }))
	}
	if err := writeSet(env.progress(), out, writers.Set{Job: "build", Generator: env.Generator, RunID: info.RunID}, files); err != nil {
		return nil, err
	}
	names := BuildFiles()
	if s.NoPage {
		names = names[:len(names)-1] // report.html comes last
	}
	return &Outcome{Out: s.Out, Files: names, RunID: info.RunID, Report: rep, Connectors: conn, Result: res,
		Reached: s.Fail && res.Reached(s.FailOn)}, nil
}

// OpenOutput takes the output directory of a run before the run does
// its work (writers.OpenSet: the lock, the recovery of a killed run's
// leftovers, the check that the directory is Joinery's to replace), so
// that a run that could not write its outputs fails at once. A directory
// Joinery did not write is a usage error; the caller Writes the set and
// Closes the directory.
func OpenOutput(dir string) (*writers.OutputDir, error) {
	out, err := writers.OpenSet(dir)
	if errors.Is(err, writers.ErrNotOwned) {
		return nil, UsageError(err)
	}
	return out, err
}

// writeSet renders files and writes them with set's header as one set
// into out, each step reported to prog.
func writeSet(prog geom.Progress, out *writers.OutputDir, set writers.Set, files []writers.File) error {
	prog.Start("rendering outputs", 0)
	rendered, err := writers.Render(files)
	prog.Done()
	if err != nil {
		return err
	}
	set.Files = rendered
	prog.Start("writing outputs", 0)
	defer prog.Done()
	return out.Write(set)
}

// buildFiles lists the files of a build's output set but the page, in
// BuildFiles order.
func buildFiles(conn *document.ConnectorsDoc, rep *document.ReportDoc) []writers.File {
	return []writers.File{
		{Name: "connectors.json", Render: func(w io.Writer) error { return document.EncodeConnectors(w, conn) }},
		{Name: "connectors.csv", Render: func(w io.Writer) error { return writers.WriteConnectorsCSV(w, conn) }},
		{Name: "connectors.vtk", Render: func(w io.Writer) error { return writers.WriteConnectorsVTK(w, conn) }},
		{Name: "report.json", Render: func(w io.Writer) error { return document.EncodeReport(w, rep) }},
		{Name: "report.txt", Render: func(w io.Writer) error { return writers.WriteReportText(w, rep) }},
	}
}

// BuildConnectors indexes the model near the joints and builds every
// joint's connector with options o (defaults resolved against the
// model): spot welds by package spot, bolts by package bolt. It returns the assembled result with new ids.
func BuildConnectors(ctx context.Context, in *Inputs, o joints.BuildOptions, env Env) (*joints.Result, error) {
	m := in.Model.Mesh
	if err := in.missingThickness(); err != nil {
		return nil, err
	}
	if err := in.checkIDStart(o.IDStart); err != nil {
		return nil, err
	}
	o = o.Defaults(joints.MaxThickness(m))
	prog := env.progress()
	index := in.index // a sweep's, shared by its variants
	if index == nil {
		prog.Start("indexing elements", 0)
		index = IndexFor(m, in.Joints, []joints.BuildOptions{o})
		prog.Done()
	}
	conns, err := in.buildShared(spotBuilder, func() ([]joints.Connector, error) {
		return spot.BuildShared(ctx, index, in.Joints, o, prog, in.stacks)
	})
	if err != nil {
		return nil, err
	}
	bolts, err := in.buildShared(boltBuilder, func() ([]joints.Connector, error) { return bolt.Build(ctx, index, in.Joints, o, prog) })
	if err != nil {
		return nil, err
	}
	conns = append(conns, bolts...)
	res, err := joints.NewResult(m, conns, in.ModelFindings(), o)
	if err != nil {
		return nil, UsageError(err)
	}
	return res, nil
}

// missingThickness fails when parts have elements without a thickness,
// naming the mesh files that hold them (with a parts table, every part
// has one).
func (in *Inputs) missingThickness() error {
	missing := in.Model.MissingThickness()
	if len(missing) == 0 {
		return nil
	}
	const show = 10
	files := in.Model.PartFiles(missing[:min(len(missing), show)])
	var b strings.Builder
	for i, id := range missing[:min(len(missing), show)] {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%d (in %s)", id, files[i])
	}
	if len(missing) > show {
		fmt.Fprintf(&b, " and %d more", len(missing)-show)
	}
	where := files[0]
	if in.Job.Parts != "" {
		where = in.Job.Parts
	}
	return geom.FileError(where, "parts without a thickness: %s; give them one in a parts table", b.String())
}

// checkIDStart fails when a first new id collides with the mesh's ids,
// at the job file's line of id_start or naming the flag.
func (in *Inputs) checkIDStart(start int64) error {
	m := in.Model.Mesh
	maxID := max(m.MaxNodeID(), m.MaxElemID())
	if start <= 0 || start > maxID {
		return nil
	}
	if line := in.Job.Build.IDStartLine; line > 0 && in.Job.File != "" {
		return geom.LineError(in.Job.File, line, "id_start: %d would collide with mesh ids (the largest is %d)", start, maxID)
	}
	return UsageError(fmt.Errorf("--id-start %d would collide with mesh ids (the largest is %d)", start, maxID))
}

// RunInfo returns the record of a run's inputs for its documents: the
// input paths as recorded (Job.RecordedPath) and the run id of the run
// that made res with the settings rs (inputs loaded with LoadForSet).
func (in *Inputs) RunInfo(generator string, res *joints.Result, rs RunSettings) (document.RunInfo, error) {
	job := in.Job
	info := document.RunInfo{Generator: generator, Unit: in.Unit, PartNames: map[int64]string{}}
	for _, p := range in.Model.Mesh.Parts {
		if p.Name != "" {
			info.PartNames[p.ID] = p.Name
		}
	}
	for _, p := range job.Meshes {
		info.Meshes = append(info.Meshes, job.RecordedPath(p))
	}
	if job.Parts != "" {
		info.Parts = job.RecordedPath(job.Parts)
	}
	for _, p := range job.PartsOverlays {
		info.PartsOverlays = append(info.PartsOverlays, job.RecordedPath(p))
	}
	for _, p := range job.Joints {
		info.Joints = append(info.Joints, job.RecordedPath(p))
	}
	for _, r := range in.Model.Renumbered {
		info.Renumbered = append(info.Renumbered, document.Shift{File: job.RecordedPath(r.File), NodeOffset: r.NodeOffset, ElemOffset: r.ElemOffset})
	}
	for _, t := range in.Tags {
		info.Tags = append(info.Tags, document.TagColumns{File: job.RecordedPath(t.File), Columns: t.Columns})
	}
	var err error
	info.RunID, err = in.runID(generator, res, rs)
	return info, err
}

// Summary is the few lines a build prints on stdout.
func (o *Outcome) Summary(w io.Writer) error {
	return writers.WriteBuildSummary(w, o.Report, o.Out, o.Files)
}

// FailMessage says why a run that reached its failure level exits 1.
func (o *Outcome) FailMessage(failOn joints.Severity) string {
	return fmt.Sprintf("findings at or above %q: see %s", failOn, filepath.Join(o.Out, "report.txt"))
}

// IndexFor builds one index of the elements near the joints that serves
// both builders (spot welds and bolts) with each of the options opts
// (one for a build, the variants' for a sweep): the spot welds' points
// with the largest of the spot builder's margins, the bolts' with the
// largest of the bolt builder's. Each kind keeps its own margin, since
// a bolt looks farther round it than a weld (its washer and edge check)
// and the welds are many.
func IndexFor(m *geom.Mesh, js []joints.Joint, opts []joints.BuildOptions) *geom.Index {
	pts, margin := spot.NearAll(m, js, opts)
	var bpts []r3.Vec
	bmargin := 0.0
	for i, o := range opts {
		p, mg := bolt.Near(m, js, o)
		if i == 0 { // the same points for every variant
			bpts = p
		}
		bmargin = max(bmargin, mg)
	}
	return geom.NewIndexNearSets(m, []geom.NearPoints{{Pts: pts, Margin: margin}, {Pts: bpts, Margin: bmargin}}, false)
}
