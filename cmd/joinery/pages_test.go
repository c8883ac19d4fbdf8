package main

import (
	"bytes"
	"encoding/xml"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/joints"
)

// pageRuns are the example's runs of every command that writes a
// report, each with the arguments after the job file.
var pageRuns = []struct {
	cmd  string
	args []string
}{
	{"check", []string{"--connectors", filepath.Join("testdata", "golden", "build-connectors.json")}},
	{"flanges", []string{"--pitch", "30"}},
	{"offsets", nil},
}

// runPage runs a command on the example into dir and returns its
// report.html.
func runPage(t *testing.T, dir, cmd string, args ...string) []byte {
	t.Helper()
	all := append([]string{cmd, exampleJob, "--out", dir, "--quiet"}, args...)
	if code, _, errs := runCLI(t, all...); code != exitOK {
		t.Fatalf("%s: exit %d: %s", cmd, code, errs)
	}
	page, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatalf("%s wrote no report.html: %v", cmd, err)
	}
	return page
}

// TestPagesGolden compares the structure of the report.html of check,
// flanges and offsets on the example with testdata/golden
// (<command>-report.html.txt; see TestBuildPageGolden), and wants the
// pictures to parse as XML.
func TestPagesGolden(t *testing.T) {
	skipWithoutExample(t)
	for _, r := range pageRuns {
		t.Run(r.cmd, func(t *testing.T) {
			page := runPage(t, t.TempDir(), r.cmd, r.args...)
			golden(t, r.cmd+"-report.html.txt", pageStructure(t, page))
			svgsParse(t, page)
		})
	}
}

// TestPagesDeterministic runs every report-writing command twice, under
// GOMAXPROCS 1 and 4, into the same directory, and wants the same page
// bytes.
func TestPagesDeterministic(t *testing.T) {
	skipWithoutExample(t)
	if testing.Short() {
		t.Skip("runs every command twice")
	}
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	runs := append([]struct {
		cmd  string
		args []string
	}{{"build", nil}}, pageRuns...)
	for _, r := range runs {
		dir := t.TempDir()
		var first []byte
		for _, procs := range []int{1, 4} {
			runtime.GOMAXPROCS(procs)
			page := runPage(t, dir, r.cmd, r.args...)
			if first == nil {
				first = page
			} else if !bytes.Equal(page, first) {
				t.Errorf("%s: the page differs under GOMAXPROCS %d", r.cmd, procs)
			}
		}
	}
}

var (
	svgElement = regexp.MustCompile(`(?s)<svg[ >].*?</svg>`)
	axisText   = regexp.MustCompile(`(?s)<text[^>]*>([^<]*\([a-z]+\))</text>`)
)

// svgsParse wants every picture of a page to be a well-formed XML
// document of its own.
func svgsParse(t *testing.T, page []byte) {
	t.Helper()
	svgs := svgElement.FindAll(page, -1)
	if len(svgs) == 0 {
		t.Fatal("no pictures")
	}
	for i, s := range svgs {
		d := xml.NewDecoder(bytes.NewReader(s))
		d.Strict = true
		for {
			_, err := d.Token()
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatalf("picture %d does not parse as XML: %v\n%.300s", i, err, s)
			}
		}
	}
}

// TestPageUnits builds the example drawn in metres and in inches: the
// page labels its lengths with the unit the documents use (plot axes,
// table headings, scale bars), never mm but in the findings' messages,
// which keep the millimetres they were written in.
func TestPageUnits(t *testing.T) {
	skipWithoutExample(t)
	for _, u := range []joints.Unit{joints.Millimetre, joints.Metre, joints.Inch} {
		t.Run(u.String(), func(t *testing.T) {
			_, args := scaledExample(t, u)
			dir := t.TempDir()
			if code, _, errs := runCLI(t, append([]string{"build", "--out", dir, "--quiet", "--units", u.String()}, args...)...); code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			page, err := os.ReadFile(filepath.Join(dir, "report.html"))
			if err != nil {
				t.Fatal(err)
			}
			svgsParse(t, page)
			want := "(" + u.String() + ")"
			// The plots' axis labels: every one with a length carries the
			// unit, and the counts' axes say what they count.
			labels := 0
			for _, m := range axisText.FindAllSubmatch(page, -1) {
				l := string(m[1])
				if strings.Contains(l, "count") {
					continue
				}
				labels++
				if !strings.HasSuffix(l, want) {
					t.Errorf("axis label %q, want the unit %s", l, want)
				}
			}
			if labels < 6 {
				t.Errorf("%d axis labels with a unit, want the plots' (at least 6)", labels)
			}
			text := string(scriptOrStyle.ReplaceAll(page, nil))
			for _, heading := range []string{"location " + want, "d " + want, "pitch " + want} {
				if !strings.Contains(text, heading) {
					t.Errorf("no heading %q", heading)
				}
			}
			if u != joints.Millimetre && strings.Contains(text, "(mm)") {
				i := strings.Index(text, "(mm)")
				t.Errorf("a length labelled in mm: %q", text[max(0, i-80):i+4])
			}
			if !strings.Contains(text, " "+u.String()+"</text></g>") {
				t.Errorf("no scale bar in %s", u)
			}
		})
	}
}
