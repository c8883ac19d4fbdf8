package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
)

// globalOptions are the flags every command shares, and the streams.
type globalOptions struct {
	quiet    bool
	json     bool
	cpuProf  string // file for a CPU profile of the run; hidden flag
	steps    bool   // print each step's wall time on stderr; hidden flag
	profFile *os.File
	stdout   io.Writer
	stderr   io.Writer
	terminal bool // stderr is a terminal: progress bars allowed
}

// progress returns a terminal bar when stderr is a terminal and output is
// neither quiet nor JSON, else a no-op.
func (g *globalOptions) progress() geom.Progress {
	if g.steps {
		return newStepClock(g.stderr)
	}
	if g.terminal && !g.quiet && !g.json {
		return &bar{w: g.stderr}
	}
	return geom.NoProgress{}
}

// env is what the pipeline needs from the command line.
func (g *globalOptions) env() pipeline.Env {
	return pipeline.Env{Progress: g.progress(), Note: g.note, Generator: "joinery " + version}
}

// writeJSON prints v on stdout as indented JSON.
func (g *globalOptions) writeJSON(v any) error { return writers.WriteJSON(g.stdout, v) }

// note prints a diagnostic line to stderr unless --quiet.
func (g *globalOptions) note(format string, args ...any) {
	if !g.quiet {
		fmt.Fprintf(g.stderr, format+"\n", args...)
	}
}

func newRootCommand(g *globalOptions) *cobra.Command {
	root := &cobra.Command{
		Use:   "joinery",
		Short: "Build and check spot-weld and bolt connectors for shell models of sheet-metal assemblies",
		Long: `joinery reads shell meshes of sheet-metal parts (VTK legacy .vtk, VTK XML .vtu
and .vtp, or joinery's native .jmesh), a parts table and a joint list (spot welds and
bolts), finds the sheets each joint joins, and writes connector definitions
and a connectivity report in joinery's own documented formats.

` + document.Caution + `

` + exitStatusHelp,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetOut(g.stdout)
	root.SetErr(g.stderr)
	pf := root.PersistentFlags()
	pf.BoolVarP(&g.quiet, "quiet", "q", false, "print no summary and no progress, only errors and why the exit status is not 0 (inspect still prints its summary: it is its result)")
	pf.BoolVar(&g.json, "json", false, "print results on stdout as JSON")
	pf.StringVar(&g.cpuProf, "cpu-profile", "", "write a CPU profile of the run to this file (for developers)")
	pf.MarkHidden("cpu-profile")
	pf.BoolVar(&g.steps, "step-times", false, "print each step's start and wall time on stderr (for developers)")
	pf.MarkHidden("step-times")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return pipeline.UsageError(fmt.Errorf("%w (see '%s --help')", err, c.CommandPath()))
	})
	root.AddCommand(newInspectCommand(g), newBuildCommand(g), newCheckCommand(g), newFlangesCommand(g), newOffsetsCommand(g), newSweepCommand(g))
	strictHelpAndCompletion(root)
	return root
}

// strictHelpAndCompletion makes cobra's own help and completion commands
// exit 2 on a topic or shell they do not know, as every other mistake on
// the command line does: by themselves they print their help and exit
// 0 (joinery completion fish2, joinery help biuld).
func strictHelpAndCompletion(root *cobra.Command) {
	root.InitDefaultHelpCmd()
	root.InitDefaultCompletionCmd()
	for _, c := range root.Commands() {
		switch c.Name() {
		case "help":
			c.Run = nil
			c.RunE = func(hc *cobra.Command, args []string) error {
				cmd, rest, err := hc.Root().Find(args)
				if cmd == nil || err != nil || len(rest) > 0 {
					return pipeline.UsageError(fmt.Errorf("unknown help topic %q (see 'joinery --help')", strings.Join(args, " ")))
				}
				cmd.InitDefaultHelpFlag()
				cmd.InitDefaultVersionFlag()
				return cmd.Help()
			}
		case "completion":
			var shells []string
			for _, s := range c.Commands() {
				shells = append(shells, s.Name())
			}
			c.Args = nil
			c.DisableFlagsInUseLine = true
			c.RunE = func(cc *cobra.Command, args []string) error {
				what := "no shell given"
				if len(args) > 0 {
					what = fmt.Sprintf("unknown shell %q", strings.Join(args, " "))
				}
				return pipeline.UsageError(fmt.Errorf("completion: %s: want one of %s (see 'joinery completion --help')", what, strings.Join(shells, ", ")))
			}
		}
	}
}

// finish ends a command that wrote an output set: it prints doc (--json)
// or the summary (unless --quiet), then returns the findings error, with
// the message failMsg gives, when the findings reached --fail-on.
func (g *globalOptions) finish(doc any, summary func(io.Writer) error, reached bool, failMsg func() string) error {
	switch {
	case g.json:
		if err := g.writeJSON(doc); err != nil {
			return err
		}
	case !g.quiet:
		if err := summary(g.stdout); err != nil {
			return err
		}
	}
	if reached {
		return &findingsError{msg: failMsg()}
	}
	return nil
}
