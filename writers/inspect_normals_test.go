package writers

import (
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/joints/inspect"
)

// inspect --deep prints a part's normals-flipped line with the elements
// listed and how many more there are.
func TestInspectTextNormalsFlipped(t *testing.T) {
	w := 10.0
	in := &inspect.Inspection{Deep: true, WarpLimit: &w, Parts: []inspect.PartSummary{
		{ID: 7, Surface: "mid", Deep: &inspect.PartDeep{Flipped: 12, FlipElems: []int64{3, 5}, Unorientable: 1}},
		{ID: 8, Surface: "mid", Deep: &inspect.PartDeep{}},
	}}
	var b strings.Builder
	if err := WriteInspectText(&b, in); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	want := "  normals-flipped: 12 element(s) with normals opposite to their neighbours': flip 3 5 ... (10 more); 1 shared edge(s) disagree whichever way the part is turned\n"
	if !strings.Contains(out, want) || strings.Count(out, "normals-flipped") != 1 {
		t.Errorf("output:\n%s\nwant the line\n%s", out, want)
	}
}
