package tui

import (
	"os"
	"path/filepath"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
)

// fileWatch is what the App knows about the file on disk, so that a save
// never silently discards a change made there (another UI, an editor,
// optimize --out) and save-as never silently replaces an unrelated file.
type fileWatch struct {
	path    string            // the file the fingerprint is of
	fp      fsafe.Fingerprint // taken when it was loaded or last saved
	pending string            // the path a question is about
	force   string            // a path the user said to write anyway (once)
	recover string            // the recovery file offered at start
	found   *Recovery         // what was found at start
}

// record notes the file's state after a load or save.
func (w *fileWatch) record(path string) {
	w.path = path
	w.fp = fsafe.Fingerprint{}
	if path == "" {
		return
	}
	if fp, err := fsafe.Take(path); err == nil {
		w.fp = fp
	}
}

// offerRecovery looks for a recovery file of path and, if there is one,
// asks what to do with it (a corrupt one is only reported: it was kept aside).
func (a *App) offerRecovery(path string) {
	r := FindRecovery(path)
	if r == nil {
		return
	}
	a.files.found = r
	a.files.recover = r.Path
	if r.Method == nil {
		a.say(msgWarn, "%s", textsafe.Inert(r.Offer(time.Now())))
		return
	}
	a.recover = r.Method
	a.confirm = confirmRestore
	a.say(msgWarn, "%s", textsafe.Inert(r.Offer(time.Now())))
}

// mayWrite checks path before a save: when it is the file loaded (or last
// saved) and it changed on disk since, or when it is another file that
// exists, it asks and returns false. A path the user already said yes to
// passes once.
func (a *App) mayWrite(path string) bool {
	if a.files.force == path {
		a.files.force = ""
		return true
	}
	if a.files.path != "" && samePath(path, a.files.path) {
		changed, err := a.files.fp.Changed(path)
		if err == nil && !changed {
			return true
		}
		a.files.pending = path
		a.confirm = confirmDiskChanged
		a.say(msgWarn, "%s changed on disk since it was loaded: o overwrite it · w save as another file · r reload it (your edits are lost; u undoes) · esc cancel", textsafe.Inert(path))
		return false
	}
	if _, err := os.Lstat(path); err == nil {
		a.files.pending = path
		a.confirm = confirmReplace
		a.say(msgWarn, "%s exists: y replace it · esc cancel", textsafe.Inert(path))
		return false
	}
	return true
}

func samePath(a, b string) bool {
	if a == b {
		return true
	}
	aa, err1 := filepath.Abs(a)
	bb, err2 := filepath.Abs(b)
	return err1 == nil && err2 == nil && aa == bb
}

// onFileConfirm answers the questions mayWrite asked.
func (a *App) onFileConfirm(msg tea.KeyMsg) tea.Cmd {
	path := a.files.pending
	switch a.confirm {
	case confirmDiskChanged:
		switch msg.String() {
		case "o":
			a.confirm = confirmNone
			a.files.force = path
			a.saveTo(path)
		case "w":
			a.confirm = confirmNone
			a.startInput(inputSaveAs, "save as: ", "")
		case "r":
			a.confirm = confirmNone
			m, err := methodfile.ReadFile(path)
			if err != nil {
				a.say(msgError, "cannot reload: %s", textsafe.Inert(err.Error()))
				return nil
			}
			a.undo = append(a.undo, a.method)
			a.saved = m
			a.restore(m)
			a.files.record(path)
			a.say(msgGood, "reloaded %s (u brings your edits back)", textsafe.Inert(path))
		case "esc", "n":
			a.confirm = confirmNone
			a.say(msgInfo, "not saved")
		}
	case confirmReplace:
		switch msg.String() {
		case "y":
			a.confirm = confirmNone
			a.files.force = path
			a.saveTo(path)
		case "esc", "n":
			a.confirm = confirmNone
			a.say(msgInfo, "not saved")
		}
	}
	return nil
}
