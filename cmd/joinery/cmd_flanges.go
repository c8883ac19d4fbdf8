package main

import (
	"errors"
	"fmt"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers/document"
)

// flangesOptions are the flags of flanges.
type flangesOptions struct {
	in           inputOptions
	out          string
	pairs        []string
	pitch        string
	endMargin    float64
	attach       string
	gapAllowance float64
	nuggetRule   string
	failOn       string
	flags        *pflag.FlagSet
}

// AddFlags registers the flags of flanges; the input flags are those of
// build without --joints (flanges reads no joint list).
func (o *flangesOptions) AddFlags(fs *pflag.FlagSet) {
	o.flags = fs
	o.in.AddModelFlags(fs)
	fs.StringVarP(&o.out, "out", "o", "", "output directory (default: the job's out with "+pipeline.FlangesSuffix+" appended, else ./"+pipeline.DefaultOut+pipeline.FlangesSuffix+": beside a build's set, not in it)")
	fs.StringArrayVar(&o.pairs, "pair", nil, "part pair A,B to find flanges of; repeat for several (default: every pair of parts in contact)")
	fs.StringVar(&o.pitch, "pitch", "", "place spot welds every MM (at least 2.9) along each flange, or 'table' for the minimum spacing of the spacing table (default: place none)")
	fs.Float64Var(&o.endMargin, "end-margin", 0, "with --pitch: mm from each end of a flange to its first weld (0: one nugget diameter)")
	fs.StringVar(&o.attach, "attach", joints.DefaultAttach.String(), "attachment the welds will be built with (interpolated, node-pair or patch): it decides which welds share elements")
	fs.Float64Var(&o.gapAllowance, "gap-allowance", 0, fmt.Sprintf("mm; allowed deviation of a gap from contact (0: %g x the contact gap (t1+t2)/2)", joints.DefaultGapAllowanceFactor))
	fs.StringVar(&o.nuggetRule, "nugget-rule", joints.DefaultNuggetRule.String(), "nugget diameter from the governing thickness t: 4sqrt or 5sqrt (d = K*sqrt(t))")
	fs.StringVar(&o.failOn, "fail-on", "error", "exit 1 when findings reach this level: error, warning, info or never")
}

// apply layers the flags the user set over the job's settings.
func (o *flangesOptions) apply(job *pipeline.Job) error {
	o.in.apply(job)
	set := o.flags.Changed
	b, f := &job.Build, &job.Flanges
	if set("out") {
		job.Out, job.OutGiven = o.out, true
	}
	if set("pair") {
		f.Pairs = [][2]int64{}
		for _, s := range o.pairs {
			p, err := joints.ParsePair(s)
			if err != nil {
				return pipeline.UsageError(fmt.Errorf("--pair: %w", err))
			}
			f.Pairs = append(f.Pairs, p)
		}
	}
	if set("pitch") {
		if _, err := joints.ParsePitch(o.pitch); err != nil {
			return pipeline.UsageError(fmt.Errorf("--pitch: %w", err))
		}
		f.Pitch = o.pitch
	}
	if set("end-margin") {
		f.EndMargin = &o.endMargin
	}
	if set("attach") {
		b.Attach = o.attach
	}
	if set("gap-allowance") {
		b.GapAllowance = &o.gapAllowance
	}
	if set("nugget-rule") {
		b.NuggetRule = o.nuggetRule
	}
	if set("fail-on") {
		b.FailOn = o.failOn
	}
	return nil
}

func newFlangesCommand(g *globalOptions) *cobra.Command {
	o := &flangesOptions{}
	c := &cobra.Command{
		Use:   "flanges [JOB.yaml]",
		Short: "Find flanges and facing node pairs; place spot welds at a pitch that never makes a seam",
		Long: `flanges finds every flange of the part pairs asked for (--pair, repeatable;
default: every pair of parts whose sheets come within contact of each other):
each connected overlap where two sheets lie in contact, with its facing node
pairs, area, length, width, centreline, and whether the meshes match node for
node (congruent) or not (projected) and whether it is a strip (open) or a ring
(closed). With --pitch it places spot welds along every centreline, on the
faying surface, each joining the whole stack of sheets there, so that no two
welds' attachment nodes share an element (the welds stay apart instead of
acting as a seam); it checks the welds with build's own rules and audits
them as build does (seams, duplicates, pitch, free parts, mechanisms). It
writes, in the output directory:
  flanges.json  the flanges, their facing pairs and welds (schema joinery/flanges, version 2)
  joints.csv    the welds placed, as a joint list for build (empty without --pitch)
  flanges.vtk   centrelines, facing pairs and welds, for viewing beside the mesh
  report.json   summary and findings (schema joinery/report, version 2)
  report.txt    the same for a person
  report.html   the same as one page to open in a browser
By default the output directory is the job's out with -flanges appended,
beside a build's set.
Inputs and settings come from a job file (its build and flanges sections),
from flags, or both (flags win).

` + document.Caution + `

` + exitStatusHelp,
		Example: `  joinery flanges examples/van-rear-crossmember/job.yaml --out flanges/
  joinery flanges --mesh body.vtk --parts parts.yaml --pair 100,200 --pitch 30 --out flanges/
  joinery flanges job.yaml --pitch table --attach node-pair --out flanges/ && joinery build job.yaml --joints flanges/joints.csv --attach node-pair`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			return runFlanges(c, o, g, args)
		},
	}
	o.AddFlags(c.Flags())
	return c
}

func runFlanges(c *cobra.Command, o *flangesOptions, g *globalOptions, args []string) error {
	job, err := loadJob(args)
	if err != nil {
		return err
	}
	if err := o.apply(job); err != nil {
		return err
	}
	s, err := job.FlangeSettings()
	if err != nil {
		return err
	}
	if o.flags.Changed("end-margin") && !s.Flanges.Pitch.Set() {
		return pipeline.UsageError(errors.New("--end-margin places the first weld of each flange: it needs --pitch (or the job's flanges: pitch), without which no weld is placed"))
	}
	out, err := pipeline.Flanges(c.Context(), job, s, g.env())
	if err != nil {
		return err
	}
	return g.finish(flangesJSON{Summary: out.Report.Summary, Flanges: len(out.Flanges.Flanges), Out: out.Out,
		Files: out.Files, RunID: out.RunID, Caution: document.Caution}, out.FlangesSummary, out.Reached, func() string { return out.FailMessage(s.FailOn) })
}

// flangesJSON is what flanges --json prints.
type flangesJSON struct {
	Summary document.Summary `json:"summary"`
	Flanges int              `json:"flanges"`
	Out     string           `json:"out"`
	Files   []string         `json:"files"`
	RunID   string           `json:"run_id"`
	Caution string           `json:"caution"`
}
