package joints

import (
	"fmt"

	"github.com/joinery-cae/joinery/geom"
)

// ThicknessTolerance is the relative difference between an element's own
// thickness (from a file's thickness array or t= field) and its part's
// thickness (parts table) beyond which the two disagree and
// thickness-mismatch is reported: 0.1 %, our own choice, far above the
// rounding of values stored in single precision (6e-8) and far below the
// steps between sheet gauges (0.05 mm on sheets of 0.6 to 3 mm, 1.7 % and
// more: common practice).
const ThicknessTolerance = 1e-3

// ThicknessMismatches reports, as run-level warnings, the parts whose
// elements in some file carry thicknesses of their own that differ from
// the parts table's by more than ThicknessTolerance: the elements' values
// are used (they may vary within a part, as in tailored blanks), so the
// table's value is not the one that counts there. Call it for a mesh
// whose parts took their thicknesses from a parts table (meshio.Load
// with LoadOptions.Parts): without a table, a file's elements that
// override its own part records do so by design.
func ThicknessMismatches(m *geom.Mesh) []Finding {
	var out []Finding
	for _, c := range m.ThicknessClashes(ThicknessTolerance) {
		p := m.Parts[c.PartIndex]
		vals := MM(c.Min) + " mm"
		if c.Max != c.Min {
			vals = "from " + MM(c.Min) + " to " + MM(c.Max) + " mm"
		}
		out = append(out, Finding{Severity: Warning, Code: CodeThicknessClash, Parts: []int64{p.ID},
			Message: fmt.Sprintf("part %d: %s gives %d element(s) a thickness of %s where the parts table gives %s mm; the file's values are used",
				p.ID, c.File, c.Elems, vals, MM(c.PartThickness))})
	}
	return out
}
