package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"runtime/debug"
	"strings"

	"github.com/rampwise/rampwise/model/methodfile"
)

// command is one subcommand. Adding a command is one entry in commands: the
// overview (rampwise help), `help NAME`, `NAME --help` and the dispatch all
// come from this table.
type command struct {
	name     string
	args     string // the arguments as the overview shows them
	synopsis string // one line for the overview
	// run executes the command; it parses its own flags with newFlags and
	// parseArgs / parseArgsN, so that --help and bad flags behave alike.
	run func(args []string, stdout, stderr io.Writer) error
}

// commands is the table, in the order the overview lists them.
var commands []command

func init() {
	commands = []command{
		{"tui", "[FILE]", "open the terminal UI on a method file", runTUI},
		{"simulate", "[FILE] [flags]", "predict retention times, widths, resolution", runSimulate},
		{"optimize", "[FILE] [flags]", "find the fastest program meeting the target", runOptimize},
		{"fit", "METHOD RUNS [flags]", "calibrate ΔH, ΔS (ΔCp) from scouting runs", runFit},
		{"index", "METHOD [flags]", "retention indices against the ladder alkanes", runIndex},
		{"check", "METHOD RUN [flags]", "does a measured run meet the target? (exit 0 yes, 3 no)", runCheck},
		{"export", "METHOD [flags]", "figure (PNG/SVG/PDF), peak CSV, method sheet", runExport},
		{"sweep", "METHOD [flags]", "window diagram of one or two program values", runSweep},
		{"compare", "METHOD... [flags]", "rank phases and column dimensions", runCompare},
		{"plan", "METHOD [RUNS] [flags]", "what to inject next: a scouting run, the verification, or done", runPlan},
		{"version", "", "print the version and the commit it was built from", runVersion},
		{"help", "[COMMAND]", "explain a command", runHelp},
	}
}

func findCommand(name string) *command {
	for i := range commands {
		if commands[i].name == name {
			return &commands[i]
		}
	}
	return nil
}

// usage is the overview, generated from the table.
func usage() string {
	var b strings.Builder
	b.WriteString("rampwise: GC oven-program optimizer\n\nUsage:\n")
	rows := [][2]string{{"rampwise", "open the terminal UI on the built-in demo"}}
	for _, c := range commands {
		rows = append(rows, [2]string{strings.TrimSpace("rampwise " + c.name + " " + c.args), c.synopsis})
	}
	w := 0
	for _, r := range rows {
		w = max(w, len([]rune(r[0])))
	}
	for _, r := range rows {
		fmt.Fprintf(&b, "  %s%s  %s\n", r[0], strings.Repeat(" ", w-len([]rune(r[0]))), r[1])
	}
	b.WriteString(`
FILE is a method file (TOML: column, carrier, oven program, limits, goal and
compounds). - for FILE or METHOD (or the RUNS of fit and plan) reads it
from standard input (cat m.toml | rampwise simulate -), and is the demo
when nothing is piped in; without FILE, or with @demo for FILE or METHOD,
the built-in demo method is used; an empty
name ("") is refused. rampwise help COMMAND (or rampwise COMMAND --help)
explains a command and its flags.

Limits: the instrument limits in the file (limits.max_rate_c_min and
limits.rate_band, limits.max_inlet_kpa and limits.min_inlet_kpa,
column.max_temp_c and column.max_isothermal_c, limits.ambient_c or
limits.coolant_c) refuse a program everywhere; the search bounds
(limits.oven_min_c, limits.max_hold_min, the keypad steps, goal.min_first_k)
bind what optimize proposes and are only noted for a program set by hand.

Exit codes: 0 success; 1 unexpected failure; 2 bad input (the message names
file, line and key); 3 optimize could not meet the target resolution, or
check: the measured run does not meet it.

Safety: never program the oven above the column's maximum temperature; the
oven and inlet are hot; hydrogen carrier gas is flammable (leak checks, a
hydrogen sensor, the instrument maker's guidance, local codes).
`)
	return b.String()
}

func dispatch(args []string, stdout, stderr io.Writer) error {
	if len(args) == 0 {
		return runTUI(nil, stdout, stderr)
	}
	switch args[0] {
	case "-h", "-help", "--help":
		fmt.Fprint(stdout, usage())
		return nil
	case "-version", "--version":
		return runVersion(nil, stdout, stderr)
	}
	if c := findCommand(args[0]); c != nil {
		return c.run(args[1:], stdout, stderr)
	}
	if strings.HasPrefix(args[0], "-") {
		return badf("unknown flag %s (see rampwise help)", args[0])
	}
	return badf("unknown command %q (see rampwise help)", args[0])
}

const helpHelp = `Usage: rampwise help [COMMAND]

Without COMMAND, lists the commands; with one, explains it and its flags
(the same text as rampwise COMMAND --help). Help is printed on standard
output.
`

func runHelp(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("help", helpHelp, stderr)
	names, err := parseArgsN(fs, args, 0, 1, "at most one COMMAND")
	if err != nil {
		return err
	}
	if len(names) == 0 {
		fmt.Fprint(stdout, usage())
		return nil
	}
	c := findCommand(names[0])
	if c == nil {
		return badf("help: unknown command %q (see rampwise help)", names[0])
	}
	return c.run([]string{"--help"}, stdout, stderr)
}

const versionHelp = `Usage: rampwise version

Prints the module version and the version-control commit the binary was
built from (from the build information Go records).
`

func runVersion(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("version", versionHelp, stderr)
	if _, err := parseArgsN(fs, args, 0, 0, "no arguments"); err != nil {
		return err
	}
	fmt.Fprintln(stdout, versionLine())
	return nil
}

// buildCommit is the commit given at link time, for builds where Go
// records no version-control information (a git worktree, whose .git is a
// file Go does not recognise, golang/go#58218; -buildvcs=false; go run):
//
//	go build -ldflags "-X main.buildCommit=$(git rev-parse HEAD)" ./cmd/rampwise
var buildCommit string

// versionLine is "rampwise VERSION (commit REV[, modified], TIME, GO)" from
// the build information.
func versionLine() string {
	info, ok := debug.ReadBuildInfo()
	return versionFrom(info, ok, buildCommit)
}

// versionFrom is versionLine for the given build information and link-time
// commit. Without a recorded revision it names the link-time commit, or
// says the binary was built without version control information (never
// "commit unknown", which reads like a fault of the checkout).
func versionFrom(info *debug.BuildInfo, ok bool, ldCommit string) string {
	if !ok || info == nil {
		return "rampwise (no build information)"
	}
	version := info.Main.Version
	if version == "" {
		version = "(devel)"
	}
	var rev, when string
	modified := false
	for _, s := range info.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.time":
			when = s.Value
		case "vcs.modified":
			modified = s.Value == "true"
		}
	}
	var extra []string
	switch {
	case rev != "":
		c := "commit " + rev
		if modified {
			c += " (modified)"
		}
		extra = append(extra, c)
	case strings.TrimSpace(ldCommit) != "":
		extra = append(extra, "commit "+strings.TrimSpace(ldCommit))
	default:
		extra = append(extra, "built without version control information")
	}
	if when != "" {
		extra = append(extra, when)
	}
	extra = append(extra, info.GoVersion)
	return fmt.Sprintf("rampwise %s (%s)", version, strings.Join(extra, ", "))
}

// helpRequest is returned by parseArgs for -h/--help: run prints the
// command's usage on standard output and exits 0.
type helpRequest struct{ fs *flag.FlagSet }

func (helpRequest) Error() string { return "help requested" }

// newFlags makes a command's flag set. The flag package prints nothing
// itself: a bad flag comes back as one error (printed once by run) and
// --help as a helpRequest (printed on stdout).
func newFlags(name, help string, _ io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {
		fmt.Fprint(fs.Output(), help)
		hasFlags := false
		fs.VisitAll(func(*flag.Flag) { hasFlags = true })
		if hasFlags {
			if !strings.HasSuffix(strings.TrimRight(help, "\n"), ":") {
				fmt.Fprint(fs.Output(), "\nFlags:\n")
			}
			printDefaults(fs)
		}
	}
	return fs
}

// printDefaults is flag.PrintDefaults in its layout, except that a flag
// whose default is NaN (a value that must be given, or one that is off
// unless given) shows no default rather than "(default NaN)".
func printDefaults(fs *flag.FlagSet) {
	fs.VisitAll(func(f *flag.Flag) {
		var b strings.Builder
		fmt.Fprintf(&b, "  -%s", f.Name)
		name, usage := flag.UnquoteUsage(f)
		if name != "" {
			b.WriteString(" " + name)
		}
		if b.Len() <= 4 {
			b.WriteString("\t")
		} else {
			b.WriteString("\n    \t")
		}
		b.WriteString(strings.ReplaceAll(usage, "\n", "\n    \t"))
		if d := f.DefValue; d != "" && d != "0" && d != "false" && d != "NaN" {
			if g, ok := f.Value.(flag.Getter); ok && isString(g.Get()) {
				fmt.Fprintf(&b, " (default %q)", d)
			} else {
				fmt.Fprintf(&b, " (default %v)", d)
			}
		}
		fmt.Fprintln(fs.Output(), b.String())
	})
}

func isString(v any) bool { _, ok := v.(string); return ok }

// parseFlags parses args with fs, flags before and after the positional
// arguments, which it returns.
func parseFlags(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, helpRequest{fs}
			}
			return nil, badf("%s: %v (see rampwise help %s)", fs.Name(), err, fs.Name())
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		if strings.TrimSpace(args[0]) == "" {
			// an unset shell variable ("$METHOD") must not mean the demo
			return nil, badf("%s: an empty file name (give a method file, - for standard input, or %s for the built-in demo)", fs.Name(), DemoArg)
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	return pos, nil
}

// parseArgs parses flags that may come before or after the one optional
// FILE argument.
func parseArgs(fs *flag.FlagSet, args []string) (file string, err error) {
	pos, err := parseFlags(fs, args)
	if err != nil {
		return "", err
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
	pos, err := parseFlags(fs, args)
	if err != nil {
		return nil, err
	}
	if len(pos) < min || len(pos) > max {
		return nil, badf("%s: expected %s, got %d argument(s) (see rampwise help %s)", fs.Name(), what, len(pos), fs.Name())
	}
	return pos, nil
}

// given reports whether the flag name was set on the command line.
func given(fs *flag.FlagSet, name string) bool {
	set := false
	fs.Visit(func(f *flag.Flag) { set = set || f.Name == name })
	return set
}

// override checks a method after a flag changed the value at key; a
// refusal names the flag rather than the file's line.
func override(m *methodfile.Method, flagName, key string) error {
	err := m.ValidateKey(key)
	var fe *methodfile.Error
	if errors.As(err, &fe) {
		if fe.Key == key {
			return badf("--%s: %s", flagName, fe.Msg)
		}
		return badf("--%s: %v", flagName, err)
	}
	return err
}
