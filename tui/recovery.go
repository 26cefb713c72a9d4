package tui

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sync"
	"time"

	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
)

// RecoverySuffix ends every recovery file's name.
const RecoverySuffix = ".rampwise-recovery.toml"

// RecoveryPath is where unsaved changes to the method at path are written
// when the terminal goes away: beside it, as NAME.rampwise-recovery.toml
// with NAME the whole file name (blend.toml and blend.method get different
// ones). The built-in demo (path "") recovers to the current folder.
func RecoveryPath(path string) string {
	if path == "" {
		return "demo" + RecoverySuffix
	}
	return path + RecoverySuffix
}

// CacheRecoveryPath is the fallback when the method's folder cannot be
// written (read-only share, a folder of another user): the user's cache
// folder, rampwise/recovery, the file named after the method with a short
// hash of its absolute path so that two blend.toml in two folders differ.
func CacheRecoveryPath(path string) (string, error) {
	dir, err := os.UserCacheDir()
	if err != nil {
		return "", err
	}
	abs := path
	if abs == "" {
		abs = "demo"
	}
	if a, err := filepath.Abs(abs); err == nil {
		abs = a
	}
	h := sha256.Sum256([]byte(abs))
	name := filepath.Base(abs) + "-" + hex.EncodeToString(h[:4]) + RecoverySuffix
	return filepath.Join(dir, "rampwise", "recovery", name), nil
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
// Beside the method first; if that folder cannot be written, in the user's
// cache folder (the returned path says where).
//
// It is called from a signal handler while the UI may be in the middle of
// an update: it only reads the method the guard was last given (methods are
// replaced, never changed in place) and writes with Marshal, without the
// validation a save does, so it is quick at any method size.
func (g *Guard) WriteRecovery() (string, error) {
	g.mu.Lock()
	path, m, dirty := g.path, g.m, g.dirty
	g.mu.Unlock()
	if !dirty || m == nil {
		return "", nil
	}
	data, err := methodfile.Marshal(m)
	if err != nil {
		return "", err
	}
	rp := RecoveryPath(path)
	err = fsafe.WriteFile(rp, data)
	if err == nil {
		return rp, nil
	}
	cp, cerr := CacheRecoveryPath(path)
	if cerr != nil {
		return "", err
	}
	if mkerr := os.MkdirAll(filepath.Dir(cp), 0o700); mkerr != nil {
		return "", fmt.Errorf("%v; and in the cache folder: %v", err, mkerr)
	}
	if cerr := fsafe.WriteFile(cp, data); cerr != nil {
		return "", fmt.Errorf("%v; and in the cache folder: %v", err, cerr)
	}
	return cp, nil
}

// Saved tells the guard the method was saved at path: nothing is unsaved,
// and the recovery files of path (beside it and in the cache) are obsolete
// and removed.
func (g *Guard) Saved(path string, m *methodfile.Method) {
	g.update(path, m, false)
	RemoveRecovery(path)
}

// RemoveRecovery removes the recovery files of the method at path.
func RemoveRecovery(path string) {
	os.Remove(RecoveryPath(path))
	if cp, err := CacheRecoveryPath(path); err == nil {
		os.Remove(cp)
	}
}

// Recovery is a recovery file found at start-up.
type Recovery struct {
	Path     string             // the recovery file
	Method   *methodfile.Method // nil when Corrupt
	Written  time.Time          // when it was written
	FileTime time.Time          // the method file's time (zero: no file)
	Corrupt  error              // it could not be read; it was moved to KeptAs
	KeptAs   string
}

// Offer is the line that offers the recovery, with its age and the file's.
func (r *Recovery) Offer(now time.Time) string {
	if r.Corrupt != nil {
		if r.KeptAs != "" {
			return fmt.Sprintf("a recovery file could not be read (%v); kept it aside as %s", r.Corrupt, r.KeptAs)
		}
		return fmt.Sprintf("a recovery file could not be read (%v); left it as it is", r.Corrupt)
	}
	s := fmt.Sprintf("unsaved changes from an earlier session, written %s ago", Age(now.Sub(r.Written)))
	if !r.FileTime.IsZero() {
		s += fmt.Sprintf(" (file saved %s ago", Age(now.Sub(r.FileTime)))
		if r.FileTime.After(r.Written) {
			s += ", later"
		}
		s += ")"
	}
	return s + fmt.Sprintf(": r restore · d discard · esc keep · in %s", r.Path)
}

// Age says a duration the way a person would: 40 s, 5 min, 3 h, 2 days.
func Age(d time.Duration) string {
	switch {
	case d < 0:
		return "0 s"
	case d < time.Minute:
		return fmt.Sprintf("%d s", int(d.Seconds()))
	case d < time.Hour:
		return fmt.Sprintf("%d min", int(d.Minutes()))
	case d < 48*time.Hour:
		return fmt.Sprintf("%d h", int(d.Hours()))
	}
	return fmt.Sprintf("%d days", int(d.Hours()/24))
}

// FindRecovery looks for a recovery file of the method at path, beside it
// and then in the cache folder. A corrupt one is moved aside (renamed with
// .corrupt-TIME) so that it is kept, reported once, and not offered again.
// nil when there is none.
func FindRecovery(path string) *Recovery {
	cands := []string{RecoveryPath(path)}
	if cp, err := CacheRecoveryPath(path); err == nil {
		cands = append(cands, cp)
	}
	for _, rp := range cands {
		st, err := os.Stat(rp)
		if err != nil {
			continue
		}
		r := &Recovery{Path: rp, Written: st.ModTime()}
		if path != "" {
			if fst, err := os.Stat(path); err == nil {
				r.FileTime = fst.ModTime()
			}
		}
		m, err := methodfile.ReadFile(rp)
		if err != nil {
			r.Corrupt = err
			var pe *fs.PathError
			if !errors.As(err, &pe) {
				aside := rp + ".corrupt-" + time.Now().Format("20060102-150405")
				if os.Rename(rp, aside) == nil {
					r.KeptAs = aside
				}
			}
			return r
		}
		r.Method = m
		return r
	}
	return nil
}

// recoveryAvailable reports whether a readable recovery file exists for path.
func recoveryAvailable(path string) (*methodfile.Method, string, bool) {
	r := FindRecovery(path)
	if r == nil || r.Method == nil {
		return nil, RecoveryPath(path), false
	}
	return r.Method, r.Path, true
}
