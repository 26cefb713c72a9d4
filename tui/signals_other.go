//go:build !unix && !windows

package tui

import "os"

var exitSignals = []os.Signal{os.Interrupt}
