package pipeline

import (
	"context"
	"errors"
	"fmt"
	"hash"
	"io"
	"runtime"
	"strings"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
)

// ErrUsage marks a run that cannot start because of how it was asked
// for (no mesh given, no joints for a command that needs them, bad
// option values): the command line's fault, exit status 2.
var ErrUsage = errors.New("bad usage")

// usageError is an error of the command line or job settings.
type usageError struct{ err error }

func (e *usageError) Error() string        { return e.err.Error() }
func (e *usageError) Unwrap() error        { return e.err }
func (e *usageError) Is(target error) bool { return target == ErrUsage }

// UsageError marks err as a usage error (errors.Is(err, ErrUsage)).
func UsageError(err error) error {
	if err == nil {
		return nil
	}
	return &usageError{err}
}

// Env is what a run needs from its caller: where progress goes and where
// notes (input warnings) go, and the name of the program.
type Env struct {
	Progress  geom.Progress                 // nil: none
	Note      func(format string, a ...any) // nil: notes are dropped
	Generator string                        // "joinery <version>"
}

func (e *Env) progress() geom.Progress {
	if e.Progress == nil {
		return geom.NoProgress{}
	}
	return e.Progress
}

func (e *Env) note(format string, a ...any) {
	if e.Note != nil {
		e.Note(format, a...)
	}
}

// Inputs is everything a job reads, with every length in millimetres.
type Inputs struct {
	Job    *Job
	Model  *meshio.Model
	Joints []joints.Joint
	// Unit is the unit the inputs were given in; Model and Joints have
	// been scaled from it to mm, and outputs are written back in it.
	Unit     joints.Unit
	Warnings []joints.InputWarning
	// Findings are the findings about the inputs as a whole (a
	// units-suspect warning), for the report of a run.
	Findings []joints.Finding
	// Tags names the free tag columns of each joint list that has some.
	Tags []joints.ListTags
	// Connectors are the connector files a check read, as given; they
	// enter the run id with their bytes' digest.
	Connectors []string
	// sums holds the digest of every input file, taken as it was read
	// (LoadForSet); nil after Load.
	sums *inputSums
	// index, when set, is the spatial index BuildConnectors uses instead
	// of building its own: a sweep's, built once for all its variants
	// (spot.IndexForAll).
	index *geom.Index
	// stacks, when set, keeps the welds' stacks for the builds that share
	// them (a sweep's variants).
	stacks *spot.Stacks
	// shared and shareKey, when set, let a sweep's variants share the
	// connectors of a builder (Inputs.buildShared in sweep.go).
	shared   *sharedBuilds
	shareKey map[builders]string
}

// Load reads the model and the joint lists a job names, holds their
// values to the plausible ranges (geom.MaxThickness, geom.MaxCoordinate,
// joints.CheckJoints) and scales them from the job's unit to mm. Input
// warnings go to env's notes and are kept in Inputs.Warnings.
func Load(ctx context.Context, job *Job, env Env) (*Inputs, error) { return load(ctx, job, env, nil) }

// LoadForSet loads like Load and also hashes every input file as it is
// read, for the run id of an output set (Inputs.RunInfo): the run of
// every command that writes outputs loads with it.
func LoadForSet(ctx context.Context, job *Job, env Env) (*Inputs, error) {
	return load(ctx, job, env, &inputSums{sums: map[string]hash.Hash{}})
}

func load(ctx context.Context, job *Job, env Env, sums *inputSums) (*Inputs, error) {
	if len(job.Meshes) == 0 {
		return nil, UsageError(errors.New("no mesh given: name one with --mesh or in a job file"))
	}
	if job.PartArray != "" {
		if err := CheckPartArray(job.PartArray); err != nil {
			return nil, UsageError(fmt.Errorf("part array: %w", err))
		}
	}
	unit, err := joints.ParseUnit(job.Units)
	if err != nil {
		return nil, UsageError(fmt.Errorf("units: %w", err))
	}
	scale := unit.MM()
	lo := meshio.LoadOptions{Meshes: job.Meshes, Parts: job.Parts, Renumber: job.Renumber != nil && *job.Renumber,
		PartArray: job.PartArray, Progress: env.progress(), Scale: scale}
	var digest func(string) io.Writer
	if sums != nil {
		digest = sums.writer
		lo.Digest = digest
	}
	model, err := meshio.Load(lo)
	if err != nil {
		return nil, err
	}
	// Overlays compare their thicknesses with the first table's, both
	// in the inputs' unit: lay them before scaling to mm.
	if err := model.Overlay(job.PartsOverlays, digest, scale); err != nil {
		return nil, err
	}
	model.Mesh.Scale(scale)
	// The readers' file buffers, often larger than the model, are garbage
	// now; collect them before the next steps grow the heap, so that the
	// process reuses their memory instead of asking the system for more.
	runtime.GC()
	lists, err := joints.ReadJointListsDigest(job.Joints, digest)
	if err != nil {
		return nil, err
	}
	for _, w := range lists.Warnings {
		env.note("warning: %s", w)
	}
	for _, t := range lists.Tags {
		env.note("note: %s: kept as free tags: %s", t.File, strings.Join(t.Columns, ", "))
	}
	if err := joints.CheckJoints(lists.Joints, scale); err != nil {
		return nil, err
	}
	joints.ScaleJoints(lists.Joints, scale)
	if err := joints.CheckParts(lists.Joints, model.Mesh); err != nil {
		return nil, err
	}
	in := &Inputs{Job: job, Model: model, Joints: lists.Joints, Unit: unit, Warnings: lists.Warnings, Tags: lists.Tags, sums: sums}
	if f, ok := joints.UnitsSuspect(model.Mesh, unit); ok {
		in.Findings = append(in.Findings, f)
	}
	return in, ctx.Err()
}
