//go:build unix

package tui

import (
	"os"
	"syscall"
)

var exitSignals = []os.Signal{syscall.SIGHUP, syscall.SIGTERM, syscall.SIGINT, syscall.SIGQUIT}
