package writers

import (
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/inspect"
)

// WriteInspectText writes an inspection for a person to read.
func WriteInspectText(w io.Writer, in *inspect.Inspection) error {
	ew := &errWriter{w: w}
	second := ""
	if in.SecondOrder > 0 {
		second = ", " + group(in.SecondOrder) + " of them second-order"
	}
	ew.printf("model: %d mesh file(s), %d part(s), %s nodes, %s elements (%s quads, %s triangles%s)\n",
		len(in.Files), len(in.Parts), group(in.Nodes), group(in.Elements), group(in.Quads), group(in.Triangles), second)
	ew.printf("mesh memory: %s bytes (%.0f bytes per element)\n", group(in.MemoryBytes), perElem(in.MemoryBytes, in.Elements))
	for _, f := range in.Files {
		ew.printf("  %s: %s nodes, %s elements%s\n", f.File, group(f.Nodes), group(f.Elements), skippedText(f.Skipped))
	}
	for _, r := range in.Renumbered {
		ew.printf("  renumbered %s: node ids +%d, element ids +%d\n", r.File, r.NodeOffset, r.ElemOffset)
	}
	if len(in.Skipped) > 0 {
		ew.printf("cells skipped (kinds Joinery does not read): %s\n", cellsText(in.Skipped))
	}
	ew.printf("\nparts\n")
	tw := tabwriter.NewWriter(ew, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "id\tname\tt mm\tsurface\telements\ttri\tarea mm²\tbox min\tbox max\t\n")
	for _, p := range in.Parts {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%d\t%d\t%s\t%s\t%s\t\n", p.ID, dash(p.Name), thickRange(p.ThicknessMin, p.ThicknessMax, p.Thickness), p.Surface,
			p.Elements, p.Triangles, num(p.Area, 1), vec(p.BoxMin), vec(p.BoxMax))
	}
	tw.Flush()
	if len(in.MissingThick) > 0 {
		ew.printf("parts without a thickness: %s\n", ints(in.MissingThick))
	}
	if len(in.UnusedParts) > 0 {
		ew.printf("parts in the table with no elements: %s\n", ints(in.UnusedParts))
	}
	for _, w := range in.Warnings {
		ew.printf("warning %s: %s\n", w.Code, w.Message)
	}
	if in.Deep {
		ew.printf("\nfree-edge loops and element quality (warp limit %s°)\n", num(*in.WarpLimit, 1))
		for _, p := range in.Parts {
			d := p.Deep
			ew.printf("part %d: %d loop(s)", p.ID, len(d.Loops))
			for _, lp := range d.Loops {
				ew.printf(" [%s %s mm, %d nodes]", lp.Kind, num(lp.Length, 1), lp.Nodes)
			}
			ew.printf("\n  warped %d, degenerate %d, worst warp %s°", d.Warped, d.Degenerate, num(d.WorstWarp, 2))
			if d.WorstElem != 0 && d.WorstWarp >= 0.005 {
				ew.printf(" (element %d)", d.WorstElem)
			}
			ew.printf(", worst aspect %s, shortest edge %s mm\n", num(d.MaxAspect, 2), num(d.MinEdge, 3))
			for _, q := range d.Listed {
				aspect := num(q.Aspect, 2)
				if q.Aspect < 0 { // inspect's -1: a zero-length edge, the ratio is infinite
					aspect = "infinite"
				}
				ew.printf("  element %d %s: warp %s°, aspect %s, shortest edge %s mm\n", q.Element, q.Problem, num(q.Warp, 2), aspect, num(q.MinEdge, 3))
			}
			writeFlipped(ew, d)
		}
	}
	ew.printf("\njoints: %d", in.Joints.Total)
	kinds := make([]string, 0, len(in.Joints.ByKind))
	for k := range in.Joints.ByKind {
		kinds = append(kinds, k)
	}
	slices.Sort(kinds)
	for i, k := range kinds {
		sep := ", "
		if i == 0 {
			sep = " ("
		}
		ew.printf("%s%s %d", sep, k, in.Joints.ByKind[k])
	}
	if len(kinds) > 0 {
		ew.printf(")")
	}
	ew.printf("\njoints outside every part's bounding box (+%s mm): %d", num(in.BoxMarginMM, 1), len(in.Joints.Outside))
	if n := len(in.Joints.Outside); n > 0 {
		shown := in.Joints.Outside[:min(n, 20)]
		ew.printf(": %s", strings.Join(shown, " "))
		if n > len(shown) {
			ew.printf(" ... (%d more)", n-len(shown))
		}
	}
	ew.printf("\n")
	return ew.err
}

// errWriter keeps the first write error so text writers can print freely
// and check once.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return 0, e.err
	}
	n, err := e.w.Write(p)
	e.err = err
	return n, err
}

func (e *errWriter) printf(format string, args ...any) { fmt.Fprintf(e, format, args...) }

// num formats v with a fixed number of decimals.
func num(v float64, dec int) string { return strconv.FormatFloat(v, 'f', dec, 64) }

func thick(t float64) string {
	if t <= 0 {
		return "-"
	}
	return strconv.FormatFloat(t, 'g', -1, 64)
}

func vec(v *[3]float64) string {
	if v == nil {
		return "-"
	}
	// To the micrometre, trailing zeros cut (joints.MM): at a tenth of a
	// millimetre a corner on a half-tenth (1.25) rounds to an even
	// neighbour and the box seems not to hold the part.
	return joints.MM(v[0]) + "," + joints.MM(v[1]) + "," + joints.MM(v[2])
}

func dash(s string) string {
	if s == "" {
		return "-"
	}
	return s
}

func perElem(bytes, elems int) float64 {
	if elems == 0 {
		return 0
	}
	return float64(bytes) / float64(elems)
}

func ints(v []int64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatInt(x, 10)
	}
	return strings.Join(s, " ")
}

// group writes n with thousands separators: 2000000 -> "2,000,000".
func group(n int) string {
	s := strconv.Itoa(n)
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	var b strings.Builder
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(c)
	}
	if neg {
		return "-" + b.String()
	}
	return b.String()
}

// skippedText is a file's skipped cells for its summary line.
func skippedText(cells []inspect.CellCount) string {
	if len(cells) == 0 {
		return ""
	}
	return " (skipped " + cellsText(cells) + ")"
}

// cellsText lists cell counts as "vertex (VTK type 1): 4, line (VTK type 3): 252".
func cellsText(cells []inspect.CellCount) string {
	s := make([]string, len(cells))
	for i, c := range cells {
		s[i] = fmt.Sprintf("%s (VTK type %d): %d", c.Kind, c.VTKType, c.Cells)
	}
	return strings.Join(s, ", ")
}

// thickRange shows the thicknesses used on a part's elements: one value,
// or "lo-hi" when they vary; the part's own when it has no elements.
func thickRange(lo, hi, part float64) string {
	switch {
	case lo == 0 && hi == 0:
		return thick(part)
	case lo == hi:
		return thick(lo)
	}
	return thick(lo) + "-" + thick(hi)
}

// writeFlipped writes a part's normals-flipped line, when it has one.
func writeFlipped(ew *errWriter, d *inspect.PartDeep) {
	if d.Flipped == 0 && d.Unorientable == 0 {
		return
	}
	ew.printf("  normals-flipped: %d element(s) with normals opposite to their neighbours'", d.Flipped)
	if len(d.FlipElems) > 0 {
		ew.printf(": flip %s", ints(d.FlipElems))
		if d.Flipped > len(d.FlipElems) {
			ew.printf(" ... (%d more)", d.Flipped-len(d.FlipElems))
		}
	}
	if d.Unorientable > 0 {
		ew.printf("; %d shared edge(s) disagree whichever way the part is turned", d.Unorientable)
	}
	ew.printf("\n")
}
