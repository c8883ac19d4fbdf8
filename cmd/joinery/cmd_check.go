package main

import (
	"fmt"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers/document"
)

// checkOptions are the flags of check.
type checkOptions struct {
	in           inputOptions
	connectors   []string
	out          string
	reach        float64
	gapAllowance float64
	spotDOFs     string
	nuggetRule   string
	failOn       string
	flags        *pflag.FlagSet
}

// AddFlags registers the check flags; their default texts come from the
// joints package's defaults.
func (o *checkOptions) AddFlags(fs *pflag.FlagSet) {
	o.flags = fs
	o.in.AddFlags(fs)
	fs.Lookup("joints").Usage = "joint list (.csv or .yaml) of planned welds to check against, not built; repeat for several"
	fs.StringArrayVarP(&o.connectors, "connectors", "c", nil, "connectors to check: a connectors.json (or the output directory of a build), or a node-pair list (.csv: id,node_a,node_b[,dofs]); repeat for several")
	fs.StringVarP(&o.out, "out", "o", "", "output directory (default: the job's out with "+pipeline.CheckSuffix+" appended, else ./"+pipeline.DefaultOut+pipeline.CheckSuffix+": beside a build's set, not in it)")
	fs.Float64Var(&o.reach, "reach", 0, fmt.Sprintf("mm; for points of --joints: sheets farther are not theirs (0: %g x the largest thickness)", joints.DefaultReachFactor))
	fs.Float64Var(&o.gapAllowance, "gap-allowance", 0, fmt.Sprintf("mm; node pairs: allowed deviation of a gap from contact (0: %g x the contact gap (t1+t2)/2)", joints.DefaultGapAllowanceFactor))
	fs.StringVar(&o.spotDOFs, "spot-dofs", joints.DefaultSpotDOFs.String(), "degrees of freedom of node-pair links whose list gives none (from tx,ty,tz,rx,ry,rz)")
	fs.StringVar(&o.nuggetRule, "nugget-rule", joints.DefaultNuggetRule.String(), "nugget diameter of node-pair welds from the governing thickness t: 4sqrt or 5sqrt (d = K*sqrt(t))")
	fs.StringVar(&o.failOn, "fail-on", "error", "exit 1 when findings reach this level: error, warning, info or never")
}

// apply layers the flags the user set over the job's settings.
func (o *checkOptions) apply(job *pipeline.Job) {
	o.in.apply(job)
	b := &job.Build
	set := o.flags.Changed
	if set("out") {
		job.Out, job.OutGiven = o.out, true
	}
	if set("reach") {
		b.Reach = &o.reach
	}
	if set("gap-allowance") {
		b.GapAllowance = &o.gapAllowance
	}
	if set("spot-dofs") {
		b.SpotDOFs = []string{o.spotDOFs}
	}
	if set("nugget-rule") {
		b.NuggetRule = o.nuggetRule
	}
	if set("fail-on") {
		b.FailOn = o.failOn
	}
}

func newCheckCommand(g *globalOptions) *cobra.Command {
	o := &checkOptions{}
	c := &cobra.Command{
		Use:   "check [JOB.yaml] --connectors FILE...",
		Short: "Audit existing weld definitions: seams, duplicates, short pitch, loose parts, mechanisms",
		Long: `check reads the weld definitions of a model, Joinery's own connectors.json or a
node-pair list exported from any model (CSV: id,node_a,node_b and optionally
dofs such as tx+ty+tz; rows sharing an id form one weld), with the model's
mesh and parts table, and reports what a person would have to look for by hand:
  seam          welds whose attachments on a sheet share nodes or elements, in
                chains: the flange cannot open between them
  duplicate     two welds whose nuggets overlap on a shared sheet, or two on
                one node pair
  pitch-short   consecutive welds of a part pair closer than the minimum
                spacing for their governing thickness (resistance welding
                manufacturers' table; +30 % for three sheets)
  nodes-apart, gap-open, gap-closed
                node pairs that do not face each other or do not touch, by the
                rules build applies
  edge-close    weld centres closer than one nugget diameter to a sheet's
                free edge, as build judges them
  free-part     parts joined by no connector to the largest group
  mechanism     parts the connectors do not hold against every rigid-body
                motion, with the free motion (a turn about the line of a row
                of welds that couple translations only, ...)
  unrestrained  nodes a connector creates with degrees of freedom nothing holds
  end-moved     ends of a connectors.json that no longer lie where the mesh
                puts them (each rebuilt from its nodes and weights): the mesh
                changed since the build, or is read in another unit
  units-suspect, thickness-mismatch, cells-skipped
                the model's own findings, as build gives them
--joints adds planned weld points to check against the others (duplicates,
spacing) without building them. It writes, in the output directory:
  report.json   summary and findings (schema joinery/report, version 2)
  report.txt    the same for a person
  report.html   the same as one page to open in a browser
By default the output directory is the job's out with -check appended,
beside the build's set: a check never replaces the connectors it reads.
Inputs come from a job file, from flags, or both (flags win); build runs the
same checks on what it builds.

` + document.Caution + `

` + exitStatusHelp,
		Example: `  joinery check --mesh body.vtk --parts parts.yaml --connectors out/ --out audit/
  joinery check job.yaml --connectors legacy-welds.csv --spot-dofs tx,ty,tz --fail-on warning
  joinery check job.yaml --connectors out/connectors.json --joints new-welds.csv --json`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			return runCheck(c, o, g, args)
		},
	}
	o.AddFlags(c.Flags())
	return c
}

func runCheck(c *cobra.Command, o *checkOptions, g *globalOptions, args []string) error {
	job, err := loadJob(args)
	if err != nil {
		return err
	}
	o.apply(job)
	s, err := job.CheckSettings(o.connectors)
	if err != nil {
		return err
	}
	out, err := pipeline.Check(c.Context(), job, s, g.env())
	if err != nil {
		return err
	}
	return g.finish(buildJSON{Summary: out.Report.Summary, Inputs: out.Report.Inputs, Out: out.Out, Files: out.Files, RunID: out.RunID, Caution: document.Caution}, out.Summary, out.Reached, func() string { return out.FailMessage(s.FailOn) })
}
