package joints

import (
	"errors"
	"os"
	"path/filepath"
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
	_, _, err := ReadJointLists([]string{a, b})
	if err == nil || !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), "b.csv:3") || !strings.Contains(err.Error(), "a.csv:2") {
		t.Errorf("duplicate across lists: %v", err)
	}
	if _, _, err := ReadJointLists([]string{a, a}); err == nil || !strings.Contains(err.Error(), "given twice") {
		t.Errorf("same list twice: %v", err)
	}
	js, _, err := ReadJointLists([]string{a})
	if err != nil || len(js) != 2 {
		t.Errorf("one list: %d joints, %v", len(js), err)
	}
}
