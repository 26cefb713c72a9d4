//go:build unix

package tui

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/rampwise/rampwise/model/methodfile"
)

// Each exit signal, sent to this very process, writes the recovery file
// before kill is called, and stop reports it.
func TestCatchSignalsWritesBeforeKill(t *testing.T) {
	for _, sig := range []syscall.Signal{syscall.SIGHUP, syscall.SIGTERM, syscall.SIGINT, syscall.SIGQUIT} {
		path := filepath.Join(t.TempDir(), "m.toml")
		m := demoMethod(t)
		methodfile.WriteFile(path, m)
		changed := m.Clone()
		changed.Oven.InitialC = 61
		g := NewGuard(path)
		g.update(path, changed, true)
		killed := make(chan bool, 1)
		stop := g.CatchSignals(func() {
			_, err := os.Stat(RecoveryPath(path))
			killed <- err == nil // the file must be there when kill runs
		})
		syscall.Kill(os.Getpid(), sig)
		select {
		case ok := <-killed:
			if !ok {
				t.Errorf("%v: kill before the recovery file was written", sig)
			}
		case <-time.After(10 * time.Second):
			t.Fatalf("%v: not caught", sig)
		}
		msg, caught := stop()
		if !caught || !strings.Contains(msg, "unsaved changes written to") {
			t.Errorf("%v: caught %v, %q", sig, caught, msg)
		}
		r, err := methodfile.ReadFile(RecoveryPath(path))
		if err != nil || r.Oven.InitialC != 61 {
			t.Errorf("%v: recovery %v", sig, err)
		}
	}
}

// With no signal, stop returns at once and reports nothing.
func TestCatchSignalsStopQuiet(t *testing.T) {
	g := NewGuard("")
	stop := g.CatchSignals(func() { t.Error("kill without a signal") })
	if msg, caught := stop(); caught || msg != "" {
		t.Errorf("%v %q", caught, msg)
	}
}
