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
	"bytes"
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
	noteOut = stderr
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
	// messages show names from files through textsafe.Inert already; the
	// last line of defence escapes what is left without doubling their
	// backslashes (as the text output does)
	fmt.Fprintf(stderr, "rampwise: %s\n", inertLines(err.Error()))
	var bi badInput
	var me *methodfile.Error
	var fe *fsafe.Error // an output path that cannot be written
	if errors.As(err, &bi) || errors.As(err, &me) || errors.As(err, &fe) {
		return exitBadInput
	}
	return exitFailure
}

// DemoArg names the built-in demo on the command line (a name no method
// file has); no FILE means the demo too.
const DemoArg = "@demo"

// StdinName is how standard input is named in messages.
const StdinName = "<stdin>"

// stdin is where - reads a method from (a variable for tests).
var stdin io.Reader = os.Stdin

// stdinText is the method text read from standard input, kept for --out
// (which carries the source's comments over); stdin can be read once.
var stdinText []byte

// noteOut is where a command's notes go (its stderr).
var noteOut io.Writer = io.Discard

// errNoStdin says that "-" found nothing to read: standard input is a
// terminal or empty.
var errNoStdin = errors.New("nothing on standard input")

// loadMethod reads FILE: the built-in demo when file is empty (no FILE
// given) or DemoArg; for "-" standard input (as every Unix tool reads it)
// when something is piped in, and the built-in demo, with a note, when
// standard input is a terminal or empty (so "-" keeps naming the demo as
// it always did); else the file.
func loadMethod(file string) (*methodfile.Method, string, error) {
	switch file {
	case "", DemoArg:
		m, err := methodfile.Parse(DemoName, demoMethod)
		return m, DemoName, err
	case "-":
		data, err := readStdin()
		if errors.Is(err, errNoStdin) {
			fmt.Fprintf(noteOut, "rampwise: nothing on standard input: - is the built-in demo here (pipe a method in to read it, or name it %s)\n", DemoArg)
			m, err := methodfile.Parse(DemoName, demoMethod)
			return m, DemoName, err
		}
		if err != nil {
			return nil, StdinName, err
		}
		m, err := methodfile.Parse(StdinName, data)
		return m, StdinName, err
	}
	m, err := methodfile.ReadFile(file)
	return m, file, err
}

// readRuns reads a scouting runs file, or standard input for "-" (as a
// method is read; not both from standard input at once).
func readRuns(path string, m *methodfile.Method) (*methodfile.Runs, error) {
	if path != "-" {
		return methodfile.ReadRuns(path, m)
	}
	data, err := readStdin()
	if errors.Is(err, errNoStdin) {
		return nil, badf("%s: - reads the runs from standard input, which is a terminal or empty; pipe the runs file in or give its name", StdinName)
	}
	if err != nil {
		return nil, err
	}
	return methodfile.ParseRuns(StdinName, data, m)
}

// readStdin reads a method from standard input, once. A terminal is
// refused rather than waited on (- is standard input, not the demo).
func readStdin() ([]byte, error) {
	if stdinText != nil {
		return nil, badf("%s: - (standard input) can be read only once", StdinName)
	}
	if f, ok := stdin.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			return nil, errNoStdin
		}
	}
	data, err := io.ReadAll(io.LimitReader(stdin, methodfile.MaxFileSize+1))
	if err != nil {
		return nil, badf("%s: cannot read: %v", StdinName, err)
	}
	if len(data) > methodfile.MaxFileSize {
		return nil, badf("%s: more than %d MiB; not a method file", StdinName, methodfile.MaxFileSize>>20)
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, errNoStdin
	}
	stdinText = data
	return data, nil
}
