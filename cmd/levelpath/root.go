package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"syscall"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
)

// version is the program version, set at build time with
// -ldflags "-X main.version=...".
var version = "0.1.0-dev"

// Exit codes shared by every command (documented in the README under "Commands").
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

Caution: ` + optimizer.Caution,
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
	markRunErrors(root)
	return root
}

// ranError marks an error returned by a command's own work, as opposed to
// one from cobra parsing the command line (unknown command, wrong number
// of arguments), which is bad input.
type ranError struct{ err error }

func (e *ranError) Error() string { return e.err.Error() }
func (e *ranError) Unwrap() error { return e.err }

// markRunErrors wraps the RunE of c and of every command below it so that
// their errors are ranErrors.
func markRunErrors(c *cobra.Command) {
	if runE := c.RunE; runE != nil {
		c.RunE = func(cmd *cobra.Command, args []string) error {
			if err := runE(cmd, args); err != nil {
				return &ranError{err}
			}
			return nil
		}
	}
	for _, sub := range c.Commands() {
		markRunErrors(sub)
	}
}

// subcommands lists the constructors of every command (tests may append a
// command of their own). It is filled in one place, init below, because
// demo builds a root command of its own to plan the demo flight.
var subcommands []func() *cobra.Command

func init() {
	subcommands = []func() *cobra.Command{
		newDemoCmd, newPlanCmd, newAssessCmd, newEnvelopeCmd, newRouteCmd,
		newGridCmd, newBatchCmd, newAircraftCmd, newServeCmd,
	}
}

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
	var re *ranError
	switch {
	case environmentFailure(err):
		return exitInternal // even when a command marked it as input
	case errors.As(err, &ie):
		return exitBadInput
	case errors.As(err, &re):
		return exitInternal
	}
	return exitBadInput // cobra rejected the command line itself
}

// environmentFailure reports whether err comes from the machine rather
// than from the user's input: a full disk or quota, a read-only file
// system, an I/O error, missing permissions, exhausted memory or file
// descriptors. Such a failure exits 1 even if a command wrapped it as bad
// input (writing a chart to a full disk is not the user's mistake).
func environmentFailure(err error) bool {
	if errors.Is(err, fs.ErrPermission) {
		return true
	}
	for _, e := range []syscall.Errno{syscall.ENOSPC, syscall.EDQUOT, syscall.EROFS, syscall.EIO, syscall.ENOMEM, syscall.EMFILE, syscall.ENFILE} {
		if errors.Is(err, e) {
			return true
		}
	}
	return false
}
