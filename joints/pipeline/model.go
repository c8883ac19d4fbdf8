package pipeline

import (
	"fmt"

	"github.com/joinery-cae/joinery/joints"
)

// ModelFindings returns the run-level findings about the model a job
// read: for every mesh file whose reader skipped cells, cells-skipped
// (info) naming the file, the cell kinds and their counts; for every part
// whose elements carry thicknesses that disagree with the parts table,
// thickness-mismatch (warning, see joints.ThicknessMismatches); after the
// findings Load made about the inputs as a whole (units-suspect).
func (in *Inputs) ModelFindings() []joints.Finding {
	out := append([]joints.Finding(nil), in.Findings...)
	for _, f := range in.Model.Skipped {
		out = append(out, joints.Finding{Severity: joints.Info, Code: joints.CodeCellsSkipped,
			Message: fmt.Sprintf("%s: %d cell(s) of kinds Joinery does not read were skipped: %s", f.File, f.Cells.Total(), f.Cells)})
	}
	if in.Job.Parts != "" {
		out = append(out, joints.ThicknessMismatches(in.Model.Mesh)...)
	}
	return out
}
