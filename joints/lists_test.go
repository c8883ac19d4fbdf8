package joints

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

func TestReadJointListsAcrossFiles(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.csv")
	b := filepath.Join(dir, "b.csv")
	os.WriteFile(a, []byte("id,x,y,z\nW1,0,0,0\nW2,1,0,0\n"), 0o644)
	os.WriteFile(b, []byte("id,x,y,z\nW3,0,0,0\nW1,5,0,0\n"), 0o644)
	_, err := ReadJointLists([]string{a, b})
	if err == nil || !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), "b.csv:3") || !strings.Contains(err.Error(), "a.csv:2") {
		t.Errorf("duplicate across lists: %v", err)
	}
	if _, err := ReadJointLists([]string{a, a}); err == nil || !strings.Contains(err.Error(), "given twice") {
		t.Errorf("same list twice: %v", err)
	}
	l, err := ReadJointLists([]string{a})
	if err != nil || len(l.Joints) != 2 || l.Tags != nil {
		t.Fatalf("one list: %+v, %v", l, err)
	}
}

func TestReadJointListsTags(t *testing.T) {
	// Free tag columns are named per list: CSV columns in header order,
	// YAML tag keys sorted; a list without any is left out.
	dir := t.TempDir()
	files := map[string]string{
		"a.csv":  "id;x;y;z;torque;Note\nW1;0;0;0;;left\n",
		"b.csv":  "id,x,y,z\nW2,0,0,0\n",
		"c.yaml": "joints:\n  - {id: W3, point: [0, 0, 0], tags: {robot: R2, cell: 4}}\n  - {id: W4, point: [0, 0, 1], tags: {station: 10}}\n",
	}
	var paths []string
	for _, name := range []string{"a.csv", "b.csv", "c.yaml"} {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(files[name]), 0o644); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, p)
	}
	l, err := ReadJointLists(paths)
	if err != nil {
		t.Fatal(err)
	}
	want := []ListTags{{paths[0], []string{"torque", "Note"}}, {paths[2], []string{"cell", "robot", "station"}}}
	if !reflect.DeepEqual(l.Tags, want) || len(l.Joints) != 4 {
		t.Errorf("tags %v, want %v (%d joints)", l.Tags, want, len(l.Joints))
	}
}

// ReadJointListsDigest passes each list's bytes, all of them, to the
// writer digest gives for its path.
func TestReadJointListsDigest(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.csv")
	b := filepath.Join(dir, "b.yaml")
	os.WriteFile(a, []byte("id,x,y,z\nW1,0,0,0\n# a comment at the end\n"), 0o644)
	os.WriteFile(b, []byte("joints:\n  - {id: W2, point: [1, 0, 0]}\n"), 0o644)
	got := map[string]*strings.Builder{}
	_, err := ReadJointListsDigest([]string{a, b}, func(p string) io.Writer {
		got[p] = &strings.Builder{}
		return got[p]
	})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{a, b} {
		want, _ := os.ReadFile(p)
		if got[p] == nil || got[p].String() != string(want) {
			t.Errorf("%s: digest got %q", p, got[p])
		}
	}
}
