package main

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
)

// TestBuildPageGolden builds the example and compares the structure of
// its report.html with testdata/golden/build-report.html.txt: every
// element outside the pictures with its id, classes and text, and inside
// the pictures the elements that have ids (the marks that findings link
// to). Coordinates and plot drawing are left out, so the golden file
// shows the page's structure and its stable ids rather than its
// geometry.
func TestBuildPageGolden(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	if code, _, errs := runCLI(t, "build", exampleJob, "--out", dir, "--quiet"); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	page, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	golden(t, "build-report.html.txt", pageStructure(t, page))
}

var scriptOrStyle = regexp.MustCompile(`(?s)<(script|style)>.*?</(script|style)>`)

// pageStructure returns the outline of a page (see TestBuildPageGolden),
// one element per line, indented by depth.
func pageStructure(t *testing.T, page []byte) []byte {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(scriptOrStyle.ReplaceAll(page, []byte("<$1/>"))))
	d.Strict = true
	var out bytes.Buffer
	depth, svg := 0, 0 // svg: depth inside a picture
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("report.html is not well-formed: %v", err)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			depth++
			attrs := map[string]string{}
			for _, a := range tok.Attr {
				attrs[a.Name.Local] = a.Value
			}
			if svg > 0 {
				svg++
				if attrs["id"] == "" {
					continue
				}
			} else if tok.Name.Local == "svg" {
				svg = 1
			}
			line := strings.Repeat("  ", depth-1) + tok.Name.Local
			if id := attrs["id"]; id != "" {
				line += "#" + id
			}
			if c := attrs["class"]; c != "" {
				line += "." + strings.ReplaceAll(c, " ", ".")
			}
			var extra []string
			for k, v := range attrs {
				if k == "href" && strings.HasPrefix(v, "#") || strings.HasPrefix(k, "data-") && k != "data-n" {
					extra = append(extra, k+"="+v)
				}
			}
			slices.Sort(extra)
			if len(extra) > 0 {
				line += " [" + strings.Join(extra, " ") + "]"
			}
			fmt.Fprintln(&out, line)
		case xml.EndElement:
			depth--
			if svg > 0 {
				svg--
			}
		case xml.CharData:
			if svg > 0 {
				continue
			}
			if s := strings.Join(strings.Fields(string(tok)), " "); s != "" {
				fmt.Fprintf(&out, "%s%q\n", strings.Repeat("  ", depth), s)
			}
		}
	}
	return out.Bytes()
}
