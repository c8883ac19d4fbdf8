package main

import (
	"fmt"
	"io"
	"strings"
	"time"
)

// bar is a geom.Progress that draws a one-line progress bar on a
// terminal. It redraws at most ten times a second and clears its line
// when a step is done. Create it only when the output is a terminal.
type bar struct {
	w     io.Writer
	label string
	total int64
	done  int64
	start time.Time
	last  time.Time
}

// Start begins a step.
func (b *bar) Start(label string, total int64) {
	b.label, b.total, b.done = label, total, 0
	b.start = time.Now()
	b.last = time.Time{}
	b.draw()
}

// Add advances the bar; it redraws when the last redraw is 100 ms old
// or the step's work is complete.
func (b *bar) Add(n int64) {
	b.done += n
	if time.Since(b.last) >= 100*time.Millisecond || b.total > 0 && b.done >= b.total {
		b.draw()
	}
}

// Done clears the bar's line.
func (b *bar) Done() { fmt.Fprint(b.w, "\r\033[K") }

func (b *bar) draw() {
	b.last = time.Now()
	if b.total <= 0 { // unknown amount of work: a count once there is one
		if b.done > 0 {
			fmt.Fprintf(b.w, "\r\033[K%s ... %d", b.label, b.done)
		} else {
			fmt.Fprintf(b.w, "\r\033[K%s ...", b.label)
		}
		return
	}
	const width = 30
	frac := float64(b.done) / float64(b.total)
	frac = min(max(frac, 0), 1)
	n := int(frac * width)
	fmt.Fprintf(b.w, "\r\033[K%-24s [%s%s] %3.0f%%", b.label, strings.Repeat("#", n), strings.Repeat(".", width-n), 100*frac)
}
