package pipeline

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"path/filepath"
	"strings"

	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio/tabular"
	"github.com/joinery-cae/joinery/joints"
)

// JobVersion is the job file version this package reads.
const JobVersion = 1

// Job is a whole connector build described in one YAML file, so that it
// can be kept under version control:
//
//	# joinery job, version 1
//	version: 1                       # required
//	meshes: [mesh/floor.vtk, mesh/beam.jmesh]   # required, at least one
//	parts: parts.yaml                # optional parts table; a list lays later
//	                                 # tables over the first (surfaces.yaml)
//	joints: [welds.csv]              # joint lists
//	out: out                         # output directory
//	renumber: false                  # shift clashing ids of later meshes
//	part_array: part                 # VTK cell array with the part ids
//	units: mm                        # mm | m | in: unit of every input length
//	build:
//	  reach: 0                       # mm, 0 = automatic
//	  gap_allowance: 0               # mm, 0 = automatic
//	  attach: interpolated           # node-pair | interpolated | patch
//	  spot_dofs: [tx, ty, tz, rx, ry, rz]
//	  id_start: 0                    # 0 = above every id in the mesh
//	  nugget_rule: 5sqrt             # 4sqrt | 5sqrt
//	  links: gap                     # gap | offset
//	  bolt_dofs: [tx, ty, tz]        # what a bolt's rings couple
//	  bolt_coupling: rigid           # rigid | averaging
//	  shank: rigid                   # rigid | beam
//	  bolt_ring: hole                # hole | washer (rings of meshed holes)
//	  shank_modulus: 0               # N/mm^2 of a beam shank, 0 = steel
//	  hole_tolerance: 0              # mm, 0 = 0.25
//	  fail_on: error                 # error | warning | info | never
//	  groups:                        # per joint group overrides
//	    rear-rail: {attach: node-pair}
//	flanges:                         # joinery flanges (see JobFlanges)
//	  pitch: 30                      # mm, or table; none: no welds placed
//	  end_margin: 0                  # mm, 0 = one nugget diameter
//	  pairs: [[100, 200]]            # part pairs; none: every pair in contact
//
// Relative paths are relative to the job file's directory; LoadJob
// resolves them, and the outputs record them as written (RecordedPath).
// Unknown keys are errors.
//
// Every setting records whether the file gave it: strings are "" and
// lists nil when not given, numbers and booleans are pointers, nil when
// not given. A command therefore layers its settings as defaults, then
// the job (JobBuild.Apply sets only what the file gave), then the flags
// the user set on the command line (pflag's Changed), so a flag overrides
// the job and the job overrides the defaults.
type Job struct {
	Version int      `yaml:"version"`
	Meshes  []string `yaml:"meshes"`
	Parts   string   `yaml:"parts,omitempty"`
	// PartsOverlays are further parts tables laid over Parts in order
	// (meshio.Model.Overlay): the job's parts list after its first
	// entry, or --parts given more than once.
	PartsOverlays []string `yaml:"-"`
	Joints        []string `yaml:"joints,omitempty"`
	Out           string   `yaml:"out,omitempty"`
	// OutGiven is set when Out was named on the command line: the
	// commands that write beside a build's set (check, flanges, offsets,
	// sweep) then write into Out as given instead of Out with their
	// suffix appended (their Settings functions resolve it).
	OutGiven bool  `yaml:"-"`
	Renumber *bool `yaml:"renumber,omitempty"`
	// PartArray names the cell array of VTK files that holds part ids;
	// "" means geom.DefaultPartArray ("part").
	PartArray string `yaml:"part_array,omitempty"`
	// Units is the unit of every length in the inputs: meshes, parts
	// table, joint lists ("mm", "m" or "in"; "" is mm). Build settings
	// (reach, gap allowance) are in mm whatever it is.
	Units string   `yaml:"units,omitempty"`
	Build JobBuild `yaml:"build,omitempty"`
	// Flanges holds the settings of joinery flanges (see JobFlanges).
	Flanges JobFlanges `yaml:"flanges,omitempty"`
	// Sweep holds the settings of joinery sweep (see JobSweep).
	Sweep JobSweep `yaml:"sweep,omitempty"`
	// File is the path the job was read from.
	File string `yaml:"-"`

	// written maps each path of the job file, as resolved, to the path
	// as the file wrote it (see RecordedPath).
	written map[string]string
}

// JobBuild holds the build settings of a job, as written in the file
// (validated by LoadJob).
type JobBuild struct {
	Reach        *float64 `yaml:"reach,omitempty"`         // mm, 0 = automatic
	GapAllowance *float64 `yaml:"gap_allowance,omitempty"` // mm, 0 = automatic
	Attach       string   `yaml:"attach,omitempty"`
	SpotDOFs     []string `yaml:"spot_dofs,omitempty"`
	IDStart      *int64   `yaml:"id_start,omitempty"` // 0 = above every id in the mesh
	IDStartLine  int      `yaml:"-"`                  // line of id_start in the job file; 0 when not from it
	NuggetRule   string   `yaml:"nugget_rule,omitempty"`
	Links        string   `yaml:"links,omitempty"`
	// Bolt settings.
	BoltDOFs      []string            `yaml:"bolt_dofs,omitempty"`
	BoltCoupling  string              `yaml:"bolt_coupling,omitempty"`
	Shank         string              `yaml:"shank,omitempty"`
	BoltRing      string              `yaml:"bolt_ring,omitempty"`
	ShankModulus  *float64            `yaml:"shank_modulus,omitempty"`  // N/mm^2, 0 = steel
	HoleTolerance *float64            `yaml:"hole_tolerance,omitempty"` // mm, 0 = default
	FailOn        string              `yaml:"fail_on,omitempty"`
	Groups        map[string]JobGroup `yaml:"groups,omitempty"`
}

// JobGroup holds the settings that differ for the joints of one group.
type JobGroup struct {
	Attach string `yaml:"attach,omitempty"`
}

// Apply copies the settings the job gave into o, leaving the others as
// they are; group settings are added to o.GroupAttach. FailOn is not a
// build option: read it with ParseFailOn.
func (b *JobBuild) Apply(o *joints.BuildOptions) error {
	if b.Reach != nil {
		o.Reach = *b.Reach
	}
	if b.GapAllowance != nil {
		o.GapAllowance = *b.GapAllowance
	}
	if b.IDStart != nil {
		o.IDStart = *b.IDStart
	}
	var err error
	if b.Attach != "" {
		if o.Attach, err = joints.ParseAttach(b.Attach); err != nil {
			return err
		}
	}
	if b.SpotDOFs != nil {
		if o.SpotDOFs, err = joints.ParseDOFs(b.SpotDOFs...); err != nil {
			return err
		}
	}
	if b.NuggetRule != "" {
		if o.Rule, err = joints.ParseNuggetRule(b.NuggetRule); err != nil {
			return err
		}
	}
	if b.BoltDOFs != nil {
		if o.BoltDOFs, err = joints.ParseDOFs(b.BoltDOFs...); err != nil {
			return err
		}
	}
	if b.BoltCoupling != "" {
		if o.BoltCoupling, err = joints.ParseBoltCoupling(b.BoltCoupling); err != nil {
			return err
		}
	}
	if b.Shank != "" {
		if o.Shank, err = joints.ParseShankForm(b.Shank); err != nil {
			return err
		}
	}
	if b.BoltRing != "" {
		if o.BoltRing, err = joints.ParseBoltRing(b.BoltRing); err != nil {
			return err
		}
	}
	if b.ShankModulus != nil {
		o.ShankModulus = *b.ShankModulus
	}
	if b.HoleTolerance != nil {
		o.HoleTolerance = *b.HoleTolerance
	}
	if b.Links != "" {
		if o.Links, err = joints.ParseLinkForm(b.Links); err != nil {
			return err
		}
	}
	for name, g := range b.Groups {
		if g.Attach == "" {
			continue
		}
		a, err := joints.ParseAttach(g.Attach)
		if err != nil {
			return fmt.Errorf("group %q: %w", geom.Excerpt(name), err)
		}
		if o.GroupAttach == nil {
			o.GroupAttach = map[string]joints.Attach{}
		}
		o.GroupAttach[name] = a
	}
	return nil
}

// RecordedPath returns how the outputs record the input file path p (a
// path of the job as resolved, or one a flag gave), so that they depend
// on the inputs, not on the directory Joinery runs in: a path of the job
// file as the file wrote it; another relative path relative to the job
// file's directory; with no job file, or for an absolute path, the path
// as given. Always cleaned, with forward slashes.
func (job *Job) RecordedPath(p string) string {
	if w, ok := job.written[p]; ok {
		return w
	}
	if job.File != "" && !filepath.IsAbs(p) {
		base, err1 := filepath.Abs(filepath.Dir(job.File))
		abs, err2 := filepath.Abs(p)
		if err1 == nil && err2 == nil {
			if r, err := filepath.Rel(base, abs); err == nil {
				return filepath.ToSlash(r)
			}
		}
	}
	return filepath.ToSlash(filepath.Clean(p))
}

// CheckPartArray checks the name of a part array: not empty, and not the
// name of another array Joinery reads from the cells.
func CheckPartArray(name string) error {
	switch name {
	case "":
		return errors.New("empty array name")
	case "element_id":
		return errors.New(`"element_id" holds the element ids; name the array that holds part ids`)
	case "thickness":
		return errors.New(`"thickness" holds the element thicknesses; name the array that holds part ids`)
	}
	return nil
}

// MaxJobFileBytes bounds a job file's size: a job file names a few input
// files and settings (the examples' are under 2 KB), so a file larger
// than 1 MiB is some other file given in its place, refused before it is
// parsed (a 230 MB mesh read as YAML took 12 s and 1 GB to refuse).
const MaxJobFileBytes = 1 << 20

// LoadJob reads the job file at path and resolves its relative paths
// against the file's directory. A mesh file or a joint list given in its
// place (by its extension or a mesh file's first line) is refused at once
// with the flag that takes it.
func LoadJob(path string) (*Job, error) {
	if err := notJobFile(path, nil); err != nil {
		return nil, err
	}
	f, err := geom.OpenRegular(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil, geom.FileError(path, "job file not found")
	case errors.Is(err, geom.ErrInput):
		return nil, fmt.Errorf("job file: %w", err)
	case err != nil:
		return nil, geom.FileError(path, "job file: %w", err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxJobFileBytes+1))
	if err != nil {
		return nil, geom.FileError(path, "job file: %w", err)
	}
	if err := notJobFile(path, data); err != nil {
		return nil, err
	}
	if len(data) > MaxJobFileBytes {
		return nil, geom.FileError(path, "larger than %d bytes: not a job file (a job file names its inputs and settings in a few lines)", MaxJobFileBytes)
	}
	return ReadJob(bytes.NewReader(data), path)
}

// notJobFile refuses a file that is plainly an input of another kind,
// by path's extension or, with data, by a mesh file's first line.
func notJobFile(path string, data []byte) error {
	kind, flag := "", ""
	switch strings.ToLower(filepath.Ext(path)) {
	case ".jmesh", ".vtk", ".vtu", ".vtp":
		kind, flag = "a mesh file", "--mesh (-m)"
	case ".csv":
		kind, flag = "a joint list", "--joints (-j)"
	}
	if kind == "" && tabular.IsMeshStart(data) {
		kind, flag = "a mesh file", "--mesh (-m)"
	}
	if kind == "" {
		return nil
	}
	return geom.FileError(path, "this is %s, not a job file: give it with %s (a job file is YAML and lists the meshes, parts and joints)", kind, flag)
}

// ReadJob reads a job from r; name is the job file's path, used in errors
// and to resolve relative paths (against filepath.Dir(name)).
func ReadJob(r io.Reader, name string) (*Job, error) {
	y := tabular.YAML{File: name}
	root, err := y.Parse(r)
	if err != nil {
		return nil, err
	}
	if root == nil {
		return nil, y.Errorf(nil, "empty job file: want at least version and meshes")
	}
	job := &Job{File: name, written: map[string]string{}}
	dir := filepath.Dir(name)
	path := func(v *yaml.Node, what string) (string, error) {
		s, err := y.String(v, what)
		switch {
		case err != nil:
			return "", err
		case s == "":
			return "", y.Errorf(v, "%s: empty path", what)
		}
		resolved := s
		if !filepath.IsAbs(s) {
			resolved = filepath.Join(dir, s)
		}
		job.written[resolved] = filepath.ToSlash(filepath.Clean(s))
		return resolved, nil
	}
	paths := func(v *yaml.Node, what string) ([]string, error) {
		items, err := y.List(v, what)
		if err != nil {
			return nil, err
		}
		out := make([]string, len(items))
		for i, it := range items {
			if out[i], err = path(it, what); err != nil {
				return nil, err
			}
		}
		return out, nil
	}
	var hasVersion, hasMeshes bool
	keys := []string{"version", "meshes", "parts", "joints", "out", "renumber", "part_array", "units", "build", "flanges", "sweep"}
	err = y.Map(root, "job", keys, func(key string, _, v *yaml.Node) (err error) {
		switch key {
		case "version":
			hasVersion = true
			var n int64
			if n, err = y.Int(v, "version"); err == nil && n != JobVersion {
				err = y.Errorf(v, "version: job file version %d; this Joinery reads version %d", n, JobVersion)
			}
			job.Version = int(n)
		case "meshes":
			if job.Meshes, err = paths(v, "meshes"); err == nil && len(job.Meshes) == 0 {
				err = y.Errorf(v, "meshes: the list is empty")
			}
			hasMeshes = true
		case "parts":
			switch {
			case v.Kind == yaml.SequenceNode:
				var ps []string
				if ps, err = paths(v, "parts"); err == nil && len(ps) > 0 {
					job.Parts, job.PartsOverlays = ps[0], ps[1:]
				}
			case !tabular.IsNull(v):
				job.Parts, err = path(v, "parts")
			}
		case "joints":
			job.Joints, err = paths(v, "joints")
		case "out":
			if !tabular.IsNull(v) {
				job.Out, err = path(v, "out")
			}
		case "renumber":
			var b bool
			b, err = y.Bool(v, "renumber")
			job.Renumber = &b
		case "part_array":
			if job.PartArray, err = y.String(v, "part_array"); err == nil {
				if err = CheckPartArray(job.PartArray); err != nil {
					err = y.Errorf(v, "part_array: %w", err)
				}
			}
		case "units":
			if job.Units, err = y.String(v, "units"); err == nil {
				if _, perr := joints.ParseUnit(job.Units); perr != nil || job.Units == "" {
					err = y.Errorf(v, "units: %q: want mm, m or in", geom.Excerpt(job.Units))
				}
			}
		case "build":
			err = readJobBuild(y, v, &job.Build)
		case "flanges":
			err = readJobFlanges(y, v, &job.Flanges)
		case "sweep":
			err = readJobSweep(y, v, &job.Sweep)
		}
		return err
	})
	if err != nil {
		return nil, err
	}
	if !hasVersion {
		return nil, y.Errorf(root, "no version: this Joinery reads job files with version: %d", JobVersion)
	}
	if !hasMeshes {
		return nil, y.Errorf(root, "no meshes: give the list of mesh files")
	}
	return job, nil
}

// readJobBuild reads and checks the build map of a job.
func readJobBuild(y tabular.YAML, n *yaml.Node, b *JobBuild) error {
	// distance reads a length, mm, that must be 0 (automatic) or
	// positive and at most limit.
	distance := func(v *yaml.Node, what string, limit float64) (*float64, error) {
		d, err := y.Float(v, what)
		switch {
		case err != nil:
		case d < 0:
			err = y.Errorf(v, "%s: %g mm is negative (0 means automatic)", what, d)
		case d > limit:
			err = y.Errorf(v, "%s: %g mm is more than the %g mm that can make sense for a spot weld", what, d, limit)
		}
		return &d, err
	}
	// choice reads a string and checks it with parse.
	choice := func(v *yaml.Node, what string, parse func(string) error) (string, error) {
		s, err := y.String(v, what)
		if err != nil {
			return "", err
		}
		if s == "" {
			return "", y.Errorf(v, "%s: no value", what)
		}
		if err := parse(s); err != nil {
			return "", y.Errorf(v, "%s: %w", what, err)
		}
		return s, nil
	}
	attach := func(s string) error { _, err := joints.ParseAttach(s); return err }
	keys := []string{"reach", "gap_allowance", "attach", "spot_dofs", "id_start", "nugget_rule", "fail_on", "groups", "links",
		"bolt_dofs", "bolt_coupling", "shank", "bolt_ring", "shank_modulus", "hole_tolerance"}
	return y.Map(n, "build", keys, func(key string, _, v *yaml.Node) (err error) {
		switch key {
		case "reach":
			b.Reach, err = distance(v, key, joints.MaxReach)
		case "gap_allowance":
			b.GapAllowance, err = distance(v, key, joints.MaxGapAllowance)
		case "attach":
			b.Attach, err = choice(v, key, attach)
		case "spot_dofs":
			if b.SpotDOFs, err = y.Strings(v, key); err != nil {
				return err
			}
			if _, err := joints.ParseDOFs(b.SpotDOFs...); err != nil {
				return y.Errorf(v, "spot_dofs: %w", err)
			}
		case "id_start":
			var id int64
			if id, err = y.Int(v, key); err == nil && id < 0 {
				err = y.Errorf(v, "id_start: %d is negative (0 means above every id in the mesh)", id)
			}
			b.IDStart, b.IDStartLine = &id, v.Line
		case "nugget_rule":
			b.NuggetRule, err = choice(v, key, func(s string) error { _, err := joints.ParseNuggetRule(s); return err })
		case "fail_on":
			b.FailOn, err = choice(v, key, func(s string) error { _, _, err := joints.ParseFailOn(s); return err })
		case "links":
			b.Links, err = choice(v, key, func(s string) error { _, err := joints.ParseLinkForm(s); return err })
		case "bolt_dofs":
			if b.BoltDOFs, err = y.Strings(v, key); err != nil {
				return err
			}
			if _, err := joints.ParseDOFs(b.BoltDOFs...); err != nil {
				return y.Errorf(v, "bolt_dofs: %w", err)
			}
		case "bolt_coupling":
			b.BoltCoupling, err = choice(v, key, func(s string) error { _, err := joints.ParseBoltCoupling(s); return err })
		case "shank":
			b.Shank, err = choice(v, key, func(s string) error { _, err := joints.ParseShankForm(s); return err })
		case "bolt_ring":
			b.BoltRing, err = choice(v, key, func(s string) error { _, err := joints.ParseBoltRing(s); return err })
		case "shank_modulus":
			var e float64
			if e, err = y.Float(v, key); err == nil && (e < 0 || e > joints.MaxShankModulus) {
				err = y.Errorf(v, "shank_modulus: %g N/mm^2: want 0 (steel) to %g", e, float64(joints.MaxShankModulus))
			}
			b.ShankModulus = &e
		case "hole_tolerance":
			b.HoleTolerance, err = distance(v, key, joints.MaxGapAllowance)
		case "groups":
			b.Groups = map[string]JobGroup{}
			err = y.Map(v, "groups", nil, func(name string, k, gv *yaml.Node) error {
				if name == "" {
					return y.Errorf(k, "groups: empty group name")
				}
				var g JobGroup
				err := y.Map(gv, "group "+name, []string{"attach"}, func(_ string, _, av *yaml.Node) (err error) {
					g.Attach, err = choice(av, "attach", attach)
					return err
				})
				b.Groups[name] = g
				return err
			})
		}
		return err
	})
}
