package main

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"
)

// version is the program version, set at build time with
// -ldflags "-X main.version=...".
var version = "0.1.0-dev"

// Exit codes shared by every command (DESIGN.md).
const (
	exitOK       = 0
	exitInternal = 1
	exitBadInput = 2
)

// inputError marks an error caused by the user's input: a flag, a file or a
// value. It maps to exit code 2.
type inputError struct{ err error }

func (e *inputError) Error() string { return e.err.Error() }
func (e *inputError) Unwrap() error { return e.err }

// badInput wraps err as an input error; nil stays nil.
func badInput(err error) error {
	if err == nil {
		return nil
	}
	var ie *inputError
	if errors.As(err, &ie) {
		return err
	}
	return &inputError{err}
}

// badInputf formats an input error.
func badInputf(format string, args ...any) error {
	return &inputError{fmt.Errorf(format, args...)}
}

// exitError carries a specific exit code chosen by a command (for example
// batch's 3 when some flights failed) after its output is written.
type exitError struct {
	code int
	msg  string
}

func (e *exitError) Error() string { return e.msg }

func newRootCmd(stdout, stderr io.Writer) *cobra.Command {
	root := &cobra.Command{
		Use:   "levelpath",
		Short: "Plan the vertical profile of a flight along a fixed route",
		Long: `levelpath plans the vertical profile of a flight along a fixed lateral
route: the initial cruise level, where to step, and the Mach to fly, so that
fuel plus cost-index-weighted time is least while every leg keeps its margin
to low- and high-speed buffet and stays under the thrust-limited and
certified ceilings.

` + cautionText,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return badInput(fmt.Errorf("%s: %w", c.CommandPath(), err))
	})
	for _, add := range subcommands {
		root.AddCommand(add())
	}
	return root
}

// subcommands lists constructors of the subcommands; each file that defines
// one appends to it in an init function.
var subcommands []func() *cobra.Command

// run executes the command line and returns the process exit code.
func run(args []string, stdout, stderr io.Writer) int {
	root := newRootCmd(stdout, stderr)
	root.SetArgs(args)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	var xe *exitError
	if errors.As(err, &xe) {
		if xe.msg != "" {
			fmt.Fprintln(stderr, "levelpath:", xe.msg)
		}
		return xe.code
	}
	fmt.Fprintln(stderr, "levelpath:", err)
	var ie *inputError
	if errors.As(err, &ie) || isUsageError(err) {
		return exitBadInput
	}
	return exitInternal
}

// isUsageError reports whether cobra rejected the command line itself
// (unknown command, wrong argument count).
func isUsageError(err error) bool {
	msg := err.Error()
	for _, p := range []string{"unknown command", "unknown flag", "unknown shorthand", "accepts ", "requires at least", "requires at most", "invalid argument", "required flag"} {
		if strings.Contains(msg, p) {
			return true
		}
	}
	return false
}
