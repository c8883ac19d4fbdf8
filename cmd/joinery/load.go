package main

import (
	"context"
	"fmt"
	"runtime"

	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
)

// loadJob reads the job file named by the first argument, or returns an
// empty job when there is none.
func loadJob(args []string) (*joints.Job, error) {
	if len(args) == 0 {
		return &joints.Job{}, nil
	}
	return joints.LoadJob(args[0])
}

// loadInputs reads the model and the joint lists a job names.
func loadInputs(ctx context.Context, job *joints.Job, g *globalOptions) (*meshio.Model, []joints.Joint, error) {
	if len(job.Meshes) == 0 {
		return nil, nil, usageError{fmt.Errorf("no mesh given: name one with --mesh or in a job file")}
	}
	prog := g.progress()
	prog.Start(fmt.Sprintf("reading %d mesh file(s)", len(job.Meshes)), 0)
	model, err := meshio.Load(meshio.LoadOptions{Meshes: job.Meshes, Parts: job.Parts, Renumber: job.Renumber != nil && *job.Renumber})
	prog.Done()
	if err != nil {
		return nil, nil, err
	}
	// The readers' file buffers, often larger than the model, are garbage
	// now; collect them before the next steps grow the heap, so that the
	// process reuses their memory instead of asking the system for more.
	runtime.GC()
	js, warnings, err := joints.ReadJointLists(job.Joints)
	if err != nil {
		return nil, nil, err
	}
	for _, w := range warnings {
		g.note("warning: %s", w)
	}
	if err := joints.CheckParts(js, model.Mesh); err != nil {
		return nil, nil, err
	}
	return model, js, ctx.Err()
}
