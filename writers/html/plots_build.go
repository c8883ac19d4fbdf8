package html

import (
	"math"
	"slices"
	"sync"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"

	"github.com/joinery-cae/joinery/joints"
)

const plotsAnchor = "plots"

// BuildPlots is the section of a build's plots: gap offsets from
// contact, nugget diameters, spacings and edge distances, each against
// its rule.
type BuildPlots struct {
	an *buildAnalysis
}

// Anchor returns "plots".
func (s *BuildPlots) Anchor() string { return plotsAnchor }

// Heading returns the section's title.
func (s *BuildPlots) Heading() string { return "Plots" }

// figure is one rendered plot and its caption.
type figure struct {
	id      string
	svg     []byte
	caption string
	none    string // said instead of a plot when there is nothing to draw
	// labels are the plot's axis labels, for the tests.
	xLabel, yLabel string
}

// figures renders the plots, concurrently (each writes its own slot).
func (s *BuildPlots) figures() ([]figure, error) {
	makers := []func() (figure, error){s.gapPlot, s.nuggetPlot, s.spacingPlot, s.edgePlot}
	out := make([]figure, len(makers))
	errs := make([]error, len(makers))
	var wg sync.WaitGroup
	for i, mk := range makers {
		wg.Go(func() { out[i], errs[i] = mk() })
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// Write writes the section.
func (s *BuildPlots) Write(w *Writer, p *Page) error {
	figs, err := s.figures()
	if err != nil {
		return err
	}
	w.Raw("<section id=\"plots\">\n<h2>Plots</h2>\n<div class=\"plots\">\n")
	for _, f := range figs {
		w.Raw("<figure class=\"plot\"")
		w.Attr("id", "fig-"+f.id)
		w.Raw(">")
		if f.svg != nil {
			w.Raw(string(f.svg))
		} else {
			w.Raw("<p class=\"none\">")
			w.Text(f.none)
			w.Raw("</p>")
		}
		w.Raw("<figcaption>")
		w.Text(f.caption)
		w.Raw("</figcaption></figure>\n")
	}
	w.Raw("</div>\n</section>\n")
	return nil
}

func (s *BuildPlots) render(f *figure, p *plot.Plot, label string) error {
	f.xLabel, f.yLabel = p.X.Label.Text, p.Y.Label.Text
	b, err := renderPlot(p, "plot-"+f.id, label)
	f.svg = b
	return err
}

// built reports whether a connector state is one of a connector that was
// made.
func built(state string) bool { return state == "built" || state == "flagged" }

// gapPlot is the histogram of the links' gap offsets from contact, the
// gap square to the sheets (square_gap) less contact as gap-open and
// gap-closed judge it, with the allowance marked.
func (s *BuildPlots) gapPlot() (figure, error) {
	f := figure{id: "gap", none: "No links: no connector was built."}
	conn := s.an.conn
	var offs, allow []float64
	fixed := conn.Options.GapAllowance
	for i := range conn.Connectors {
		c := &conn.Connectors[i]
		if !built(c.State) {
			continue
		}
		for _, l := range c.Links {
			offs = append(offs, l.Gap()-l.ContactGap)
			if fixed != nil {
				allow = append(allow, *fixed)
			} else {
				allow = append(allow, joints.DefaultGapAllowanceFactor*l.ContactGap)
			}
		}
	}
	if len(offs) == 0 {
		f.caption = "Gap offset from contact."
		return f, nil
	}
	aMin, aMax := slices.Min(allow), slices.Max(allow)
	beyond := 0
	for i, v := range offs {
		if math.Abs(v) > allow[i] {
			beyond++
		}
	}
	lo := math.Min(slices.Min(offs), -1.5*aMax)
	hi := math.Max(slices.Max(offs), 1.5*aMax)
	width := aMin / 4
	if !(width > 0) {
		width = (hi - lo) / 40
	}
	if (hi-lo)/width > 120 {
		width = (hi - lo) / 120
	}
	if !(width > 0) {
		width = 0.05
	}
	// A bin centred on 0, where a good build has most of its links.
	lo = (math.Floor(lo/width-0.5) + 0.5) * width
	nb := int(math.Ceil((hi-lo)/width)) + 1
	counts := make([]int, nb)
	for _, v := range offs {
		k := min(max(int(math.Floor((v-lo)/width)), 0), nb-1)
		counts[k]++
	}
	top := float64(slices.Max(counts)) * 1.05
	p := newPlot("Gap offset from contact", "mid-surface gap square to the sheets − contact gap (t1+t2)/2 ("+s.an.unit+")", "links (count)")
	b := &bars{lo: lo, width: width, counts: counts, fill: rgb(colSky)}
	p.Add(b)
	p.Legend.Add("links", b)
	marks := []float64{aMin}
	label := "allowance ±" + joints.MM(aMin) + " " + s.an.unit
	if fixed == nil {
		label = "allowance ±" + joints.MM(joints.DefaultGapAllowanceFactor) + " (t1+t2)/2"
		if aMax > aMin {
			marks = append(marks, aMax)
		}
	}
	for k, a := range marks {
		for _, sg := range []float64{-1, 1} {
			l, err := line(plotter.XYs{{X: sg * a, Y: 0}, {X: sg * a, Y: top}}, "#000000", k > 0 || fixed == nil, 1)
			if err != nil {
				return f, err
			}
			p.Add(l)
			if sg > 0 && k == 0 {
				p.Legend.Add(label, l)
			}
		}
	}
	p.Y.Min, p.Y.Max = 0, top*1.35 // room for the legend above the lines
	f.caption = itoa(len(offs)) + " links of built connectors; " + itoa(beyond) + " beyond the allowance " +
		allowanceText(fixed != nil, aMin, aMax, s.an.unit) + " (gap-open to the right, gap-closed to the left). Bins " + joints.MM(width) + " " + s.an.unit + " wide."
	return f, s.render(&f, p, "histogram of gap offsets from contact")
}

func allowanceText(fixed bool, aMin, aMax float64, unit string) string {
	if fixed {
		return "(±" + joints.MM(aMin) + " " + unit + ")"
	}
	if aMax > aMin {
		return "(±" + joints.MM(joints.DefaultGapAllowanceFactor) + " (t1+t2)/2: ±" + joints.MM(aMin) + " to ±" + joints.MM(aMax) + " " + unit + ", dashed lines)"
	}
	return "(±" + joints.MM(joints.DefaultGapAllowanceFactor) + " (t1+t2)/2 = ±" + joints.MM(aMin) + " " + unit + ", dashed lines)"
}

// nuggetPlot plots nugget diameters against governing thickness with
// the 4 sqrt(t) and 5 sqrt(t) rules.
func (s *BuildPlots) nuggetPlot() (figure, error) {
	f := figure{id: "nugget", none: "No spot weld was built."}
	conn := s.an.conn
	var listed, ruled plotter.XYs
	tmax := 0.0
	for i := range conn.Connectors {
		c := &conn.Connectors[i]
		if c.Kind != "spot" || !built(c.State) || c.Diameter == nil || s.an.gov[i] <= 0 {
			continue
		}
		q := plotter.XY{X: s.an.gov[i], Y: *c.Diameter}
		tmax = math.Max(tmax, q.X)
		if c.DiameterSource == "list" {
			listed = append(listed, q)
		} else {
			ruled = append(ruled, q)
		}
	}
	f.caption = "Nugget diameter against the governing thickness: the thinner of two sheets, the second thickest of three or more (AWS D8.1M). " +
		"The rules d = 4√t and d = 5√t (t and d in mm) are common practice."
	if len(listed)+len(ruled) == 0 {
		return f, nil
	}
	p := newPlot("Nugget diameter", "governing thickness t ("+s.an.unit+")", "nugget diameter d ("+s.an.unit+")")
	mm := s.an.mm
	x1 := math.Max(1.15*tmax, 1/mm)
	for _, r := range []struct {
		k      float64
		dashed bool
	}{{5, false}, {4, true}} {
		l, err := line(curve(func(t float64) float64 { return r.k * math.Sqrt(t*mm) / mm }, 0, x1, 60), "#000000", r.dashed, 1)
		if err != nil {
			return f, err
		}
		p.Add(l)
		p.Legend.Add("d = "+joints.MM(r.k)+"√t", l)
	}
	if len(ruled) > 0 {
		d := newDots(ruled, square, colSky)
		p.Add(d)
		p.Legend.Add("diameter from the rule ("+itoa(len(ruled))+")", d)
	}
	if len(listed) > 0 {
		d := newDots(listed, diamond, colLine)
		p.Add(d)
		p.Legend.Add("diameter from the list ("+itoa(len(listed))+")", d)
	}
	p.X.Min, p.X.Max, p.Y.Min = 0, x1, 0
	p.Legend.Left = true
	f.caption = itoa(len(listed)+len(ruled)) + " built spot welds. " + f.caption
	return f, s.render(&f, p, "nugget diameter against governing thickness")
}

// spacingPlot plots the spacings of consecutive welds against the
// minimum-spacing table.
func (s *BuildPlots) spacingPlot() (figure, error) {
	f := figure{id: "spacing", none: "No two welds of a part pair to space."}
	var two, three plotter.XYs
	below := 0
	tmax, lmax := 0.0, 0.0
	for _, pa := range s.an.pairs {
		for _, l := range pa.links {
			q := plotter.XY{X: l.thickness, Y: l.length}
			if l.sheets >= 3 {
				three = append(three, q)
			} else {
				two = append(two, q)
			}
			if l.length < l.min {
				below++
			}
			tmax = math.Max(tmax, l.thickness)
			lmax = math.Max(lmax, l.length)
		}
	}
	f.caption = "Spacing between consecutive welds of the same part pair (neighbours in the minimum spanning forest of the pair's welds; " +
		"runs split where a spacing exceeds " + joints.MM(RunCut) + " times the pair's median) against the minimum weld spacing of the " +
		"resistance-welding manufacturers' table for low-carbon steel (secondary copy), 30 per cent more for three sheets."
	n := len(two) + len(three)
	if n == 0 {
		return f, nil
	}
	mm := s.an.mm
	x1 := math.Max(1.15*tmax, 1/mm)
	top := joints.MinSpacing(x1*mm, 3) / mm
	ymax := math.Min(lmax, 3*top) * 1.05
	ymax = math.Max(ymax, 1.2*top)
	above := 0
	for _, q := range append(slices.Clone(two), three...) {
		if q.Y > ymax {
			above++
		}
	}
	p := newPlot("Weld spacing", "governing thickness t ("+s.an.unit+")", "spacing to the consecutive weld ("+s.an.unit+")")
	for _, r := range []struct {
		sheets int
		dashed bool
		label  string
	}{{2, false, "minimum, 2 sheets"}, {3, true, "minimum, 3 sheets"}} {
		l, err := line(curve(func(t float64) float64 { return joints.MinSpacing(t*mm, r.sheets) / mm }, 0, x1, 120), "#000000", r.dashed, 1)
		if err != nil {
			return f, err
		}
		p.Add(l)
		p.Legend.Add(r.label, l)
	}
	if len(two) > 0 {
		d := newDots(two, square, colSky)
		p.Add(d)
		p.Legend.Add("2 sheets ("+itoa(len(two))+")", d)
	}
	if len(three) > 0 {
		d := newDots(three, triangle, colPurple)
		p.Add(d)
		p.Legend.Add("3 or more sheets ("+itoa(len(three))+")", d)
	}
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, x1, 0, ymax
	p.Legend.Left = true
	f.caption = itoa(n) + " spacings, " + itoa(below) + " below the minimum" + aboveText(above, ymax, s.an.unit) + ". " + f.caption
	return f, s.render(&f, p, "weld spacing against governing thickness")
}

func aboveText(n int, y float64, unit string) string {
	if n == 0 {
		return ""
	}
	return "; " + itoa(n) + " above " + joints.MM(y) + " " + unit + " not drawn"
}

// edgePlot plots the distance from each weld centre to its sheets' free
// edges against the nugget diameter, with the edge rule.
func (s *BuildPlots) edgePlot() (figure, error) {
	f := figure{id: "edge", none: "No spot weld was built."}
	conn := s.an.conn
	factor := conn.Options.EdgeFactor
	if !(factor > 0) {
		factor = joints.DefaultEdgeFactor
	}
	var pts plotter.XYs
	none, near := 0, 0
	dmax := 0.0
	for i := range conn.Connectors {
		c := &conn.Connectors[i]
		if c.Kind != "spot" || !built(c.State) || c.Diameter == nil {
			continue
		}
		d := *c.Diameter
		for _, sh := range c.Sheets {
			if sh.EdgeDistance == nil {
				none++
				continue
			}
			pts = append(pts, plotter.XY{X: d, Y: *sh.EdgeDistance})
			if *sh.EdgeDistance < factor*d {
				near++
			}
			dmax = math.Max(dmax, d)
		}
	}
	f.caption = "Distance from the weld centre to the nearest free edge of each sheet, against the nugget diameter d; the rule asks for at least " +
		joints.MM(factor) + " d (common practice), and the check looks for edges up to twice that far."
	if len(pts) == 0 {
		if none > 0 {
			f.none = "No free edge within twice the edge limit of any weld (" + itoa(none) + " sheets)."
		}
		return f, nil
	}
	p := newPlot("Edge distance", "nugget diameter d ("+s.an.unit+")", "weld centre to free edge ("+s.an.unit+")")
	x1 := math.Max(1.15*dmax, 1/s.an.mm)
	for _, r := range []struct {
		k      float64
		dashed bool
		label  string
	}{{factor, false, "edge rule: " + joints.MM(factor) + " d"}, {2 * factor, true, "limit of the search: " + joints.MM(2*factor) + " d"}} {
		l, err := line(plotter.XYs{{X: 0, Y: 0}, {X: x1, Y: r.k * x1}}, "#000000", r.dashed, 1)
		if err != nil {
			return f, err
		}
		p.Add(l)
		p.Legend.Add(r.label, l)
	}
	d := newDots(pts, square, colSky)
	p.Add(d)
	p.Legend.Add("sheets ("+itoa(len(pts))+")", d)
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, x1, 0, 2.1*factor*x1
	p.Legend.Left = true
	f.caption = itoa(len(pts)) + " sheets with a free edge within reach of the check, " + itoa(near) + " closer than the rule; " +
		itoa(none) + " sheets with none (not drawn). " + f.caption
	return f, s.render(&f, p, "edge distance against nugget diameter")
}
