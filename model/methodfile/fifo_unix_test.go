//go:build unix

package methodfile

import (
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Opening a FIFO as a method refuses at once instead of waiting for a
// writer that never comes.
func TestReadFileRefusesFIFO(t *testing.T) {
	p := filepath.Join(t.TempDir(), "m.toml")
	if err := syscall.Mkfifo(p, 0o644); err != nil {
		t.Skip(err)
	}
	done := make(chan error, 1)
	go func() { _, err := ReadFile(p); done <- err }()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "FIFO") || !strings.HasPrefix(err.Error(), p) {
			t.Errorf("error %v", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("ReadFile blocked on a FIFO")
	}
}
