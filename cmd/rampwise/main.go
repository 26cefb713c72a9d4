// Command rampwise predicts GC retention under an oven temperature program
// and searches for the fastest program that separates every critical pair.
//
//	rampwise                      open the terminal UI on the built-in demo
//	rampwise tui [FILE]           open the terminal UI on a method file
//	rampwise simulate [FILE]      predict the chromatogram of the method's program
//	rampwise optimize [FILE]      find the fastest program that meets the goal
//	rampwise help [COMMAND]       the rest (commands.go holds the table)
//
// Exit codes: 0 success, 1 unexpected failure, 2 bad input, 3 (optimize) the
// target resolution cannot be met within the limits.
package main

import (
	_ "embed"
	"errors"
	"fmt"
	"io"
	"os"

	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
)

//go:embed demo.toml
var demoMethod []byte

// DemoName is how the built-in demo is named in messages.
const DemoName = "demo.toml (built in)"

// Exit codes (FORMAT.md).
const (
	exitOK         = 0
	exitFailure    = 1
	exitBadInput   = 2
	exitNotReached = 3
)

// badInput marks an error as the user's input (exit 2).
type badInput struct{ err error }

func (b badInput) Error() string { return b.err.Error() }
func (b badInput) Unwrap() error { return b.err }

func bad(err error) error { return badInput{err} }

func badf(format string, args ...any) error { return badInput{fmt.Errorf(format, args...)} }

// exitError carries a specific exit code with an already-printed outcome.
type exitError struct{ code int }

func (e exitError) Error() string { return fmt.Sprintf("exit %d", e.code) }

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run executes one command line and returns the exit code. It never lets a
// panic escape as a stack trace.
func run(args []string, stdout, stderr io.Writer) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "rampwise: internal error: %v\n", r)
			code = exitFailure
		}
	}()
	out, flush := textOutput(args, stdout)
	err := dispatch(args, out, stderr)
	flush()
	if err == nil {
		return exitOK
	}
	var ee exitError
	if errors.As(err, &ee) {
		return ee.code
	}
	var hr helpRequest
	if errors.As(err, &hr) {
		hr.fs.SetOutput(stdout)
		hr.fs.Usage()
		return exitOK
	}
	fmt.Fprintf(stderr, "rampwise: %s\n", inertLines(err.Error()))
	var bi badInput
	var me *methodfile.Error
	var fe *fsafe.Error // an output path that cannot be written
	if errors.As(err, &bi) || errors.As(err, &me) || errors.As(err, &fe) {
		return exitBadInput
	}
	return exitFailure
}

// loadMethod reads FILE, or the built-in demo when file is empty or "-".
func loadMethod(file string) (*methodfile.Method, string, error) {
	if file == "" || file == "-" {
		m, err := methodfile.Parse(DemoName, demoMethod)
		return m, DemoName, err
	}
	m, err := methodfile.ReadFile(file)
	return m, file, err
}
