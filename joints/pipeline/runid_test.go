package pipeline

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
)

// The run id follows what shapes the outputs and nothing else: the same
// inputs give the same id, in any output directory; a changed byte of
// any input file, another option or another version give another.
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
	appendTo("job.yaml", "# one more comment\n")
	differ("job file changed", build("joinery test", nil))
}
