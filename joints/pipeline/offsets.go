package pipeline

import (
	"context"
	"io"
	"path/filepath"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/offset"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// OffsetsSuffix is appended to the job's output directory to name the
// directory joinery offsets writes to when none is named: beside a
// build's set (a set's directory holds that set and nothing else), so
// that its report does not replace the build's.
const OffsetsSuffix = "-offsets"

// CheckSuffix and FlangesSuffix name, as OffsetsSuffix does, the
// directories joinery check and joinery flanges write to when none is
// named: beside a build's set, so that a check of a build's connectors
// does not replace the set it reads, nor flanges the build's outputs.
const (
	CheckSuffix   = "-check"
	FlangesSuffix = "-flanges"
)

// Beside returns the default output directory of a command that writes
// beside the build output directory out: out with suffix appended.
func Beside(out, suffix string) string { return filepath.Clean(out) + suffix }

// besideOut returns the output directory of a command that writes beside
// the build's set out: out with suffix appended, or out itself when it
// was named on the command line (OutGiven).
func (job *Job) besideOut(out, suffix string) string {
	if job.OutGiven {
		return out
	}
	return Beside(out, suffix)
}

// OffsetsSettings reads and checks a job's settings for joinery offsets:
// its build settings, written beside the build's set (OffsetsSuffix).
// Errors are usage errors.
func (job *Job) OffsetsSettings() (BuildSettings, error) {
	s, err := job.BuildSettings()
	s.Out = job.besideOut(s.Out, OffsetsSuffix)
	return s, err
}

// OffsetsFiles are the names of the files joinery offsets writes, in
// order.
func OffsetsFiles() []string {
	return []string{"surfaces.yaml", "surfaces.json", "report.json", "report.txt", PageFile}
}

// OffsetsOutcome is what a command reports of a surface inference.
type OffsetsOutcome struct {
	Out      string   // output directory
	Files    []string // names of the files written there
	RunID    string   // the run id every file carries
	Report   *document.ReportDoc
	Surfaces *document.SurfacesDoc
	Result   *offset.Result
	// Reached is set when findings reached the settings' failure level.
	Reached bool
}

// Offsets runs a surface inference: load the job's inputs (joint lists
// are optional: their sites add evidence), index every element, infer
// each part's reference surface (offset.Infer, with the job's build
// settings: reach, gap allowance), and write surfaces.yaml,
// surfaces.json, report.json and report.txt as one set into s.Out.
func Offsets(ctx context.Context, job *Job, s BuildSettings, env Env) (*OffsetsOutcome, error) {
	out, err := OpenOutput(s.Out)
	if err != nil {
		return nil, err
	}
	defer out.Close()
	in, err := LoadForSet(ctx, job, env)
	if err != nil {
		return nil, err
	}
	m := in.Model.Mesh
	if missing := in.Model.MissingThickness(); len(missing) > 0 {
		return nil, geom.FileError(in.Job.Parts, "parts without a thickness: %v (give them one in the parts table)", missing)
	}
	page := startPage(m)
	prog := env.progress()
	prog.Start("indexing elements", 0)
	// The node-to-element adjacency the inference needs, and with it the
	// orientation of the normals, are found while the elements are
	// indexed (the index leaves a core idle part of the time).
	adjc := make(chan geom.Adjacency, 1)
	orc := make(chan geom.Orientation, 1)
	go func() {
		adj := geom.NodeElements(m)
		adjc <- adj
		orc <- geom.OrientNormals(m, adj)
	}()
	x := geom.NewElemIndex(m)
	adj := <-adjc
	prog.Done()
	res, err := offset.InferOriented(ctx, x, adj, func() geom.Orientation { return <-orc }, in.Joints, s.Options, prog)
	if err != nil {
		return nil, err
	}
	// The run id covers the options as the inference resolved them.
	info, err := in.RunInfo(env.Generator, &joints.Result{Options: res.Options}, RunSettings{Command: "offsets"})
	if err != nil {
		return nil, err
	}
	doc := document.NewSurfaces(res, info)
	rep := document.NewSurfacesReport(res, info)
	err = writeSet(env.progress(), out, writers.Set{Job: "offsets", Generator: env.Generator, RunID: info.RunID}, []writers.File{
		{Name: "surfaces.yaml", Render: func(w io.Writer) error { return writers.WriteSurfacesYAML(w, doc) }},
		{Name: "surfaces.json", Render: func(w io.Writer) error { return document.EncodeSurfaces(w, doc) }},
		{Name: "report.json", Render: func(w io.Writer) error { return document.EncodeReport(w, rep) }},
		{Name: "report.txt", Render: func(w io.Writer) error { return writers.WriteSurfacesText(w, rep, doc) }},
		page.file(func(o *html.Outline) *html.Page { return html.ForOffsets(rep, doc, o) }),
	})
	if err != nil {
		return nil, err
	}
	return &OffsetsOutcome{Out: s.Out, Files: OffsetsFiles(), RunID: info.RunID, Report: rep, Surfaces: doc, Result: res,
		Reached: s.Fail && reached(res, s)}, nil
}

func reached(res *offset.Result, s BuildSettings) bool {
	for _, f := range res.Findings {
		if f.Severity >= s.FailOn {
			return true
		}
	}
	return false
}

// Summary is the few lines joinery offsets prints on stdout.
func (o *OffsetsOutcome) Summary(w io.Writer) error {
	return writers.WriteSurfacesSummary(w, o.Report, o.Surfaces, o.Out, o.Files)
}

// SurfacesFile is the path of the surfaces table a run wrote.
func (o *OffsetsOutcome) SurfacesFile() string { return filepath.Join(o.Out, "surfaces.yaml") }
