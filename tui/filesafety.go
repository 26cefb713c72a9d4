package tui

import (
	"fmt"
	"path/filepath"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
)

// fileWatch is what the App knows about its file on disk, so that a save
// never silently discards a change made there (another UI, an editor,
// optimize --out): the fingerprint (size, time, hash) taken when the file
// was loaded or last saved, checked again before each save.
type fileWatch struct {
	path    string            // the file the fingerprint is of
	fp      fsafe.Fingerprint // taken when it was loaded or last saved
	recover string            // the recovery file offered at start
}

// record notes the file's state after a load or save.
func (w *fileWatch) record(path string) {
	w.path, w.fp = path, fsafe.Fingerprint{}
	if path == "" {
		return
	}
	if fp, err := fsafe.Take(path); err == nil {
		w.fp = fp
	}
}

// changedOnDisk says whether path is the watched file and it changed since
// the fingerprint was taken (a touch alone is no change).
func (w *fileWatch) changedOnDisk(path string) bool {
	if w.path == "" || !samePath(path, w.path) {
		return false
	}
	changed, err := w.fp.Changed(path)
	return err != nil || changed
}

func samePath(a, b string) bool {
	if a == b {
		return true
	}
	aa, err1 := filepath.Abs(a)
	bb, err2 := filepath.Abs(b)
	return err1 == nil && err2 == nil && aa == bb
}

// offerRecovery looks for a recovery file of path and, if there is one,
// offers it with its age and the file's; a corrupt one is only reported
// (FindRecovery kept it aside).
func (a *App) offerRecovery(path string) {
	r := FindRecovery(path)
	if r == nil {
		return
	}
	a.files.recover = r.Path
	offer := inert(r.Offer(time.Now()))
	if r.Method == nil {
		a.say(msgWarn, "%s", offer)
		return
	}
	a.open(newConfirm(&a.sh, "unsaved changes from an earlier session", offer, []choice{
		{keys: []string{"r"}, label: "restore them", msgs: []tea.Msg{restoreMsg{m: r.Method}}},
		{keys: []string{"d"}, label: "discard the file", msgs: []tea.Msg{discardRecoveryMsg{}}},
		{keys: []string{"esc", "n"}, label: "keep it and go on", msgs: []tea.Msg{sayMsg{msgInfo, "kept the recovery file " + inert(r.Path)}}},
	}))
	a.say(msgWarn, "%s", offer)
}

// fileIntent is a message about the file on disk; the root hands it to
// its apply.
type fileIntent interface{ apply(a *App) tea.Cmd }

// overwriteMsg saves over a file that changed on disk, as the user chose.
type overwriteMsg struct {
	path string
	quit bool
}

func (m overwriteMsg) apply(a *App) tea.Cmd {
	a.files.record(m.path) // accept the disk's state as seen
	return a.startSave(m.path, m.quit)
}

// reloadMsg replaces the method with the file's current content; the
// edits stay on the undo stack (u brings them back).
type reloadMsg struct{ path string }

func (m reloadMsg) apply(a *App) tea.Cmd {
	data, err := fsafe.ReadRegular(m.path, methodfile.MaxFileSize)
	var fresh *methodfile.Method
	if err == nil {
		fresh, err = methodfile.Parse(m.path, data)
	}
	if err != nil && data == nil {
		_, err = methodfile.ReadFile(m.path) // its message names the file
		if err == nil {
			err = fmt.Errorf("%s changed while it was read; try again", m.path)
		}
	}
	if err != nil {
		a.say(msgError, "cannot reload: %s", inertErr(err))
		return nil
	}
	a.text, a.textOf = data, m.path
	a.undo = append(a.undo, a.sh.method)
	a.saved = fresh
	a.restore(fresh)
	a.files.record(m.path)
	a.say(msgGood, "reloaded %s (u brings your edits back)", inert(m.path))
	return nil
}

// mayWrite is checked before a save to path: when path is the file loaded
// (or last saved) and it changed on disk since, it asks (overwrite, save
// as, reload) and returns false.
func (a *App) mayWrite(path string, quit bool) bool {
	if !a.files.changedOnDisk(path) {
		return true
	}
	a.open(newConfirm(&a.sh, inert(path)+" changed on disk", "since it was loaded or last saved here (another program or window wrote it)", []choice{
		{keys: []string{"o"}, label: "overwrite it", msgs: []tea.Msg{overwriteMsg{path: path, quit: quit}}},
		{keys: []string{"w"}, label: "save as another file", msgs: []tea.Msg{openMsg{a.saveAsPrompt(quit)}}},
		{keys: []string{"r"}, label: "reload it (your edits are lost; u undoes)", msgs: []tea.Msg{reloadMsg{path: path}}},
		{keys: []string{"esc", "n"}, label: "cancel", msgs: []tea.Msg{sayMsg{msgInfo, "not saved"}}},
	}))
	a.say(msgWarn, "%s changed on disk: o overwrite · w save as · r reload · esc cancel", inert(path))
	return false
}

// saved is called when a save to path succeeded: the recovery files are
// obsolete, and the file's new state is recorded.
func (a *App) savedFile(path string) {
	RemoveRecovery(path)
	a.files.record(path)
}
