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

// A degenerate element with a zero-length edge has an infinite aspect
// ratio (longest over shortest edge), which the JSON holds as -1: the text
// says infinite, not -1.00.
func TestInspectTextAspectInfinite(t *testing.T) {
	w := 10.0
	in := &inspect.Inspection{Deep: true, WarpLimit: &w, Parts: []inspect.PartSummary{
		{ID: 7, Surface: "mid", Deep: &inspect.PartDeep{Degenerate: 1, Listed: []inspect.ElemQuality{{Element: 1, Problem: "degenerate", Aspect: -1}}}},
	}}
	var b strings.Builder
	if err := WriteInspectText(&b, in); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	want := "  element 1 degenerate: warp 0.00°, aspect infinite, shortest edge 0.000 mm\n"
	if !strings.Contains(out, want) {
		t.Errorf("output:\n%s\nwant the line\n%s", out, want)
	}
}
