package html

import (
	"image/color"
	"slices"
)

// Colours of the Okabe-Ito set (M. Okabe and K. Ito, Color Universal
// Design, 2008; hex values from memory), named by their use here.
const (
	colBuilt    = "#009E73" // bluish green
	colFlagged  = "#E69F00" // orange
	colNotBuilt = "#D55E00" // vermillion
	colLine     = "#0072B2" // blue: weld lines, rule curves
	colSky      = "#56B4E9" // sky blue: data of two-sheet stacks
	colPurple   = "#CC79A7" // reddish purple: three-sheet stacks, locations of findings
)

// rgb returns a hex colour for gonum/plot.
func rgb(hex string) color.Color {
	v := func(i int) uint8 {
		h := func(c byte) uint8 {
			switch {
			case c >= '0' && c <= '9':
				return c - '0'
			case c >= 'a' && c <= 'f':
				return c - 'a' + 10
			case c >= 'A' && c <= 'F':
				return c - 'A' + 10
			}
			return 0
		}
		return h(hex[i])<<4 | h(hex[i+1])
	}
	return color.NRGBA{R: v(1), G: v(3), B: v(5), A: 255}
}

// The states in the order they are shown; other states (from later
// versions) follow in alphabetical order.
func orderStates(states []string) []string {
	out := []string{"built", "flagged", "not-built"}
	var rest []string
	for _, s := range states {
		if !slices.Contains(out, s) && !slices.Contains(rest, s) {
			rest = append(rest, s)
		}
	}
	slices.Sort(rest)
	return append(out, rest...)
}

// glyph returns the id of the symbol that draws a state.
func glyph(state string) string {
	switch state {
	case "built", "flagged", "not-built":
		return "g-" + state
	}
	return "g-other"
}

// unitsPerPx: pictures are drawn in units of a tenth of a pixel of their
// nominal size (the marks' symbols too, a disc of 32 units for built).
const unitsPerPx = 10

// writeGlyphDefs writes the symbols of the states, used by every
// picture: a disc for built, a triangle for flagged, a cross for
// not-built, a grey square for a state this version does not know, and
// a purple diamond for the location of a finding that concerns no
// joint.
func writeGlyphDefs(w *Writer) {
	w.Raw(`<svg class="defs" width="0" height="0" aria-hidden="true"><defs>
<g id="g-built"><circle r="32" fill="` + colBuilt + `" stroke="#fff" stroke-width="8"/></g>
<g id="g-flagged"><path d="M0-50L44 27H-44Z" fill="` + colFlagged + `" stroke="#000" stroke-width="5" stroke-linejoin="round"/></g>
<g id="g-not-built"><path d="M-30-30L30 30M30-30L-30 30" stroke="#fff" stroke-width="30" stroke-linecap="round"/><path d="M-30-30L30 30M30-30L-30 30" stroke="` + colNotBuilt + `" stroke-width="16" stroke-linecap="round"/></g>
<g id="g-other"><rect x="-28" y="-28" width="56" height="56" fill="#777" stroke="#fff" stroke-width="8"/></g>
<g id="g-at"><path d="M0-44L44 0L0 44L-44 0Z" fill="none" stroke="` + colPurple + `" stroke-width="14"/></g>
</defs></svg>
`)
}

// compactMark returns, for a state, the path data of one mark at the
// origin drawn as part of one path per state (a move to the mark goes
// before it), the path's style, and the current point after it,
// relative to the mark (where the next relative move starts).
func compactMark(state string) (d, style string, end [2]int) {
	switch state {
	case "built":
		return "h0", `fill="none" stroke="` + colBuilt + `" stroke-width="64" stroke-linecap="round"`, [2]int{0, 0}
	case "flagged":
		return "m0-50l44 77h-88z", `fill="` + colFlagged + `" stroke="#000" stroke-width="5" stroke-linejoin="round"`, [2]int{0, -50}
	case "not-built":
		return "m-30-30l60 60m0-60l-60 60", `fill="none" stroke="` + colNotBuilt + `" stroke-width="16" stroke-linecap="round"`, [2]int{-30, 30}
	}
	return "m-28-28h56v56h-56z", `fill="#777"`, [2]int{-28, -28}
}

// writeStateLabel writes a state's name with its mark (drawn by the
// style sheet).
func writeStateLabel(w *Writer, state string) {
	w.Raw(`<span class="st `)
	w.Text(glyph(state))
	w.Raw(`">`)
	w.Text(state)
	w.Raw(`</span>`)
}
