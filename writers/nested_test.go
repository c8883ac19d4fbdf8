package writers

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/writers/document"
)

func TestNestedSets(t *testing.T) {
	const runC = "cccccccccccccccccccccccccccccccc"
	dir := filepath.Join(t.TempDir(), "sweep")
	outer := testSet(runC, 1)
	outer.Job = "sweep"
	outer.Sets = []NestedSet{{Dir: "01-a=x", Set: testSet(runA, 2)}, {Dir: "02-a=y", Set: testSet(runB, 3)}}
	if err := WriteSet(dir, outer); err != nil {
		t.Fatal(err)
	}
	set, err := ReadSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	if set.Marker.RunID != runC || len(set.Sets) != 2 || set.Sets["01-a=x"].RunID != runA || set.Sets["02-a=y"].RunID != runB {
		t.Fatalf("read back %+v", set.Sets)
	}
	for name, id := range map[string]string{"01-a=x": runA, "02-a=y": runB} {
		sub, err := ReadSet(filepath.Join(dir, name))
		if err != nil || sub.Marker.RunID != id || len(sub.Files) != 3 {
			t.Errorf("%s: %v", name, err)
		}
	}
	// A second run replaces the whole, nested folders included.
	outer.Sets = outer.Sets[:1]
	if err := WriteSet(dir, outer); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "02-a=y")); !os.IsNotExist(err) {
		t.Errorf("the old variant folder survived the new set")
	}
	// A nested set replaced by another run's: the outer set is mixed.
	other := filepath.Join(t.TempDir(), "other")
	if err := WriteSet(other, testSet(runB, 4)); err != nil {
		t.Fatal(err)
	}
	raw, _ := os.ReadFile(filepath.Join(other, document.SetMarker))
	if err := os.WriteFile(filepath.Join(dir, "01-a=x", document.SetMarker), raw, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadSet(dir); err == nil || !strings.Contains(err.Error(), "mixed") {
		t.Errorf("mixed nested set: %v", err)
	}
	// Bad folder names and nested sets of nested sets are refused.
	for _, bad := range []NestedSet{{Dir: "a/b", Set: testSet(runA, 1)}, {Dir: "report.txt", Set: testSet(runA, 1)},
		{Dir: "x", Set: Set{RunID: runA, Sets: []NestedSet{{Dir: "y", Set: testSet(runA, 1)}}}}} {
		s := testSet(runC, 1)
		s.Sets = []NestedSet{bad}
		if err := WriteSet(filepath.Join(t.TempDir(), "bad"), s); err == nil {
			t.Errorf("nested set %q accepted", bad.Dir)
		}
	}
	// A folder put into the directory that the marker does not list is
	// not Joinery's: the next run refuses to replace it.
	if err := os.Mkdir(filepath.Join(dir, "mine"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := WriteSet(dir, outer); err == nil || !strings.Contains(err.Error(), "mine") {
		t.Errorf("foreign folder: %v", err)
	}
}
