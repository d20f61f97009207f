// Command floodtrace computes waterflood performance from an areal
// reservoir map and a well layout with streamlines: where the injected
// water goes, when it reaches each producer, how each producer's water cut
// rises, and which layout recovers the most oil.
//
// Usage:
//
//	floodtrace <command> [arguments]
//
// Run "floodtrace help" for the list of commands and "floodtrace <command>
// --help" for the options of one.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"sort"
	"strings"

	"github.com/spf13/pflag"

	"floodtrace/internal/hugeheap"
	"floodtrace/reservoir"
)

// version is set at build time with -ldflags "-X main.version=...".
var version = "0.1.0-dev"

// command is one subcommand, in the manner of cmd/go: its usage line, a
// one-line summary, a longer help with examples, and the function that
// runs it.
type command struct {
	Name  string
	Usage string
	Short string
	Long  string
	// Flags registers the command's options on fs.
	Flags func(fs *pflag.FlagSet)
	// Run runs the command with the positional arguments.
	Run func(args []string) error
	// NArgs checks the number of positional arguments (nil = any).
	NArgs func(n int) bool
}

var commands = map[string]*command{}

func register(c *command) { commands[c.Name] = c }

// usageError is a problem with the command line itself (exit code 2).
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

// Exit codes, as in the design notes, and 4 for outputs that could not
// be written; exitFor (exit.go) maps errors to them.
const (
	exitOK       = 0
	exitInput    = 1
	exitUsage    = 2
	exitInternal = 3
	exitWrite    = 4 // the outputs could not be written (disk full, permissions)
)

func main() {
	// Back the heap with huge pages (see internal/hugeheap): page faults
	// were a quarter of the CPU time of a run at a million cells. The
	// commands that load a case reserve more once they know its size.
	hugeheap.Reserve(64 << 20)
	os.Exit(runMain(os.Args[1:], os.Stdout, os.Stderr))
}

// stdout and stderr are where commands print; tests swap them.
var (
	stdout io.Writer = os.Stdout
	stderr io.Writer = os.Stderr
)

// runMain runs the command line and returns the exit code. A panic is
// turned into an internal-error message and exit code 3; --debug prints
// the stack as well.
func runMain(args []string, out, errw io.Writer) (code int) {
	stdout, stderr = out, errw
	debugMode := false
	for _, a := range args {
		if a == "--debug" {
			debugMode = true
		}
	}
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "floodtrace: internal error: %v\nplease report this with the case file and the command line\n", r)
			if debugMode {
				fmt.Fprintf(stderr, "%s", debug.Stack())
			} else {
				fmt.Fprintln(stderr, "(run again with --debug to see where it happened)")
			}
			code = exitInternal
		}
	}()
	if len(args) == 0 {
		printUsage(stderr)
		return exitUsage
	}
	switch args[0] {
	case "help", "-h", "--help":
		if len(args) > 1 {
			if c, ok := commands[args[1]]; ok {
				printCommandHelp(stdout, c, newFlagSet(c))
				return exitOK
			}
		}
		printUsage(stdout)
		return exitOK
	case "version", "--version", "-V":
		fmt.Fprintf(stdout, "floodtrace %s\n", version)
		return exitOK
	}
	c, ok := commands[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "floodtrace: unknown command %q\n", args[0])
		if s := nearestCommand(args[0]); s != "" {
			fmt.Fprintf(stderr, "did you mean %q?\n", s)
		}
		fmt.Fprintln(stderr, "run 'floodtrace help' for the list of commands")
		return exitUsage
	}
	fs := newFlagSet(c)
	if err := fs.Parse(args[1:]); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			printCommandHelp(stdout, c, fs)
			return exitOK
		}
		fmt.Fprintf(stderr, "floodtrace %s: %v\nusage: floodtrace %s\n", c.Name, err, c.Usage)
		return exitUsage
	}
	if c.NArgs != nil && !c.NArgs(fs.NArg()) {
		fmt.Fprintf(stderr, "floodtrace %s: wrong number of arguments\nusage: floodtrace %s\n", c.Name, c.Usage)
		return exitUsage
	}
	if err := c.Run(fs.Args()); err != nil {
		var ue usageError
		if errors.As(err, &ue) {
			fmt.Fprintf(stderr, "floodtrace %s: %v\nusage: floodtrace %s\n", c.Name, err, c.Usage)
			return exitUsage
		}
		code, msg := exitFor(err)
		fmt.Fprintf(stderr, "floodtrace %s: %s\n", c.Name, msg)
		return code
	}
	return exitOK
}

// internalError marks a failure that is floodtrace's fault, not the
// input's (exit code 3). A breakdown of the pressure solver on a case that
// passed validation (*pressure.SolverError) is one too.
type internalError struct{ err error }

func (e internalError) Error() string { return e.err.Error() }
func (e internalError) Unwrap() error { return e.err }

var debugFlag bool

func newFlagSet(c *command) *pflag.FlagSet {
	fs := pflag.NewFlagSet(c.Name, pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.SortFlags = false
	if c.Flags != nil {
		c.Flags(fs)
	}
	fs.BoolVar(&debugFlag, "debug", false, "show the stack of an internal error")
	return fs
}

func printUsage(w io.Writer) {
	fmt.Fprintf(w, `floodtrace %s: waterflood streamlines from an areal map and a well layout

Usage:
  floodtrace <command> [arguments]

Commands:
`, version)
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-9s %s\n", n, commands[n].Short)
	}
	fmt.Fprint(w, `
Run 'floodtrace <command> --help' for the options and examples of a command.
Results are screening estimates for planning; they do not replace local
regulations or licensed engineering review.
`)
}

func printCommandHelp(w io.Writer, c *command, fs *pflag.FlagSet) {
	fmt.Fprintf(w, "usage: floodtrace %s\n\n%s\n", c.Usage, strings.TrimSpace(c.Long))
	if u := fs.FlagUsages(); u != "" {
		fmt.Fprintf(w, "\nOptions:\n%s", u)
	}
}

func nearestCommand(s string) string {
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	if best, ok := reservoir.Nearest(s, names); ok {
		return best
	}
	return ""
}

func exactly(n int) func(int) bool { return func(k int) bool { return k == n } }
