package main

import (
	"fmt"
	"io"
	"os"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/tui"
)

const tuiHelp = `Usage: rampwise tui [FILE]

Opens the interactive program editor: the oven program, a live simulated
chromatogram with the oven temperature, the peak table and the method
settings; o runs the optimizer in the background, ctrl+s saves, ? lists every
key. Without FILE it opens the built-in demo. Keys may also come from a pipe
or a file (rampwise tui m.toml < keys.txt).

If the terminal or the SSH connection goes away, or the program gets SIGHUP,
SIGTERM, SIGINT or SIGQUIT (on Windows: the console window closed, logoff,
shutdown), unsaved changes are written to NAME.rampwise-recovery.toml beside
the file, NAME being the whole file name (blend.toml.rampwise-recovery.toml);
when that folder cannot be written, to rampwise/recovery in the user's cache
folder (the message says where). The next start offers them with their age;
the recovery file is kept until the method is saved. The ctrl+c key is like
q: it asks first when there are unsaved changes.

A save changes only what changed, in the file's own text (comments and
layout kept), and writes through a symlink to its target. If the file was
changed on disk since it was loaded, a save asks: overwrite, save as, or
reload.
`

func runTUI(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("tui", tuiHelp, stderr)
	noColor := fs.Bool("no-color", false, "draw without colour (also when NO_COLOR is set)")
	file, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	m, name, err := loadMethod(file)
	if err != nil {
		return err
	}
	if _, err := simulateMethod(m, name); err != nil {
		return err
	}
	guard := tui.NewGuard(file)
	app, err := tui.New(m, tui.Options{Path: file, Name: name, Guard: guard, NoColor: *noColor})
	if err != nil {
		return bad(fmt.Errorf("%s: %v", name, err))
	}
	// The UI library's own SIGINT/SIGTERM handling is off: it would quit
	// the program while the recovery file is being written. CatchSignals
	// writes it first, then ends the UI; stop waits for that write.
	opts := []tea.ProgramOption{tea.WithAltScreen(), tea.WithOutput(stdout), tea.WithoutSignalHandler()}
	if in := keyInput(os.Stdin); in != nil {
		// keys come from a pipe or a file (scripts, tests): read them as
		// they are
		opts = append(opts, tea.WithInput(in))
	}
	p := tea.NewProgram(app, opts...)
	stop := guard.CatchSignals(p.Kill)
	if !isTerminal(stdout) {
		// no terminal to ask for its size (a pipe, a test): draw at 80×24
		go p.Send(tea.WindowSizeMsg{Width: 80, Height: 24})
	}
	_, runErr := p.Run()
	if msg, caught := stop(); caught {
		if msg != "" {
			fmt.Fprintln(stderr, "rampwise:", msg)
		}
		return exitError{exitFailure}
	}
	if runErr != nil {
		return runErr
	}
	return nil
}

// keyInput is where the UI reads keys when stdin is not a terminal: a pipe
// as it is; a regular file or a device such as /dev/null hidden behind a
// plain reader, because the UI library's cancellable reader cannot poll
// those and would fail to start. nil for a terminal (the library's own).
func keyInput(f *os.File) io.Reader {
	st, err := f.Stat()
	if err != nil {
		return f
	}
	switch m := st.Mode(); {
	case m&os.ModeNamedPipe != 0, m&os.ModeSocket != 0:
		return f
	case m&os.ModeCharDevice != 0 && isTerminal(f):
		return nil
	}
	return struct{ io.Reader }{f}
}
