package main

import (
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers"
)

type inspectOptions struct {
	in      inputOptions
	inspect joints.InspectOptions
}

func (o *inspectOptions) AddFlags(fs *pflag.FlagSet) {
	o.in.AddFlags(fs)
	fs.BoolVar(&o.inspect.Deep, "deep", false, "also list free-edge loops per part and warped or degenerate elements")
	fs.Float64Var(&o.inspect.WarpLimit, "warp-limit", o.inspect.WarpLimit, "with --deep: warp angle in degrees above which a quad is listed")
	fs.Float64Var(&o.inspect.BoxMargin, "box-margin", o.inspect.BoxMargin, "margin in mm added to part bounding boxes when testing joints")
}

func newInspectCommand(g *globalOptions) *cobra.Command {
	o := &inspectOptions{inspect: joints.DefaultInspectOptions()}
	c := &cobra.Command{
		Use:   "inspect [JOB.yaml]",
		Short: "Read meshes, parts and joints and summarise them",
		Long: `inspect reads everything a connector build would read and prints a summary:
parts with element counts, thickness, area and bounding box; node and element
counts; cells skipped for their type; joints per kind and joints outside every
part's bounding box. --deep adds free-edge loops per part and warped or
degenerate elements with their worst values.

Inputs come from a job file, from flags, or both (flags win).

EXIT STATUS
  0  read and summarised
  2  bad usage or unreadable input`,
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
		return usageError{err}
	}
	job, err := loadJob(args)
	if err != nil {
		return err
	}
	o.in.apply(job)
	model, js, err := loadInputs(c.Context(), job, g)
	if err != nil {
		return err
	}
	rep := joints.Inspect(joints.ModelInfo{Mesh: model.Mesh, Renumbered: model.Renumbered, UnusedParts: model.UnusedParts}, js, o.inspect)
	if g.json {
		return writers.WriteJSON(g.stdout, rep)
	}
	return writers.WriteInspectText(g.stdout, rep)
}
