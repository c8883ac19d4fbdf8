package main

import (
	"errors"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/joints/inspect"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers"
)

type inspectOptions struct {
	in      inputOptions
	inspect inspect.Options
}

func (o *inspectOptions) AddFlags(fs *pflag.FlagSet) {
	o.in.AddFlags(fs)
	fs.BoolVar(&o.inspect.Deep, "deep", false, "also list free-edge loops per part and warped or degenerate elements")
	fs.Float64Var(&o.inspect.WarpLimit, "warp-limit", o.inspect.WarpLimit, "with --deep (exit 2 without it): warp angle in degrees above which a quad is listed")
	fs.Float64Var(&o.inspect.BoxMargin, "box-margin", o.inspect.BoxMargin, "margin in mm added to part bounding boxes when testing joints")
}

func newInspectCommand(g *globalOptions) *cobra.Command {
	o := &inspectOptions{inspect: inspect.DefaultOptions()}
	c := &cobra.Command{
		Use:   "inspect [JOB.yaml]",
		Short: "Read meshes, parts and joints and summarise them",
		Long: `inspect reads everything a connector build would read and prints a summary:
parts with element counts, thickness, area and bounding box; node and element
counts; cells skipped for their type; joints per kind and joints outside every
part's bounding box. --deep adds free-edge loops per part, warped or
degenerate elements with their worst values, and elements whose normals
disagree with their neighbours' (normals-flipped, with the elements to
flip). It writes no files; --quiet leaves out only the progress bars.
Inputs come from a job file, from flags, or both (flags win).

` + inspectExitHelp,
		Example: `  joinery inspect examples/van-rear-crossmember/job.yaml
  joinery inspect --mesh floor.vtk --mesh beam.vtu --parts parts.yaml --joints welds.csv --deep
  joinery inspect job.yaml --json > summary.json`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			return runInspect(c, o, g, args)
		},
	}
	o.AddFlags(c.Flags())
	return c
}

func runInspect(c *cobra.Command, o *inspectOptions, g *globalOptions, args []string) error {
	if err := o.inspect.Validate(); err != nil {
		return pipeline.UsageError(err)
	}
	if c.Flags().Changed("warp-limit") && !o.inspect.Deep {
		return pipeline.UsageError(errors.New("--warp-limit applies with --deep only, which lists the warped elements: add --deep"))
	}
	job, err := loadJob(args)
	if err != nil {
		return err
	}
	o.in.apply(job)
	in, err := pipeline.Load(c.Context(), job, g.env())
	if err != nil {
		return err
	}
	for _, f := range in.Findings {
		g.note("warning: %s: %s", f.Code, f.Message)
	}
	m := in.Model
	rep := inspect.Run(inspect.ModelInfo{Mesh: m.Mesh, Renumbered: m.Renumbered, UnusedParts: m.UnusedParts, PartsTable: job.Parts != ""}, in.Joints, o.inspect)
	if g.json {
		return g.writeJSON(rep)
	}
	return writers.WriteInspectText(g.stdout, rep)
}
