package tui

import (
	"os"
	"path/filepath"
	"strings"
	"sync"

	"github.com/rampwise/rampwise/model/methodfile"
)

// RecoveryPath is where unsaved changes to the method at path are written
// when the terminal goes away: beside it, as NAME.rampwise-recovery.toml.
// The built-in demo (path "") recovers to the current folder.
func RecoveryPath(path string) string {
	if path == "" {
		return "demo.rampwise-recovery.toml"
	}
	dir, base := filepath.Split(path)
	base = strings.TrimSuffix(base, filepath.Ext(base))
	return filepath.Join(dir, base+".rampwise-recovery.toml")
}

// Guard keeps the latest unsaved method where a signal handler can reach it
// without going through the UI's event loop (which may be stuck writing to a
// terminal that is gone).
type Guard struct {
	mu    sync.Mutex
	path  string
	m     *methodfile.Method
	dirty bool
}

// NewGuard guards the method file at path ("" for the demo).
func NewGuard(path string) *Guard { return &Guard{path: path} }

func (g *Guard) update(path string, m *methodfile.Method, dirty bool) {
	g.mu.Lock()
	g.path, g.m, g.dirty = path, m, dirty
	g.mu.Unlock()
}

// WriteRecovery saves the unsaved method, if any, to its recovery file
// (atomically) and returns the file's path ("" when nothing was unsaved).
func (g *Guard) WriteRecovery() (string, error) {
	g.mu.Lock()
	path, m, dirty := g.path, g.m, g.dirty
	g.mu.Unlock()
	if !dirty || m == nil {
		return "", nil
	}
	rp := RecoveryPath(path)
	if err := methodfile.WriteFile(rp, m); err != nil {
		return "", err
	}
	return rp, nil
}

// recoveryAvailable reports whether a readable recovery file exists for path.
func recoveryAvailable(path string) (*methodfile.Method, string, bool) {
	rp := RecoveryPath(path)
	if _, err := os.Stat(rp); err != nil {
		return nil, rp, false
	}
	m, err := methodfile.ReadFile(rp)
	if err != nil {
		return nil, rp, false
	}
	return m, rp, true
}
