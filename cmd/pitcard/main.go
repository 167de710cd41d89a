// Command pitcard is the command line of a race-day prep assistant for
// bracket drag racers: it wires flags, the event folder and output for the
// air, the car's logbook, the prediction, the dial-in and the prep card.
//
// It does not compute any figure, and it never writes the event folder
// itself: the formulas are in weather and engine, the card in prep, and
// every change to the folder goes through package event, as the pit page's
// do (the only files it writes are the --out and --write-map files named).
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
	"time"

	"golang.org/x/term"
)

// Exit codes, as written in the README.
const (
	exitOK       = 0
	exitFailure  = 1 // something went wrong that is not the user's input
	exitBadInput = 2 // the user's input is wrong: a flag, a value, a file's row
	// exitCheckFailed: the card (or dial table) printed whole, but a check
	// failed (a safety limit, the belts' tag, a rule's fail): the dial is
	// not to be posted as it stands. It wins over exitBadInput, so a script
	// cannot mistake a stopped dial for a mistyped flag.
	exitCheckFailed = 3
)

// checksFailed is a command's answer when everything printed but a check
// failed.
type checksFailed struct{ failed []string }

func (c checksFailed) Error() string {
	if len(c.failed) == 1 {
		return "a check failed, do not post the dial as it stands: " + c.failed[0]
	}
	return fmt.Sprintf("%d checks failed, do not post the dial as it stands: %s", len(c.failed), strings.Join(c.failed, "; "))
}

// failedChecks is the error for a card's failed checks, nil for none.
func failedChecks(failed []string) error {
	if len(failed) == 0 {
		return nil
	}
	return checksFailed{failed}
}

// IOStreams are the streams a command reads and writes; tests give buffers.
type IOStreams struct {
	In       io.Reader
	Out      io.Writer
	Err      io.Writer
	Terminal bool             // Out is a terminal: color is allowed
	Width    int              // the terminal's columns; 0 when not a terminal (100 is used)
	Now      func() time.Time // the clock; tests fix it
	// Stop, when set, ends a long-running command (serve) as an interrupt
	// would: tests close it.
	Stop <-chan struct{}
}

func main() {
	streams := &IOStreams{In: os.Stdin, Out: os.Stdout, Err: os.Stderr,
		Terminal: term.IsTerminal(int(os.Stdout.Fd())), Now: time.Now}
	if streams.Terminal {
		if w, _, err := term.GetSize(int(os.Stdout.Fd())); err == nil {
			streams.Width = w
		}
	}
	os.Exit(run(os.Args[1:], streams))
}

// run executes one pitcard command line and returns its exit code. A panic
// below is reported in one line, never as a stack trace.
func run(args []string, s *IOStreams) (code int) {
	defer func() {
		if p := recover(); p != nil {
			fmt.Fprintf(s.Err, "pitcard: internal error: %v\nThis is a bug in pitcard, not in your input; please report it with the command you ran.\n", p)
			code = exitFailure
		}
	}()
	root := newRootCmd(s)
	root.SetArgs(args)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	fmt.Fprintf(s.Err, "pitcard: %v\n", err)
	if errors.As(err, new(checksFailed)) {
		return exitCheckFailed
	}
	if isBadInput(err) {
		return exitBadInput
	}
	return exitFailure
}

// badInput marks an error as the user's to fix.
type badInput struct{ err error }

func (b badInput) Error() string        { return b.err.Error() }
func (b badInput) Unwrap() error        { return b.err }
func (b badInput) BadInput() bool       { return true }
func userErr(err error) error           { return badInput{err} }
func userErrf(f string, a ...any) error { return badInput{fmt.Errorf(f, a...)} }

func isBadInput(err error) bool {
	var b interface{ BadInput() bool }
	if errors.As(err, &b) && b.BadInput() {
		return true
	}
	// cobra's own argument errors: a mistyped command line
	msg := err.Error()
	for _, p := range []string{"unknown command", "accepts ", "requires ", "invalid argument", "unknown flag", "unknown shorthand flag", "flag needs an argument"} {
		if strings.HasPrefix(msg, p) {
			return true
		}
	}
	return false
}
