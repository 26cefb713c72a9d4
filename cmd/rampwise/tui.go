package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"sync"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/tui"
)

const tuiHelp = `Usage: rampwise tui [FILE] [--no-color]

Opens the interactive program editor: the oven program, a live simulated
chromatogram with the oven temperature, the peak table and the method
settings; o runs the optimizer in the background, ctrl+s saves, ! lists every
caution, ? lists every key. Without FILE it opens the built-in demo. Keys may
also come from a pipe or a file (rampwise tui m.toml < keys.txt); at their end
the UI finishes as if the user quit: exit 0 with nothing unsaved; with unsaved
changes the recovery file (below) is written, the message says where, and the
exit status is 1.

If the terminal or the SSH connection goes away, or the program gets SIGHUP,
SIGTERM, SIGINT or SIGQUIT (on Windows: the console window closed, logoff,
shutdown), unsaved changes are written to NAME.rampwise-recovery.toml beside
the file, NAME being the whole file name (blend.toml.rampwise-recovery.toml);
when that folder cannot be written, to rampwise/recovery in the user's cache
folder (the message says where). The next start offers them with their age;
the recovery file is kept until the method is saved. The ctrl+c key is like
q: with unsaved changes it asks (s save and quit, d discard and quit, esc
stay).

A save changes only what changed, in the file's own text (comments,
layout and quotes kept), and writes through a symlink to its target; W
(save as) writes that text, so changed, to the new name (the demo's own
text for the demo). If the file was
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
	switch file {
	case "-":
		return badf("tui: the terminal UI reads its keys from standard input; give the method file's name (or %s for the built-in demo)", DemoArg)
	case DemoArg:
		file = ""
	}
	m, name, err := loadMethod(file)
	if err != nil {
		return err
	}
	if _, err := simulateMethod(m, name); err != nil {
		return err
	}
	guard := tui.NewGuard(file)
	var text []byte // the file's text is read by the UI; the demo's is built in
	if file == "" {
		text = demoMethod
	}
	app, err := tui.New(m, tui.Options{Path: file, Name: name, Text: text, Guard: guard, NoColor: *noColor})
	if err != nil {
		return bad(fmt.Errorf("%s: %v", name, err))
	}
	// The UI library's own SIGINT/SIGTERM handling is off: it would quit
	// the program while the recovery file is being written. CatchSignals
	// writes it first, then ends the UI; stop waits for that write.
	opts := []tea.ProgramOption{tea.WithAltScreen(), tea.WithOutput(stdout), tea.WithoutSignalHandler()}
	var p *tea.Program
	if in := keyInput(os.Stdin, func() { p.Send(tui.InputEndedMsg{}) }); in != nil {
		// keys come from a pipe or a file (scripts, tests): read them as
		// they are; at their end the UI finishes as if the user quit
		opts = append(opts, tea.WithInput(in))
	}
	p = tea.NewProgram(app, opts...)
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
	if ended, unsaved := app.InputEnded(); ended && unsaved {
		// the keys ran out before the changes were saved: keep them
		path, err := guard.WriteRecovery()
		if err != nil {
			fmt.Fprintf(stderr, "rampwise: end of input with unsaved changes; could not write the recovery file: %v\n", err)
		} else {
			fmt.Fprintf(stderr, "rampwise: end of input with unsaved changes (not saved to %s): written to %s\n", name, path)
		}
		return exitError{exitFailure}
	}
	return nil
}

// keyInput is where the UI reads keys when stdin is not a terminal: a pipe
// as a file (the UI library polls it); a regular file or a device such as
// /dev/null behind a plain reader, because the library's cancellable reader
// cannot poll those and would fail to start. nil for a terminal (the
// library's own). atEnd is called once when the input ends (the library
// itself ignores the end of its input), after every key before it.
func keyInput(f *os.File, atEnd func()) io.Reader {
	st, err := f.Stat()
	if err != nil {
		return &endFile{File: f, atEnd: atEnd}
	}
	switch m := st.Mode(); {
	case m&os.ModeNamedPipe != 0, m&os.ModeSocket != 0:
		return &endFile{File: f, atEnd: atEnd}
	case m&os.ModeCharDevice != 0 && isTerminal(f):
		return nil
	}
	return &endReader{r: f, atEnd: atEnd}
}

// endFile is a file whose end of input is reported (it keeps Fd, so that
// the UI library can still poll it).
type endFile struct {
	*os.File
	atEnd func()
	once  sync.Once
}

func (e *endFile) Read(p []byte) (int, error) {
	n, err := e.File.Read(p)
	if errors.Is(err, io.EOF) {
		e.once.Do(e.atEnd)
	}
	return n, err
}

// endReader is a plain reader whose end of input is reported.
type endReader struct {
	r     io.Reader
	atEnd func()
	once  sync.Once
}

func (e *endReader) Read(p []byte) (int, error) {
	n, err := e.r.Read(p)
	if errors.Is(err, io.EOF) {
		e.once.Do(e.atEnd)
	}
	return n, err
}
