package main

import (
	"fmt"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers/document"
)

// buildOptions are the flags of build (and of every command that builds
// connectors).
type buildOptions struct {
	in           inputOptions
	out          string
	reach        float64
	gapAllowance float64
	attach       string
	spotDOFs     string
	idStart      int64
	nuggetRule   string
	links        string
	boltDOFs     string
	boltCoupling string
	shank        string
	boltRing     string
	shankModulus float64
	holeTol      float64
	failOn       string
	noHTML       bool
	noCheck      bool
	flags        *pflag.FlagSet
}

// AddFlags registers the build flags; their default texts come from the
// joints package's defaults.
func (o *buildOptions) AddFlags(fs *pflag.FlagSet) {
	o.flags = fs
	o.in.AddFlags(fs)
	fs.StringVarP(&o.out, "out", "o", "", "output directory (default: the job's out, else ./"+pipeline.DefaultOut+")")
	fs.Float64Var(&o.reach, "reach", 0, fmt.Sprintf("mm; sheets farther from a weld are ignored (0: %g x the largest thickness)", joints.DefaultReachFactor))
	fs.Float64Var(&o.gapAllowance, "gap-allowance", 0, fmt.Sprintf("mm; allowed deviation of a gap from contact (0: %g x the contact gap (t1+t2)/2)", joints.DefaultGapAllowanceFactor))
	fs.StringVar(&o.attach, "attach", joints.DefaultAttach.String(), "how connector ends tie to sheets: interpolated, node-pair or patch")
	fs.StringVar(&o.spotDOFs, "spot-dofs", joints.DefaultSpotDOFs.String(), "degrees of freedom a spot weld couples (from tx,ty,tz,rx,ry,rz)")
	fs.Int64Var(&o.idStart, "id-start", 0, "first id for new nodes and elements (0: the round number above every mesh id)")
	fs.StringVar(&o.nuggetRule, "nugget-rule", joints.DefaultNuggetRule.String(), "default nugget diameter from the governing thickness t: 4sqrt or 5sqrt (d = K*sqrt(t))")
	fs.StringVar(&o.links, "links", joints.DefaultLinks.String(), fmt.Sprintf("how links bridge a stack: %s (one link between the ends of consecutive sheets, across the gap) or %s (per sheet an offset link to its faying face, joined by zero-length faying joints)", joints.GapLinks, joints.OffsetLinks))
	fs.StringVar(&o.boltDOFs, "bolt-dofs", joints.DefaultBoltDOFs.String(), "degrees of freedom a bolt's rings couple, and its support to ground holds (from tx,ty,tz,rx,ry,rz)")
	fs.StringVar(&o.boltCoupling, "bolt-coupling", joints.DefaultBoltCoupling.String(), fmt.Sprintf("how a bolt's centre couples its ring: %s (the ring follows the centre's rigid motion) or %s (the centre follows the ring's weighted mean)", joints.RigidCoupling, joints.AveragingCoupling))
	fs.StringVar(&o.shank, "shank", joints.DefaultShank.String(), fmt.Sprintf("a bolt's shank between its centres: %s (a rigid link) or %s (a beam of the bolt's diameter between the sheets' centres, whatever --links, steel unless --shank-modulus)", joints.RigidShank, joints.BeamShank))
	fs.StringVar(&o.boltRing, "bolt-ring", joints.DefaultBoltRing.String(), fmt.Sprintf("the ring of a meshed hole: %s (its edge nodes) or %s (every node within the washer's radius)", joints.HoleRing, joints.WasherRing))
	fs.Float64Var(&o.shankModulus, "shank-modulus", 0, fmt.Sprintf("N/mm^2; Young's modulus of a beam shank (0: %g, steel)", joints.DefaultShankModulus))
	fs.Float64Var(&o.holeTol, "hole-tolerance", 0, fmt.Sprintf("mm; measured hole against declared before hole-size (0: %g)", joints.DefaultHoleTolerance))
	fs.StringVar(&o.failOn, "fail-on", "error", "exit 1 when findings reach this level: error, warning, info or never")
	fs.BoolVar(&o.noHTML, "no-html", false, "developer switch: leave report.html out, to measure what it costs")
	_ = fs.MarkHidden("no-html")
	fs.BoolVar(&o.noCheck, "no-check", false, "developer switch: leave the check step out, to measure what it costs")
	_ = fs.MarkHidden("no-check")
}

// apply layers the flags the user set over the job's settings.
func (o *buildOptions) apply(job *pipeline.Job) {
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
	if set("attach") {
		b.Attach = o.attach
	}
	if set("spot-dofs") {
		b.SpotDOFs = []string{o.spotDOFs}
	}
	if set("id-start") {
		b.IDStart, b.IDStartLine = &o.idStart, 0
	}
	if set("nugget-rule") {
		b.NuggetRule = o.nuggetRule
	}
	if set("links") {
		b.Links = o.links
	}
	if set("bolt-dofs") {
		b.BoltDOFs = []string{o.boltDOFs}
	}
	if set("bolt-coupling") {
		b.BoltCoupling = o.boltCoupling
	}
	if set("shank") {
		b.Shank = o.shank
	}
	if set("bolt-ring") {
		b.BoltRing = o.boltRing
	}
	if set("shank-modulus") {
		b.ShankModulus = &o.shankModulus
	}
	if set("hole-tolerance") {
		b.HoleTolerance = &o.holeTol
	}
	if set("fail-on") {
		b.FailOn = o.failOn
	}
}

func newBuildCommand(g *globalOptions) *cobra.Command {
	o := &buildOptions{}
	c := &cobra.Command{
		Use:   "build [JOB.yaml]",
		Short: "Build spot-weld and bolt connectors and write them with a connectivity report",
		Long: `build finds the sheets each spot weld and bolt joins, checks gaps, nugget sizes,
edge distances and bolt sizes, attaches a connector to every sheet and writes,
in the output directory:
  connectors.json   connector definitions (schema joinery/connectors, version 2)
  connectors.csv    one row per connector end, for spreadsheets
  connectors.vtk    links and joints not built, as VTK lines and points, for viewing
  report.json       summary and findings (schema joinery/report, version 2)
  report.txt        the same for a person
  report.html       the same with pictures, plots and a findings table, for a browser
Links bridge each pair of consecutive sheets between their ends (--links gap),
or (--links offset) by an offset link from each sheet's end along its normal to
its faying face (t/2 from a mid-surface mesh, 0 or t from an outer-face one, as
the parts table's surface says) and a zero-length faying joint between the two
faying points. --parts given again lays a table of surfaces over the parts
table (the surfaces.yaml of joinery offsets).
A bolt gets a centre node per sheet on its axis, coupled to the ring of nodes
round its hole (the hole's edge nodes; without a meshed hole, the nodes within
the washer's radius) on --bolt-dofs (default translations only: coupling a
shell's rotations at a hole over-stiffens the joint), rigidly or by averaging
(--bolt-coupling), and a shank between consecutive centres (--shank; with
--links offset a rigid shank joins the faying points, while a beam always runs
between the two sheets' centres, so that it spans the grip: a beam shorter than
` + fmt.Sprint(joints.MinBeamShank) + ` mm is shank-short, an error); a bolt listed with ground yes is
supported at its last centre. Sizes are checked against ISO 7089 washers and
ISO 273 clearance holes, and meshed holes against the declared diameter
(hole-size).
Inputs and settings come from a job file, from flags, or both (flags win).

` + document.Caution + `

` + exitStatusHelp,
		Example: `  joinery build examples/van-rear-crossmember/job.yaml
  joinery build job.yaml --bolt-coupling averaging --bolt-dofs tx,ty,tz,rx,ry,rz --shank beam
  joinery build --mesh body.vtk --parts parts.yaml --joints welds.csv --out build/
  joinery build job.yaml --attach node-pair --spot-dofs tx,ty,tz --fail-on warning
  joinery build job.yaml --links offset --parts parts.yaml --parts offsets/surfaces.yaml`,
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
	s, err := job.BuildSettings()
	if err != nil {
		return err
	}
	s.NoPage, s.NoCheck = o.noHTML, o.noCheck
	out, err := pipeline.Build(c.Context(), job, s, g.env())
	if err != nil {
		return err
	}
	return g.finish(buildJSON{Summary: out.Report.Summary, Inputs: out.Report.Inputs, Out: out.Out, Files: out.Files, RunID: out.RunID, Caution: document.Caution}, out.Summary, out.Reached, func() string { return out.FailMessage(s.FailOn) })
}

// buildJSON is what build --json prints.
type buildJSON struct {
	Summary document.Summary `json:"summary"`
	// Inputs records the input files, the id offsets of renumbered mesh
	// files and the joint-list columns kept as free tags.
	Inputs  document.Inputs `json:"inputs"`
	Out     string          `json:"out"`
	Files   []string        `json:"files"`
	RunID   string          `json:"run_id"`
	Caution string          `json:"caution"`
}
