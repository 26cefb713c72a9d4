//go:build unix

package tui

import (
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// A FIFO given as a verification run is refused at once (opened only as a
// regular file), never waited on.
func TestVerificationRunFIFO(t *testing.T) {
	for _, name := range []string{"run.csv", "run.cdf", "runs.toml"} {
		p := filepath.Join(t.TempDir(), name)
		if err := syscall.Mkfifo(p, 0o600); err != nil {
			t.Skip("no FIFO here:", err)
		}
		a, _ := newApp(t, 80, 24)
		done := make(chan struct{})
		go func() {
			press(a, "V", p, "enter")
			close(done)
		}()
		select {
		case <-done:
		case <-time.After(5 * time.Second):
			t.Fatalf("%s: the UI waits on a FIFO", name)
		}
		if !strings.Contains(a.message, "FIFO") {
			t.Errorf("%s: message %q", name, a.message)
		}
	}
}
