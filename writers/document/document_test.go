package document

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// connectors.json reads back through the same types that wrote it.
func TestDecodeConnectorsRoundTrip(t *testing.T) {
	path := filepath.Join("..", "..", "cmd", "joinery", "testdata", "golden", "build-connectors.json")
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Skip(err)
	}
	doc, err := DecodeConnectors(bytes.NewReader(raw), path)
	if err != nil {
		t.Fatal(err)
	}
	var again bytes.Buffer
	if err := EncodeConnectors(&again, doc); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(again.Bytes(), raw) {
		t.Errorf("decode then encode does not give back the same bytes")
	}
}

func TestDecodeRefusesOtherDocuments(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{`{"schema":"joinery/report","version":2}`, `c.json: not a joinery/connectors document`},
		{`{"schema":"joinery/connectors","version":1}`, `c.json: joinery/connectors version 1; this Joinery reads version 2`},
		{"{\n\"schema\": \"joinery/connectors\",\n\"version\": 2,\n\"connectors\": 5}", `c.json:4:`},
		{"not json", `c.json:1:`},
	} {
		_, err := DecodeConnectors(strings.NewReader(tc.in), "c.json")
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) || !errors.Is(err, geom.ErrInput) {
			t.Errorf("%q: err %v, want an input error starting %q", tc.in, err, tc.want)
		}
	}
}

// The README carries the caution word for word: one text everywhere.
func TestREADMEHoldsTheCaution(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(strings.Fields(string(raw)), " "), Caution) {
		t.Errorf("README.md does not hold the caution text of document.Caution")
	}
}

// The report schema's description of a finding's code lists every code
// joints defines (read from its source, so that a new code cannot be
// forgotten there).
func TestReportSchemaListsEveryCode(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "..", "joints", "finding.go"))
	if err != nil {
		t.Fatal(err)
	}
	schema, err := Schemas.ReadFile("schema/report.schema.json")
	if err != nil {
		t.Fatal(err)
	}
	desc := regexp.MustCompile(`"description": "finding code; [^"]*"`).Find(schema)
	if desc == nil {
		t.Fatal("no description of the finding code in report.schema.json")
	}
	codes := regexp.MustCompile(`(?m)^\s*Code[A-Za-z]+\s*=\s*"([a-z0-9-]+)"`).FindAllSubmatch(src, -1)
	if len(codes) < 40 {
		t.Fatalf("found %d codes in joints/finding.go", len(codes))
	}
	for _, c := range codes {
		if !regexp.MustCompile(`[ (]` + regexp.QuoteMeta(string(c[1])) + `[,;)]`).Match(desc) {
			t.Errorf("report.schema.json does not list %s", c[1])
		}
	}
}
