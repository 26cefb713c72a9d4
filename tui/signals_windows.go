//go:build windows

package tui

import (
	"os"
	"syscall"
)

// On Windows, os.Interrupt is ctrl+c / ctrl+break at the console, and
// syscall.SIGTERM is what Go delivers for CTRL_CLOSE_EVENT (the console
// window closed), CTRL_LOGOFF_EVENT and CTRL_SHUTDOWN_EVENT; Go holds the
// process open while the handler runs (Windows allows about 5 s on close).
var exitSignals = []os.Signal{os.Interrupt, syscall.SIGTERM}
