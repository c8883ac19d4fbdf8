package joints

import (
	"math"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// thicknessModel is two parts of two files: part 1 (table 1.5 mm) whose
// elements in b.vtk carry 1.2 and 1.3 mm, part 2 (table 0.8 mm) whose
// elements carry 0.8 mm to within rounding, or nothing.
func thicknessModel(t *testing.T) *geom.Mesh {
	a := geomtest.Grid(geomtest.GridSpec{NX: 2, NY: 2, Parts: []geom.Part{{ID: 1}}})
	a.Sources = []geom.Source{{File: "a.vtk"}}
	b := geomtest.Grid(geomtest.GridSpec{NX: 3, NY: 1, FirstNodeID: 100, FirstElemID: 100, Parts: []geom.Part{{ID: 1}, {ID: 2}},
		Part: func(i, j int) int32 { return int32(min(i, 1)) }})
	b.Sources = []geom.Source{{File: "b.vtk"}}
	b.ElemThickness = []float64{1.2, 0.8 * (1 + 1e-7), math.NaN()}
	m, _, err := geom.Merge([]*geom.Mesh{a, b}, false)
	if err != nil {
		t.Fatal(err)
	}
	m.Parts[0].Thickness, m.Parts[1].Thickness = 1.5, 0.8
	m.ElemThickness[1] = 1.3 // an element of a.vtk
	return m
}

func TestThicknessMismatches(t *testing.T) {
	m := thicknessModel(t)
	fs := ThicknessMismatches(m)
	if len(fs) != 2 {
		t.Fatalf("%d findings: %+v", len(fs), fs)
	}
	want := []string{
		"part 1: a.vtk gives 1 element(s) a thickness of 1.3 mm where the parts table gives 1.5 mm",
		"part 1: b.vtk gives 1 element(s) a thickness of 1.2 mm where the parts table gives 1.5 mm",
	}
	for i, f := range fs {
		if f.Severity != Warning || f.Code != CodeThicknessClash || f.Joint != "" || len(f.Parts) != 1 || f.Parts[0] != 1 ||
			!strings.HasPrefix(f.Message, want[i]) {
			t.Errorf("finding %d: %+v\nwant %s", i, f, want[i])
		}
	}
	// The thicknesses used: the elements' own where they have one.
	if got := MaxThickness(m); got != 1.5 {
		t.Errorf("MaxThickness = %g, want 1.5 (the table's, on the elements without their own)", got)
	}
	for e := range m.ElemThickness {
		if !math.IsNaN(m.ElemThickness[e]) || m.ElemPart[e] != 0 {
			continue
		}
		m.ElemThickness[e] = 1.1 // every element of part 1 its own value
	}
	if got := MaxThickness(m); got != 1.3 {
		t.Errorf("MaxThickness = %g, want 1.3: the table's 1.5 is used by no element", got)
	}
	st := m.PartStats()
	if st[0].ThicknessMin != 1.1 || st[0].ThicknessMax != 1.3 || st[1].ThicknessMin != 0.8 || st[1].ThicknessMax != 0.8*(1+1e-7) {
		t.Errorf("part thickness ranges %+v", st)
	}
}

// MaxThickness gives what math.Max folded over every element's
// thickness gives, special values included (math.Max's rules: +Inf
// wins over NaN, NaN over numbers).
func TestMaxThicknessAsMathMax(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	for _, tc := range []struct {
		name  string
		elems []float64 // per element; NaN: the part's
		part  float64
	}{
		{"plain", []float64{1.2, 0.8, 2.5}, 1},
		{"part's", []float64{nan, 0.8, nan}, 3},
		{"part NaN", []float64{nan, 0.8}, nan},
		{"part NaN then Inf", []float64{nan, inf, 0.8}, nan},
		{"Inf then part NaN", []float64{inf, nan}, nan},
		{"negative zero", []float64{math.Copysign(0, -1)}, 1},
		{"none", nil, 1},
	} {
		m := &geom.Mesh{Parts: []geom.Part{{ID: 1, Thickness: tc.part}}, ElemThickness: tc.elems,
			ElemIDs: make([]int64, len(tc.elems)), ElemPart: make([]int32, len(tc.elems))}
		if tc.elems == nil {
			m.ElemThickness = []float64{}
		}
		want := 0.0
		for e := range m.ElemThickness {
			want = math.Max(want, m.Thickness(e))
		}
		if got := MaxThickness(m); math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
			t.Errorf("%s: MaxThickness = %g, want %g", tc.name, got, want)
		}
	}
}
