package writers

import (
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/joinery-cae/joinery/writers/document"
)

// WriteSurfacesYAML writes surfaces.yaml: a parts table (the format of
// geom/meshio) of the parts whose surface the evidence speaks to, each
// with its id, thickness, surface and offset, to lay over the parts
// table (--parts parts.yaml --parts surfaces.yaml). Parts without any
// evidence are left out, so that the table under it keeps its word for
// them. Comments give each part's confidence and evidence.
func WriteSurfacesYAML(w io.Writer, doc *document.SurfacesDoc) error {
	ew := &errWriter{w: w}
	ew.printf("# joinery offsets (%s; run %s): the surface each part was meshed on, found from\n", doc.Generator, doc.RunID)
	ew.printf("# where the parts face each other; surface and offset are relative to the\n")
	ew.printf("# element normals (offset: meshed surface to mid-surface along them, %s).\n", doc.Units.Length)
	ew.printf("# Lay it over the parts table: joinery build --parts PARTS --parts surfaces.yaml\n")
	ew.printf("# CAUTION: %s\n", document.Caution)
	ew.printf("parts:\n")
	for _, p := range doc.Parts {
		if p.Contacts == 0 {
			continue
		}
		ew.printf("  - id: %d\n", p.ID)
		ew.printf("    thickness: %s\n", f64(p.Thickness))
		ew.printf("    surface: %s\n", p.Surface)
		ew.printf("    offset: %s", f64(p.Offset))
		note := fmt.Sprintf("confidence %s, %d contact(s)", num(p.Confidence, 2), p.Contacts)
		if p.Disagreeing > 0 {
			note += fmt.Sprintf(", %d disagree", p.Disagreeing)
		}
		if p.Declared != p.Surface {
			note += ", the table said " + p.Declared
		}
		if p.FlipCount > 0 {
			note += fmt.Sprintf("; %d element(s) to flip (surfaces.json)", p.FlipCount)
		}
		ew.printf("   # %s\n", note)
	}
	return ew.err
}

// WriteSurfacesText writes the report of joinery offsets for a person:
// counts, the findings grouped by code, the parts table, and the
// caution.
func WriteSurfacesText(w io.Writer, rep *document.ReportDoc, doc *document.SurfacesDoc) error {
	ew := &errWriter{w: w}
	ew.printf("joinery surface report (%s; run %s)\n\n", doc.Generator, doc.RunID)
	surfacesSummary(ew, rep, doc)
	ew.printf("inputs      %s", strings.Join(doc.Inputs.Meshes, " "))
	if doc.Inputs.Parts != "" {
		ew.printf(" | parts %s", strings.Join(append([]string{doc.Inputs.Parts}, doc.Inputs.PartsOverlays...), " "))
	}
	if len(doc.Inputs.Joints) > 0 {
		ew.printf(" | joints %s", strings.Join(doc.Inputs.Joints, " "))
	}
	ew.printf("\n")
	codes := make([]string, 0, len(rep.Summary.ByCode))
	for c := range rep.Summary.ByCode {
		codes = append(codes, c)
	}
	slices.SortFunc(codes, func(a, b string) int {
		if ra, rb := severityRank(rep, a), severityRank(rep, b); ra != rb {
			return rb - ra
		}
		return strings.Compare(a, b)
	})
	for _, code := range codes {
		ew.printf("\n%s (%d)\n", code, rep.Summary.ByCode[code])
		for _, f := range rep.Findings {
			if f.Code == code {
				ew.printf("  %-7s %s\n", f.Severity, f.Message)
			}
		}
	}
	ew.printf("\nparts\n")
	tw := tabwriter.NewWriter(ew, 0, 0, 2, ' ', tabwriter.AlignRight)
	u := doc.Units.Length
	fmt.Fprintf(tw, "id\tt %s\ttable\tfound\toffset %s\tconfidence\tcontacts\tdisagree\tevidence %s²\tflip\t\n", u, u, u)
	for _, p := range doc.Parts {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%s\t%s\t%d\t%d\t%s\t%d\t\n", p.ID, thick(p.Thickness), p.Declared, p.Surface,
			f64(p.Offset), num(p.Confidence, 2), p.Contacts, p.Disagreeing, evidence(p.Evidence, u), p.FlipCount)
	}
	tw.Flush()
	ew.printf("\nCAUTION: %s\n", doc.Caution)
	return ew.err
}

// WriteSurfacesSummary writes the few lines joinery offsets prints on
// stdout.
func WriteSurfacesSummary(w io.Writer, rep *document.ReportDoc, doc *document.SurfacesDoc, outDir string, files []string) error {
	ew := &errWriter{w: w}
	surfacesSummary(ew, rep, doc)
	ew.printf("written     %s/{%s}\n", filepath.ToSlash(filepath.Clean(outDir)), strings.Join(files, ","))
	ew.printf("run id      %s\n", doc.RunID)
	ew.printf("CAUTION: %s\n", doc.Caution)
	return ew.err
}

func surfacesSummary(ew *errWriter, rep *document.ReportDoc, doc *document.SurfacesDoc) {
	bySurface := map[string]int{}
	differ, flipParts, flips, disagree := 0, 0, 0, 0
	for _, p := range doc.Parts {
		if p.Contacts == 0 {
			bySurface["no evidence"]++
		} else {
			bySurface[p.Surface]++
			if p.Surface != p.Declared {
				differ++
			}
		}
		if p.FlipCount > 0 {
			flipParts++
			flips += p.FlipCount
		}
	}
	for _, c := range doc.Contacts {
		if !c.Agrees {
			disagree++
		}
	}
	ew.printf("parts       %d (%s)\n", len(doc.Parts), countList(bySurface))
	ew.printf("differ      %d from the parts table\n", differ)
	ew.printf("contacts    %d (%d disagree)\n", len(doc.Contacts), disagree)
	ew.printf("normals     %d element(s) to flip in %d part(s)\n", flips, flipParts)
	s := rep.Summary
	ew.printf("findings    %d error, %d warning, %d info\n", s.BySev["error"], s.BySev["warning"], s.BySev["info"])
	if len(s.ByCode) > 0 {
		ew.printf("by code     %s\n", countList(s.ByCode))
	}
}

// evidence formats an evidence weight, an area in the square of unit u:
// whole mm², or four significant digits in a larger unit.
func evidence(v float64, u string) string {
	if u == "mm" {
		return num(v, 0)
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}
