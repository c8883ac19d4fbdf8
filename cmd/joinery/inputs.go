package main

import (
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints/pipeline"
)

// inputOptions are the input flags shared by the commands that read a
// model: they override the same fields of a job file.
type inputOptions struct {
	meshes   []string
	parts    []string
	joints   []string
	renumber bool
	// partArray names the VTK cell array of part ids.
	partArray string
	flags     *pflag.FlagSet
	units     string
}

// AddFlags registers the input flags.
func (o *inputOptions) AddFlags(fs *pflag.FlagSet) {
	o.AddModelFlags(fs)
	fs.StringArrayVarP(&o.joints, "joints", "j", nil, "joint list (.csv or .yaml); repeat for several lists")
}

// AddModelFlags registers the input flags of the model alone, without
// --joints, for commands that read no joint list.
func (o *inputOptions) AddModelFlags(fs *pflag.FlagSet) {
	o.flags = fs
	fs.StringArrayVarP(&o.meshes, "mesh", "m", nil, "shell mesh file (.vtk, .vtu, .vtp or .jmesh); repeat for several files")
	fs.StringArrayVarP(&o.parts, "parts", "p", nil, "parts table (.yaml or .csv): thickness, surface, names; given again, a table laid over the first (e.g. the surfaces.yaml of joinery offsets)")
	fs.BoolVar(&o.renumber, "renumber", false, "offset clashing node and element ids of later mesh files instead of failing")
	fs.StringVar(&o.partArray, "part-array", geom.DefaultPartArray, "VTK cell array that holds the part ids (gmsh writes CellEntityIds)")
	fs.StringVar(&o.units, "units", "mm", "unit of every input length (meshes, parts table, joint lists): mm, m or in; outputs keep it, rules and options work in mm")
}

// apply overrides the job's inputs with the flags the user set.
func (o *inputOptions) apply(job *pipeline.Job) {
	if o.flags.Changed("mesh") {
		job.Meshes = o.meshes
	}
	if o.flags.Changed("parts") && len(o.parts) > 0 {
		job.Parts, job.PartsOverlays = o.parts[0], o.parts[1:]
	}
	if o.flags.Changed("joints") {
		job.Joints = o.joints
	}
	if o.flags.Changed("renumber") {
		job.Renumber = &o.renumber
	}
	if o.flags.Changed("part-array") {
		job.PartArray = o.partArray
	}
	if o.flags.Changed("units") {
		job.Units = o.units
	}
}

// loadJob reads the job file named by the first argument, or returns an
// empty job when there is none.
func loadJob(args []string) (*pipeline.Job, error) {
	if len(args) == 0 {
		return &pipeline.Job{}, nil
	}
	return pipeline.LoadJob(args[0])
}
