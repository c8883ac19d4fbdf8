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
const runIDVersion = "joinery run id 2"

// runID returns the run id of a run on in with result res: the first 16
// bytes, in hex, of a SHA-256 over the recipe's version, the generator
// (Joinery and its version), the job file's bytes, each input file's
// recorded path and the XXH3-128 digest of its bytes (hashed as the
// file was read: no second pass; for a check, the connector files too), the job's settings and the options as resolved.
// Everything that shapes the outputs enters it, and nothing else (not
// the working directory, not the output directory), so the same inputs
// give the same id and the files of two runs cannot pass for one set.
func (in *Inputs) runID(generator string, res *joints.Result) (string, error) {
	if in.sums == nil {
		return "", fmt.Errorf("pipeline: run id asked of inputs loaded without hashing (use LoadForSet)")
	}
	job := in.Job
	h := sha256.New()
	fmt.Fprintf(h, "%s\ngenerator %q\n", runIDVersion, generator)
	if job.Sum != nil {
		fmt.Fprintf(h, "job %x\n", job.Sum)
	}
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
	// The settings as the job and the flags gave them, without the paths
	// (recorded above) and the output directory (not part of the set).
	settings := *job
	settings.Meshes, settings.Parts, settings.Joints, settings.Out, settings.File, settings.Sum = nil, "", nil, "", "", nil
	if settings.Units == joints.Millimetre.String() {
		settings.Units = "" // the default, given or not: the same outputs
	}
	s, err := json.Marshal(&settings)
	if err != nil {
		return "", fmt.Errorf("pipeline: run id: %w", err)
	}
	o, err := json.Marshal(struct {
		Options joints.BuildOptions
		IDStart int64
	}{res.Options, res.IDStart})
	if err != nil {
		return "", fmt.Errorf("pipeline: run id: %w", err)
	}
	fmt.Fprintf(h, "settings %s\noptions %s\n", s, o)
	return hex.EncodeToString(h.Sum(nil)[:document.RunIDLen/2]), nil
}
