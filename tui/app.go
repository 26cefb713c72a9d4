package tui

import (
	"context"
	"fmt"
	"math"
	"os"
	"reflect"
	"strings"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textinput"
	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/checks"
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

type inputMode int

const (
	inputNone inputMode = iota
	inputValue
	inputSaveAs
	inputCompound
	inputRuns
	inputCompare
)

type confirmMode int

const (
	confirmNone confirmMode = iota
	confirmQuit
	confirmRestore
)

type msgKind int

const (
	msgInfo msgKind = iota
	msgWarn
	msgError
	msgGood
)

// Options configure a new App.
type Options struct {
	Path    string // the method's file; "" for the built-in demo
	Name    string // how to name it on screen
	Styles  *Styles
	Guard   *Guard
	NoColor bool
	// Settings for the optimizer (zero: defaults).
	Optimizer optimizer.Settings
}

// App is the root model: the method and everything the panes share.
type App struct {
	st    Styles
	keys  GlobalKeys
	pkeys FieldKeys
	skeys FieldKeys
	ckeys ChartKeys
	tkeys PeakKeys
	help  help.Model

	path, name string
	method     *methodfile.Method
	saved      *methodfile.Method
	undo, redo []*methodfile.Method
	sys        *model.System
	sysKey     string
	res        model.Result
	simErr     error
	guard      *Guard

	width, height int
	ready         bool
	focus, lower  int
	progSel       int
	setSel        int
	peakSel       int
	peakCol       int // 0 ΔH, 1 ΔS
	zoom, center  float64

	message string
	kind    msgKind
	input   textinput.Model
	inMode  inputMode
	confirm confirmMode
	recover *methodfile.Method
	full    bool // full help shown

	optSettings optimizer.Settings
	opt         *optRun
	sweepView   *sweepView
	newCaution  string
	fit         *calibrate.Report
	cmp         *compareRun

	chart chart
	view  cachedView
}

// optRun is the optimizer running in the background, or its outcome.
type optRun struct {
	id      int
	cancel  context.CancelFunc
	ch      chan tea.Msg
	running bool
	last    optimizer.Progress
	preview model.Result
	hasPrev bool
	result  *optimizer.Result
	err     error
	after   *methodfile.Method
	afterR  model.Result
}

type cachedView struct {
	title, method, program, summary, message, help string
	chart, lower                                   []string
}

type optProgressMsg struct {
	id int
	p  optimizer.Progress
}

type optDoneMsg struct {
	id  int
	res *optimizer.Result
	err error
}

// New makes the App for a method.
func New(m *methodfile.Method, opt Options) (*App, error) {
	st := DefaultStyles(opt.NoColor)
	if opt.Styles != nil {
		st = *opt.Styles
	}
	a := &App{
		st: st, keys: DefaultGlobalKeys(), pkeys: DefaultProgramKeys(), skeys: DefaultSettingsKeys(),
		ckeys: DefaultChartKeys(), tkeys: DefaultPeakKeys(), help: help.New(),
		path: opt.Path, name: opt.Name, method: m, saved: m, guard: opt.Guard,
		lower: panePeaks, zoom: 1, optSettings: opt.Optimizer,
	}
	if a.name == "" {
		a.name = opt.Path
	}
	if a.guard == nil {
		a.guard = NewGuard(opt.Path)
	}
	a.help.Styles.ShortKey = st.Help
	a.help.Styles.ShortDesc = st.Help
	a.input = textinput.New()
	a.input.CharLimit = 200
	if err := a.resimulate(); err != nil {
		return nil, err
	}
	if rm, rp, ok := recoveryAvailable(opt.Path); ok {
		a.recover = rm
		a.confirm = confirmRestore
		a.say(msgWarn, "unsaved changes from an earlier session are in %s: r restore them · d discard the file · esc keep it and go on", rp)
	}
	a.guard.update(a.path, a.method, false)
	return a, nil
}

// Init implements tea.Model.
func (a *App) Init() tea.Cmd { return nil }

// Method is the method as edited so far.
func (a *App) Method() *methodfile.Method { return a.method }

// Result is the simulation of the current program.
func (a *App) Result() *model.Result { return &a.res }

// Dirty reports unsaved changes.
func (a *App) Dirty() bool { return !reflect.DeepEqual(a.method, a.saved) }

// Path is the file the method saves to.
func (a *App) Path() string { return a.path }

func (a *App) say(k msgKind, format string, args ...any) {
	a.kind = k
	a.message = fmt.Sprintf(format, args...)
}

// systemKey is everything the model's tables depend on.
func systemKey(m *methodfile.Method) string {
	return fmt.Sprintf("%v|%v|%v|%v %v %v", m.Column, m.Carrier, m.Compounds, m.Limits.AmbientC, m.Limits.CooldownTauMin, m.Limits.EquilibrationMin)
}

// resimulate rebuilds the tables when the column, carrier or compounds
// changed, then simulates the program.
func (a *App) resimulate() error {
	if k := systemKey(a.method); k != a.sysKey || a.sys == nil {
		sys, err := a.method.System()
		if err != nil {
			return err
		}
		a.sys, a.sysKey = sys, k
	}
	return a.sys.Simulate(a.method.ModelProgram(), &a.res)
}

// apply makes m the method if it is valid: the previous one goes on the
// undo stack. An invalid m leaves everything as it was, with a message.
func (a *App) apply(m *methodfile.Method, what string) bool {
	if err := validate(m); err != nil {
		a.say(msgError, "%v (kept the last valid value)", err)
		return false
	}
	prev, prevSys, prevKey := a.method, a.sys, a.sysKey
	a.method = m
	if err := a.resimulate(); err != nil {
		a.method, a.sys, a.sysKey = prev, prevSys, prevKey
		a.resimulate()
		a.say(msgError, "%s (kept the last valid value)", strings.TrimPrefix(err.Error(), "model: "))
		return false
	}
	a.cautions(prev, prevSys)
	a.undo = append(a.undo, prev)
	if len(a.undo) > maxUndo {
		a.undo = append(a.undo[:0], a.undo[len(a.undo)-maxUndo:]...)
	}
	a.redo = nil
	a.say(msgInfo, "%s", what)
	if c := a.newCaution; c != "" {
		a.say(msgWarn, "%s · %s", what, c)
	}
	if m.Carrier.Gas == "hydrogen" && prev.Carrier.Gas != "hydrogen" {
		a.say(msgWarn, "%s", model.HydrogenCaution)
	}
	a.guard.update(a.path, a.method, a.Dirty())
	return true
}

func (a *App) restore(m *methodfile.Method) {
	a.method = m
	if err := a.resimulate(); err != nil {
		a.say(msgError, "%v", err)
	}
	if n := len(programFields(a.method)); a.progSel >= n {
		a.progSel = n - 1
	}
	a.guard.update(a.path, a.method, a.Dirty())
}

// cautions notes the first caution (overload, detector zone, inlet
// pressure, late peak) that the change from prev brought in.
func (a *App) cautions(prev *methodfile.Method, prevSys *model.System) {
	a.newCaution = ""
	now := checks.Warnings(a.method, a.sys, &a.res)
	if len(now) == 0 {
		return
	}
	var before []string
	if prevSys != nil {
		var r model.Result
		if prevSys.Simulate(prev.ModelProgram(), &r) == nil {
			before = checks.Warnings(prev, prevSys, &r)
		}
	}
	for _, w := range now {
		seen := false
		for _, b := range before {
			if b == w {
				seen = true
			}
		}
		if !seen {
			a.newCaution = w
			return
		}
	}
}

// Update implements tea.Model: global keys first, then the resize fan-out,
// then the message to the focused pane.
func (a *App) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	var cmd tea.Cmd
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		a.width, a.height, a.ready = msg.Width, msg.Height, true
		a.help.Width = msg.Width
	case optProgressMsg:
		cmd = a.onProgress(msg)
	case optDoneMsg:
		a.onDone(msg)
	case compareDoneMsg:
		if a.cmp != nil {
			a.cmp.running = false
			a.cmp.out = msg.out
			a.say(msgGood, "ranked %d columns: enter switches the method to the chosen one", len(msg.out))
		}
	case tea.KeyMsg:
		cmd = a.onKey(msg)
	}
	a.clampSelections()
	a.refresh()
	return a, cmd
}

// clampSelections keeps every selection inside its list after the method
// changed shape (ramps removed, a pressure mode switched, compounds added).
func (a *App) clampSelections() {
	clamp := func(v *int, n int) {
		if *v >= n {
			*v = n - 1
		}
		if *v < 0 {
			*v = 0
		}
	}
	clamp(&a.progSel, len(programFields(a.method)))
	clamp(&a.setSel, len(settingsFields(a.method)))
	clamp(&a.peakSel, len(a.res.Peaks))
}

func (a *App) onKey(msg tea.KeyMsg) tea.Cmd {
	if a.inMode != inputNone {
		return a.onInput(msg)
	}
	if a.confirm != confirmNone {
		return a.onConfirm(msg)
	}
	if a.opt != nil && a.opt.running {
		if key.Matches(msg, a.keys.Cancel) {
			a.opt.cancel()
			a.say(msgInfo, "stopping the optimizer; the best program so far will be offered")
			return nil
		}
		if key.Matches(msg, a.keys.Quit) && msg.String() == "ctrl+c" {
			a.opt.cancel()
			return tea.Quit
		}
		if a.focus == paneChart {
			a.chartKey(msg)
			return nil
		}
		a.say(msgInfo, "optimizing: esc stops and keeps the best program so far")
		return nil
	}
	if a.opt != nil && a.opt.result != nil {
		return a.onCompare(msg)
	}
	if a.fit != nil {
		a.onFitDecision(msg)
		return nil
	}
	if a.cmp != nil {
		a.onCompareRankKey(msg)
		return nil
	}
	switch {
	case key.Matches(msg, a.keys.Quit):
		if a.Dirty() {
			a.confirm = confirmQuit
			a.say(msgWarn, "unsaved changes: s save and quit · y quit without saving · esc stay")
			return nil
		}
		return tea.Quit
	case key.Matches(msg, a.keys.Save):
		return a.save("")
	case key.Matches(msg, a.keys.SaveAs):
		a.startInput(inputSaveAs, "save as: ", a.path)
		return nil
	case key.Matches(msg, a.keys.Undo):
		if n := len(a.undo); n > 0 {
			a.redo = append(a.redo, a.method)
			m := a.undo[n-1]
			a.undo = a.undo[:n-1]
			a.restore(m)
			a.say(msgInfo, "undone (%d more to undo)", len(a.undo))
		} else {
			a.say(msgInfo, "nothing to undo")
		}
		return nil
	case key.Matches(msg, a.keys.Redo):
		if n := len(a.redo); n > 0 {
			a.undo = append(a.undo, a.method)
			m := a.redo[n-1]
			a.redo = a.redo[:n-1]
			a.restore(m)
			a.say(msgInfo, "redone")
		} else {
			a.say(msgInfo, "nothing to redo")
		}
		return nil
	case key.Matches(msg, a.keys.Optimize):
		return a.startOptimize()
	case key.Matches(msg, a.keys.Focus):
		a.setFocus((a.focus + 1) % paneCount)
		return nil
	case key.Matches(msg, a.keys.FocusBack):
		a.setFocus((a.focus + paneCount - 1) % paneCount)
		return nil
	case key.Matches(msg, a.keys.Help):
		a.full = !a.full
		return nil
	case key.Matches(msg, a.keys.Cancel):
		a.full = false
		a.sweepView = nil
		a.message = ""
		return nil
	case key.Matches(msg, a.keys.Export):
		a.export()
		return nil
	case key.Matches(msg, a.keys.Fit):
		a.startInput(inputRuns, "scouting runs file: ", "")
		return nil
	case key.Matches(msg, a.keys.Compare):
		a.startInput(inputCompare, "columns to compare (lengths m, diameters mm, films µm): ", fmt.Sprintf("%g,%g", a.method.Column.LengthM/2, a.method.Column.LengthM))
		return nil
	}
	switch a.focus {
	case paneProgram:
		a.programKey(msg)
	case paneChart:
		a.chartKey(msg)
	case panePeaks:
		a.peaksKey(msg)
	case paneSettings:
		a.settingsKey(msg)
	}
	return nil
}

func (a *App) setFocus(p int) {
	a.focus = p
	if p == panePeaks || p == paneSettings {
		a.lower = p
	}
}

func (a *App) startInput(mode inputMode, prompt, value string) {
	a.inMode = mode
	a.input.Prompt = prompt
	a.input.SetValue(value)
	a.input.CursorEnd()
	a.input.Focus()
}

func (a *App) onInput(msg tea.KeyMsg) tea.Cmd {
	switch msg.String() {
	case "esc":
		a.inMode = inputNone
		a.input.Blur()
		a.say(msgInfo, "not changed")
		return nil
	case "enter":
		mode := a.inMode
		text := a.input.Value()
		a.inMode = inputNone
		a.input.Blur()
		switch mode {
		case inputValue:
			a.typeValue(text)
		case inputCompound:
			a.typeCompound(text)
		case inputRuns:
			a.runFit(strings.TrimSpace(text))
		case inputCompare:
			return a.startCompare(text)
		case inputSaveAs:
			if strings.TrimSpace(text) == "" {
				a.say(msgError, "no file name given; not saved")
				return nil
			}
			return a.save(strings.TrimSpace(text))
		}
		return nil
	}
	var cmd tea.Cmd
	a.input, cmd = a.input.Update(msg)
	return cmd
}

func (a *App) onConfirm(msg tea.KeyMsg) tea.Cmd {
	mode := a.confirm
	switch mode {
	case confirmQuit:
		switch msg.String() {
		case "y":
			a.confirm = confirmNone
			a.guard.update(a.path, a.method, false)
			return tea.Quit
		case "s":
			a.confirm = confirmNone
			if a.path == "" {
				a.startInput(inputSaveAs, "save as (then quit with q): ", "")
				return nil
			}
			if a.saveTo(a.path) {
				return tea.Quit
			}
			return nil
		case "esc", "n":
			a.confirm = confirmNone
			a.say(msgInfo, "still here")
		}
	case confirmRestore:
		switch msg.String() {
		case "r":
			a.confirm = confirmNone
			a.undo = append(a.undo, a.method)
			a.restore(a.recover)
			a.say(msgGood, "restored the unsaved changes (u undoes); save with ctrl+s")
			os.Remove(RecoveryPath(a.path))
		case "d":
			a.confirm = confirmNone
			os.Remove(RecoveryPath(a.path))
			a.say(msgInfo, "discarded the recovery file")
		case "esc":
			a.confirm = confirmNone
			a.say(msgInfo, "kept the recovery file %s", RecoveryPath(a.path))
		}
	}
	return nil
}

// save writes the method to path (or the current path).
func (a *App) save(path string) tea.Cmd {
	if path == "" {
		path = a.path
	}
	if path == "" {
		a.startInput(inputSaveAs, "save as: ", "")
		return nil
	}
	a.saveTo(path)
	return nil
}

func (a *App) saveTo(path string) bool {
	if err := methodfile.WriteFile(path, a.method); err != nil {
		a.say(msgError, "not saved: %v", err)
		return false
	}
	a.path = path
	a.name = path
	a.saved = a.method
	a.guard.update(a.path, a.method, false)
	a.say(msgGood, "saved to %s", path)
	return true
}

// --- program pane ---

func (a *App) programKey(msg tea.KeyMsg) {
	fs := programFields(a.method)
	k := a.pkeys
	if a.fieldKey(fs, &a.progSel, msg, k) {
		return
	}
	switch {
	case key.Matches(msg, k.AddRamp):
		a.addRamp()
	case key.Matches(msg, k.DelRamp):
		a.removeRamp()
	case key.Matches(msg, k.Sweep):
		a.openSweep(fs[a.progSel])
	}
}

// fieldKey handles the keys a list of fields shares (choose, step, type)
// and reports whether msg was one of them.
func (a *App) fieldKey(fs []field, sel *int, msg tea.KeyMsg, k FieldKeys) bool {
	switch {
	case key.Matches(msg, k.Prev):
		*sel = (*sel + len(fs) - 1) % len(fs)
	case key.Matches(msg, k.Next):
		*sel = (*sel + 1) % len(fs)
	case isStep(msg, k):
		a.step(fs[*sel], msg, k)
	case key.Matches(msg, k.Type):
		f := fs[*sel]
		a.startInput(inputValue, fmt.Sprintf("%s (%s): ", f.key, f.unit), f.text(a.method))
	default:
		return false
	}
	return true
}

func isStep(msg tea.KeyMsg, k FieldKeys) bool {
	return key.Matches(msg, k.Up) || key.Matches(msg, k.Down) || key.Matches(msg, k.BigUp) || key.Matches(msg, k.BigDown)
}

// step moves field f by one step (or a big one), down for the Down keys.
func (a *App) step(f field, msg tea.KeyMsg, k FieldKeys) {
	n := 1.0
	if key.Matches(msg, k.Down) || key.Matches(msg, k.BigDown) {
		n = -1
	}
	big := key.Matches(msg, k.BigUp) || key.Matches(msg, k.BigDown)
	m := f.stepped(a.method, n, big)
	if f.key == "carrier.mode" {
		fillPressureOrFlow(m, a.sys)
	}
	a.apply(m, fmt.Sprintf("%s = %s %s", f.key, f.text(m), f.unit))
}

func (a *App) addRamp() {
	m := a.method.Clone()
	if len(m.Oven.Ramps) >= 5 {
		a.say(msgError, "five ramps at most")
		return
	}
	prev := m.Oven.InitialC
	rate := 10.0
	if n := len(m.Oven.Ramps); n > 0 {
		prev = m.Oven.Ramps[n-1].FinalC
		rate = m.Oven.Ramps[n-1].RateCMin
	}
	final := math.Min(m.Column.MaxTempC, prev+20)
	if final <= prev {
		a.say(msgError, "the program is already at the column maximum %s °C; no room for another ramp", trimNum(m.Column.MaxTempC))
		return
	}
	m.Oven.Ramps = append(m.Oven.Ramps, methodfile.Ramp{RateCMin: rate, FinalC: final})
	if a.apply(m, fmt.Sprintf("added ramp %d", len(m.Oven.Ramps))) {
		a.progSel = len(programFields(m)) - 2
	}
}

func (a *App) removeRamp() {
	fs := programFields(a.method)
	r := fs[a.progSel].ramp
	if r == 0 {
		r = len(a.method.Oven.Ramps)
	}
	if r == 0 {
		a.say(msgError, "no ramp to remove")
		return
	}
	m := a.method.Clone()
	m.Oven.Ramps = append(m.Oven.Ramps[:r-1], m.Oven.Ramps[r:]...)
	if len(m.Oven.Ramps) == 0 && m.Oven.InitialHoldMin == 0 {
		m.Oven.InitialHoldMin = 10
	}
	if a.apply(m, fmt.Sprintf("removed ramp %d", r)) {
		if n := len(programFields(m)); a.progSel >= n {
			a.progSel = n - 1
		}
	}
}

func (a *App) typeValue(text string) {
	var f field
	if a.focus == paneSettings {
		f = settingsFields(a.method)[a.setSel]
	} else {
		f = programFields(a.method)[a.progSel]
	}
	m, err := f.typed(a.method, text)
	if err != nil {
		a.say(msgError, "%v (kept the last valid value)", err)
		return
	}
	a.apply(m, fmt.Sprintf("%s = %s %s", f.key, f.text(m), f.unit))
}

// --- chart pane ---

func (a *App) fullWindow() (float64, float64) {
	end := a.res.RunTime
	for _, pk := range a.res.Peaks {
		if pk.Eluted && pk.RetentionTime+4*pk.Sigma > end {
			end = pk.RetentionTime + 4*pk.Sigma
		}
	}
	return 0, end
}

func (a *App) window() (float64, float64) {
	t0, t1 := a.fullWindow()
	if a.zoom <= 1 {
		return t0, t1
	}
	w := (t1 - t0) / a.zoom
	c := a.center
	lo := math.Max(t0, math.Min(t1-w, c-w/2))
	return lo, lo + w
}

func (a *App) chartKey(msg tea.KeyMsg) {
	k := a.ckeys
	t0, t1 := a.window()
	if a.zoom <= 1 {
		a.center = (t0 + t1) / 2
	}
	switch {
	case key.Matches(msg, k.ZoomIn):
		a.zoom = math.Min(a.zoom*1.5, 200)
		a.center = (t0 + t1) / 2
	case key.Matches(msg, k.ZoomOut):
		a.zoom = math.Max(1, a.zoom/1.5)
		a.center = (t0 + t1) / 2
	case key.Matches(msg, k.Left):
		a.center = (t0+t1)/2 - (t1-t0)*0.2
	case key.Matches(msg, k.Right):
		a.center = (t0+t1)/2 + (t1-t0)*0.2
	case key.Matches(msg, k.Reset):
		a.zoom = 1
	}
}

// --- peaks pane ---

func (a *App) peaksKey(msg tea.KeyMsg) {
	k := a.tkeys
	n := len(a.res.Peaks)
	switch {
	case key.Matches(msg, k.Up):
		a.peakSel = (a.peakSel + n - 1) % n
	case key.Matches(msg, k.Down):
		a.peakSel = (a.peakSel + 1) % n
	case key.Matches(msg, k.Column), key.Matches(msg, k.ColumnBack):
		a.peakCol = 1 - a.peakCol
	case key.Matches(msg, k.Toggle):
		ci := a.res.Peaks[a.peakSel].Compound
		m := a.method.Clone()
		m.Compounds[ci].Target = !m.Compounds[ci].Target
		state := "no longer a target"
		if m.Compounds[ci].Target {
			state = "a target"
		}
		a.apply(m, fmt.Sprintf("%s is %s", m.Compounds[ci].Name, state))
	case key.Matches(msg, k.Type):
		ci := a.res.Peaks[a.peakSel].Compound
		c := a.method.Compounds[ci]
		if a.peakCol == 0 {
			a.startInput(inputCompound, fmt.Sprintf("%s ΔH (kJ/mol): ", c.Name), trimNum(c.DHkJ))
		} else {
			a.startInput(inputCompound, fmt.Sprintf("%s ΔS (J/(mol·K)): ", c.Name), trimNum(c.DS))
		}
	}
}

func (a *App) typeCompound(text string) {
	ci := a.res.Peaks[a.peakSel].Compound
	var v float64
	if _, err := fmt.Sscanf(strings.TrimSpace(text), "%g", &v); err != nil {
		a.say(msgError, "%q is not a number (kept the last valid value)", text)
		return
	}
	m := a.method.Clone()
	c := &m.Compounds[ci]
	what := "ΔH"
	if a.peakCol == 0 {
		c.DHkJ = v
	} else {
		c.DS = v
		what = "ΔS"
	}
	c.FromIndex = false
	a.apply(m, fmt.Sprintf("%s %s = %g", c.Name, what, v))
}

// --- settings pane ---

func (a *App) settingsKey(msg tea.KeyMsg) {
	a.fieldKey(settingsFields(a.method), &a.setSel, msg, a.skeys)
	if n := len(settingsFields(a.method)); a.setSel >= n {
		a.setSel = n - 1
	}
}

// fillPressureOrFlow gives a method switched between constant flow and
// constant pressure the value the other mode needs, from the current
// conditions at the initial temperature.
func fillPressureOrFlow(m *methodfile.Method, sys *model.System) {
	t0 := m.Oven.InitialC + model.ZeroCelsius
	if m.Carrier.Mode == "constant-pressure" && m.Carrier.InletKPa <= 0 {
		m.Carrier.InletKPa = math.Round(sys.Cond.InletGauge(t0)/100) / 10
	}
	if m.Carrier.Mode == "constant-flow" && m.Carrier.FlowMLMin <= 0 {
		m.Carrier.FlowMLMin = 1.0
	}
}

// --- optimizer ---

func (a *App) startOptimize() tea.Cmd {
	prob := optimizer.FromMethod(a.method, a.sys)
	ctx, cancel := context.WithCancel(context.Background())
	id := 1
	if a.opt != nil {
		id = a.opt.id + 1
	}
	run := &optRun{id: id, cancel: cancel, ch: make(chan tea.Msg, 4), running: true}
	a.opt = run
	settings := a.optSettings
	settings.Progress = func(p optimizer.Progress) {
		select {
		case run.ch <- optProgressMsg{id: id, p: p}:
		default: // the UI is behind: drop this report, a newer one follows
		}
	}
	go func() {
		res, err := optimizer.Optimize(ctx, prob, settings)
		run.ch <- optDoneMsg{id: id, res: res, err: err}
	}()
	a.say(msgInfo, "optimizing… esc stops and keeps the best so far")
	return waitFor(run.ch)
}

func waitFor(ch chan tea.Msg) tea.Cmd {
	return func() tea.Msg { return <-ch }
}

func (a *App) onProgress(msg optProgressMsg) tea.Cmd {
	if a.opt == nil || msg.id != a.opt.id {
		return nil
	}
	a.opt.last = msg.p
	if err := a.sys.Simulate(msg.p.Program, &a.opt.preview); err == nil {
		a.opt.hasPrev = true
	}
	return waitFor(a.opt.ch)
}

func (a *App) onDone(msg optDoneMsg) {
	if a.opt == nil || msg.id != a.opt.id {
		return
	}
	o := a.opt
	o.running = false
	o.cancel()
	if msg.err != nil {
		a.say(msgError, "optimizer: %v", msg.err)
		a.opt = nil
		return
	}
	o.result = msg.res
	if msg.res.Canceled && !msg.res.Offer {
		// an early stop offers only a better program that meets the target
		a.say(msgInfo, "%s; kept the current program", msg.res.Explanation)
		a.opt = nil
		return
	}
	o.after, o.afterR = optimizer.Apply(a.method, msg.res), msg.res.Sim
	if msg.res.Feasible() {
		a.say(msgGood, "target met: enter or y takes the new program, n or esc keeps the old one")
	} else {
		a.say(msgWarn, "target not met: %s. y takes the best program anyway, n keeps the old one", msg.res.Explanation)
	}
}

func (a *App) onCompare(msg tea.KeyMsg) tea.Cmd {
	switch msg.String() {
	case "y", "enter":
		after := a.opt.after
		a.opt = nil
		a.apply(after, "took the optimized program (u undoes)")
	case "n", "esc":
		a.opt = nil
		a.say(msgInfo, "kept the old program")
	case "q", "ctrl+c":
		a.opt = nil
		return a.onKey(msg)
	}
	return nil
}

// View implements tea.Model; it only joins strings computed in Update.
func (a *App) View() string {
	if !a.ready {
		return "rampwise: starting…"
	}
	if a.width < MinWidth || a.height < MinHeight {
		return fmt.Sprintf("rampwise needs a terminal of at least %d×%d; this one is %d×%d.\nEnlarge the window (q quits).", MinWidth, MinHeight, a.width, a.height)
	}
	v := &a.view
	parts := []string{v.title, v.method, v.program}
	parts = append(parts, v.chart...)
	parts = append(parts, v.lower...)
	parts = append(parts, v.summary, v.message, v.help)
	return strings.Join(parts, "\n")
}
