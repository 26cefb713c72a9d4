package tui

import "github.com/rampwise/rampwise/model/textsafe"

// inert is how every string from a file (names, title, phase, paths)
// reaches the screen: control characters escaped, never raw.
func inert(s string) string { return textsafe.Inert(s) }

// inertErr is an error's text made inert: errors quote names and values
// from files, already through textsafe.Inert (whose escapes are kept, not
// doubled).
func inertErr(err error) string { return textsafe.Message(err.Error()) }

// inertMsg is inertErr for an error's text already trimmed.
func inertMsg(s string) string { return textsafe.Message(s) }
