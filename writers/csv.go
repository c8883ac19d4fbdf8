package writers

import (
	"encoding/csv"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// ConnectorsCSVHeader is the header of connectors.csv: one row per
// connector end. nodes and weights hold ';'-separated lists.
var connectorsCSVHeader = []string{
	"joint", "kind", "state", "group", "sheet", "part", "element", "end_node",
	"x", "y", "z", "distance", "thickness", "edge_distance", "diameter", "attach", "dofs", "nodes", "weights",
}

// offsetCSVHeader are the columns connectors.csv adds when some link is
// an offset link (--links offset): per end, the new faying nodes of the
// sheet's offset links and their lengths, ';'-separated, toward the
// previous sheet first.
var offsetCSVHeader = []string{"faying_nodes", "offsets"}

// boltCSVHeader are the columns connectors.csv adds when some connector
// is a bolt, empty on spot welds' rows: per end, the hole measured in
// the mesh (empty: none), the ring kind (hole, washer, patch), the
// bolt's coupling and shank forms, and the degrees of freedom the
// support to ground holds at this end (empty: no support here).
var boltCSVHeader = []string{"hole_diameter", "ring", "coupling", "shank", "support_dofs"}

// WriteConnectorsCSV writes a comment line with the generator, the run
// id and the caution, the header, then one row per connector end
// (sheet); connectors not built get one row with the sheet columns
// empty. With offset links (--links offset) two columns follow (see
// offsetCSVHeader), and with bolts five more (boltCSVHeader).
func WriteConnectorsCSV(w io.Writer, doc *document.ConnectorsDoc) error {
	// A comment line first: Joinery's own CSV readers skip lines that
	// start with '#', and the caution travels with the file.
	if _, err := fmt.Fprintf(w, "# joinery connectors (%s; run %s); CAUTION: %s\n", doc.Generator, doc.RunID, document.Caution); err != nil {
		return err
	}
	offsets := false
	for _, c := range doc.Connectors {
		for _, l := range c.Links {
			offsets = offsets || l.Kind == joints.OffsetLink.String()
		}
	}
	bolts := slices.ContainsFunc(doc.Connectors, func(c document.ConnectorDoc) bool { return c.Bolt != nil })
	header := connectorsCSVHeader
	if offsets {
		header = append(slices.Clone(header), offsetCSVHeader...)
	}
	if bolts {
		header = append(slices.Clone(header), boltCSVHeader...)
	}
	boltCells := func(c *document.ConnectorDoc, i int) []string {
		if c.Bolt == nil {
			return make([]string, len(boltCSVHeader))
		}
		hole, ring, support := "", "", ""
		if i >= 0 && i < len(c.Sheets) {
			if h := c.Sheets[i].HoleDiameter; h != nil {
				hole = f64(*h)
			}
			ring = c.Sheets[i].Ring
		}
		if sp := c.Bolt.Support; sp != nil && sp.Sheet == i {
			support = strings.Join(sp.DOFs, ";")
		}
		return []string{hole, ring, c.Bolt.Coupling, c.Bolt.Shank, support}
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, c := range doc.Connectors {
		base := []string{c.ID, c.Kind, c.State, c.Group}
		dia := ""
		if c.Diameter != nil {
			dia = f64(*c.Diameter)
		}
		tail := []string{dia, c.Attach, strings.Join(c.DOFs, ";")}
		if c.State == joints.NotBuilt.String() || len(c.Sheets) == 0 {
			row := append(append(slices.Clone(base), make([]string, 10)...), tail...)
			row = append(row, "", "")
			if offsets {
				row = append(row, "", "")
			}
			if bolts {
				row = append(row, boltCells(&c, -1)...)
			}
			if err := cw.Write(row); err != nil {
				return err
			}
			continue
		}
		for i, s := range c.Sheets {
			end, p := "", s.Point
			if s.EndNode != nil {
				end = strconv.FormatInt(*s.EndNode, 10)
			} else if len(s.Nodes) == 1 {
				end = strconv.FormatInt(s.Nodes[0], 10)
			}
			if s.EndPoint != nil {
				p = *s.EndPoint
			}
			ed := ""
			if s.EdgeDistance != nil {
				ed = f64(*s.EdgeDistance)
			}
			nodes := make([]string, len(s.Nodes))
			for k, n := range s.Nodes {
				nodes[k] = strconv.FormatInt(n, 10)
			}
			weights := make([]string, len(s.Weights))
			for k, v := range s.Weights {
				weights[k] = f64(v)
			}
			row := append(slices.Clone(base), strconv.Itoa(i), strconv.FormatInt(s.Part, 10), strconv.FormatInt(s.Element, 10), end,
				f64(p[0]), f64(p[1]), f64(p[2]), f64(s.Distance), f64(s.Thickness), ed)
			row = append(row, tail...)
			row = append(row, strings.Join(nodes, ";"), strings.Join(weights, ";"))
			if offsets {
				var fn, off []string
				for _, l := range c.Links {
					if l.Kind == joints.OffsetLink.String() && l.From == i {
						fn = append(fn, strconv.FormatInt(l.EndNode, 10))
						off = append(off, f64(l.Length))
					}
				}
				row = append(row, strings.Join(fn, ";"), strings.Join(off, ";"))
			}
			if bolts {
				row = append(row, boltCells(&c, i)...)
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

func f64(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
