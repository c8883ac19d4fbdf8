package pipeline

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"hash"
	"io"
	"sync"

	"github.com/zeebo/xxh3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// inputSums hashes each input file while its reader reads it (see
// geom.ReadOptions.Digest): one XXH3-128 digest per path. The readers
// of one path never run at once (meshio refuses a mesh given twice, and
// the parts table and the joint lists are read one after another), so
// the sums are the same whatever the order the files are read in.
//
// The digest of a file's bytes need not resist forgery (a run id tells
// sets apart, it does not sign them); it must be stable across runs and
// machines, which XXH3's specification makes it (a fixed byte order,
// scalar and vector code giving the same value), and fast: the inputs
// of a large body are hundreds of megabytes, hashed while the reader
// decodes them, and XXH3 takes them about ten times faster than
// SHA-256.
type inputSums struct {
	mu   sync.Mutex
	sums map[string]hash.Hash
}

// writer returns the hash that receives the bytes of the file at path.
func (s *inputSums) writer(path string) io.Writer {
	s.mu.Lock()
	defer s.mu.Unlock()
	h, ok := s.sums[path]
	if !ok {
		h = xxh3.New128()
		s.sums[path] = h
	}
	return h
}

// sum returns the hex XXH3-128 digest of the file at path, "-" for a file that
// was not read through a hash.
func (s *inputSums) sum(path string) string {
	s.mu.Lock()
	defer s.mu.Unlock()
	h, ok := s.sums[path]
	if !ok {
		return "-"
	}
	return hex.EncodeToString(h.Sum(nil))
}

// runIDVersion names the recipe below; change it when the recipe
// changes.
const runIDVersion = "joinery run id 3"

// RunSettings are what a run's id takes besides its inputs and the
// options of its result (see runID): the command that writes the set
// and the settings of that command that are not build options.
type RunSettings struct {
	// Command is the set's job: build (a sweep's variant too), check,
	// flanges or offsets.
	Command string
	// Flanges are the options of a flanges run, as it resolved them
	// (joints.FlangeOptions.Defaults); nil for the other commands.
	Flanges *joints.FlangeOptions
	// NoCheck and NoPage are the developer switches of a build: a set
	// without the check's findings, or without its page, is another set.
	NoCheck, NoPage bool
}

// runSettings is the canonical form of a run's settings that runID
// hashes: every value resolved (defaults filled), so that a setting
// left out, given at its default, given by the job or by a flag, in any
// spelling, enters the same way.
type runSettings struct {
	Command   string
	Unit      string // the resolved unit of the input lengths
	PartArray string // the resolved VTK part array
	Renumber  bool
	Options   joints.BuildOptions // resolved; IDStart is the run's first new id
	Flanges   *flangeRunSettings  `json:",omitempty"`
	NoCheck   bool                `json:",omitempty"`
	NoPage    bool                `json:",omitempty"`
}

// flangeRunSettings is the canonical form of a flanges run's options.
type flangeRunSettings struct {
	Pitch        string // as Pitch.String writes it: "30", "table", "" for none
	EndMargin    float64
	FacingFactor float64
	Pairs        [][2]int64 // each as joints.PairKey orders it, in the order given
}

// canonicalOptions returns the options o of a result (defaults already
// resolved by joints.BuildOptions.Defaults) with the fields Defaults
// leaves at zero set to the values they stand for, the id start set to
// the run's first new id, and an empty group map as none.
func canonicalOptions(o joints.BuildOptions, idStart int64) joints.BuildOptions {
	o.BoltDOFs = o.BoltDOFsOrDefault()
	o.ShankModulus = o.ShankModulusOrDefault()
	o.HoleTolerance = o.HoleToleranceOrDefault()
	o.IDStart = idStart
	if len(o.GroupAttach) == 0 {
		o.GroupAttach = nil
	}
	return o
}

// runID returns the run id of a run on in with result res: the first 16
// bytes, in hex, of a SHA-256 over
//   - the recipe's version and the generator (Joinery and its version);
//   - each input file's recorded path (Job.RecordedPath) and the
//     XXH3-128 digest of its bytes, hashed as the file was read (no
//     second pass): meshes, parts table and overlays, joint lists and,
//     for a check, the connector files;
//   - the canonical form of the settings (runSettings): the command, the
//     resolved unit, part array and renumbering, the options as the run
//     resolved them (res.Options, every default filled, the id start
//     being the first new id, res.IDStart), and the command's own
//     settings (RunSettings).
//
// The rule: a setting enters when it can change a byte of the outputs
// other than the run id, in its resolved form, whether or not these
// inputs make use of it (bolt options on a model without bolts, the part
// array of a model without VTK files); a setting that cannot change the
// outputs does not: the failure level (the exit status only), the output
// directory, the working directory, the job file's own bytes (its
// comments, its keys' order and spelling: what it says enters through
// the paths and the settings it gives). So runs that write the same
// files have the same id, and the files of two runs that differ cannot
// pass for one set.
func (in *Inputs) runID(generator string, res *joints.Result, rs RunSettings) (string, error) {
	if in.sums == nil {
		return "", fmt.Errorf("pipeline: run id asked of inputs loaded without hashing (use LoadForSet)")
	}
	job := in.Job
	h := sha256.New()
	fmt.Fprintf(h, "%s\ngenerator %q\n", runIDVersion, generator)
	for _, p := range job.Meshes {
		fmt.Fprintf(h, "mesh %q %s\n", job.RecordedPath(p), in.sums.sum(p))
	}
	if job.Parts != "" {
		fmt.Fprintf(h, "parts %q %s\n", job.RecordedPath(job.Parts), in.sums.sum(job.Parts))
	}
	for _, p := range job.PartsOverlays {
		fmt.Fprintf(h, "parts-overlay %q %s\n", job.RecordedPath(p), in.sums.sum(p))
	}
	for _, p := range job.Joints {
		fmt.Fprintf(h, "joints %q %s\n", job.RecordedPath(p), in.sums.sum(p))
	}
	for _, p := range in.Connectors {
		fmt.Fprintf(h, "connectors %q %s\n", job.RecordedPath(p), in.sums.sum(p))
	}
	settings := runSettings{
		Command:   rs.Command,
		Unit:      in.Unit.String(),
		PartArray: job.PartArray,
		Renumber:  job.Renumber != nil && *job.Renumber,
		Options:   canonicalOptions(res.Options, res.IDStart),
		NoCheck:   rs.NoCheck,
		NoPage:    rs.NoPage,
	}
	if settings.PartArray == "" {
		settings.PartArray = geom.DefaultPartArray
	}
	if f := rs.Flanges; f != nil {
		fs := &flangeRunSettings{Pitch: f.Pitch.String(), EndMargin: f.EndMargin, FacingFactor: f.FacingFactor}
		for _, p := range f.Pairs {
			fs.Pairs = append(fs.Pairs, joints.PairKey(p[0], p[1]))
		}
		settings.Flanges = fs
	}
	s, err := json.Marshal(&settings)
	if err != nil {
		return "", fmt.Errorf("pipeline: run id: %w", err)
	}
	fmt.Fprintf(h, "settings %s\n", s)
	return hex.EncodeToString(h.Sum(nil)[:document.RunIDLen/2]), nil
}
