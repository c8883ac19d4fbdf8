package html

import (
	"fmt"
	"strconv"
	"strings"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"github.com/joinery-cae/joinery/writers/document"
)

// sweepPairsPlotted is the number of part pairs the sweep's chart shows:
// those that change most.
const sweepPairsPlotted = 4

// ForSweep returns the page of a sweep: the varied settings, a table of
// the variants (each linked to its own report.html) and a bar chart of
// the stiffness ratios of the part pairs that change most.
func ForSweep(m *document.ManifestDoc, c *document.CompareDoc) *Page {
	p := &Page{Title: "Joinery sweep report", Generator: m.Generator, RunID: m.RunID, Caution: m.Caution, Inputs: m.Inputs}
	for _, v := range m.Vary {
		p.Settings = append(p.Settings, Setting{Name: v.Key, Value: strings.Join(v.Values, ", "), Note: "varied"})
	}
	p.Sections = []Section{&SweepVariants{m: m}, &SweepStiffness{c: c}}
	return p
}

// SweepVariants is the table of a sweep's variants.
type SweepVariants struct{ m *document.ManifestDoc }

// Anchor returns "variants".
func (*SweepVariants) Anchor() string { return "variants" }

// Heading returns the section's title.
func (*SweepVariants) Heading() string { return "Variants" }

// Write writes the section.
func (s *SweepVariants) Write(w *Writer, _ *Page) error {
	w.Raw("<section id=\"variants\">\n<h2>Variants</h2>\n<table id=\"variant-table\">\n<thead><tr><th>variant</th>")
	if len(s.m.Variants) > 0 {
		for _, st := range s.m.Variants[0].Settings {
			w.Raw("<th>")
			w.Text(st.Key)
			w.Raw("</th>")
		}
	}
	w.Raw("<th>built</th><th>flagged</th><th>not built</th><th>errors</th><th>warnings</th><th>mechanism motions</th><th>unrestrained</th></tr></thead>\n<tbody>\n")
	for i, v := range s.m.Variants {
		w.Raw("<tr")
		if v.Moves {
			w.Raw(" class=\"moves\"")
		}
		w.Raw("><td><a")
		w.Attr("href", v.Folder+"/report.html")
		w.Raw(">")
		w.Text("v" + strconv.Itoa(i+1) + " " + v.Name)
		w.Raw("</a></td>")
		for _, st := range v.Settings {
			w.Cell(st.Value)
		}
		c := v.Counts
		for _, n := range []int{c.ByState["built"], c.ByState["flagged"], c.ByState["not-built"], c.BySeverity["error"], c.BySeverity["warning"], v.Mechanisms, v.Unrestrained} {
			w.IntCell(n)
		}
		w.Raw("</tr>\n")
	}
	w.Raw("</tbody></table>\n")
	if s.m.Moving > 0 {
		w.Raw("<p class=\"moves\">")
		w.Text(fmt.Sprintf("%d variant(s) leave a mechanism or an unrestrained freedom: see their reports.", s.m.Moving))
		w.Raw("</p>\n")
	}
	w.Raw("</section>\n")
	return nil
}

// SweepStiffness is the bar chart of the stiffness ratios.
type SweepStiffness struct{ c *document.CompareDoc }

// Anchor returns "stiffness".
func (*SweepStiffness) Anchor() string { return "stiffness" }

// Heading returns the section's title.
func (*SweepStiffness) Heading() string { return "Connection stiffness" }

// trace sums three principal values.
func trace(v [3]float64) float64 { return v[0] + v[1] + v[2] }

// Write writes the section: per pair that changes most (and has a
// rotational stiffness in the first variant), the ratio of each
// variant's rotational and translational stiffness (the sum of the
// principal values) to the first's.
func (s *SweepStiffness) Write(w *Writer, _ *Page) error {
	w.Raw("<section id=\"stiffness\">\n<h2>Connection stiffness</h2>\n<p>")
	w.Text(s.c.Stiffness)
	w.Raw("</p>\n<div class=\"plots\">\n")
	for _, kind := range []string{"rotational", "translational"} {
		pl := newPlot(kind+" stiffness against v1, pairs that change most", "variant", "ratio to v1 (sum of principal values)")
		var pairs []document.ComparePair
		for _, cp := range s.c.Pairs {
			if len(pairs) == sweepPairsPlotted {
				break
			}
			if v := pick(cp.Variants[0], kind); v > 0 {
				pairs = append(pairs, cp)
			}
		}
		if len(pairs) == 0 {
			continue
		}
		colours := []string{colLine, colFlagged, colBuilt, colPurple}
		top := 1.0
		width := vg.Points(40 / float64(len(pairs)))
		for k, cp := range pairs {
			vals := make(plotter.Values, len(cp.Variants))
			first := pick(cp.Variants[0], kind)
			for i, v := range cp.Variants {
				vals[i] = pick(v, kind) / first
				top = max(top, vals[i])
			}
			bc, err := plotter.NewBarChart(vals, width)
			if err != nil {
				return fmt.Errorf("html: stiffness chart: %w", err)
			}
			bc.Color = rgb(colours[k%len(colours)])
			bc.LineStyle.Width = 0
			bc.Offset = vg.Length(float64(k)-float64(len(pairs)-1)/2) * width
			pl.Add(bc)
			pl.Legend.Add(fmt.Sprintf("parts %d-%d", cp.Parts[0], cp.Parts[1]), bc)
		}
		names := make([]string, len(s.c.Variants))
		for i := range names {
			names[i] = "v" + strconv.Itoa(i+1)
		}
		pl.NominalX(names...)
		pl.Y.Min, pl.Y.Max = 0, 1.35*top // room for the legend above the bars
		b, err := renderPlot(pl, "plot-stiffness-"+kind, kind+" stiffness ratios to the first variant")
		if err != nil {
			return err
		}
		w.Raw("<figure class=\"plot\">")
		w.Raw(string(b))
		w.Raw("</figure>\n")
	}
	w.Raw("</div>\n<p>The table of every pair is in compare.txt, compare.json and compare.csv.</p>\n</section>\n")
	return nil
}

func pick(v document.PairStiffnessDoc, kind string) float64 {
	if kind == "rotational" {
		return trace(v.Rotational)
	}
	return trace(v.Translational)
}
