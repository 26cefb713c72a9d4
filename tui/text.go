package tui

import "github.com/rampwise/rampwise/model/textsafe"

// inert is how every string from a file (names, title, phase, paths)
// reaches the screen: control characters escaped, never raw.
func inert(s string) string { return textsafe.Inert(s) }

// inertErr is an error's text made inert: errors quote names and values
// from files.
func inertErr(err error) string { return inert(err.Error()) }
