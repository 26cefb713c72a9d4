// Command rampwise predicts GC retention under an oven temperature program
// and searches for the fastest program that separates every critical pair.
//
//	rampwise                      open the terminal UI on the built-in demo
//	rampwise tui [FILE]           open the terminal UI on a method file
//	rampwise simulate [FILE]      predict the chromatogram of the method's program
//	rampwise optimize [FILE]      find the fastest program that meets the goal
//
// Exit codes: 0 success, 1 unexpected failure, 2 bad input, 3 (optimize) the
// target resolution cannot be met within the limits.
package main

import (
	_ "embed"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

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

const usage = `rampwise: GC oven-program optimizer

Usage:
  rampwise                          open the terminal UI on the built-in demo
  rampwise tui [FILE]               open the terminal UI on a method file
  rampwise simulate [FILE] [flags]  predict retention times, widths, resolution
  rampwise optimize [FILE] [flags]  find the fastest program meeting the target
  rampwise fit METHOD RUNS [flags]  calibrate ΔH, ΔS (ΔCp) from scouting runs
  rampwise index METHOD [flags]     retention indices against the ladder alkanes
  rampwise check METHOD RUN [flags] does a measured run meet the target?
  rampwise export METHOD [flags]    figure (PNG/SVG/PDF), peak CSV, method sheet
  rampwise sweep METHOD [flags]     window diagram of one or two program values
  rampwise compare METHOD... [flags] rank phases and column dimensions
  rampwise help [COMMAND]           explain a command

FILE is a method file (TOML: column, carrier, oven program, limits, goal and
compounds). Without FILE the built-in demo method is used.

Exit codes: 0 success; 1 unexpected failure; 2 bad input (the message names
file, line and key); 3 optimize could not meet the target resolution, or
check: the measured run does not meet it.

Safety: never program the oven above the column's maximum temperature; the
oven and inlet are hot; hydrogen carrier gas is flammable (leak checks, a
hydrogen sensor, the instrument maker's guidance, local codes).
`

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
	err := dispatch(args, stdout, stderr)
	if err == nil {
		return exitOK
	}
	var ee exitError
	if errors.As(err, &ee) {
		return ee.code
	}
	if errors.Is(err, flag.ErrHelp) {
		return exitOK
	}
	fmt.Fprintf(stderr, "rampwise: %v\n", err)
	var bi badInput
	var me *methodfile.Error
	if errors.As(err, &bi) || errors.As(err, &me) {
		return exitBadInput
	}
	return exitFailure
}

func dispatch(args []string, stdout, stderr io.Writer) error {
	if len(args) == 0 {
		return runTUI(nil, stdout, stderr)
	}
	switch args[0] {
	case "simulate":
		return runSimulate(args[1:], stdout, stderr)
	case "optimize":
		return runOptimize(args[1:], stdout, stderr)
	case "tui":
		return runTUI(args[1:], stdout, stderr)
	case "fit":
		return runFit(args[1:], stdout, stderr)
	case "index":
		return runIndex(args[1:], stdout, stderr)
	case "check":
		return runCheck(args[1:], stdout, stderr)
	case "export":
		return runExport(args[1:], stdout, stderr)
	case "sweep":
		return runSweep(args[1:], stdout, stderr)
	case "compare":
		return runCompare(args[1:], stdout, stderr)
	case "help", "-h", "--help", "-help":
		if len(args) > 1 {
			return dispatch([]string{args[1], "--help"}, stdout, stderr)
		}
		fmt.Fprint(stdout, usage)
		return nil
	}
	if strings.HasPrefix(args[0], "-") {
		return badf("unknown flag %s (see rampwise --help)", args[0])
	}
	return badf("unknown command %q (see rampwise --help)", args[0])
}

// parseArgs parses flags that may come before or after the one optional
// FILE argument.
func parseArgs(fs *flag.FlagSet, args []string) (file string, err error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return "", err
			}
			return "", bad(err)
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	if len(pos) > 1 {
		return "", badf("%s: one method file at most, got %d (%s)", fs.Name(), len(pos), strings.Join(pos, " "))
	}
	if len(pos) == 1 {
		return pos[0], nil
	}
	return "", nil
}

// parseArgsN parses flags around between min and max positional arguments.
func parseArgsN(fs *flag.FlagSet, args []string, min, max int, what string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, err
			}
			return nil, bad(err)
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	if len(pos) < min || len(pos) > max {
		return nil, badf("%s: expected %s, got %d argument(s)", fs.Name(), what, len(pos))
	}
	return pos, nil
}

func newFlags(name, help string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprint(fs.Output(), help)
		fs.PrintDefaults()
	}
	return fs
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
