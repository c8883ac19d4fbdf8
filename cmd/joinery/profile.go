package main

import (
	"fmt"
	"io"
	"os"
	"runtime/pprof"
	"time"
)

// startProfile starts a CPU profile when --cpu-profile names a file.
func (g *globalOptions) startProfile() error {
	if g.cpuProf == "" {
		return nil
	}
	f, err := os.Create(g.cpuProf)
	if err != nil {
		return fmt.Errorf("cpu profile: %w", err)
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		return fmt.Errorf("cpu profile: %w", err)
	}
	g.profFile = f
	return nil
}

// stopProfile ends the CPU profile, if one runs.
func (g *globalOptions) stopProfile() {
	if g.profFile != nil {
		pprof.StopCPUProfile()
		g.profFile.Close()
		g.profFile = nil
	}
}

// stepClock is a geom.Progress that prints, when each step ends, its
// label, when it started (seconds since the clock was made) and its wall
// time: the --step-times view of where a run's time goes.
type stepClock struct {
	w      io.Writer
	origin time.Time
	label  string
	start  time.Time
}

func newStepClock(w io.Writer) *stepClock { return &stepClock{w: w, origin: time.Now()} }

// Start begins a step.
func (c *stepClock) Start(label string, _ int64) { c.label, c.start = label, time.Now() }

// Add does nothing.
func (c *stepClock) Add(int64) {}

// Done prints the step's times.
func (c *stepClock) Done() {
	now := time.Now()
	fmt.Fprintf(c.w, "step %-28s at %7.3f s  took %7.3f s\n", c.label, c.start.Sub(c.origin).Seconds(), now.Sub(c.start).Seconds())
}
