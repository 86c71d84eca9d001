// Command holdfast assesses whether the steady states of an uncertain
// one-variable rate law hold. Each sub-command lives in its own file and only
// wires flags to the library (packages scenarios, sample, assess) and hands
// results to package report; exit statuses are decided here alone.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
	"time"
)

// stuckAfter is how long after SIGINT or SIGTERM a command that has not
// returned is stopped by force.
const stuckAfter = 3 * time.Second

// Exit statuses.
const (
	exitOK      = 0
	exitFailure = 1 // the run itself failed
	exitBad     = 2 // bad input or usage
	exitGate    = 3 // a --require gate was not met
)

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run executes one command line and returns the exit status. It never lets
// a panic escape as a Go stack trace: user input must get a message.
func run(args []string, stdout, stderr io.Writer) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "holdfast: internal error: %v\n(this is a bug in holdfast, not in your input; please report it with the command line)\n", r)
			code = exitFailure
		}
	}()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	// A run stops within a second of SIGINT or SIGTERM by itself; should
	// a command be stuck in a system call the signal cannot interrupt,
	// exit anyway rather than ignore the signal.
	finished := make(chan struct{})
	defer close(finished)
	go func() {
		select {
		case <-finished:
			return
		case <-ctx.Done():
		}
		select {
		case <-finished:
		case <-time.After(stuckAfter):
			fmt.Fprintf(stderr, "holdfast: did not stop within %v of the signal; exiting\n", stuckAfter)
			os.Exit(exitFailure)
		}
	}()
	root := newRootCmd(stdout, stderr)
	root.SetArgs(args)
	err := root.ExecuteContext(ctx)
	if err == nil {
		return exitOK
	}
	fmt.Fprintf(stderr, "holdfast: %v\n", err)
	var ce *codeError
	if errors.As(err, &ce) {
		return ce.code
	}
	// Anything cobra itself rejects (unknown flag, wrong argument count)
	// is a usage error.
	return exitBad
}

// codeError carries the exit status chosen by the command that failed.
type codeError struct {
	code int
	err  error
}

func (e *codeError) Error() string { return e.err.Error() }
func (e *codeError) Unwrap() error { return e.err }

// badInput marks err as bad input or usage (exit status 2).
func badInput(err error) error {
	if err == nil {
		return nil
	}
	return &codeError{code: exitBad, err: err}
}

// failed marks err as a failure of the run (exit status 1).
func failed(err error) error {
	if err == nil {
		return nil
	}
	return &codeError{code: exitFailure, err: err}
}
