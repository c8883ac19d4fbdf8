package main

import (
	"fmt"
	"os"
	"runtime/pprof"
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
