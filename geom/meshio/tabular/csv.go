package tabular

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/joinery-cae/joinery/geom"
)

// CSV reads a table of delimited values whose first row names the
// columns. The delimiter is a comma, a semicolon (the usual spreadsheet
// export where the comma is the decimal separator) or a tab, found from
// the header line (see NewCSV). Lines starting with '#' and blank lines
// are skipped anywhere; fields are trimmed of surrounding white space; a
// UTF-8 byte-order mark before the header is ignored. Quoting follows
// RFC 4180, as encoding/csv reads it.
type CSV struct {
	// File names the table in messages.
	File string
	// Header holds the trimmed column names as written.
	Header []string
	// HeaderLine is the line of the header row.
	HeaderLine int
	// Comma is the delimiter found in the header line: ',', ';' or '\t'.
	Comma rune

	r *csv.Reader
}

// delimiters are the column separators NewCSV recognises.
const delimiters = ",;\t"

// NewCSV reads the header row of a table from r. The delimiter is the one
// of ',', ';' and tab that occurs most often in the header line outside
// quotes; a comma when none does (a table of one column). A header in
// which two of them occur equally often is an error. The names must be
// non-empty and distinct (ignoring case).
func NewCSV(r io.Reader, file string) (*CSV, error) {
	br := bufio.NewReader(r)
	if bom, err := br.Peek(3); err == nil && string(bom) == "\ufeff" {
		br.Discard(3)
	}
	head, comma, err := sniffDelimiter(br, file)
	if err != nil {
		return nil, err
	}
	c := &CSV{File: file, Comma: comma, r: csv.NewReader(io.MultiReader(bytes.NewReader(head), br))}
	c.r.Comma = comma
	c.r.Comment = '#'
	c.r.FieldsPerRecord = -1
	// Leading white space would swallow empty fields between tabs; the
	// fields are trimmed anyway.
	c.r.TrimLeadingSpace = comma != '\t'
	c.r.ReuseRecord = true
	rec, err := c.next()
	if errors.Is(err, io.EOF) {
		return nil, geom.FileError(file, "empty table: want a header row naming the columns")
	}
	if err != nil {
		return nil, err
	}
	c.HeaderLine = c.Line(0)
	c.Header = make([]string, len(rec))
	seen := make(map[string]int, len(rec))
	for i, name := range rec {
		name = strings.TrimSpace(name)
		if name == "" {
			return nil, geom.LineError(file, c.HeaderLine, "column %d of the header has no name", i+1)
		}
		low := strings.ToLower(name)
		if prev, dup := seen[low]; dup {
			return nil, geom.LineError(file, c.HeaderLine, "column %q given twice (columns %d and %d)", geom.Excerpt(name), prev+1, i+1)
		}
		seen[low] = i
		c.Header[i] = name
	}
	return c, nil
}

// sniffDelimiter reads br up to and including the header line (the first
// line that is neither blank nor a comment) and returns what it read with
// the delimiter that line uses.
func sniffDelimiter(br *bufio.Reader, file string) ([]byte, rune, error) {
	var head []byte
	for line := 1; ; line++ {
		start := len(head)
		b, err := br.ReadSlice('\n')
		for errors.Is(err, bufio.ErrBufferFull) {
			head = append(head, b...)
			b, err = br.ReadSlice('\n')
		}
		head = append(head, b...)
		if err != nil && !errors.Is(err, io.EOF) {
			return nil, 0, fmt.Errorf("reading %s: %w", file, err)
		}
		text := head[start:]
		if len(bytes.TrimSpace(text)) > 0 && text[0] != '#' {
			comma, err := headerDelimiter(text)
			if err != nil {
				return nil, 0, geom.LineError(file, line, "%v", err)
			}
			return head, comma, nil
		}
		if err != nil { // end of input before a header
			return head, ',', nil
		}
	}
}

// headerDelimiter returns the delimiter of a header line: the most
// frequent of ',', ';' and tab outside double quotes, ',' when none
// occurs.
func headerDelimiter(line []byte) (rune, error) {
	var n [len(delimiters)]int
	quoted := false
	for _, b := range line {
		switch k := strings.IndexByte(delimiters, b); {
		case b == '"':
			quoted = !quoted
		case k >= 0 && !quoted:
			n[k]++
		}
	}
	best := 0
	for k := range n {
		if n[k] > n[best] {
			best = k
		}
	}
	for k := range n {
		if k != best && n[k] > 0 && n[k] == n[best] {
			return 0, fmt.Errorf("the header holds as many %s as %s: cannot tell which separates the columns", delimName(delimiters[best]), delimName(delimiters[k]))
		}
	}
	return rune(delimiters[best]), nil
}

// delimName names a delimiter in messages.
func delimName(b byte) string {
	switch b {
	case ';':
		return "semicolons"
	case '\t':
		return "tabs"
	}
	return "commas"
}

// Columns finds the names of known in the header, comparing without
// regard to case. at[k] is the column of known[k], -1 when the header
// lacks it; unknown lists the other columns in header order.
func (c *CSV) Columns(known []string) (at, unknown []int) {
	at = make([]int, len(known))
	for k := range at {
		at[k] = -1
	}
	for col, h := range c.Header {
		k := slices.IndexFunc(known, func(name string) bool { return strings.EqualFold(h, name) })
		if k < 0 {
			unknown = append(unknown, col)
			continue
		}
		at[k] = col
	}
	return at, unknown
}

// Require returns an input error at the header naming the first of the
// required names (indices into known) that at lacks.
func (c *CSV) Require(at []int, known []string, required ...int) error {
	for _, k := range required {
		if at[k] < 0 {
			return geom.LineError(c.File, c.HeaderLine, "missing required column %q", known[k])
		}
	}
	return nil
}

// UnknownColumn returns the error for a header column that is not in
// known, suggesting the known name it resembles.
func (c *CSV) UnknownColumn(col int, known []string) error {
	return geom.LineError(c.File, c.HeaderLine, "unknown column %q%s", geom.Excerpt(c.Header[col]), didYouMean(c.Header[col], known))
}

// Read returns the next data row, trimmed, with exactly one field per
// header column, or io.EOF after the last row. The slice is reused by the
// next call; the strings are not.
func (c *CSV) Read() ([]string, error) {
	rec, err := c.next()
	if err != nil {
		return nil, err
	}
	if len(rec) != len(c.Header) {
		hint := ""
		if len(rec) > len(c.Header) && c.Comma == ';' {
			hint = ` (in a table separated by semicolons, quote a field that holds one: "10;20")`
		}
		return nil, geom.LineError(c.File, c.Line(0), "row has %d fields; the header has %d columns%s", len(rec), len(c.Header), hint)
	}
	return rec, nil
}

// next returns the next record that is not blank, its fields trimmed.
func (c *CSV) next() ([]string, error) {
	for {
		rec, err := c.r.Read()
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, geom.LineError(c.File, max(pe.Line, 1), "CSV: %v", pe.Err)
			}
			if errors.Is(err, io.EOF) {
				return nil, io.EOF
			}
			return nil, fmt.Errorf("reading %s: %w", c.File, err)
		}
		for i, f := range rec {
			rec[i] = strings.TrimSpace(f)
		}
		if len(rec) == 1 && rec[0] == "" {
			continue // a line of white space only
		}
		return rec, nil
	}
}

// Line returns the line on which field col of the last row starts.
func (c *CSV) Line(col int) int {
	line, _ := c.r.FieldPos(col)
	return line
}

// Errorf returns an input error at the line of field col of the last row.
func (c *CSV) Errorf(col int, format string, args ...any) error {
	return geom.LineError(c.File, c.Line(col), format, args...)
}

// Float parses the field rec[col] of the last row as a finite number.
// The decimal separator is '.': a number written with a decimal comma
// ("12,5", as spreadsheets write it in many countries) is an error that
// says so.
func (c *CSV) Float(rec []string, col int) (float64, error) {
	s := rec[col]
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		if dot := strings.Replace(s, ",", ".", 1); dot != s && !strings.Contains(dot, ",") {
			if _, err := strconv.ParseFloat(dot, 64); err == nil {
				return 0, c.Errorf(col, "%s: %q has a decimal comma; write %s (the decimal separator is '.')", geom.Excerpt(c.Header[col]), geom.Excerpt(s), geom.Excerpt(dot))
			}
		}
		return 0, c.Errorf(col, "%s: %q is not a finite number", geom.Excerpt(c.Header[col]), geom.Excerpt(s))
	}
	return v, nil
}

// Int parses the field rec[col] of the last row as a 64-bit integer.
func (c *CSV) Int(rec []string, col int) (int64, error) {
	v, err := strconv.ParseInt(rec[col], 10, 64)
	if err != nil {
		return 0, c.Errorf(col, "%s: %q is not an integer", geom.Excerpt(c.Header[col]), geom.Excerpt(rec[col]))
	}
	return v, nil
}
