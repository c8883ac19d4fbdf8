package main

import (
	"fmt"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/offset"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers/document"
)

// offsetsOptions are the flags of offsets.
type offsetsOptions struct {
	in           inputOptions
	out          string
	reach        float64
	gapAllowance float64
	failOn       string
	flags        *pflag.FlagSet
}

// AddFlags registers the flags of offsets; their default texts come from
// the joints and offset packages' defaults.
func (o *offsetsOptions) AddFlags(fs *pflag.FlagSet) {
	o.flags = fs
	o.in.AddFlags(fs)
	fs.StringVarP(&o.out, "out", "o", "", "output directory (default: the job's out with "+pipeline.OffsetsSuffix+" appended, else ./"+pipeline.DefaultOut+pipeline.OffsetsSuffix+": beside a build's set, not in it)")
	fs.Float64Var(&o.reach, "reach", 0, "mm; around joint sites, sheets farther away are ignored (0: twice the largest thickness plus its allowance, the window overlaps are sought in)")
	fs.Float64Var(&o.gapAllowance, "gap-allowance", 0, fmt.Sprintf("mm; a separation agrees with a pair of surfaces within it, and within a quarter of the thinner sheet (0: %g x the contact gap (t1+t2)/2)", joints.DefaultGapAllowanceFactor))
	fs.StringVar(&o.failOn, "fail-on", "error", "exit 1 when findings reach this level: error, warning, info or never")
}

// apply layers the flags the user set over the job's settings.
func (o *offsetsOptions) apply(job *pipeline.Job) {
	o.in.apply(job)
	set := o.flags.Changed
	if set("out") {
		job.Out, job.OutGiven = o.out, true
	}
	if set("reach") {
		job.Build.Reach = &o.reach
	}
	if set("gap-allowance") {
		job.Build.GapAllowance = &o.gapAllowance
	}
	if set("fail-on") {
		job.Build.FailOn = o.failOn
	}
}

func newOffsetsCommand(g *globalOptions) *cobra.Command {
	o := &offsetsOptions{}
	c := &cobra.Command{
		Use:   "offsets [JOB.yaml]",
		Short: "Find which surface each part was meshed on: mid-surface, top or bottom face",
		Long: `offsets finds, for every part, whether its mesh was drawn on its mid-surface,
its top face or its bottom face (top: the face its element normals point to),
whatever the parts table says. It measures how far apart the meshes lie
wherever two parts face each other (every overlap of near-parallel elements
up to t1+t2 apart, and every joint site when joint lists are given), and
solves one assignment of surfaces that agrees with the most evidence,
preferring the mid-surface where the evidence cannot tell. Before that it
makes each part's normals agree across shared edges, and reports the
elements to flip (normals-flipped). It writes, in the output directory:
  surfaces.yaml   a parts table of id, thickness, surface and offset, to lay
                  over the parts table: build --parts parts.yaml --parts surfaces.yaml
  surfaces.json   per part the surface found, its confidence, its evidence and
                  the elements to flip; every contact (schema joinery/surfaces, version 1)
  report.json     the findings (schema joinery/report, version 2)
  report.txt      the same for a person
  report.html     the same as one page to open in a browser
Findings: normals-flipped, surface-differs (found differs from the table),
surface-unsure (confidence below ` + fmt.Sprint(offset.UnsureConfidence) + `, or no evidence), contact-disagrees
(a place where the parts stand off or penetrate whatever their surfaces).
Inputs and settings come from a job file, from flags, or both (flags win).

` + document.Caution + `

` + exitStatusHelp,
		Example: `  joinery offsets examples/van-rear-crossmember/job.yaml
  joinery offsets --mesh body.vtk --parts parts.yaml --joints welds.csv --out offsets/
  joinery build --mesh body.vtk --parts parts.yaml --parts offsets/surfaces.yaml --joints welds.csv`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			return runOffsets(c, o, g, args)
		},
	}
	o.AddFlags(c.Flags())
	return c
}

func runOffsets(c *cobra.Command, o *offsetsOptions, g *globalOptions, args []string) error {
	job, err := loadJob(args)
	if err != nil {
		return err
	}
	o.apply(job)
	s, err := job.OffsetsSettings()
	if err != nil {
		return err
	}
	out, err := pipeline.Offsets(c.Context(), job, s, g.env())
	if err != nil {
		return err
	}
	return g.finish(offsetsJSON{Summary: out.Report.Summary, Parts: out.Surfaces.Parts, Out: out.Out, Files: out.Files, RunID: out.RunID, Caution: document.Caution}, out.Summary, out.Reached, func() string { return fmt.Sprintf("findings at or above %q: see %s/report.txt", s.FailOn, out.Out) })
}

// offsetsJSON is what offsets --json prints.
type offsetsJSON struct {
	Summary document.Summary          `json:"summary"`
	Parts   []document.PartSurfaceDoc `json:"parts"`
	Out     string                    `json:"out"`
	Files   []string                  `json:"files"`
	RunID   string                    `json:"run_id"`
	Caution string                    `json:"caution"`
}
