package html_test

import (
	"bytes"
	"context"
	"encoding/xml"
	"io"
	"regexp"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/joints/synth"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// build builds a synthetic body (with node-pair attachment, so that
// many welds are flagged, and a weld far from every sheet, not built)
// and returns its page. Two findings are added that concern no joint,
// one with a location and one without, as a run can report.
func build(t *testing.T, elements, welds int) *html.Page {
	t.Helper()
	md, err := synth.Generate(synth.Config{Elements: elements, Welds: welds, Bolts: 2, Seed: 5})
	if err != nil {
		t.Fatal(err)
	}
	js := append(md.Joints, joints.Joint{ID: "far away", Kind: joints.Spot, Point: r3.Vec{X: -1e5}})
	in := &pipeline.Inputs{Job: &pipeline.Job{}, Model: &meshio.Model{Mesh: md.Mesh}, Joints: js}
	res, err := pipeline.BuildConnectors(context.Background(), in, joints.BuildOptions{Attach: joints.NodePair}, pipeline.Env{})
	if err != nil {
		t.Fatal(err)
	}
	info := document.RunInfo{Generator: "joinery test"}
	conn := document.NewConnectors(md.Mesh, res, info)
	rep := document.NewReport(res, info)
	at := document.Vec{1, 2, 3}
	rep.Findings = append(rep.Findings,
		document.FindingDoc{Severity: "info", Code: "test-here", Parts: []int64{}, Message: "a finding about a place <&>", Location: &at},
		document.FindingDoc{Severity: "info", Code: "test-run", Parts: []int64{}, Message: "a finding about the run"})
	return html.ForBuild(rep, conn, html.NewOutline(md.Mesh))
}

func render(t *testing.T, p *html.Page) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := html.Render(&buf, p); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

var (
	scriptOrStyle = regexp.MustCompile(`(?s)<(script|style)>.*?</(script|style)>`)
	svgElement    = regexp.MustCompile(`(?s)<svg[ >].*?</svg>`)
)

// element is one element of the page as encoding/xml reads it.
type element struct {
	name  string
	attrs map[string]string
}

// elements reads the page with encoding/xml (strict, after taking out
// its style and script, whose text is not XML) and returns its elements.
func elements(t *testing.T, page []byte) []element {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(scriptOrStyle.ReplaceAll(page, nil)))
	d.Strict = true
	var out []element
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatalf("the page is not well-formed: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok {
			e := element{name: se.Name.Local, attrs: map[string]string{}}
			for _, a := range se.Attr {
				e.attrs[a.Name.Local] = a.Value
			}
			out = append(out, e)
		}
	}
}

// TestPageStructure checks a page with findings of every sort: it is
// well-formed, its ids are unique, every link and every symbol it uses
// resolves, every finding has its row and links to its mark, each SVG
// picture reads as XML alone, and nothing is fetched from elsewhere.
func TestPageStructure(t *testing.T) {
	p := build(t, 30_000, 60)
	page := render(t, p)
	els := elements(t, page)
	ids := map[string]bool{}
	for _, e := range els {
		if id, ok := e.attrs["id"]; ok {
			if ids[id] {
				t.Errorf("id %q appears twice", id)
			}
			ids[id] = true
		}
	}
	for _, e := range els {
		if h, ok := e.attrs["href"]; ok {
			if !strings.HasPrefix(h, "#") {
				t.Errorf("<%s href=%q> leaves the page", e.name, h)
			} else if !ids[h[1:]] {
				t.Errorf("<%s href=%q> points at no id", e.name, h)
			}
		}
		if _, ok := e.attrs["src"]; ok {
			t.Errorf("<%s> loads a resource", e.name)
		}
	}
	for i, f := range p.Findings {
		row := html.FindingRow(i)
		if !ids[row] {
			t.Errorf("finding %d has no row %s", i, row)
		}
		target := p.FindingTarget(i)
		switch {
		case f.Joint != nil || f.Location != nil:
			if target == "" || !ids[target] {
				t.Errorf("finding %d (%s) links to %q, not a mark", i, f.Code, target)
			}
		case target != "":
			t.Errorf("finding %d has neither joint nor place but links to %q", i, target)
		}
	}
	for _, svg := range svgElement.FindAll(page, -1) {
		d := xml.NewDecoder(bytes.NewReader(svg))
		d.Strict = true
		for {
			if _, err := d.Token(); err == io.EOF {
				break
			} else if err != nil {
				t.Fatalf("an SVG picture does not read as XML: %v\n%.200s", err, svg)
			}
		}
	}
	for _, bad := range []string{"http://", "https://", "url(", "@import", "@font-face"} {
		rest := strings.ReplaceAll(string(page), `xmlns="http://www.w3.org/2000/svg"`, "")
		rest = strings.ReplaceAll(rest, `"http://www.w3.org/2000/svg"`, "") // the script's namespace argument
		if strings.Contains(rest, bad) {
			t.Errorf("the page holds %q", bad)
		}
	}
	if !bytes.Contains(page, []byte(strings.ReplaceAll(document.Caution, "'", "&#39;"))) {
		t.Error("the page lacks the caution")
	}
}

// TestPageMarks counts the marks of the axonometric view per state, as
// the page's script does, on a page small enough to draw every mark and
// on one above html.CompactAbove, where the plain marks are one path
// per state: the counts must be the connectors' by state.
func TestPageMarks(t *testing.T) {
	cases := []struct {
		elements, welds int
		compact         bool
	}{{30_000, 60, false}, {400_000, html.CompactAbove + 100, true}}
	if testing.Short() {
		cases = cases[:1]
	}
	for _, c := range cases {
		p := build(t, c.elements, c.welds)
		page := render(t, p)
		want := map[string]int{}
		for _, m := range p.Marks {
			want[m.State]++
		}
		got := map[string]int{}
		paths := 0
		inAxo := false
		for _, e := range elements(t, page) {
			if e.name == "svg" {
				inAxo = e.attrs["id"] == "view-axo"
			}
			if !inAxo {
				continue
			}
			switch {
			case e.name == "path" && e.attrs["data-s"] != "":
				n, _ := strconv.Atoi(e.attrs["data-n"])
				got[e.attrs["data-s"]] += n
				paths++
			case e.name == "use" && e.attrs["href"] != "#g-at":
				got[strings.TrimPrefix(e.attrs["href"], "#g-")]++
			}
		}
		for s, n := range want {
			if got[s] != n {
				t.Errorf("%d welds: %d %s marks, want %d", c.welds, got[s], s, n)
			}
		}
		if (paths > 0) != c.compact {
			t.Errorf("%d welds: %d compact paths, compact %v", c.welds, paths, c.compact)
		}
	}
}

// TestPageDeterministic renders the same page under GOMAXPROCS 1, 2 and
// 4 and wants the same bytes.
func TestPageDeterministic(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	var first []byte
	for _, procs := range []int{1, 2, 4} {
		runtime.GOMAXPROCS(procs)
		page := render(t, build(t, 30_000, 60))
		if first == nil {
			first = page
		} else if !bytes.Equal(page, first) {
			t.Errorf("GOMAXPROCS=%d: the page differs", procs)
		}
	}
}

// BenchmarkRender measures ForBuild and Render alone on the page of the
// 2,000,000-element synthetic body with 6,000 spot welds (the outline
// found once).
func BenchmarkRender(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md, err := synth.Generate(synth.Config{Elements: 2_000_000, Welds: 6000, Bolts: 20, Seed: 1})
	if err != nil {
		b.Fatal(err)
	}
	in := &pipeline.Inputs{Job: &pipeline.Job{}, Model: &meshio.Model{Mesh: md.Mesh}, Joints: md.Joints}
	res, err := pipeline.BuildConnectors(context.Background(), in, joints.BuildOptions{}, pipeline.Env{})
	if err != nil {
		b.Fatal(err)
	}
	info := document.RunInfo{Generator: "bench"}
	conn := document.NewConnectors(md.Mesh, res, info)
	rep := document.NewReport(res, info)
	o := html.NewOutline(md.Mesh)
	var buf bytes.Buffer
	for b.Loop() {
		buf.Reset()
		if err := html.Render(&buf, html.ForBuild(rep, conn, o)); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len())/1e6, "MB")
}
