package pipeline

import (
	"context"
	"encoding/hex"
	"hash"
	"os"
	"path/filepath"
	"testing"

	"github.com/zeebo/xxh3"

	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
)

// The run id follows what shapes the outputs and nothing else: the same
// inputs give the same id, in any output directory, whatever the job
// file's comments; a changed byte of any input file, another option or
// another version give another.
func TestRunIDFollowsInputs(t *testing.T) {
	example := filepath.Join("..", "..", "examples", "van-rear-crossmember")
	if _, err := os.Stat(filepath.Join(example, "job.yaml")); err != nil {
		t.Skip("example not generated")
	}
	dir := t.TempDir()
	if err := os.CopyFS(dir, os.DirFS(example)); err != nil {
		t.Fatal(err)
	}
	build := func(generator string, change func(*Job)) string {
		t.Helper()
		job, err := LoadJob(filepath.Join(dir, "job.yaml"))
		if err != nil {
			t.Fatal(err)
		}
		if change != nil {
			change(job)
		}
		job.Out = filepath.Join(t.TempDir(), "out")
		s, err := job.BuildSettings()
		if err != nil {
			t.Fatal(err)
		}
		out, err := Build(context.Background(), job, s, Env{Generator: generator})
		if err != nil {
			t.Fatal(err)
		}
		set, err := writers.ReadSet(job.Out)
		if err != nil {
			t.Fatal(err)
		}
		if set.Marker.RunID != out.RunID || !document.ValidRunID(out.RunID) {
			t.Fatalf("marker run id %s, outcome %s", set.Marker.RunID, out.RunID)
		}
		return out.RunID
	}
	base := build("joinery test", nil)
	if again := build("joinery test", nil); again != base {
		t.Errorf("same inputs, another output directory: run id %s, then %s", base, again)
	}
	appendTo := func(name, text string) {
		f, err := os.OpenFile(filepath.Join(dir, name), os.O_APPEND|os.O_WRONLY, 0)
		if err != nil {
			t.Fatal(err)
		}
		f.WriteString(text)
		f.Close()
	}
	seen := map[string]string{base: "base"}
	differ := func(what, id string) {
		t.Helper()
		if prev, ok := seen[id]; ok {
			t.Errorf("%s: run id %s, the same as %s", what, id, prev)
		}
		seen[id] = what
	}
	differ("another version", build("joinery test2", nil))
	differ("another option", build("joinery test", func(j *Job) { j.Build.Attach = "node-pair" }))
	differ("renumber", build("joinery test", func(j *Job) { r := true; j.Renumber = &r }))
	appendTo("welds.csv", "# one more comment\n")
	differ("joint list changed", build("joinery test", nil))
	appendTo("parts.yaml", "# one more comment\n")
	differ("parts table changed", build("joinery test", nil))
	appendTo(filepath.Join("mesh", "bracket.jmesh"), "# one more comment\n")
	differ("mesh changed", build("joinery test", nil))
	// The job file's bytes do not enter, only what it says: a comment,
	// or a default given explicitly, leave the id as it was.
	same := build("joinery test", nil)
	appendTo("job.yaml", "# one more comment\n")
	if got := build("joinery test", nil); got != same {
		t.Errorf("a comment added to the job file: run id %s, then %s", same, got)
	}
	if got := build("joinery test", func(j *Job) { j.Build.Links, j.Build.BoltDOFs = "gap", []string{"tx,ty,tz"} }); got != same {
		t.Errorf("defaults given explicitly: run id %s, then %s", same, got)
	}
}

// The digest of an input file is XXH3-128 of its bytes whatever the
// pieces the reader hands them over in, so that a run id is the same on
// every machine and for every chunking. Reference values: the XXH3-128
// digests (seed 0) of "" and "abc" (from memory of the reference
// implementation's test vectors; the library agrees).
func TestInputSumsStable(t *testing.T) {
	big := make([]byte, 3<<20+17)
	for i := range big {
		big[i] = byte(i*7 + i>>9)
	}
	whole := xxh3.Hash128(big).Bytes()
	tests := []struct {
		name  string
		data  []byte
		piece int
		want  string
	}{
		{"empty", nil, 1, "99aa06d3014798d86001c324468d497f"},
		{"abc whole", []byte("abc"), 3, "06b05ab6733a618578af5f94892f3950"},
		{"abc by bytes", []byte("abc"), 1, "06b05ab6733a618578af5f94892f3950"},
		{"3 MiB whole", big, len(big), hex.EncodeToString(whole[:])},
		{"3 MiB by 1 MiB", big, 1 << 20, hex.EncodeToString(whole[:])},
		{"3 MiB by 1000 bytes", big, 1000, hex.EncodeToString(whole[:])},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := &inputSums{sums: map[string]hash.Hash{}}
			w := s.writer("f")
			for p := 0; p < len(tc.data); p += tc.piece {
				if _, err := w.Write(tc.data[p:min(p+tc.piece, len(tc.data))]); err != nil {
					t.Fatal(err)
				}
			}
			if got := s.sum("f"); got != tc.want {
				t.Errorf("sum %s, want %s", got, tc.want)
			}
		})
	}
}
