package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sync"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers"
)

type buildOptions struct {
	in             inputOptions
	out            string
	searchDistance float64
	gapTolerance   float64
	attach         string
	spotDOFs       string
	idStart        int64
	nuggetRule     string
	failOn         string
	flags          *pflag.FlagSet
}

func (o *buildOptions) AddFlags(fs *pflag.FlagSet) {
	o.flags = fs
	o.in.AddFlags(fs)
	fs.StringVarP(&o.out, "out", "o", "", "output directory (default: the job's out, else ./joinery-out)")
	fs.Float64Var(&o.searchDistance, "search-distance", 0, "mm; sheets farther from a weld are ignored (0: 4.5 x the largest thickness)")
	fs.Float64Var(&o.gapTolerance, "gap-tolerance", 0, "mm; allowed deviation of a gap from contact (0: a quarter of the contact gap (t1+t2)/2)")
	fs.StringVar(&o.attach, "attach", "interpolated", "how connector ends tie to sheets: interpolated, node-pair or patch")
	fs.StringVar(&o.spotDOFs, "spot-dofs", "tx,ty,tz,rx,ry,rz", "degrees of freedom a spot weld couples")
	fs.Int64Var(&o.idStart, "id-start", 0, "first id for new nodes and elements (0: the round number above every mesh id)")
	fs.StringVar(&o.nuggetRule, "nugget-rule", "5sqrt", "default nugget diameter from the governing thickness t: 4sqrt or 5sqrt (d = K*sqrt(t))")
	fs.StringVar(&o.failOn, "fail-on", "error", "exit 1 when findings reach this level: error, warning, info or never")
}

// apply layers the flags the user set over the job's settings.
func (o *buildOptions) apply(job *joints.Job) {
	o.in.apply(job)
	b := &job.Build
	set := o.flags.Changed
	if set("out") {
		job.Out = o.out
	}
	if set("search-distance") {
		b.SearchDistance = &o.searchDistance
	}
	if set("gap-tolerance") {
		b.GapTolerance = &o.gapTolerance
	}
	if set("attach") {
		b.Attach = o.attach
	}
	if set("spot-dofs") {
		b.SpotDOFs = []string{o.spotDOFs}
	}
	if set("id-start") {
		b.IDStart = &o.idStart
	}
	if set("nugget-rule") {
		b.NuggetRule = o.nuggetRule
	}
	if set("fail-on") {
		b.FailOn = o.failOn
	}
}

func newBuildCommand(g *globalOptions) *cobra.Command {
	o := &buildOptions{}
	c := &cobra.Command{
		Use:   "build [JOB.yaml]",
		Short: "Build spot-weld connectors and write them with a connectivity report",
		Long: `build finds the sheets each spot weld joins, checks gaps, nugget sizes and edge
distances, attaches a connector to every sheet and writes, in the output
directory:

  connectors.json   connector definitions (schema joinery/connectors, version 1)
  connectors.csv    one row per connector end, for spreadsheets
  report.json       summary and findings (schema joinery/report, version 1)
  report.txt        the same for a person
  connectors.vtk    links and failed joints as VTK lines and points, for viewing

Inputs and settings come from a job file, from flags, or both (flags win).
Bolts are reported as not yet supported.

EXIT STATUS
  0  built; no finding at or above --fail-on
  1  built; findings at or above --fail-on
  2  bad usage or unreadable input; nothing written`,
		Example: `  joinery build examples/van-rear-crossmember/job.yaml
  joinery build --mesh body.vtk --parts parts.yaml --joints welds.csv --out build/
  joinery build job.yaml --attach node-pair --spot-dofs tx,ty,tz --fail-on warning`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			return runBuild(c, o, g, args)
		},
	}
	o.AddFlags(c.Flags())
	return c
}

func runBuild(c *cobra.Command, o *buildOptions, g *globalOptions, args []string) error {
	job, err := loadJob(args)
	if err != nil {
		return err
	}
	o.apply(job)
	bo := joints.BuildOptions{}
	if err := job.Build.Apply(&bo); err != nil {
		return usageError{err}
	}
	if err := bo.Validate(); err != nil {
		return usageError{err}
	}
	failOn, fail, err := joints.ParseFailOn(job.Build.FailOn)
	if err != nil {
		return usageError{err}
	}
	out := job.Out
	if out == "" {
		out = "joinery-out"
	}
	model, js, err := loadInputs(c.Context(), job, g)
	if err != nil {
		return err
	}
	if missing := model.MissingThickness(); len(missing) > 0 {
		return geom.FileError(job.Parts, "parts without a thickness: %v (give them one in the parts table)", missing)
	}
	prog := g.progress()
	prog.Start("indexing elements", 0)
	index := joints.IndexFor(model.Mesh, js, bo)
	prog.Done()
	res, err := joints.Build(c.Context(), index, js, bo, prog)
	if err != nil {
		return err
	}
	info := writers.RunInfo{Generator: "joinery " + version, Meshes: job.Meshes, Parts: job.Parts, Joints: job.Joints}
	conn := writers.NewConnectorsDoc(model.Mesh, res, info)
	rep := writers.NewReportDoc(res, info)
	// Render every file in memory first (concurrently: they are
	// independent), so that a failure leaves nothing written; then write
	// them, each through a temporary file renamed into place.
	files := []struct {
		name   string
		render func(w io.Writer) error
		data   bytes.Buffer
	}{
		{name: "connectors.json", render: func(w io.Writer) error { return writers.WriteConnectorsJSON(w, conn) }},
		{name: "connectors.csv", render: func(w io.Writer) error { return writers.WriteConnectorsCSV(w, conn) }},
		{name: "report.json", render: func(w io.Writer) error { return writers.WriteReportJSON(w, rep) }},
		{name: "report.txt", render: func(w io.Writer) error { return writers.WriteReportText(w, rep) }},
		{name: "connectors.vtk", render: func(w io.Writer) error { return writers.WriteConnectorsVTK(w, conn) }},
	}
	renderErrs := make([]error, len(files))
	var rg sync.WaitGroup
	for i := range files {
		rg.Go(func() { renderErrs[i] = files[i].render(&files[i].data) })
	}
	rg.Wait()
	for i, err := range renderErrs {
		if err != nil {
			return fmt.Errorf("rendering %s: %w", files[i].name, err)
		}
	}
	if err := os.MkdirAll(out, 0o755); err != nil {
		return fmt.Errorf("creating output directory: %w", err)
	}
	errs := make([]error, len(files))
	var wg sync.WaitGroup
	for i := range files {
		f := &files[i]
		wg.Go(func() {
			errs[i] = writers.WriteFileAtomic(filepath.Join(out, f.name), func(w io.Writer) error {
				_, err := w.Write(f.data.Bytes())
				return err
			})
		})
	}
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		return err
	}
	if g.json {
		if err := writers.WriteJSON(g.stdout, rep.Summary); err != nil {
			return err
		}
	} else if !g.quiet {
		if err := writers.WriteBuildSummary(g.stdout, rep, out); err != nil {
			return err
		}
	}
	if fail && res.Reached(failOn) {
		return &findingsError{msg: fmt.Sprintf("findings at or above %q: see %s", failOn, filepath.Join(out, "report.txt"))}
	}
	return nil
}
