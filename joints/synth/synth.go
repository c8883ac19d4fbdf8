package synth

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Limits of a Config.
const (
	// MaxElements is the largest element count Generate accepts.
	MaxElements = 20_000_000
	// DefaultElementSize is the element size used when Config.ElementSize
	// is zero, mm.
	DefaultElementSize = 5.0
	// MinPitch and MaxPitch bound the weld pitch, mm (car-body weld pitch,
	// common practice).
	MinPitch = 25.0
	MaxPitch = 40.0
)

// Config says what model to generate.
type Config struct {
	// Elements is the target number of shell elements (mostly quads); the
	// model has within a few per cent of it. Must be positive.
	Elements int
	// Welds is the exact number of spot welds; 0 for none.
	Welds int
	// Bolts is the exact number of bolts; 0 for none.
	Bolts int
	// Seed selects the model; the same Config always gives the same model.
	Seed uint64
	// ElementSize is the nominal element edge length in mm; 0 means
	// DefaultElementSize. Must lie in [0.5, 25].
	ElementSize float64
}

// Model is a generated model and its ground truth.
type Model struct {
	// Mesh holds the sheets; every part has a name, a thickness, a
	// material and the mid reference surface. Mesh.Index has been called.
	Mesh *geom.Mesh
	// Joints are the spot welds and bolts, in generation order (assembly,
	// weld line, position along the line).
	Joints []joints.Joint
	// Stacks is aligned with Joints: the ids of the parts each joint
	// passes through, ordered along Normals[i].
	Stacks [][]int64
	// Normals is aligned with Joints: the unit normal of the faying
	// surfaces at the joint.
	Normals []r3.Vec
	// Pitch is the weld pitch used on every weld line, mm.
	Pitch float64
}

// Generate builds the model cfg describes. Errors (an invalid Config, or
// more joints than the flanges of the requested element count can hold at
// the minimum pitch) are plain errors, not input errors.
func Generate(cfg Config) (*Model, error) {
	if err := cfg.check(); err != nil {
		return nil, err
	}
	if cfg.ElementSize == 0 {
		cfg.ElementSize = DefaultElementSize
	}
	rng := rand.New(rand.NewPCG(cfg.Seed, 0x5eed_b0d7))
	specs := newSpecs(cfg, rng)
	asms := sizeModel(cfg, specs)
	links := place(cfg, asms, rng)
	model := &Model{}
	if err := placeJoints(cfg, asms, links, rng, model); err != nil {
		return nil, err
	}
	mesh, err := buildMesh(cfg, asms)
	if err != nil {
		return nil, err
	}
	model.Mesh = mesh
	return model, nil
}

func (cfg Config) check() error {
	switch {
	case cfg.Elements <= 0:
		return fmt.Errorf("synth: element count %d is not positive", cfg.Elements)
	case cfg.Elements > MaxElements:
		return fmt.Errorf("synth: element count %d is above the limit of %d", cfg.Elements, MaxElements)
	case cfg.Welds < 0:
		return fmt.Errorf("synth: weld count %d is negative", cfg.Welds)
	case cfg.Bolts < 0:
		return fmt.Errorf("synth: bolt count %d is negative", cfg.Bolts)
	case math.IsNaN(cfg.ElementSize) || cfg.ElementSize != 0 && (cfg.ElementSize < 0.5 || cfg.ElementSize > 25):
		return fmt.Errorf("synth: element size %g mm is outside 0.5 to 25 mm", cfg.ElementSize)
	}
	return nil
}

// ErrTooManyJoints is returned (wrapped) when the requested joints do not
// fit on the flanges at the minimum pitch.
var ErrTooManyJoints = errors.New("synth: too many joints for the element count")
