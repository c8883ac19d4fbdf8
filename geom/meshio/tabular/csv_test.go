package tabular

import (
	"errors"
	"io"
	"slices"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

func TestCSV(t *testing.T) {
	in := "\ufeff# a comment\n\n Id , X,name\n1, 2.5 ,\"a, b\"\n   \n# another\n2,3,c\n"
	c, err := NewCSV(strings.NewReader(in), "t.csv")
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(c.Header, "|"); got != "Id|X|name" || c.HeaderLine != 3 {
		t.Fatalf("header %q at line %d", got, c.HeaderLine)
	}
	known := []string{"x", "id", "z"}
	at, unknown := c.Columns(known)
	if !slices.Equal(at, []int{1, 0, -1}) || !slices.Equal(unknown, []int{2}) {
		t.Errorf("Columns = %v, %v", at, unknown)
	}
	if err := c.Require(at, known, 0, 1); err != nil {
		t.Error(err)
	}
	if err := c.Require(at, known, 0, 2); err == nil || err.Error() != `t.csv:3: missing required column "z"` {
		t.Errorf("Require: %v", err)
	}
	var rows []string
	var lines []int
	for {
		rec, err := c.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		rows = append(rows, strings.Join(rec, "|"))
		lines = append(lines, c.Line(0))
	}
	if got := strings.Join(rows, "/"); got != "1|2.5|a, b/2|3|c" {
		t.Errorf("rows %q", got)
	}
	if lines[0] != 4 || lines[1] != 7 {
		t.Errorf("lines %v, want [4 7]", lines)
	}
}

func TestCSVErrors(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"empty", "", "t.csv: empty table"},
		{"comments only", "# x\n\n", "t.csv: empty table"},
		{"unnamed column", "id,,x\n", "t.csv:1: column 2 of the header has no name"},
		{"duplicate column", "id,x,ID\n", `t.csv:1: column "ID" given twice (columns 1 and 3)`},
		{"too few", "id,x\n1,2\n3\n", "t.csv:3: row has 1 fields; the header has 2 columns"},
		{"too many", "id,x\n1,2,3\n", "t.csv:2: row has 3 fields; the header has 2 columns"},
		{"bad quote", "id,x\n1,a\"b\n", "t.csv:2: CSV: "},
		{"not a number", "id,x\n1,abc\n", `t.csv:2: x: "abc" is not a finite number`},
		{"nan", "id,x\n1,NaN\n", `t.csv:2: x: "NaN" is not a finite number`},
		{"inf", "id,x\n1,-Inf\n", `t.csv:2: x: "-Inf" is not a finite number`},
		{"bad id", "id,x\n1.5,1\n", `t.csv:2: id: "1.5" is not an integer`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := readAllCSV(tt.in)
			if err == nil || !strings.HasPrefix(err.Error(), tt.want) {
				t.Fatalf("err = %v\nwant prefix %s", err, tt.want)
			}
			if !errors.Is(err, geom.ErrInput) {
				t.Errorf("not an input error: %v", err)
			}
		})
	}
}

// readAllCSV reads a table whose first column is an integer and second a
// number.
func readAllCSV(in string) error {
	c, err := NewCSV(strings.NewReader(in), "t.csv")
	if err != nil {
		return err
	}
	for {
		rec, err := c.Read()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
		if _, err := c.Int(rec, 0); err != nil {
			return err
		}
		if _, err := c.Float(rec, 1); err != nil {
			return err
		}
	}
}

func TestCSVUnknownColumn(t *testing.T) {
	c, err := NewCSV(strings.NewReader("id,thicknes\n"), "p.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := `p.csv:1: unknown column "thicknes" (did you mean "thickness"?)`
	if err := c.UnknownColumn(1, []string{"id", "thickness"}); err == nil || err.Error() != want {
		t.Errorf("err = %v\nwant  %s", err, want)
	}
}

func TestCSVDelimiters(t *testing.T) {
	tests := []struct {
		name, in string
		comma    rune
		rows     string // rows joined by "/", fields by "|"
	}{
		{"comma", "id,x\n1,2.5\n", ',', "1|2.5"},
		{"semicolon", "id;x;parts\n1;2.5;\"3;4\"\n", ';', "1|2.5|3;4"},
		{"semicolon with commas in quotes", "id;\"a,b\";c\n1;2;3\n", ';', "1|2|3"},
		{"tab with empty fields", "id\tx\tnote\n1\t\t\n2\t 3 \tn\n", '\t', "1||/2|3|n"},
		{"comment lines with other delimiters", "# a,b,c,d\n\n id ; x \n1;2\n", ';', "1|2"},
		{"one column", "id\n7\n", ',', "7"},
		{"bom and semicolon", "\ufeffid;x\n1;2\n", ';', "1|2"},
		{"crlf", "id;x\r\n1;2\r\n", ';', "1|2"},
		{"long header line", "id;" + strings.Repeat("c", 5000) + "\n1;2\n", ';', "1|2"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c, err := NewCSV(strings.NewReader(tt.in), "t.csv")
			if err != nil {
				t.Fatal(err)
			}
			if c.Comma != tt.comma {
				t.Errorf("delimiter %q, want %q", c.Comma, tt.comma)
			}
			var rows []string
			for {
				rec, err := c.Read()
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatal(err)
				}
				rows = append(rows, strings.Join(rec, "|"))
			}
			if got := strings.Join(rows, "/"); got != tt.rows {
				t.Errorf("rows %q, want %q", got, tt.rows)
			}
		})
	}
}

func TestCSVDelimiterErrors(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"tie", "# c\nid;x,y\n", "t.csv:2: the header holds as many commas as semicolons: cannot tell which separates the columns"},
		{"decimal comma", "id;x\n1;2.5\n2;12,5\n", `t.csv:3: x: "12,5" has a decimal comma; write 12.5 (the decimal separator is '.')`},
		{"decimal comma in a tab file", "id\tx\n1\t-0,75\n", `t.csv:2: x: "-0,75" has a decimal comma; write -0.75 (the decimal separator is '.')`},
		{"two commas", "id;x\n1;1,2,5\n", `t.csv:2: x: "1,2,5" is not a finite number`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := readAllCSV(tt.in)
			if err == nil || err.Error() != tt.want {
				t.Fatalf("err = %v\nwant    %s", err, tt.want)
			}
			if !errors.Is(err, geom.ErrInput) {
				t.Errorf("not an input error: %v", err)
			}
		})
	}
}
