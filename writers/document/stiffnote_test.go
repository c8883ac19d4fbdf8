package document

import (
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/joints/stiffness"
)

// TestStiffnessNoteShankFactor keeps the note's rigid-shank factor the
// one the summary uses.
func TestStiffnessNoteShankFactor(t *testing.T) {
	want := "a rigid shank " + strconv.FormatFloat(stiffness.RigidShankFactor, 'f', -1, 64) + " times that beam"
	if !strings.Contains(StiffnessNote, want) {
		t.Errorf("StiffnessNote lacks %q", want)
	}
}
