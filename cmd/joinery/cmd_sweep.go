package main

import (
	"fmt"
	"slices"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers/document"
)

// sweepOptions are the flags of sweep: the build's, and the varied
// settings.
type sweepOptions struct {
	build       buildOptions
	vary        []string
	maxVariants int
}

// AddFlags registers the sweep flags.
func (o *sweepOptions) AddFlags(fs *pflag.FlagSet) {
	o.build.AddFlags(fs)
	fs.Lookup("out").Usage = "output directory (default: the job's out for a job with a sweep: section, else the job's out with " + pipeline.SweepSuffix + " appended, else ./" + pipeline.DefaultOut + pipeline.SweepSuffix + ")"
	fs.StringArrayVar(&o.vary, "vary", nil, "KEY=V1,V2,...: build a variant per value (repeat for more keys; the last varies fastest; a DOF set is written tx+ty+tz)")
	fs.IntVar(&o.maxVariants, "max-variants", 0, fmt.Sprintf("refuse a sweep of more variants than this, up to %d (0: the job's max_variants, else %d)", pipeline.MaxMaxVariants, pipeline.DefaultMaxVariants))
}

func newSweepCommand(g *globalOptions) *cobra.Command {
	o := &sweepOptions{}
	var keys []string
	for _, k := range pipeline.VaryKeys() {
		keys = append(keys, k.Flag)
	}
	c := &cobra.Command{
		Use:   "sweep [JOB.yaml] --vary KEY=V1,V2 [--vary ...] [--out DIR]",
		Short: "Build the same model several ways and compare the variants side by side",
		Long: `sweep builds one job several ways, one variant per combination of the varied
settings (their Cartesian product, the last --vary varying fastest), and
compares them before any solve. The mesh is read and indexed once; the
variants are built in parallel. DIR holds, written as one set:
  NN-key=value-.../   each variant's build outputs, as 'joinery build' writes them
                      with the same settings (byte for byte)
  manifest.json       every variant's settings, counts, findings, free motions and
                      the SHA-256 of each of its files (schema joinery/sweep-manifest)
  manifest.yaml       the same in YAML
  compare.txt         the variants side by side: connectors by kind and state,
                      coupled degrees of freedom, findings by code, free motions,
                      and the connection stiffness of the part pairs that change most
  compare.json        the same for programs (schema joinery/sweep-compare), every pair
  compare.csv         the stiffness of every part pair in every variant
  report.html         a variant table and charts of the stiffness ratios, linking
                      each variant's own page
Keys (--vary, or the job's sweep: vary: with the job keys): ` + strings.Join(keys, ", ") + `.
Values are separated by ','; values take the form their build flag takes, a set
of degrees of freedom written with '+'. The bolt keys change the bolts'
connectors only. A variant whose connectors leave a mechanism or an unrestrained
freedom is flagged (MOVES) in the manifest and the summary. Other build flags
apply to every variant; --vary wins over them and over the job's build settings.

The connection stiffness takes every part as rigid and every connector as a
spring on the degrees of freedom it couples (a spot weld as a Timoshenko beam
of the nugget diameter and the sheets' contact length; steel unless the parts
table names aluminium), assembled per part pair about its centroid: a
comparison aid with rigid sheets, not a model of the joints' real stiffness.

` + document.Caution + `

` + exitStatusHelp,
		Example: `  joinery sweep examples/van-rear-crossmember/job.yaml --vary spot-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz --vary attach=interpolated,patch --out sweep/
  joinery sweep job.yaml --vary links=gap,offset --vary nugget-rule=4sqrt,5sqrt
  joinery sweep examples/van-rear-crossmember/sweep.yaml     # the job's sweep: section
  joinery sweep job.yaml --vary attach=interpolated,node-pair,patch --json`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			return runSweep(c, o, g, args)
		},
	}
	o.AddFlags(c.Flags())
	return c
}

func runSweep(c *cobra.Command, o *sweepOptions, g *globalOptions, args []string) error {
	if o.maxVariants < 0 {
		return pipeline.UsageError(fmt.Errorf("--max-variants %d: want 1 to %d (0 for the default)", o.maxVariants, pipeline.MaxMaxVariants))
	}
	var vary []pipeline.Vary
	for _, s := range o.vary {
		v, err := pipeline.ParseVary(s)
		if err != nil {
			return err
		}
		vary = append(vary, v)
		if note := singleDOFNote(v); note != "" && !g.quiet && !g.json {
			fmt.Fprintln(g.stderr, "joinery: note:", note)
		}
	}
	job, err := loadJob(args)
	if err != nil {
		return err
	}
	o.build.apply(job)
	s, err := job.SweepSettings(vary, o.maxVariants)
	if err != nil {
		return err
	}
	s.Build.NoPage, s.Build.NoCheck = o.build.noHTML, o.build.noCheck
	out, err := pipeline.Sweep(c.Context(), job, s, g.env())
	if err != nil {
		return err
	}
	return g.finish(sweepJSON{Out: out.Out, Files: out.Files, RunID: out.RunID, Variants: out.Manifest.Variants,
		Moving: out.Manifest.Moving, Caution: document.Caution}, out.Summary, out.Reached, func() string {
		return fmt.Sprintf("findings at or above %q in some variant: see %s", s.Build.FailOn, out.Out+"/manifest.yaml")
	})
}

// sweepJSON is what sweep --json prints.
type sweepJSON struct {
	Out      string                `json:"out"`
	Files    []string              `json:"files"`
	RunID    string                `json:"run_id"`
	Moving   int                   `json:"moving_variants"`
	Variants []document.VariantDoc `json:"variants"`
	Caution  string                `json:"caution"`
}

// singleDOFNote returns a note when every value of a degrees-of-freedom
// key is one degree of freedom (spot-dofs=tx,ty,tz): most likely the set
// tx+ty+tz was meant, which build's --spot-dofs writes tx,ty,tz.
func singleDOFNote(v pipeline.Vary) string {
	if !strings.HasSuffix(v.Key, "-dofs") || len(v.Values) < 2 {
		return ""
	}
	for _, val := range v.Values {
		if !slices.Contains([]string{"tx", "ty", "tz", "rx", "ry", "rz"}, val) {
			return ""
		}
	}
	return fmt.Sprintf("--vary %s=%s makes %d variants, each coupling one degree of freedom; a set of them is written with + (%s=%s)",
		v.Key, strings.Join(v.Values, ","), len(v.Values), v.Key, strings.Join(v.Values, "+"))
}
