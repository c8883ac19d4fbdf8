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

	"github.com/spf13/cobra"
	"golang.org/x/term"
)

// Exit statuses, decided here and nowhere else.
const (
	exitOK       = 0 // done, nothing at or above the failure level
	exitFindings = 1 // done, with findings at or above the failure level
	exitBadInput = 2 // bad usage or unreadable input; nothing written
)

// version is set at build time with -ldflags "-X main.version=...".
var version = "dev"

func main() {
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
	root.PersistentPreRunE = func(*cobra.Command, []string) error { return g.startProfile() }
	err := root.ExecuteContext(ctx)
	g.stopProfile()
	if err == nil {
		return exitOK
	}
	fmt.Fprintln(stderr, "joinery:", err)
	var fe *findingsError
	if errors.As(err, &fe) {
		return exitFindings
	}
	return exitBadInput
}

// findingsError reports that a command ran to the end but found problems
// at or above the level the user asked to fail on.
type findingsError struct{ msg string }

func (e *findingsError) Error() string { return e.msg }
