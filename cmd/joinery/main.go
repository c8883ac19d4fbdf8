// Command joinery turns a joining plan (spot welds and bolts) and shell
// meshes of sheet-metal parts into connector definitions, and checks them.
//
// main builds the command tree and decides the exit status; everything
// else lives in the packages geom, joints and writers.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"

	"github.com/spf13/cobra"
	"golang.org/x/term"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints/pipeline"
)

// Exit statuses, decided here and nowhere else.
const (
	exitOK       = 0   // done, nothing at or above the failure level
	exitFindings = 1   // done, with findings at or above the failure level
	exitBadInput = 2   // bad usage or bad input; nothing written
	exitFailure  = 3   // a failure that is not the input's fault (outputs, disk, lock, internal error)
	exitCanceled = 130 // interrupted (Ctrl-C), the shell's convention for SIGINT
)

// exitStatusHelp ends every command's long help.
const exitStatusHelp = `EXIT STATUS
  0    done; no finding at or above --fail-on
  1    done; findings at or above --fail-on (outputs written)
  2    bad usage or bad input (the message names the file and line), or an output
       directory Joinery did not write; nothing written
  3    a failure that is not the input's fault: an output that cannot be written,
       a full disk, a lock held by another run, an output directory holding files
       Joinery did not write beside its set, an internal error; the message says
       what is left in the output directory (the old set, untouched, or nothing)
  130  interrupted (Ctrl-C)`

// inspectExitHelp ends inspect's long help: it writes no outputs and
// has no failure level.
const inspectExitHelp = `EXIT STATUS
  0    read and summarised (what --deep finds, normals-flipped among it, is
       reported, not failed on)
  2    bad usage or bad input (the message names the file and line)
  3    a failure that is not the input's fault (an internal error)
  130  interrupted (Ctrl-C)`

// version is set at build time with -ldflags "-X main.version=...".
var version = "dev"

// gcPercent is the garbage collector's target (the GOGC setting) when
// the environment sets none: the heap may grow by this percentage of
// the live data before a collection. Joinery's heap is mostly a few
// large arrays without pointers (the mesh), which the collector does not
// scan, so collecting four times as often as Go's default (100) costs
// little time and keeps the peak memory of a build close to its live
// data (measured on the 2,000,000-element synthetic body:
// examples/synthbody/compare.sh).
const gcPercent = 25

func main() {
	if os.Getenv("GOGC") == "" {
		debug.SetGCPercent(gcPercent)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	tty := term.IsTerminal(int(os.Stderr.Fd()))
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr, tty)
	stop()
	os.Exit(code)
}

// run executes one command line and returns the exit status.
func run(ctx context.Context, args []string, stdout, stderr io.Writer, stderrIsTerminal bool) int {
	g := &globalOptions{stdout: stdout, stderr: stderr, terminal: stderrIsTerminal}
	root := newRootCommand(g)
	root.SetArgs(args)
	// An error before any command starts (an unknown command, too many
	// arguments) is the command line's: bad usage.
	started := false
	root.PersistentPreRunE = func(*cobra.Command, []string) error {
		started = true
		return g.startProfile()
	}
	cmd, err := root.ExecuteContextC(ctx)
	g.stopProfile()
	if err != nil && !started && !errors.Is(err, pipeline.ErrUsage) {
		msg := strings.TrimRight(err.Error(), "\n")
		if strings.Contains(msg, "\n") {
			msg += "\n" // a suggestion on lines of its own
		} else {
			msg += " "
		}
		help := "joinery"
		if cmd != nil {
			help = cmd.CommandPath() // the command whose arguments were wrong
		}
		err = pipeline.UsageError(fmt.Errorf("%s(see '%s --help')", msg, help))
	}
	if err == nil {
		return exitOK
	}
	code := exitCode(err)
	switch code {
	case exitFailure:
		fmt.Fprintln(stderr, "joinery: failed (not an input problem):", err)
	case exitCanceled:
		fmt.Fprintln(stderr, "joinery: interrupted; nothing written")
	default:
		fmt.Fprintln(stderr, "joinery:", err)
	}
	return code
}

// exitCode maps an error to the exit status.
func exitCode(err error) int {
	var fe *findingsError
	switch {
	case errors.As(err, &fe):
		return exitFindings
	case errors.Is(err, context.Canceled):
		return exitCanceled
	case errors.Is(err, geom.ErrInput), errors.Is(err, pipeline.ErrUsage):
		return exitBadInput
	}
	return exitFailure
}

// findingsError reports that a command ran to the end but found problems
// at or above the level the user asked to fail on.
type findingsError struct{ msg string }

func (e *findingsError) Error() string { return e.msg }
