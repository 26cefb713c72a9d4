package main

import (
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/tui"
)

const tuiHelp = `Usage: rampwise tui [FILE]

Opens the interactive program editor: the oven program, a live simulated
chromatogram with the oven temperature, the peak table and the method
settings; o runs the optimizer in the background, ctrl+s saves, ? lists every
key. Without FILE it opens the built-in demo. If the terminal or the SSH
connection goes away with unsaved changes, they are written to
NAME.rampwise-recovery.toml beside the file, and the next start offers them.
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
	opts := []tea.ProgramOption{tea.WithAltScreen(), tea.WithOutput(stdout)}
	if !isTerminal(os.Stdin) {
		// keys come from a pipe (scripts, tests): read them as they are
		opts = append(opts, tea.WithInput(os.Stdin))
	}
	p := tea.NewProgram(app, opts...)
	sigs := make(chan os.Signal, 1)
	signal.Notify(sigs, syscall.SIGHUP, syscall.SIGTERM)
	defer signal.Stop(sigs)
	lost := make(chan string, 1)
	go func() {
		s, ok := <-sigs
		if !ok {
			return
		}
		path, err := guard.WriteRecovery()
		switch {
		case err != nil:
			lost <- fmt.Sprintf("%v: could not write the recovery file: %v", s, err)
		case path != "":
			lost <- fmt.Sprintf("%v: unsaved changes written to %s", s, path)
		default:
			lost <- ""
		}
		p.Kill()
	}()
	if !isTerminal(stdout) {
		// no terminal to ask for its size (a pipe, a test): draw at 80×24
		go p.Send(tea.WindowSizeMsg{Width: 80, Height: 24})
	}
	_, runErr := p.Run()
	select {
	case msg := <-lost:
		if msg != "" {
			fmt.Fprintln(stderr, "rampwise:", msg)
		}
		return exitError{exitFailure}
	default:
	}
	if runErr != nil {
		return runErr
	}
	return nil
}
