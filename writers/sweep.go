package writers

import (
	"encoding/csv"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/joinery-cae/joinery/writers/document"
)

// ComparePairsShown is the number of part pairs compare.txt shows, those
// that change most between variants (compare.json and compare.csv hold
// every pair).
const ComparePairsShown = 10

// yamlString quotes s for YAML when it needs it.
func yamlString(s string) string {
	if s == "" || strings.ContainsAny(s, ":#{}[],&*!|>'\"%@`\n\t") || s != strings.TrimSpace(s) ||
		s == "true" || s == "false" || s == "null" || s == "~" || s == "yes" || s == "no" {
		return strconv.Quote(s)
	}
	if _, err := strconv.ParseFloat(s, 64); err == nil {
		return strconv.Quote(s)
	}
	return s
}

// sortedKeys returns the keys of m in order.
func sortedKeys(m map[string]int) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// WriteManifestYAML writes the manifest as YAML for a person and for
// scripts: the same content as manifest.json, with the run id on its
// first line.
func WriteManifestYAML(w io.Writer, m *document.ManifestDoc) error {
	ew := &errWriter{w: w}
	ew.printf("# joinery sweep manifest (%s; run %s)\n", m.Generator, m.RunID)
	ew.printf("schema: %s\nversion: %d\ngenerator: %s\nrun_id: %s\n", m.Schema, m.Version, yamlString(m.Generator), m.RunID)
	ew.printf("caution: %s\n", yamlString(m.Caution))
	ew.printf("inputs:\n  meshes: [%s]\n", yamlList(m.Inputs.Meshes))
	if m.Inputs.Parts != "" {
		ew.printf("  parts: %s\n", yamlString(m.Inputs.Parts))
	}
	if len(m.Inputs.PartsOverlays) > 0 {
		ew.printf("  parts_overlays: [%s]\n", yamlList(m.Inputs.PartsOverlays))
	}
	ew.printf("  joints: [%s]\n", yamlList(m.Inputs.Joints))
	ew.printf("vary:\n")
	for _, v := range m.Vary {
		ew.printf("  - key: %s\n    values: [%s]\n", v.Key, yamlList(v.Values))
	}
	ew.printf("moving_variants: %d\nvariants:\n", m.Moving)
	counts := func(name string, c map[string]int) {
		ew.printf("      %s: {", name)
		for i, k := range sortedKeys(c) {
			if i > 0 {
				ew.printf(", ")
			}
			ew.printf("%s: %d", yamlString(k), c[k])
		}
		ew.printf("}\n")
	}
	for _, v := range m.Variants {
		ew.printf("  - name: %s\n    folder: %s\n    run_id: %s\n    settings:\n", yamlString(v.Name), yamlString(v.Folder), v.RunID)
		for _, s := range v.Settings {
			ew.printf("      - {key: %s, value: %s}\n", s.Key, yamlString(s.Value))
		}
		ew.printf("    counts:\n      joints: %d\n", v.Counts.Joints)
		counts("by_state", v.Counts.ByState)
		counts("by_kind", v.Counts.ByKind)
		counts("by_dofs", v.Counts.ByDOFs)
		counts("by_severity", v.Counts.BySeverity)
		counts("by_code", v.Counts.ByCode)
		ew.printf("    moves: %t\n    mechanism_motions: %d\n    unrestrained_motions: %d\n    files:\n", v.Moves, v.Mechanisms, v.Unrestrained)
		for _, f := range v.Files {
			ew.printf("      - {name: %s, bytes: %d, sha256: %s}\n", yamlString(f.Name), f.Bytes, f.SHA256)
		}
	}
	return ew.err
}

func yamlList(ss []string) string {
	q := make([]string, len(ss))
	for i, s := range ss {
		q[i] = yamlString(s)
	}
	return strings.Join(q, ", ")
}

// stiff formats a stiffness with 4 significant digits.
func stiff(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

// ratioText formats a ratio to the first variant; "new" where the first
// had none.
func ratioText(r *float64) string {
	if r == nil {
		return "new"
	}
	return strconv.FormatFloat(*r, 'f', 3, 64)
}

// WriteCompareText writes the comparison for a person: the variants'
// legend, a side-by-side table of connectors by kind and state, coupled
// degrees of freedom, findings by code and free motions, then the
// stiffness summary of the part pairs that change most, and the
// caution.
func WriteCompareText(w io.Writer, d *document.CompareDoc) error {
	ew := &errWriter{w: w}
	ew.printf("joinery sweep comparison (%s; run %s)\n\n", d.Generator, d.RunID)
	ew.printf("variants\n")
	for i, v := range d.Variants {
		mark := ""
		if v.Moves {
			mark = fmt.Sprintf("   MOVES: %d mechanism, %d unrestrained motion(s)", v.Mechanisms, v.Unrestrained)
		}
		ew.printf("  v%d  %s%s\n", i+1, v.Name, mark)
	}
	ew.printf("\n")
	// The table: labels left, one right-aligned column per variant.
	var rows [][]string
	row := func(label string, f func(v *document.CompareVariant) string) {
		cells := []string{label}
		for i := range d.Variants {
			cells = append(cells, f(&d.Variants[i]))
		}
		rows = append(rows, cells)
	}
	union := func(f func(v *document.CompareVariant) map[string]int) []string {
		seen := map[string]int{}
		for i := range d.Variants {
			for k := range f(&d.Variants[i]) {
				seen[k] = 1
			}
		}
		return sortedKeys(seen)
	}
	section := func(title string, f func(v *document.CompareVariant) map[string]int) {
		rows = append(rows, []string{title})
		for _, k := range union(f) {
			row("  "+k, func(v *document.CompareVariant) string { return strconv.Itoa(f(v)[k]) })
		}
	}
	row("", func(v *document.CompareVariant) string { return "" })
	for i := range d.Variants {
		rows[0][i+1] = fmt.Sprintf("v%d", i+1)
	}
	section("connectors by kind", func(v *document.CompareVariant) map[string]int { return v.ByKind })
	section("by state", func(v *document.CompareVariant) map[string]int { return v.ByState })
	section("coupled dofs", func(v *document.CompareVariant) map[string]int { return v.ByDOFs })
	section("findings by code", func(v *document.CompareVariant) map[string]int { return v.ByCode })
	rows = append(rows, []string{"free motions"})
	row("  mechanism", func(v *document.CompareVariant) string { return strconv.Itoa(v.Mechanisms) })
	row("  unrestrained", func(v *document.CompareVariant) string { return strconv.Itoa(v.Unrestrained) })
	widths := make([]int, len(d.Variants)+1)
	for _, r := range rows {
		for i, c := range r {
			widths[i] = max(widths[i], len(c))
		}
	}
	for _, r := range rows {
		line := fmt.Sprintf("%-*s", widths[0], r[0])
		for i := 1; i < len(r); i++ {
			line += fmt.Sprintf("  %*s", widths[i], r[i])
		}
		ew.printf("%s\n", strings.TrimRight(line, " "))
	}
	ew.printf("\nconnection stiffness per part pair (%s, %s), principal values ascending, ratio to v1\n", d.Units.Translational, d.Units.Rotational)
	ew.printf("%s\n", wrap(d.Stiffness, 78))
	shown := min(len(d.Pairs), ComparePairsShown)
	ew.printf("the %d of %d part pairs that change most:\n", shown, len(d.Pairs))
	for _, p := range d.Pairs[:shown] {
		change := "from or to zero"
		if p.Change != nil {
			change = fmt.Sprintf("|ln ratio| up to %.3g", *p.Change)
		}
		ew.printf("\n  parts %d-%d %s (%s)\n", p.Parts[0], p.Parts[1], pairNames(p.Names), change)
		tw := tabwriter.NewWriter(ew, 0, 0, 2, ' ', 0)
		fmt.Fprintf(tw, "    \tsprings\ttranslational\tratio\trotational\tratio\n")
		for i, v := range p.Variants {
			fmt.Fprintf(tw, "    v%d\t%d\t%s\t%s\t%s\t%s\n", i+1, v.Springs, triple(v.Translational, stiff), tripleP(v.RatioTranslational),
				triple(v.Rotational, stiff), tripleP(v.RatioRotational))
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	ew.printf("\nCAUTION: %s\n", d.Caution)
	return ew.err
}

func pairNames(names []string) string {
	if names[0] == "" && names[1] == "" {
		return ""
	}
	return names[0] + " / " + names[1]
}

func triple(v [3]float64, f func(float64) string) string {
	return f(v[0]) + " " + f(v[1]) + " " + f(v[2])
}

func tripleP(v [3]*float64) string {
	return ratioText(v[0]) + " " + ratioText(v[1]) + " " + ratioText(v[2])
}

// wrap breaks s into lines of at most width characters.
func wrap(s string, width int) string {
	var b strings.Builder
	n := 0
	for _, word := range strings.Fields(s) {
		if n > 0 && n+1+len(word) > width {
			b.WriteString("\n")
			n = 0
		} else if n > 0 {
			b.WriteString(" ")
			n++
		}
		b.WriteString(word)
		n += len(word)
	}
	return b.String()
}

// compareCSVHeader is the header of compare.csv: one row per part pair
// and variant.
var compareCSVHeader = []string{"a", "b", "variant", "springs", "material",
	"k_t1", "k_t2", "k_t3", "k_r1", "k_r2", "k_r3", "ratio_t1", "ratio_t2", "ratio_t3", "ratio_r1", "ratio_r2", "ratio_r3", "change"}

// WriteCompareCSV writes a comment line with the run id, the units and
// the caution, the header, then one row per part pair and variant, the
// pairs that change most first: principal stiffnesses ascending (k_t in
// N/mm, k_r in N mm/rad), their ratios to the first variant (empty
// where the first's is zero) and the pair's change (empty when
// infinite).
func WriteCompareCSV(w io.Writer, d *document.CompareDoc) error {
	if _, err := fmt.Fprintf(w, "# joinery sweep comparison (%s; run %s); k_t in %s, k_r in %s; CAUTION: %s\n",
		d.Generator, d.RunID, d.Units.Translational, d.Units.Rotational, document.Caution); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(compareCSVHeader); err != nil {
		return err
	}
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	ptr := func(v *float64) string {
		if v == nil {
			return ""
		}
		return num(*v)
	}
	for _, p := range d.Pairs {
		for _, v := range p.Variants {
			rec := []string{strconv.FormatInt(p.Parts[0], 10), strconv.FormatInt(p.Parts[1], 10), v.Variant, strconv.Itoa(v.Springs), v.Material}
			for _, k := range v.Translational {
				rec = append(rec, num(k))
			}
			for _, k := range v.Rotational {
				rec = append(rec, num(k))
			}
			for _, r := range v.RatioTranslational {
				rec = append(rec, ptr(r))
			}
			for _, r := range v.RatioRotational {
				rec = append(rec, ptr(r))
			}
			rec = append(rec, ptr(p.Change))
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteSweepSummary writes the few lines a sweep prints: per variant its
// name, counts and whether it moves, then where the set went.
func WriteSweepSummary(w io.Writer, m *document.ManifestDoc, outDir string, files []string) error {
	ew := &errWriter{w: w}
	ew.printf("variants    %d (%s)\n", len(m.Variants), varyText(m.Vary))
	for _, v := range m.Variants {
		c := v.Counts
		mark := ""
		if v.Moves {
			mark = fmt.Sprintf("  MOVES: %d mechanism, %d unrestrained", v.Mechanisms, v.Unrestrained)
		}
		ew.printf("  %s: built %d (%d flagged), not built %d, findings %d error, %d warning%s\n", v.Name,
			c.ByState["built"]+c.ByState["flagged"], c.ByState["flagged"], c.ByState["not-built"], c.BySeverity["error"], c.BySeverity["warning"], mark)
	}
	if m.Moving > 0 {
		ew.printf("moving      %d variant(s) leave a mechanism or an unrestrained freedom\n", m.Moving)
	}
	ew.printf("written     %s/{%s} and a folder per variant\n", filepath.ToSlash(filepath.Clean(outDir)), strings.Join(files, ","))
	ew.printf("run id      %s\n", m.RunID)
	ew.printf("CAUTION: %s\n", m.Caution)
	return ew.err
}

func varyText(vs []document.VaryDoc) string {
	parts := make([]string, len(vs))
	for i, v := range vs {
		parts[i] = v.Key + "=" + strings.Join(v.Values, ",")
	}
	return strings.Join(parts, " x ")
}
