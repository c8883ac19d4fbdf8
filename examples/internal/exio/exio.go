// Package exio writes the plain-text inputs of the example programs: the
// parts table (YAML) and the joint list (CSV), in the formats Joinery
// reads. Output is deterministic: the same input gives the same bytes.
package exio

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// plain reports whether YAML reads s back unchanged without quotes: a
// letter, then letters, digits, spaces and ._/- not ending in a space.
func plain(s string) bool {
	if s == "" || strings.HasSuffix(s, " ") {
		return false
	}
	for i, r := range s {
		letter := r >= 'A' && r <= 'Z' || r >= 'a' && r <= 'z'
		if i == 0 && !letter {
			return false
		}
		if !letter && !(r >= '0' && r <= '9') && !strings.ContainsRune(" ._/-", r) {
			return false
		}
	}
	return true
}

// yamlString returns s as a YAML scalar: bare when that is safe, else as a
// double-quoted string (JSON escapes are valid YAML).
func yamlString(s string) string {
	switch strings.ToLower(s) {
	case "true", "false", "yes", "no", "on", "off", "null", "y", "n":
	default:
		if plain(s) {
			return s
		}
	}
	b, _ := json.Marshal(s) // a string always marshals
	return string(b)
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// WriteParts writes parts as a YAML parts table: a "parts:" list with id,
// name, thickness (mm), material and surface of each part, and mesh when
// the part names its mesh file. header, when not empty, is written first
// as comment lines.
func WriteParts(w io.Writer, parts []geom.Part, header string) error {
	bw := bufio.NewWriter(w)
	writeComment(bw, header)
	bw.WriteString("parts:\n")
	for _, p := range parts {
		fmt.Fprintf(bw, "  - id: %d\n", p.ID)
		if p.Name != "" {
			fmt.Fprintf(bw, "    name: %s\n", yamlString(p.Name))
		}
		fmt.Fprintf(bw, "    thickness: %s\n", num(p.Thickness))
		if p.Material != "" {
			fmt.Fprintf(bw, "    material: %s\n", yamlString(p.Material))
		}
		fmt.Fprintf(bw, "    surface: %s\n", p.Surface)
		if p.Mesh != "" {
			fmt.Fprintf(bw, "    mesh: %s\n", yamlString(p.Mesh))
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("exio: writing parts table: %w", err)
	}
	return nil
}

func writeComment(bw *bufio.Writer, text string) {
	if text == "" {
		return
	}
	for line := range strings.SplitSeq(strings.TrimRight(text, "\n"), "\n") {
		bw.WriteString(strings.TrimRight("# "+line, " ") + "\n")
	}
}

// WriteJoints writes js as a CSV joint list with the header
// id,x,y,z,kind,parts,diameter,group, followed by washer,hole when any
// joint is a bolt. Parts are separated by ';'; zero diameters, washers and
// holes are left empty (not given). header, when not empty, is written
// first as comment lines.
func WriteJoints(w io.Writer, js []joints.Joint, header string) error {
	bw := bufio.NewWriter(w)
	writeComment(bw, header)
	bolts := false
	for _, j := range js {
		bolts = bolts || j.Kind == joints.Bolt
	}
	cw := csv.NewWriter(bw)
	row := []string{"id", "x", "y", "z", "kind", "parts", "diameter", "group"}
	if bolts {
		row = append(row, "washer", "hole")
	}
	if err := cw.Write(row); err != nil {
		return fmt.Errorf("exio: writing joint list: %w", err)
	}
	opt := func(v float64) string {
		if v == 0 {
			return ""
		}
		return num(v)
	}
	var parts []string
	for _, j := range js {
		parts = parts[:0]
		for _, p := range j.Parts {
			parts = append(parts, strconv.FormatInt(p, 10))
		}
		row = append(row[:0], j.ID, num(j.Point.X), num(j.Point.Y), num(j.Point.Z), j.Kind.String(),
			strings.Join(parts, ";"), opt(j.Diameter), j.Group)
		if bolts {
			row = append(row, opt(j.Washer), opt(j.Hole))
		}
		if err := cw.Write(row); err != nil {
			return fmt.Errorf("exio: writing joint list: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("exio: writing joint list: %w", err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("exio: writing joint list: %w", err)
	}
	return nil
}
