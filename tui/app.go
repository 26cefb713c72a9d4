package tui

import (
	"context"
	"fmt"
	"os"
	"strings"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// MinWidth and MinHeight are the smallest terminal the UI draws in.
const (
	MinWidth  = 80
	MinHeight = 24
)

// maxUndo is how many changes undo can take back.
const maxUndo = 500

// The panes, in focus order.
const (
	paneProgram = iota
	paneChart
	panePeaks
	paneSettings
	paneCount
)

var paneNames = [paneCount]string{"program", "chromatogram", "peaks", "settings"}

type msgKind int

const (
	msgInfo msgKind = iota
	msgWarn
	msgError
	msgGood
)

// Options configure a new App.
type Options struct {
	Path string // the method's file; "" for the built-in demo
	Name string // how to name it on screen
	// Text is the method's text as read (the demo's embedded text for the
	// built-in demo); nil reads Path. A save to another file (W) changes
	// only what changed in this text, as ctrl+s does in the file itself.
	Text    []byte
	Styles  *Styles
	Guard   *Guard
	NoColor bool
	// Settings for the optimizer (zero: defaults).
	Optimizer optimizer.Settings
}

// App is the root model. It owns the method, its undo and redo stacks, the
// simulation and the background work; it routes every message: global keys
// first, then the resize fan-out to every child, then the one overlay slot
// (the open dialog takes every key and draws over the lower pane), then the
// focused pane. Components send edits and requests through shared.send;
// the root's one apply makes an edit the method.
type App struct {
	sh   shared
	st   Styles
	keys GlobalKeys
	help help.Model

	path, name string
	saved      *methodfile.Method
	undo, redo []*methodfile.Method
	res        model.Result
	sysk       string      // systemKey of the method the tables were built for
	rob        robustState // the program under [goal.robust] (robust.go)
	guard      *Guard
	wrote      map[string]bool // files this session wrote or opened: replaced without asking
	files      fileWatch       // the file on disk and the recovery file (filesafety.go)
	// text is the method's text as loaded or last written (of the file
	// textOf; "" for the demo's own text): the base a save to another
	// file changes in place
	text   []byte
	textOf string

	width, height int
	ready         bool
	lower         int // the pane under the chart: peaks or settings

	program  *programPane
	chart    *chartPane
	peaks    *peaksPane
	settings *settingsPane
	overlay  component   // the open dialog, or nil
	pending  []component // dialogs waiting for the open one to close

	message string
	kind    msgKind

	optSettings optimizer.Settings
	plan        planState
	job         *job
	jobSeq      int // the last job's id
	// keys (and the end of input) that came while a save ran: handled,
	// in order, once it is done, so that ctrl+s q saves and then quits
	queued []tea.Msg
	// the keys came from a pipe or a file and it ended (InputEndedMsg)
	inputEnded, endedUnsaved bool

	view       cachedView
	rows       rowCount           // of the root's own lines, as last drawn
	cautionsOf *methodfile.Method // the method sh.cautions belong to
	quitQ      component          // the last quit question
	laid       [2]int             // the chart's and lower pane's heights as last laid out
}

type cachedView struct {
	title, method, summary, message, footer string
}

// New makes the App for a method.
func New(m *methodfile.Method, opt Options) (*App, error) {
	st := DefaultStyles(opt.NoColor)
	if opt.Styles != nil {
		st = *opt.Styles
	}
	a := &App{
		st: st, keys: DefaultGlobalKeys(), help: help.New(),
		path: opt.Path, name: opt.Name, saved: m, guard: opt.Guard,
		lower: panePeaks, optSettings: opt.Optimizer, wrote: map[string]bool{},
	}
	a.sh = shared{st: &a.st, method: m, res: &a.res, ovenMinGiven: givenInFile(opt.Path, "limits", "oven_min_c")}
	if a.name == "" {
		a.name = opt.Path
	}
	if opt.Path != "" {
		a.wrote[opt.Path] = true
	}
	a.text, a.textOf = opt.Text, opt.Path
	if a.text == nil && opt.Path != "" {
		if data, err := fsafe.ReadRegular(opt.Path, methodfile.MaxFileSize); err == nil {
			a.text = data
		}
	}
	if a.guard == nil {
		a.guard = NewGuard(opt.Path)
	}
	a.help.Styles.ShortKey = st.HelpKey
	a.help.Styles.ShortDesc = st.Help
	a.help.Styles.ShortSeparator = st.Help
	a.help.Styles.FullKey = st.HelpKey
	a.help.Styles.FullDesc = st.Help
	a.help.Styles.Ellipsis = st.Help
	if err := a.resimulate(); err != nil {
		return nil, err
	}
	a.program = newProgramPane(&a.sh)
	a.chart = newChartPane(&a.sh)
	a.peaks = newPeaksPane(&a.sh)
	a.settings = newSettingsPane(&a.sh)
	a.files.record(opt.Path)
	a.offerRecovery(opt.Path)
	a.guard.update(a.path, a.sh.method, false)
	return a, nil
}

// restoreMsg and discardRecoveryMsg answer the recovery offer.
type (
	restoreMsg         struct{ m *methodfile.Method }
	discardRecoveryMsg struct{}
)

// InputEndedMsg tells the UI that its keys came from a pipe or a file and
// that it has ended: the UI finishes as if the user quit, at once (a save
// under way is waited for). With unsaved changes, InputEnded says so and
// the caller writes the recovery file.
type InputEndedMsg struct{}

// InputEnded reports whether the UI ended at the end of its input, and
// whether changes were unsaved then.
func (a *App) InputEnded() (ended, unsaved bool) { return a.inputEnded, a.endedUnsaved }

// Init implements tea.Model.
func (a *App) Init() tea.Cmd { return nil }

// Method is the method as edited so far.
func (a *App) Method() *methodfile.Method { return a.sh.method }

// Result is the simulation of the current program.
func (a *App) Result() *model.Result { return &a.res }

// Dirty reports unsaved changes.
func (a *App) Dirty() bool { return !a.sh.method.Equal(a.saved) }

// Path is the file the method saves to.
func (a *App) Path() string { return a.path }

func (a *App) say(k msgKind, format string, args ...any) {
	a.kind = k
	a.message = fmt.Sprintf(format, args...)
	a.sh.status = a.message
}

// systemKey is everything the model's tables depend on.
func systemKey(m *methodfile.Method) string {
	return fmt.Sprintf("%v|%v|%v|%v %v %v|%v %v", m.Column, m.Carrier, m.Compounds, m.Limits.AmbientC, m.Limits.CooldownTauMin, m.Limits.EquilibrationMin,
		m.Limits.HasCoolant, m.Limits.CoolantC) // the oven's sink and the tables' low end (MODEL.md §12)
}

// resimulate rebuilds the tables when the column, carrier or compounds
// changed, then simulates the program.
func (a *App) resimulate() error {
	m := a.sh.method
	if k := systemKey(m); k != a.sysk || a.sh.sys == nil {
		sys, err := m.System()
		if err != nil {
			return err
		}
		a.sh.sys = sys
		a.sysk = k
	}
	if err := a.sh.sys.Simulate(m.ModelProgram(), &a.res); err != nil {
		return err
	}
	a.updateRobust()
	return nil
}

// apply makes m the method if it is valid: the previous one goes on the
// undo stack. An invalid m leaves everything as it was, with a message.
// It is the only place an edit becomes the method.
func (a *App) apply(m *methodfile.Method, what, key string) bool {
	var err error
	if key != "" {
		err = m.ValidateKey(key) // the edited key's rules only: Validate's answer for one edit
	} else {
		err = validate(m)
	}
	if err != nil {
		a.say(msgError, "%v (kept the last valid value)", inertErr(err))
		return false
	}
	prev, prevSys, prevKey := a.sh.method, a.sh.sys, a.sysk
	a.sh.method = m
	if err := a.resimulate(); err != nil {
		a.sh.method, a.sh.sys = prev, prevSys
		a.sysk = prevKey
		a.resimulate()
		a.say(msgError, "%s (kept the last valid value)", inertMsg(strings.TrimPrefix(err.Error(), "model: ")))
		return false
	}
	caution, more := a.newCaution(prev, prevSys)
	a.undo = append(a.undo, prev)
	if len(a.undo) > maxUndo {
		a.undo = append(a.undo[:0], a.undo[len(a.undo)-maxUndo:]...)
	}
	a.redo = nil
	a.say(msgInfo, "%s", what)
	if caution != "" {
		a.say(msgWarn, "%s · %s", what, inert(caution))
		if more > 0 {
			a.say(msgWarn, "%s · %s (and %d more: ! lists them)", what, inert(caution), more)
		}
	}
	if m.Carrier.Gas.Flammable() && !prev.Carrier.Gas.Flammable() {
		// the caution itself stands whole at the top of the settings (where
		// the gas is switched) and in the cautions list
		a.say(msgWarn, "%s · ⚠ hydrogen is flammable: see the caution above", what)
	}
	if m.Limits.HasCoolant && !prev.Limits.HasCoolant {
		a.cautions()
		a.open(newCautionsDialog(&a.sh)) // the cryogen cautions, in full
	} else if below(m) && !below(prev) {
		a.say(msgWarn, "%s · %s", what, checks.CoolantNote(m))
	}
	a.guard.update(a.path, a.sh.method, a.Dirty())
	return true
}

// below reports a start below ambient (a coolant is needed).
func below(m *methodfile.Method) bool {
	return m.Limits.HasCoolant && m.Oven.InitialC <= m.Limits.AmbientC
}

// restore makes m the method without touching the undo stacks (undo, redo
// and the recovery offer manage them).
func (a *App) restore(m *methodfile.Method) {
	a.sh.method = m
	if err := a.resimulate(); err != nil {
		a.say(msgError, "%v", inertErr(err))
	}
	a.guard.update(a.path, a.sh.method, a.Dirty())
}

// newCaution is the first caution (overload, detector zone, inlet
// pressure, late peak) that the change from prev brought in, and how many
// more it brought.
func (a *App) newCaution(prev *methodfile.Method, prevSys *model.System) (string, int) {
	now := checks.Warnings(a.sh.method, a.sh.sys, &a.res)
	if len(now) == 0 {
		return "", 0
	}
	var before []string
	if prevSys != nil {
		var r model.Result
		if prevSys.Simulate(prev.ModelProgram(), &r) == nil {
			before = checks.Warnings(prev, prevSys, &r)
		}
	}
	first, more := "", 0
	for _, w := range now {
		seen := false
		for _, b := range before {
			if b == w {
				seen = true
			}
		}
		switch {
		case seen:
		case first == "":
			first = w
		default:
			more++
		}
	}
	return first, more
}

// Update implements tea.Model.
func (a *App) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	var cmds []tea.Cmd
	a.handle(msg, &cmds)
	a.refresh()
	return a, tea.Batch(cmds...)
}

// handle routes one message and then everything the components sent.
func (a *App) handle(msg tea.Msg, cmds *[]tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok && km.Type == tea.KeyRunes && len(km.Runes) > 1 && !a.typing() {
		// keys that arrived in one read (+++ over a slow link): one by one
		for _, r := range km.Runes {
			a.handle(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}, Alt: km.Alt}, cmds)
		}
		return
	}
	*cmds = append(*cmds, a.route(msg))
	for len(a.sh.outbox) > 0 {
		next := a.sh.outbox[0]
		a.sh.outbox = a.sh.outbox[1:]
		*cmds = append(*cmds, a.intent(next))
	}
	if len(a.queued) > 0 && !a.saving() {
		// the save is done: the keys typed meanwhile, in order (one that
		// starts another save queues the rest again)
		q := a.queued
		a.queued = nil
		for _, m := range q {
			a.handle(m, cmds)
		}
	}
}

// tooSmall reports whether the terminal is below the size the UI draws in.
func (a *App) tooSmall() bool { return a.ready && (a.width < MinWidth || a.height < MinHeight) }

// saving reports whether a save runs in the background.
func (a *App) saving() bool { return a.job != nil && a.job.save }

// endOfInput finishes at the end of piped keys as quitting would: any work
// stops and the UI ends; unsaved changes are reported by InputEnded.
func (a *App) endOfInput() tea.Cmd {
	if a.job != nil {
		a.job.cancel()
		a.job = nil
	}
	a.overlay, a.pending = nil, nil
	a.inputEnded, a.endedUnsaved = true, a.Dirty()
	a.guard.update(a.path, a.sh.method, a.Dirty())
	return tea.Quit
}

// typing reports whether a text prompt has the keys (a paste stays whole).
func (a *App) typing() bool {
	_, ok := a.overlay.(*promptDialog)
	return ok
}

// route is the one place that decides who gets a message.
func (a *App) route(msg tea.Msg) tea.Cmd {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		a.width, a.height, a.ready = msg.Width, msg.Height, true
		a.layout()
		return nil
	case InputEndedMsg:
		if a.saving() {
			a.queued = append(a.queued, msg)
			return nil
		}
		return a.endOfInput()
	case tea.KeyMsg:
		if key.Matches(msg, a.keys.Interrupt) {
			return a.interrupt()
		}
		if a.saving() {
			// typed while the file is written: taken once it is done
			a.queued = append(a.queued, msg)
			return nil
		}
		if a.tooSmall() {
			// nothing is drawn but the request to enlarge: only q (and
			// the answer to its question) act, never the hidden dialog
			switch {
			case a.overlay != nil && a.overlay == a.quitQ:
				return a.toOverlay(msg)
			case key.Matches(msg, a.keys.Quit):
				return a.interrupt()
			}
			return nil
		}
		if a.overlay != nil {
			if key.Matches(msg, a.keys.Help) && a.dialogHelp() {
				return nil
			}
			return a.toOverlay(msg)
		}
		if cmd, ok := a.globalKey(msg); ok {
			return cmd
		}
		return a.toPane(a.sh.focus, msg)
	case progressWith:
		return a.onOptProgress(msg)
	case doneMsg:
		return a.onDone(msg)
	}
	if a.overlay != nil {
		return a.toOverlay(msg)
	}
	return nil
}

// dialogHelp opens the key list of the open dialog over it (? in a
// dialog); closing the list goes back to the dialog. A prompt takes ? as
// text, and the key list closes itself.
func (a *App) dialogHelp() bool {
	switch a.overlay.(type) {
	case *promptDialog, *helpDialog, *progressDialog:
		return false
	}
	d := a.overlay
	a.pending = append([]component{d}, a.pending...)
	a.overlay = newDialogHelp(&a.sh, &a.help, d, dialogName(d), a.keys)
	a.resizeFor(d)
	return true
}

func (a *App) toOverlay(msg tea.Msg) tea.Cmd {
	var cmd tea.Cmd
	a.overlay, cmd = a.overlay.Update(msg)
	return cmd
}

func (a *App) pane(p int) component {
	switch p {
	case paneProgram:
		return a.program
	case paneChart:
		return a.chart
	case panePeaks:
		return a.peaks
	}
	return a.settings
}

func (a *App) toPane(p int, msg tea.Msg) tea.Cmd {
	_, cmd := a.pane(p).Update(msg)
	return cmd
}

// globalKey handles the keys every pane shares.
func (a *App) globalKey(msg tea.KeyMsg) (tea.Cmd, bool) {
	k := a.keys
	switch {
	case key.Matches(msg, k.Quit):
		a.askQuit()
	case key.Matches(msg, k.Save):
		return a.startSave(a.path, false), true
	case key.Matches(msg, k.SaveAs):
		a.open(a.saveAsPrompt(false))
	case key.Matches(msg, k.Undo):
		if n := len(a.undo); n > 0 {
			a.redo = append(a.redo, a.sh.method)
			m := a.undo[n-1]
			a.undo = a.undo[:n-1]
			a.restore(m)
			a.say(msgInfo, "undone (%d more to undo)", len(a.undo))
		} else {
			a.say(msgInfo, "nothing to undo")
		}
	case key.Matches(msg, k.Redo):
		if n := len(a.redo); n > 0 {
			a.undo = append(a.undo, a.sh.method)
			m := a.redo[n-1]
			a.redo = a.redo[:n-1]
			a.restore(m)
			a.say(msgInfo, "redone")
		} else {
			a.say(msgInfo, "nothing to redo")
		}
	case key.Matches(msg, k.Optimize):
		return a.startOptimize(), true
	case key.Matches(msg, k.Focus):
		a.setFocus((a.sh.focus + 1) % paneCount)
	case key.Matches(msg, k.FocusBack):
		a.setFocus((a.sh.focus + paneCount - 1) % paneCount)
	case key.Matches(msg, k.Cautions):
		a.cautions()
		a.open(newCautionsDialog(&a.sh))
	case key.Matches(msg, k.Help):
		a.open(newHelpDialog(&a.sh, &a.help, a.pane(a.sh.focus), paneNames[a.sh.focus], a.keys))
	case key.Matches(msg, k.Export):
		return a.askExport(), true
	case key.Matches(msg, k.Fit):
		a.open(a.fitPrompt())
	case key.Matches(msg, k.Plan):
		return a.startPlan(), true
	case key.Matches(msg, k.Verify):
		a.open(newPrompt(&a.sh, "verification run (peak table, .cdf chromatogram or runs .toml): ", "", func(text string) tea.Msg { return startVerifyMsg{path: strings.TrimSpace(text)} }))
	case key.Matches(msg, k.Compare):
		m := a.sh.method
		p := newPrompt(&a.sh, "columns to compare: ",
			fmt.Sprintf("%g,%g", m.Column.LengthM/2, m.Column.LengthM), func(text string) tea.Msg { return startCompareMsg{text: text} })
		p.note = " lengths m, then diameters mm, then films µm: commas within a group, a space between the groups (15,30 0.25,0.32); a group left out keeps the method's"
		a.open(p)
	default:
		return nil, false
	}
	return nil, true
}

// fitPrompt asks for a scouting runs file (F).
func (a *App) fitPrompt() component {
	return newPrompt(&a.sh, "scouting runs file: ", "", func(text string) tea.Msg { return startFitMsg{path: strings.TrimSpace(text)} })
}

func (a *App) setFocus(p int) {
	a.sh.focus = p
	if p == panePeaks || p == paneSettings {
		a.lower = p
	}
}

// interrupt is ctrl+c: it stops any background work and asks like q when
// there are unsaved changes, whatever dialog is open.
func (a *App) interrupt() tea.Cmd {
	if a.job != nil {
		a.job.cancel()
		a.job = nil
	}
	a.queued = nil // keys typed before ctrl+c never answer its question
	was := a.overlay
	a.overlay, a.pending = nil, nil
	a.resizeFor(was)
	a.chart.Update(previewMsg{})
	if !a.Dirty() {
		return tea.Quit
	}
	a.askQuit()
	return nil
}

func (a *App) askQuit() {
	if !a.Dirty() {
		a.sh.send(quitMsg{})
		return
	}
	// no yes/no: "y" to "save them?" could be read either way
	a.quitQ = newConfirm(&a.sh, "unsaved changes", "s saves and quits · d discards the changes and quits · esc stays", []choice{
		{keys: []string{"s"}, label: "save and quit", msgs: []tea.Msg{saveMsg{quit: true}}},
		{keys: []string{"d"}, label: "discard the changes and quit", msgs: []tea.Msg{forgetMsg{}, quitMsg{}}},
		{keys: []string{"esc"}, label: "stay", msgs: []tea.Msg{sayMsg{msgInfo, "still here"}}},
	})
	a.open(a.quitQ)
	a.say(msgWarn, "unsaved changes: s save and quit · d discard and quit · esc stay")
}

// forgetMsg drops the guard's unsaved method (quitting without saving).
type forgetMsg struct{}

// intent handles one message a component sent.
func (a *App) intent(msg tea.Msg) tea.Cmd {
	switch msg := msg.(type) {
	case editMsg:
		a.apply(msg.m, msg.what, msg.key)
	case openMsg:
		a.open(msg.d)
	case closeMsg:
		a.closeOverlay()
	case sayMsg:
		a.say(msg.kind, "%s", msg.text)
	case quitMsg:
		return tea.Quit
	case forgetMsg:
		a.guard.update(a.path, a.sh.method, false)
	case previewMsg:
		a.chart.Update(msg)
	case restoreMsg:
		a.undo = append(a.undo, a.sh.method)
		a.restore(msg.m)
		// The recovery file stays until the method is saved.
		a.say(msgGood, "restored the unsaved changes (u undoes; the recovery file stays until you save); save with ctrl+s")
	case discardRecoveryMsg:
		os.Remove(a.files.recover)
		a.say(msgInfo, "discarded the recovery file")
	case fileIntent:
		return msg.apply(a)
	case saveMsg:
		return a.startSave(msg.path, msg.quit)
	case saveAsMsg:
		return a.saveAs(msg.path, msg.quit)
	case exportMsg:
		return a.startExport(msg.base)
	case startFitMsg:
		return a.startFit(msg.path)
	case startPlanMsg:
		return a.startPlan()
	case replanMsg:
		if a.plan.shown && a.job == nil {
			return a.startPlan()
		}
	case fitTakenMsg:
		if a.plan.prior == nil || msg.path != a.plan.runs {
			a.plan.prior = msg.prior
		}
		a.plan.runs = msg.path
	case askFitMsg:
		a.open(a.fitPrompt())
	case startVerifyMsg:
		return a.startVerify(msg.path)
	case measuredMsg:
		a.chart.Update(msg)
	case startCompareMsg:
		return a.startCompare(msg.text)
	case startSweepMsg:
		return a.startSweep(msg.spec)
	case cancelMsg:
		a.cancelJob()
	}
	return nil
}

// open puts d in the overlay slot. An open prompt or question keeps the
// slot (d waits its turn); help and a finished progress display give it up.
func (a *App) open(d component) {
	switch a.overlay.(type) {
	case *promptDialog, *confirmDialog:
		if _, isProgress := d.(*progressDialog); !isProgress {
			a.pending = append(a.pending, d)
			return
		}
	}
	was := a.overlay
	a.overlay = d
	if a.ready && wantsRows(d) {
		d.SetSize(a.width, a.height) // its width, for the rows it wants
	}
	a.resizeFor(was)
}

// resizeFor sizes the open dialog after was had the slot; when either
// takes rows from the chart, every child gets its size again.
func (a *App) resizeFor(was component) {
	if (was != nil && wantsRows(was)) || (a.overlay != nil && wantsRows(a.overlay)) {
		if a.ready {
			a.layout()
		}
		return
	}
	a.sizeOverlay()
}

func (a *App) closeOverlay() {
	was := a.overlay
	a.overlay = nil
	if len(a.pending) > 0 {
		a.overlay, a.pending = a.pending[0], a.pending[1:]
	}
	a.resizeFor(was)
	if _, ok := a.overlay.(*resultDialog); !ok {
		a.chart.Update(previewMsg{})
	}
}

// View implements tea.Model; it only joins strings computed in Update.
func (a *App) View() string {
	if !a.ready {
		return "rampwise: starting…"
	}
	if a.tooSmall() {
		s := fmt.Sprintf("rampwise needs a terminal of at least %d×%d; this one is %d×%d.\nEnlarge the window (q quits).", MinWidth, MinHeight, a.width, a.height)
		if a.overlay != nil && a.overlay == a.quitQ {
			s += "\nUnsaved changes: s save and quit · d discard and quit · esc stay."
		}
		// wrapped to the terminal: the terminal cuts what is wider
		var out []string
		for _, l := range strings.Split(s, "\n") {
			out = append(out, wrap(l, max(a.width, 20))...)
		}
		return strings.Join(out, "\n")
	}
	v := &a.view
	parts := []string{v.title, v.method, a.program.View()}
	tall := false
	if t, ok := a.overlay.(interface{ tall() bool }); ok && t.tall() {
		tall = true
	}
	switch {
	case tall:
		parts = append(parts, a.overlay.View())
	case a.overlay != nil:
		parts = append(parts, a.chart.View(), a.overlay.View())
	default:
		parts = append(parts, a.chart.View(), a.pane(a.lower).View())
	}
	parts = append(parts, v.summary)
	if v.message != "" || a.rows.message > 0 {
		parts = append(parts, v.message)
	}
	parts = append(parts, v.footer)
	return strings.Join(parts, "\n")
}

// The rows around the panes: the title, the method lines, the program
// lines, the summary, the status message (as many lines as it needs, none
// when there is none) and the footer. They wrap rather than cut; the chart
// keeps its height whatever the message, the lower pane takes the rest.
type rowCount struct{ title, method, program, summary, message int }

func (r rowCount) fixed() int { return r.title + r.method + r.program + r.summary + 1 }

// programRows is the program's rows: as many as its steps need, at least
// 2, at most 3 on a 24-row terminal and more on a taller one; steps
// beyond them are reached with ←/→, which the hints say.
func (a *App) programRows(w int) int {
	return min(a.program.rowsFor(w), max(3, (a.height-16)/4))
}

// maxMessageRows is the most the status message takes; a longer one ends
// with a pointer to the list of cautions, which shows it whole.
const maxMessageRows = 4

// minLowerRows is the least the lower pane keeps: its heading, the table
// head and one row.
const minLowerRows = 3

// heights are the chart's and the lower pane's (dialog's) rows.
// A dialog that needs more rows than the lower pane has (the optimizer's
// result, the fit review, the plan, the verification run on 80×24) takes
// them from the chart, which keeps its floor (rowsFloor, at least
// minChartRows); so do the settings when their safety text would leave
// too few setting rows.
func (a *App) heights() (chartH, lowerH int) {
	base := a.height - a.rows.fixed()
	chartH = chartRows(base)
	lowerH = max(minLowerRows, base-chartH-a.rows.message)
	want, floor := a.wanted()
	if give := min(want-lowerH, chartH-floor); want > 0 && give > 0 {
		chartH, lowerH = chartH-give, lowerH+give
	}
	return chartH, lowerH
}

// wanted is the rows the open dialog (or, with none, the settings) would
// like below the chart, and the least the chart keeps for them; 0 rows
// when they want none beyond their share.
func (a *App) wanted() (want, floor int) {
	if a.overlay != nil {
		w, ok := a.overlay.(interface{ wantRows() int })
		if !ok {
			return 0, minChartRows
		}
		floor = minChartRows
		if f, ok := a.overlay.(interface{ chartFloor() int }); ok {
			floor = f.chartFloor()
		}
		return w.wantRows(), floor
	}
	if a.lower == paneSettings {
		return a.settings.wantRows(a.width), minPaneChartRows
	}
	return 0, minChartRows
}

// minChartRows is the least the chart keeps when a dialog needs its rows:
// its heading, three rows of plot and the time axis.
const minChartRows = 5

// minDialogChartRows is the least the chart keeps for a dialog that
// lists many rows (the plan, the verification run): its heading, two rows
// of plot and the time axis.
const minDialogChartRows = 4

// minPaneChartRows is the least the chart keeps for the settings when
// their safety text needs the rows.
const minPaneChartRows = 4

// wantsRows reports whether d takes rows from the chart when it needs them.
func wantsRows(d component) bool {
	_, ok := d.(interface{ wantRows() int })
	return ok
}

// chartRows is the chart's share of the base rows left by the fixed ones.
func chartRows(base int) int {
	h := base * 11 / 20
	if base < 20 {
		h-- // a small terminal: the row goes to the peak table
	}
	// the lower pane keeps its rows even when the lines above wrap a lot
	return max(3, min(max(7, h), base-minLowerRows))
}

// layoutKey is what the children's sizes depend on beyond the root's
// rows: the chart's and the lower pane's heights (the settings' safety
// text, a pane switch and an open dialog change them).
func (a *App) layoutKey() [2]int {
	c, l := a.heights()
	return [2]int{c, l}
}

// layout gives every child its size (the resize fan-out).
func (a *App) layout() {
	a.help.Width = a.width
	if a.width < MinWidth || a.height < MinHeight {
		return
	}
	a.measure()
	chartH, lowerH := a.heights()
	a.laid = a.layoutKey()
	a.program.SetSize(a.width, a.rows.program)
	a.chart.SetSize(a.width, chartH)
	a.peaks.SetSize(a.width, lowerH)
	a.settings.SetSize(a.width, lowerH)
	for _, d := range a.pending {
		a.sizeDialog(d)
	}
	a.sizeOverlay()
}

func (a *App) sizeOverlay() {
	if a.overlay != nil {
		a.sizeDialog(a.overlay)
	}
}

func (a *App) sizeDialog(d component) {
	if !a.ready || a.width < MinWidth || a.height < MinHeight {
		return
	}
	chartH, h := a.heights()
	if t, ok := d.(interface{ tall() bool }); ok && t.tall() {
		h += chartH
	}
	d.SetSize(a.width, h)
}

// measure renders the root's own lines and counts them; it reports
// whether the count changed (the panes then need new sizes).
func (a *App) measure() bool {
	w := a.width
	v := &a.view
	title, method, summary := a.titleLines(w), a.methodLines(w), a.summaryLines(w)
	was := a.rows
	a.rows = rowCount{title: len(title), method: len(method), program: a.programRows(w), summary: len(summary)}
	base := a.height - a.rows.fixed()
	chartH := chartRows(base)
	n := max(0, min(maxMessageRows, base-chartH-minLowerRows))
	if want, floor := a.wanted(); want > 0 {
		// what needs the rows below the chart (the settings' safety text
		// and setting rows, a dialog's list) comes before the message's
		// later lines; the first stays (! shows it all)
		n = min(n, max(1, base-floor-want))
	}
	if _, ok := a.overlay.(*cautionsDialog); ok {
		n = 0 // the list shows the message whole
	}
	msg := a.messageLines(w, n)
	a.rows.message = len(msg)
	a.sh.status = a.message
	v.title = strings.Join(title, "\n")
	v.method = strings.Join(method, "\n")
	v.summary = strings.Join(summary, "\n")
	v.message = strings.Join(msg, "\n")
	v.footer = a.footerLine(w)
	return a.rows != was
}

// refresh tells every child that the state may have changed, then
// recomputes the root's own lines.
func (a *App) refresh() {
	if !a.ready || a.width < MinWidth || a.height < MinHeight {
		return
	}
	if a.measure() || a.laid != a.layoutKey() {
		a.layout()
	}
	for p := 0; p < paneCount; p++ {
		a.toPane(p, refreshMsg{})
	}
	if a.overlay != nil {
		a.overlay, _ = a.overlay.Update(refreshMsg{})
	}
	a.view.footer = a.footerLine(a.width)
}

// footerLine is the active component's short key help, "? all keys" first
// so that it is never cut off.
func (a *App) footerLine(w int) string {
	var b []key.Binding
	if a.overlay != nil {
		b = a.overlay.ShortHelp()
		switch a.overlay.(type) {
		case *promptDialog, *helpDialog, *progressDialog:
		default:
			b = append([]key.Binding{bind([]string{"?"}, "?", "keys")}, b...)
		}
	} else {
		b = append([]key.Binding{a.keys.Help}, a.pane(a.sh.focus).ShortHelp()...)
		b = append(b, a.keys.ShortHelp()...)
	}
	// as many whole items as fit ("? all keys" first lists the rest)
	hm := a.help
	hm.Width = 0
	line := ""
	for i := range b {
		next := hm.ShortHelpView(b[:i+1])
		if ansi.StringWidth(next) > w {
			break
		}
		line = next
	}
	return line
}

// cancelMsg asks the root to stop the background work.
type cancelMsg struct{}

// job is background work (optimize, fit, sweep, compare, export, save).
type job struct {
	id     int
	what   string
	save   bool // a save: keys typed meanwhile wait for it
	cancel context.CancelFunc
	ch     chan tea.Msg // optimizer progress, or nil
}
