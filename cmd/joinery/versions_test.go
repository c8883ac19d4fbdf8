package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/writers/document"
)

// documentVersions are the documents Joinery writes, by schema name, with
// the version the code writes.
var documentVersions = map[string]int{
	document.ConnectorsSchema: document.ConnectorsVersion,
	document.ReportSchema:     document.ReportVersion,
	document.FlangesSchema:    document.FlangesVersion,
	document.SurfacesSchema:   document.SurfacesVersion,
	document.SetSchema:        document.SetVersion,
	document.ManifestSchema:   document.ManifestVersion,
	document.CompareSchema:    document.CompareVersion,
}

// Every place that states a document's version states the one the code
// writes: the published schema (its version, $id and title), each
// command's help ("schema joinery/x, version N") and the README
// ("schema": "joinery/x", "version": N).
func TestDocumentVersionsAgree(t *testing.T) {
	entries, err := document.Schemas.ReadDir("schema")
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, e := range entries {
		raw, err := document.Schemas.ReadFile("schema/" + e.Name())
		if err != nil {
			t.Fatal(err)
		}
		var s struct {
			ID         string `json:"$id"`
			Title      string `json:"title"`
			Properties struct {
				Schema  struct{ Const string }
				Version struct{ Const int }
			}
		}
		if err := json.Unmarshal(raw, &s); err != nil {
			t.Fatalf("%s: %v", e.Name(), err)
		}
		name, v := s.Properties.Schema.Const, s.Properties.Version.Const
		want, ok := documentVersions[name]
		if !ok {
			t.Errorf("%s: schema %q is not a document the code writes", e.Name(), name)
			continue
		}
		seen[name] = true
		if v != want {
			t.Errorf("%s: version %d, the code writes %d", e.Name(), v, want)
		}
		if !strings.HasSuffix(s.ID, "-"+strconv.Itoa(want)+".json") {
			t.Errorf("%s: $id %q does not end in -%d.json", e.Name(), s.ID, want)
		}
		if !strings.HasSuffix(s.Title, "version "+strconv.Itoa(want)) {
			t.Errorf("%s: title %q does not say version %d", e.Name(), s.Title, want)
		}
	}
	for name := range documentVersions {
		if !seen[name] {
			t.Errorf("no published schema for %s", name)
		}
	}

	inHelp := regexp.MustCompile(`schema (joinery/[a-z-]+), version ([0-9]+)`)
	for _, cmd := range []string{"build", "check", "flanges", "offsets", "sweep"} {
		code, out, errs := runCLI(t, cmd, "--help")
		if code != exitOK {
			t.Fatalf("%s --help: exit %d: %s", cmd, code, errs)
		}
		for _, m := range inHelp.FindAllStringSubmatch(out, -1) {
			if v, _ := strconv.Atoi(m[2]); v != documentVersions[m[1]] {
				t.Errorf("%s --help: %s, the code writes version %d", cmd, m[0], documentVersions[m[1]])
			}
		}
	}

	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Skip("README.md not found:", err)
	}
	inReadme := regexp.MustCompile(`"schema": "(joinery/[a-z-]+)", "version": ([0-9]+)`)
	for _, m := range inReadme.FindAllStringSubmatch(string(readme), -1) {
		if v, _ := strconv.Atoi(m[2]); v != documentVersions[m[1]] {
			t.Errorf("README.md: %s, the code writes version %d", m[0], documentVersions[m[1]])
		}
	}
}
