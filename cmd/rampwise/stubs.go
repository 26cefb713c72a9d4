package main

import "io"

// runTUI falls back to printing the simulation until the UI exists.
func runTUI(args []string, stdout, stderr io.Writer) error {
	return runSimulate(args, stdout, stderr)
}
