package html

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"regexp"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/writers/document"
)

// plotDoc is a small build: a weld line with gaps off contact, edge
// distances, listed and ruled diameters and one three-sheet weld.
func plotDoc() *document.ConnectorsDoc {
	conn := &document.ConnectorsDoc{Options: document.OptionsDoc{Reach: 9, EdgeFactor: 1}}
	for k := range 12 {
		c := weldDoc(fmt.Sprintf("W%d", k), r3.Vec{X: 28 * float64(k)}, r3.Vec{Z: 1}, 1, 2, 0.8+0.1*float64(k%3), 1.2)
		c.Links[0].MidGap += 0.05 * float64(k-5)
		e := 3 + float64(k)
		c.Sheets[0].EdgeDistance = &e
		if k%4 == 0 {
			c.DiameterSource = "list"
		}
		if k == 7 {
			c.Sheets = append(c.Sheets, document.SheetDoc{Part: 3, Thickness: 1})
		}
		conn.Connectors = append(conn.Connectors, c)
	}
	return conn
}

// TestPlotsCarryUnitsAndParse renders the build's plots and checks that
// each is SVG that encoding/xml reads, that both axis labels name a
// unit in parentheses and appear in the SVG's text, and that no font is
// embedded.
func TestPlotsCarryUnitsAndParse(t *testing.T) {
	s := &BuildPlots{an: analyse(plotDoc(), nil)}
	figs, err := s.figures()
	if err != nil {
		t.Fatal(err)
	}
	unit := regexp.MustCompile(`\((mm|count)\)$`)
	for _, f := range figs {
		if f.svg == nil {
			t.Errorf("%s: no plot (%s)", f.id, f.none)
			continue
		}
		if err := parseXML(f.svg); err != nil {
			t.Errorf("%s: %v", f.id, err)
		}
		for _, l := range []string{f.xLabel, f.yLabel} {
			if !unit.MatchString(l) {
				t.Errorf("%s: axis label %q names no unit", f.id, l)
			}
			if !bytes.Contains(f.svg, []byte(escapeText(l))) {
				t.Errorf("%s: axis label %q not in the SVG", f.id, l)
			}
		}
		if bytes.Contains(f.svg, []byte("@font-face")) || bytes.Contains(f.svg, []byte("Liberation Serif")) {
			t.Errorf("%s: embeds or names a font it should not", f.id)
		}
	}
}

// escapeText escapes as gonum/plot's SVG writer does (html.EscapeString).
func escapeText(s string) string {
	r := strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&#34;", "'", "&#39;")
	return r.Replace(s)
}

// TestPlotsByteStable renders the plots again and again, in turn and at
// the same time, and wants the same bytes every time: gonum/plot's SVG
// must hold nothing that varies (no time, no random ids, no map order).
func TestPlotsByteStable(t *testing.T) {
	s := &BuildPlots{an: analyse(plotDoc(), nil)}
	first, err := s.figures()
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	errs := make([]string, 8)
	for i := range errs {
		wg.Go(func() {
			again, err := s.figures()
			if err != nil {
				errs[i] = err.Error()
				return
			}
			for k := range again {
				if !bytes.Equal(again[k].svg, first[k].svg) {
					errs[i] = again[k].id + " differs"
				}
			}
		})
	}
	wg.Wait()
	for _, e := range errs {
		if e != "" {
			t.Error(e)
		}
	}
}

// TestPlotsWithoutData checks that a build with nothing to plot says so
// instead of drawing.
func TestPlotsWithoutData(t *testing.T) {
	s := &BuildPlots{an: analyse(&document.ConnectorsDoc{}, nil)}
	figs, err := s.figures()
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range figs {
		if f.svg != nil || f.none == "" {
			t.Errorf("%s: drawn from no data", f.id)
		}
	}
}

// parseXML reads b with encoding/xml in strict mode to its end.
func parseXML(b []byte) error {
	d := xml.NewDecoder(bytes.NewReader(b))
	d.Strict = true
	for {
		if _, err := d.Token(); err == io.EOF {
			return nil
		} else if err != nil {
			return err
		}
	}
}

// TestGapPlotSquareToSheets: the gap plot counts a link's gap square to
// the sheets (square_gap) against the allowance, 0.25 x contact
// (joints.DefaultGapAllowanceFactor), as gap-open and gap-closed do.
// Three welds join 0.8 and 1.2 mm sheets in contact (contact 1 mm) at 40
// degrees to the axis: along it they lie 1 / cos 40 deg = 1.305 mm
// apart (parallel planes d apart lie d / cos(theta) apart along a line at
// theta to their normal, plane geometry), 0.305 mm off contact read
// that way, beyond the allowance; square to them they are at contact. A
// fourth weld from a file written before square_gap is 0.3 mm open
// along its axis, which is then the figure shown.
func TestGapPlotSquareToSheets(t *testing.T) {
	conn := &document.ConnectorsDoc{Options: document.OptionsDoc{Reach: 9, EdgeFactor: 1}}
	for k := range 4 {
		c := weldDoc(fmt.Sprintf("W%d", k), r3.Vec{X: 28 * float64(k)}, r3.Vec{Z: 1}, 1, 2, 0.8, 1.2)
		l := &c.Links[0]
		if k < 3 {
			sq := l.ContactGap
			l.MidGap, l.SquareGap = l.ContactGap/math.Cos(40*math.Pi/180), &sq
		} else {
			l.MidGap = l.ContactGap + 0.3
		}
		conn.Connectors = append(conn.Connectors, c)
	}
	s := &BuildPlots{an: analyse(conn, nil)}
	f, err := s.gapPlot()
	if err != nil {
		t.Fatal(err)
	}
	if want := "4 links of built connectors; 1 beyond the allowance"; !strings.HasPrefix(f.caption, want) {
		t.Errorf("caption %q, want it to start %q", f.caption, want)
	}
}
