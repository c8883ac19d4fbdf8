// Command synthbody writes a synthetic body-in-white model (see package
// joints/synth): the mesh, a parts table, a joint list and a job file, so
// that Joinery can be tried and timed at any scale.
//
// Usage:
//
//	go run ./examples/synthbody -elements 2000000 -welds 6000 -bolts 40 -out /tmp/body
//
// Without -out it writes into joinery-synthbody under the system's
// temporary directory (os.TempDir), never into the checkout, and prints
// where. It writes, in that folder: body.jmesh and/or body.vtk (binary legacy
// VTK; -format jmesh, vtk or both), parts.yaml, welds.csv, job.yaml, and
// truth.csv: the ground truth, one row per joint with its id, the part ids
// of its stack in order along the normal (separated by ';') and the unit
// normal nx, ny, nz.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"time"

	"github.com/joinery-cae/joinery/examples/internal/exio"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/geom/vtk"
	"github.com/joinery-cae/joinery/joints/synth"
	"github.com/joinery-cae/joinery/writers"
)

type options struct {
	cfg    synth.Config
	out    string
	format string
}

func main() {
	var o options
	fs := flag.NewFlagSet("synthbody", flag.ContinueOnError)
	fs.IntVar(&o.cfg.Elements, "elements", 200_000, "target number of shell elements")
	fs.IntVar(&o.cfg.Welds, "welds", 600, "number of spot welds")
	fs.IntVar(&o.cfg.Bolts, "bolts", 4, "number of bolts")
	fs.Uint64Var(&o.cfg.Seed, "seed", 1, "random seed; the same flags give the same files")
	fs.Float64Var(&o.cfg.ElementSize, "size", synth.DefaultElementSize, "nominal element size, mm")
	fs.StringVar(&o.out, "out", defaultOut(), "output folder (created if missing)")
	fs.StringVar(&o.format, "format", "jmesh", "mesh format: jmesh, vtk or both")
	if err := fs.Parse(os.Args[1:]); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return
		}
		os.Exit(2)
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(os.Stderr, "synthbody: unexpected arguments %q\n", fs.Args())
		os.Exit(2)
	}
	if err := run(o, os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "synthbody:", err)
		os.Exit(1)
	}
}

// defaultOut is the output folder without -out: joinery-synthbody under
// the system's temporary directory, so that a run from the checkout
// leaves it clean.
func defaultOut() string { return filepath.Join(os.TempDir(), "joinery-synthbody") }

func run(o options, stdout io.Writer) error {
	var meshes []string
	switch o.format {
	case "jmesh":
		meshes = []string{"body.jmesh"}
	case "vtk":
		meshes = []string{"body.vtk"}
	case "both":
		meshes = []string{"body.jmesh", "body.vtk"}
	default:
		return fmt.Errorf("unknown -format %q (want jmesh, vtk or both)", o.format)
	}
	start := time.Now()
	model, err := synth.Generate(o.cfg)
	if err != nil {
		return err
	}
	generated := time.Since(start)
	if err := os.MkdirAll(o.out, 0o755); err != nil {
		return err
	}
	m := model.Mesh
	for _, name := range meshes {
		write := func(w io.Writer) error { return native.Write(w, m) }
		if filepath.Ext(name) == ".vtk" {
			write = func(w io.Writer) error { return vtk.Write(w, m, true) }
		}
		if err := writers.WriteFileAtomic(filepath.Join(o.out, name), write); err != nil {
			return err
		}
	}
	about := fmt.Sprintf("synthetic body: -elements %d -welds %d -bolts %d -seed %d -size %g",
		o.cfg.Elements, o.cfg.Welds, o.cfg.Bolts, o.cfg.Seed, o.cfg.ElementSize)
	if err := writers.WriteFileAtomic(filepath.Join(o.out, "parts.yaml"), func(w io.Writer) error {
		return exio.WriteParts(w, m.Parts, about)
	}); err != nil {
		return err
	}
	if err := writers.WriteFileAtomic(filepath.Join(o.out, "welds.csv"), func(w io.Writer) error {
		return exio.WriteJoints(w, model.Joints, about)
	}); err != nil {
		return err
	}
	if err := writers.WriteFileAtomic(filepath.Join(o.out, "truth.csv"), func(w io.Writer) error {
		return writeTruth(w, model)
	}); err != nil {
		return err
	}
	if err := writers.WriteFileAtomic(filepath.Join(o.out, "job.yaml"), func(w io.Writer) error {
		_, err := fmt.Fprintf(w, "# joinery job, version 1\n# %s\nversion: 1\nmeshes: [%s]\nparts: parts.yaml\njoints: [welds.csv]\nout: out\nbuild:\n  attach: interpolated\n",
			about, meshes[0])
		return err
	}); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "%s: %d elements, %d nodes, %d parts, %d joints, pitch %g mm (generated in %v, written in %v)\nbuild it with: joinery build %s\n",
		o.out, m.NumElems(), m.NumNodes(), len(m.Parts), len(model.Joints), model.Pitch,
		generated.Round(time.Millisecond), (time.Since(start) - generated).Round(time.Millisecond),
		filepath.Join(o.out, "job.yaml"))
	return nil
}

// writeTruth writes the ground truth of model as CSV: id, stack, nx, ny, nz.
func writeTruth(w io.Writer, model *synth.Model) error {
	if _, err := io.WriteString(w, "id,stack,nx,ny,nz\n"); err != nil {
		return err
	}
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	var b []byte
	for i, j := range model.Joints {
		b = append(b[:0], j.ID...)
		for k, p := range model.Stacks[i] {
			if k == 0 {
				b = append(b, ',')
			} else {
				b = append(b, ';')
			}
			b = strconv.AppendInt(b, p, 10)
		}
		n := model.Normals[i]
		b = append(b, ","+num(n.X)+","+num(n.Y)+","+num(n.Z)+"\n"...)
		if _, err := w.Write(b); err != nil {
			return err
		}
	}
	return nil
}
