package html

import (
	"encoding/json"
	"regexp"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/writers/document"
)

// splitNumbers must give back the message when its numbers are put back
// in its text, as the page's script does.
func TestSplitNumbers(t *testing.T) {
	for _, msg := range []string{
		"",
		"no numbers here",
		"nearest nodes of parts 102 and 101 are 4.631 mm apart across the stack (limit 1.531 mm): the meshes do not face each other here",
		"new ids 30000000000 to 30000006477 exceed 2147483647",
		"1.2.3 v1.0. 7. .5 -3.25e-4",
		"stack outside ISO 14373 (0.4 to 6 mm)",
		"é 12 ü",
	} {
		text, nums, ok := splitNumbers(msg)
		if !ok {
			t.Fatalf("%q: refused", msg)
		}
		n := strings.Fields(nums)
		k := 0
		back := regexp.MustCompile(`~`).ReplaceAllStringFunc(text, func(string) string { k++; return n[k-1] })
		if back != msg || k != len(n) {
			t.Errorf("%q: text %q numbers %q give %q", msg, text, nums, back)
		}
	}
	if _, _, ok := splitNumbers("a ~ in it"); ok {
		t.Error("a message with ~ must be kept whole")
	}
}

// The findings data is JSON, with no <, > or & in it, and holds every
// finding in order.
func TestFindingsData(t *testing.T) {
	j := "w<1>"
	at := document.Vec{1.5, -2, 3}
	p := &Page{Findings: []document.FindingDoc{
		{Severity: "warning", Code: "gap-open", Joint: &j, Parts: []int64{1, 2}, Message: "gap 0.5 mm > 0.2 mm & more", Location: &at},
		{Severity: "error", Code: "x", Parts: []int64{}, Message: "a ~ b"},
	}, Sections: []Section{&Overview{}}}
	var w Writer
	writeFindingsData(&w, p)
	s := string(w.Bytes())
	body := strings.TrimSuffix(strings.TrimPrefix(s, `<script type="application/json" id="findings-data">`), "</script>\n")
	if strings.ContainsAny(body, "<>&") {
		t.Errorf("unescaped markup in the data: %s", body)
	}
	var d struct {
		Sev, Code, Text []string
		Rows            [][]any
	}
	if err := json.Unmarshal([]byte(body), &d); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, body)
	}
	if len(d.Rows) != 2 || d.Text[0] != "gap ~ mm > ~ mm & more" || d.Rows[0][5] != "0.5 0.2" || d.Rows[0][6] != "1.5 -2 3" || d.Rows[1][4] != -1.0 || d.Rows[1][5] != "a ~ b" {
		t.Errorf("data %+v", d)
	}
	if d.Rows[0][7] != "axo-at-f1" && d.Rows[0][7] != "axo-"+Anchor(j) {
		t.Errorf("link %v", d.Rows[0][7])
	}
}
