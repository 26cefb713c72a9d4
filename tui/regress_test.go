package tui

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// Regression tests, one per problem users met with the earlier UI.

func fastOptimizer(a *App) {
	a.optSettings = optimizer.Settings{Workers: 1}
}

// A result that arrives while the key list is open takes the slot; the
// key list never covers it, and esc then only closes the result.
func TestResultReplacesHelp(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "?")
	if _, ok := a.overlay.(*helpDialog); !ok {
		t.Fatal("? did not open the key list")
	}
	m := a.Method().Clone()
	d := newResultDialog(&a.sh, &optimizer.Result{Status: optimizer.Met}, m, a.res)
	a.open(d)
	a.chart.Update(d.preview())
	a.refresh()
	if _, ok := a.overlay.(*resultDialog); !ok {
		t.Fatalf("the result waits behind the key list: %T", a.overlay)
	}
	press(a, "?") // the result's own keys, over it
	if _, ok := a.overlay.(*helpDialog); !ok {
		t.Fatalf("? in the result did not list its keys: %T", a.overlay)
	}
	if s := screen(a); !strings.Contains(s, "optimizer result") || !strings.Contains(s, "take it") {
		t.Errorf("the key list is not the result's:\n%s", s)
	}
	press(a, "esc") // closes the list, not the result
	if _, ok := a.overlay.(*resultDialog); !ok {
		t.Fatalf("esc after ? threw the result away: %T", a.overlay)
	}
	if res, _ := a.chart.shown(); res == a.Result() {
		t.Error("the chart went back to the current run while the result waits")
	}
}

// q closes a fit review and ctrl+c asks to quit while it waits; the footer lists
// the dialog's keys, not the program's.
func TestQuitFromFitReview(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	press(a, "F", runs, "enter")
	if _, ok := a.overlay.(*fitDialog); !ok {
		t.Fatalf("no fit review: %s", a.message)
	}
	foot := a.view.footer
	if !strings.Contains(foot, "take it") || strings.Contains(foot, "add ramp") {
		t.Errorf("footer is not the dialog's: %q", foot)
	}
	if press(a, "q") || a.overlay != nil {
		t.Errorf("q in the fit review should close it (keeping the current parameters), not quit: %T", a.overlay)
	}
	press(a, "F", runs, "enter", "y") // now there is something unsaved
	press(a, "F", runs, "enter")
	if press(a, "ctrl+c") {
		t.Fatal("ctrl+c quit without asking about the unsaved fit")
	}
	if _, ok := a.overlay.(*confirmDialog); !ok {
		t.Fatalf("ctrl+c did not ask: %T", a.overlay)
	}
	if !press(a, "d") {
		t.Error("d did not quit")
	}
}

// The key list blocks the keys behind it.
func TestHelpBlocksKeys(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	before := a.Method().Oven.InitialC
	press(a, "?", "down", "+", "-")
	if a.Method().Oven.InitialC != before {
		t.Errorf("a key behind the open key list changed the start temperature to %v", a.Method().Oven.InitialC)
	}
}

// Every key is listed on some page of ? at 80×24.
func TestEveryKeyInHelpAt80x24(t *testing.T) {
	for p := 0; p < paneCount; p++ {
		a, _ := newApp(t, 80, 24)
		a.setFocus(p)
		press(a, "?")
		d := a.overlay.(*helpDialog)
		var all strings.Builder
		for range d.pages {
			all.WriteString(screen(a))
			press(a, "pgdown")
		}
		text := all.String()
		for _, grp := range append(append(append(append(DefaultGlobalKeys().FullHelp(), DefaultProgramKeys().FullHelp()...),
			DefaultChartKeys().FullHelp()...), DefaultPeakKeys().FullHelp()...), DefaultSettingsKeys().FullHelp()...) {
			for _, b := range grp {
				if !strings.Contains(text, b.Help().Key+" ") || !strings.Contains(text, b.Help().Desc) {
					t.Errorf("pane %s: key %q (%s) not in the key list at 80×24", paneNames[p], b.Help().Key, b.Help().Desc)
				}
			}
		}
	}
}

// With NO_COLOR the selected value, compound and setting are still marked.
func TestSelectionVisibleWithoutColour(t *testing.T) {
	t.Setenv("NO_COLOR", "1")
	a, _ := newApp(t, 80, 24)
	if s := screen(a); !strings.Contains(s, "[50.0 °C]") {
		t.Errorf("program selection not marked:\n%s", s)
	}
	press(a, "tab", "tab")
	if s := screen(a); !strings.Contains(s, "›") || !strings.Contains(s, "[-21.74]") {
		t.Errorf("peak selection not marked:\n%s", s)
	}
	press(a, "tab")
	if s := screen(a); !strings.Contains(s, "[wall-coated]") {
		t.Errorf("setting selection not marked:\n%s", s)
	}
}

// The optimized run is on the chart, and the whole new program on the
// screen, before it is taken.
func TestSeeBeforeTaking(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	fastOptimizer(a)
	press(a, "o")
	d, ok := a.overlay.(*resultDialog)
	if !ok {
		t.Fatalf("no result: %s", a.message)
	}
	res, _ := a.chart.shown()
	if res != &d.afterR {
		t.Error("the chart does not show the optimized run")
	}
	s := screen(a)
	if !strings.Contains(s, "optimized run") {
		t.Errorf("chart heading does not say which run it shows:\n%s", s)
	}
	for _, r := range d.after.Oven.Ramps {
		if !strings.Contains(s, fmtNum(r.FinalC, 1, 2)) || !strings.Contains(s, fmtNum(r.RateCMin, 1, 2)) {
			t.Errorf("ramp %+v of the new program is not on the 80×24 screen:\n%s", r, s)
		}
	}
	press(a, "v")
	if res, _ := a.chart.shown(); res != a.Result() {
		t.Error("v did not show the current run")
	}
	press(a, "n")
	if res, _ := a.chart.shown(); res != a.Result() || a.chart.prev != nil {
		t.Error("after keeping the old program the chart still shows the optimized run")
	}
}

// A pressure-mode or gas switch keeps the holdup time the status line
// shows (under the program) as closely as the keypad step allows, and says
// truthfully which holdup time it gives.
func TestModeAndGasSwitchKeepHoldup(t *testing.T) {
	a, _ := newApp(t, 100, 32)
	want := a.Result().HoldupTime
	// the nearest step: no step either side comes closer
	nearest := func(what string) {
		t.Helper()
		m := a.Method()
		got := a.Result().HoldupTime
		if ph, err := programHoldup(m); err != nil || math.Abs(ph-got) > 1e-4*got {
			t.Errorf("%s: programHoldup %.5f min, the simulation %.5f min (%v)", what, ph/60, got/60, err)
		}
		v, step := &m.Carrier.FlowMLMin, m.Limits.FlowStepMLMin
		if m.Carrier.Mode == model.ConstantPressure {
			v, step = &m.Carrier.InletKPa, m.Limits.PressureStepKPa
		}
		if n := *v / step; math.Abs(n-math.Round(n)) > 1e-6 {
			t.Errorf("%s: %v is not on the %v step", what, *v, step)
		}
		for _, d := range []float64{-step, step} {
			c := m.Clone()
			if c.Carrier.Mode == model.ConstantPressure {
				c.Carrier.InletKPa += d
			} else {
				c.Carrier.FlowMLMin += d
			}
			if h, _ := programHoldup(c); math.Abs(h-want) < math.Abs(got-want)-1e-9 {
				t.Errorf("%s: %v %+v gives %.4f min, nearer %.4f than %.4f", what, *v, d, h/60, want/60, got/60)
			}
		}
		if !strings.Contains(a.message, fmt.Sprintf("holdup time %.3f min", got/60)) {
			t.Errorf("%s: the status line does not say the holdup time it gives (%.3f): %s", what, got/60, a.message)
		}
	}
	pickSetting(t, a, "carrier.mode")
	press(a, "+") // constant pressure
	if a.Method().Carrier.Mode != model.ConstantPressure {
		t.Fatalf("mode %q", a.Method().Carrier.Mode)
	}
	nearest("constant pressure")
	press(a, "up", "+") // hydrogen
	nearest("hydrogen")
	press(a, "-") // back to helium
	if a.Method().Carrier.Gas != model.Helium {
		t.Fatalf("gas %q", a.Method().Carrier.Gas)
	}
	nearest("helium again")
	for _, pk := range a.Result().Peaks {
		if !pk.Eluted {
			t.Error("a compound no longer elutes after the detour")
		}
	}
	// the keypad step is the method's: a coarse one is kept to
	m := a.Method().Clone()
	m.Limits.PressureStepKPa = 2
	if !a.apply(m, "coarse steps", "") {
		t.Fatalf("refused: %s", a.message)
	}
	pickSetting(t, a, "carrier.mode")
	press(a, "-") // back to constant flow
	if a.Method().Carrier.Mode != model.ConstantFlow {
		t.Fatalf("mode %q", a.Method().Carrier.Mode)
	}
	want = a.Result().HoldupTime
	press(a, "+") // constant pressure again, in 2 kPa steps
	nearest("2 kPa steps")
}

// What is shown is what is saved.
func TestValuesAtSavedPrecision(t *testing.T) {
	a, path := newApp(t, 100, 32)
	press(a, "shift+tab", "down", "down", "down", "down", "down", "down", "down") // column flow
	press(a, "enter", "ctrl+u", "1.234567", "enter")
	if got := a.Method().Carrier.FlowMLMin; got != 1.23 {
		t.Errorf("flow kept as %v, want 1.23 (what the screen shows)", got)
	}
	if !strings.Contains(screen(a), "1.23 mL/min") {
		t.Errorf("screen:\n%s", screen(a))
	}
	press(a, "ctrl+s")
	back, _ := methodfile.ReadFile(path)
	if back.Carrier.FlowMLMin != 1.23 {
		t.Errorf("saved %v", back.Carrier.FlowMLMin)
	}
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	press(a, "F", runs, "enter")
	d := a.overlay.(*fitDialog)
	dm := d.fit.rep.Method.Column.DiameterMM
	if dm != round(dm, 4) {
		t.Errorf("fitted diameter %v is not at the saved precision", dm)
	}
	if s := screen(a); strings.Contains(s, "0.2499") {
		t.Errorf("unrounded diameter on screen:\n%s", s)
	}
}

// The fit review lists compounds in elution order, scrolls to all of
// them, shows each ± and the minimum Rs that taking it gives.
func TestFitReview(t *testing.T) {
	a, _ := newApp(t, 120, 40)
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	press(a, "F", runs, "enter")
	d := a.overlay.(*fitDialog)
	pos := map[string]int{}
	for i, pk := range d.fit.sim.Peaks {
		pos[d.fit.sys.Compounds[pk.Compound].Name] = i
	}
	for i := 1; i < len(d.order); i++ {
		if pos[d.order[i-1].Name] > pos[d.order[i].Name] {
			t.Errorf("%s before %s: not elution order", d.order[i-1].Name, d.order[i].Name)
		}
	}
	seen := map[string]bool{}
	for k := 0; k < 10; k++ {
		s := screen(a)
		for _, c := range d.order {
			if strings.Contains(s, c.Name) {
				seen[c.Name] = true
			}
		}
		press(a, "pgdown")
	}
	if len(seen) != len(d.order) {
		t.Errorf("scrolling showed %d of %d compounds", len(seen), len(d.order))
	}
	if !strings.Contains(screen(a), "±") {
		t.Error("no ± column")
	}
	want := rsShort(&d.fit.sim)
	if !strings.Contains(screen(a), "→ fitted "+want) {
		t.Errorf("new min Rs %s not shown before taking:\n%s", want, screen(a))
	}
	press(a, "y")
	if got := rsShort(a.Result()); got != want {
		t.Errorf("took the fit: min Rs %s, the review said %s", got, want)
	}
}

// The window diagram of the flow is reachable from settings; it has ticks
// on both axes, says its units and stays in the allowed range.
func TestFlowWindowDiagram(t *testing.T) {
	a, _ := newApp(t, 100, 32)
	press(a, "shift+tab", "s")
	d, ok := a.overlay.(*sweepDialog)
	if !ok {
		t.Fatalf("s in settings did nothing: %s", a.message)
	}
	if d.spec.value.Kind != model.CarrierFlow || d.spec.unit != "mL/min" {
		t.Errorf("spec %+v", d.spec)
	}
	s := screen(a)
	if !strings.Contains(s, "column flow (mL/min)") || !strings.Contains(s, "run time") {
		t.Errorf("no names with units or no run time:\n%s", s)
	}
	ticks := 0
	for _, l := range strings.Split(s, "\n") {
		if i := strings.Index(l, "┤"); i > 0 && strings.TrimSpace(l[:i]) != "" {
			ticks++
		}
	}
	if ticks < 4 {
		t.Errorf("%d ticks on the Rs axis", ticks)
	}
	for _, p := range d.pts {
		if p.Value <= 0 {
			t.Errorf("swept a flow of %v", p.Value)
		}
	}
	// in constant pressure, the inlet pressure, never above the limit
	press(a, "esc", "down", "down", "down", "down", "down", "down", "+", "s") // pressure mode
	d, ok = a.overlay.(*sweepDialog)
	if !ok || d.spec.value.Kind != model.InletPressure || d.spec.unit != "kPa" {
		t.Fatalf("no inlet-pressure diagram in constant pressure: %T %s", a.overlay, a.message)
	}
	for _, p := range d.pts {
		if p.Value > a.Method().Limits.MaxInletKPa || p.Value < a.Method().Limits.MinInletKPa {
			t.Errorf("swept %v kPa, outside the inlet limits", p.Value)
		}
	}
}

func TestDCpEditable(t *testing.T) {
	a, _ := newApp(t, 100, 32)
	press(a, "tab", "tab", "right", "right", "enter", "ctrl+u", "55.5", "enter")
	ci := a.Result().Peaks[0].Compound
	if got := a.Method().Compounds[ci].DCp; got != 55.5 {
		t.Errorf("ΔCp %v (%s)", got, a.message)
	}
}

func TestInletShownInConstantFlow(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "shift+tab")
	s := screen(a)
	if !strings.Contains(s, "inlet pressure (gauge), derived") || !strings.Contains(s, "kPa at 50.0 °C") || !strings.Contains(s, "kPa at 240.0 °C") {
		t.Errorf("inlet pressure not shown in constant-flow mode:\n%s", s)
	}
}

// A program longer than the line scrolls to the selected value.
func TestProgramLineScrolls(t *testing.T) {
	m := demoMethod(t)
	m.Oven.Ramps = nil
	for i := 0; i < 8; i++ {
		m.Oven.Ramps = append(m.Oven.Ramps, methodfile.Ramp{RateCMin: 5 + float64(i), FinalC: 60 + 30*float64(i), HoldMin: 0.5})
	}
	path := filepath.Join(t.TempDir(), "long.toml")
	if err := methodfile.WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	a, err := New(m, Options{Path: path, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	if strings.Contains(screen(a), "270.0 °C") {
		t.Fatal("test needs a program wider than the line")
	}
	for i := 0; i < 2+3*7+1; i++ { // the 8th ramp's final temperature
		press(a, "right")
	}
	s := screen(a)
	if !strings.Contains(s, "[270.0 °C]") {
		t.Errorf("the selected 8th ramp is off the line:\n%s", s)
	}
	if !strings.Contains(s, "← 6 more") {
		t.Errorf("no mark of the steps scrolled off to the left:\n%s", s)
	}
}

// A long save-as path is shown whole.
func TestLongSaveAsPathShown(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	long := "/" + strings.Repeat("abcdefghi/", 19) + "method.toml" // 202 characters
	press(a, "W", "ctrl+u", long)
	var b strings.Builder
	for _, l := range strings.Split(screen(a), "\n") {
		b.WriteString(strings.TrimSpace(l))
	}
	if !strings.Contains(b.String(), long) {
		t.Errorf("the %d-character path is cut:\n%s", len(long), screen(a))
	}
	if v := a.overlay.(*promptDialog).ti.Value(); v != long {
		t.Errorf("the prompt holds %d characters of %d", len(v), len(long))
	}
}

// Keys that arrive in one read are all applied, in order; a paste into a
// prompt stays one text.
func TestBatchedKeys(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "right", "right")
	send(a, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("+++")})
	if got := a.Method().Oven.Ramps[0].RateCMin; got != 13.5 {
		t.Errorf("rate %v after +++, want 13.5", got)
	}
	press(a, "enter", "ctrl+u")
	send(a, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("7.5")})
	press(a, "enter")
	if got := a.Method().Oven.Ramps[0].RateCMin; got != 7.5 {
		t.Errorf("rate %v after pasting 7.5", got)
	}
}

// ctrl+c asks like q when there are unsaved changes, and quits when not.
func TestCtrlCAsks(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	if !press(a, "ctrl+c") {
		t.Error("ctrl+c with nothing unsaved did not quit")
	}
	press(a, "-")
	if press(a, "ctrl+c") {
		t.Error("ctrl+c quit with unsaved changes without asking")
	}
	if press(a, "esc"); a.overlay != nil {
		t.Error("esc did not close the question")
	}
}

// W and e ask before replacing a file this session did not write.
func TestNoSilentOverwrite(t *testing.T) {
	a, path := newApp(t, 80, 24)
	other := filepath.Join(filepath.Dir(path), "other.toml")
	os.WriteFile(other, []byte("precious"), 0o644)
	press(a, "W", "ctrl+u", other, "enter")
	if _, ok := a.overlay.(*confirmDialog); !ok {
		t.Fatalf("no question before replacing %s: %T %s", other, a.overlay, a.message)
	}
	press(a, "n", "esc")
	if b, _ := os.ReadFile(other); string(b) != "precious" {
		t.Error("the file was replaced after n")
	}
	base := strings.TrimSuffix(path, ".toml")
	os.WriteFile(base+".md", []byte("my notes"), 0o644)
	press(a, "e")
	if _, ok := a.overlay.(*confirmDialog); !ok {
		t.Fatalf("no question before replacing the sheet: %T", a.overlay)
	}
	press(a, "n")
	if b, _ := os.ReadFile(base + ".md"); string(b) != "my notes" {
		t.Error("the sheet was replaced after n")
	}
	press(a, "e", "y")
	if b, _ := os.ReadFile(base + ".md"); string(b) == "my notes" {
		t.Errorf("y did not export: %s", a.message)
	}
	press(a, "e") // written by this session now: no question
	if a.overlay != nil {
		t.Errorf("asked again about a file this session wrote: %T", a.overlay)
	}
}

// Long work runs in the background; esc stops it and its late result is
// dropped.
func TestEscCancelsBackgroundWork(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	_, cmd := a.Update(tea.KeyMsg{Type: tea.KeyRight})
	runCmd(a, cmd)
	_, cmd = a.Update(tea.KeyMsg{Type: tea.KeyRight})
	runCmd(a, cmd)
	_, cmd = a.Update(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{'s'}})
	if _, ok := a.overlay.(*progressDialog); !ok || cmd == nil {
		t.Fatalf("the sweep did not start in the background: %T", a.overlay)
	}
	press(a, "esc")
	if a.overlay != nil || a.job != nil {
		t.Fatalf("esc did not stop the sweep: %T", a.overlay)
	}
	runCmd(a, cmd) // the work's result arrives late
	if a.overlay != nil {
		t.Errorf("a stopped sweep still opened %T", a.overlay)
	}
}

// Text from a file reaches the screen inert.
func TestFileTextInert(t *testing.T) {
	m := demoMethod(t)
	m.Title = "evil \x1b]0;owned\x07 title"
	m.Compounds[0].Name = "x\x1b[2Jy"
	a, err := New(m, Options{NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	press(a, "tab", "tab")
	if v := a.View(); strings.ContainsRune(v, 0x1b) || strings.ContainsRune(v, 0x07) {
		t.Errorf("a raw control character reached the screen: %q", v)
	}
}

// Finished work never leaves its progress display behind, whatever was
// opened over it.
func TestProgressGoneWhenWorkEnds(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "right", "right")
	_, cmd := a.Update(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{'s'}})
	if _, ok := a.overlay.(*progressDialog); !ok {
		t.Fatalf("%T", a.overlay)
	}
	press(a, "?")                            // the progress display has one key, esc: no list over it
	a.pending = append(a.pending, a.overlay) // as if something had been opened over it
	a.overlay = newHelpDialog(&a.sh, &a.help, a.program, "program", a.keys)
	runCmd(a, cmd)
	if _, ok := a.overlay.(*sweepDialog); !ok {
		t.Fatalf("the window diagram is not shown: %T", a.overlay)
	}
	press(a, "esc")
	if a.overlay != nil {
		t.Errorf("a %T was left after the work ended", a.overlay)
	}
}

// A five-ramp optimized program is readable whole at 80×24.
func TestFiveRampResultFits(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	after := a.Method().Clone()
	after.Oven.Ramps = nil
	for i := 0; i < 5; i++ {
		after.Oven.Ramps = append(after.Oven.Ramps, methodfile.Ramp{RateCMin: 3.25 + float64(i), FinalC: 71.5 + 50*float64(i), HoldMin: 0.125})
	}
	sys, _ := after.System()
	var sim model.Result
	if err := sys.Simulate(after.ModelProgram(), &sim); err != nil {
		t.Fatal(err)
	}
	d := newResultDialog(&a.sh, &optimizer.Result{Status: optimizer.Met}, after, sim)
	a.open(d)
	a.chart.Update(d.preview())
	a.refresh()
	s := screen(a)
	for _, r := range after.Oven.Ramps {
		if !strings.Contains(s, fmtNum(r.RateCMin, 1, 2)) || !strings.Contains(s, fmtNum(r.FinalC, 1, 2)) {
			t.Errorf("ramp %+v not on the screen:\n%s", r, s)
		}
	}
	if !strings.Contains(s, "0.125") {
		t.Errorf("holds not shown at the precision saved:\n%s", s)
	}
}

// A key typed while a save runs in the background (ctrl+s q sent together)
// waits for the save and then acts: here q quits once the file is saved.
func TestKeyDuringSaveWaits(t *testing.T) {
	a, path := newApp(t, 80, 24)
	press(a, "-")
	_, save := a.Update(tea.KeyMsg{Type: tea.KeyCtrlS}) // the save, not run yet
	if save == nil || !a.saving() {
		t.Fatal("ctrl+s started no save")
	}
	if _, cmd := a.Update(keyRune('q')); cmd != nil && runCmd(a, cmd) {
		t.Fatal("quit before the save was done")
	}
	if len(a.queued) != 1 {
		t.Fatalf("%d keys waiting, want 1", len(a.queued))
	}
	if !runCmd(a, save) {
		t.Fatalf("q typed during the save did not quit after it: %s", a.message)
	}
	back, err := methodfile.ReadFile(path)
	if err != nil || !back.Equal(a.Method()) {
		t.Errorf("not saved before quitting: %v", err)
	}
}

// At the end of piped keys the UI finishes as if the user quit: unsaved
// changes are reported (the command writes the recovery file) and a save
// under way is waited for.
func TestEndOfInputQuits(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	if !send(a, InputEndedMsg{}) {
		t.Fatal("the end of input did not quit")
	}
	if ended, unsaved := a.InputEnded(); !ended || unsaved {
		t.Errorf("ended %v unsaved %v, want true false", ended, unsaved)
	}

	a, _ = newApp(t, 80, 24)
	press(a, "-", "q") // the question is open when the keys run out
	if !send(a, InputEndedMsg{}) {
		t.Fatal("the end of input did not quit with the question open")
	}
	if _, unsaved := a.InputEnded(); !unsaved {
		t.Error("unsaved changes not reported")
	}
	if p, err := a.guard.WriteRecovery(); err != nil || p == "" {
		t.Errorf("no recovery written: %q %v", p, err)
	}

	a, _ = newApp(t, 80, 24)
	press(a, "-")
	_, save := a.Update(tea.KeyMsg{Type: tea.KeyCtrlS})
	if _, cmd := a.Update(InputEndedMsg{}); cmd != nil && runCmd(a, cmd) {
		t.Fatal("ended before the save was done")
	}
	if !runCmd(a, save) {
		t.Fatal("did not end after the save")
	}
	if _, unsaved := a.InputEnded(); unsaved {
		t.Error("saved, yet reported unsaved")
	}
}

// At 80×24 nothing on the main screen is cut with "…" (title, method
// lines, summary, message, footer wrap or keep whole items), no row stays
// blank at the bottom, and the peak table gets the rows the message does
// not need.
func TestNothingCutAt80x24(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "tab", "tab") // peaks
	s := screen(a)
	for i, l := range strings.Split(s, "\n") {
		if strings.Contains(l, "…") {
			t.Errorf("line %d cut: %q", i, l)
		}
	}
	lines := strings.Split(s, "\n")
	if strings.TrimSpace(lines[len(lines)-2]) == "" {
		t.Errorf("a blank row above the footer:\n%s", s)
	}
	if !strings.Contains(s, "  7 alpha-pinene") {
		t.Errorf("the peak table shows fewer than 7 compounds:\n%s", s)
	}
	if !strings.Contains(unwrap(s), "Rs 1.06 not met ◆ beta-pinene / myrcene (target 1.50)") {
		t.Errorf("the critical pair is not named whole:\n%s", s)
	}
	// a long message wraps; past its rows it points to the list, which
	// shows it whole
	long := strings.Repeat("a long status message that goes on ", 20)
	a.say(msgInfo, "%s", long)
	a.refresh()
	if s := screen(a); !strings.Contains(s, "! shows it all") {
		t.Errorf("a cut message does not say where it is whole:\n%s", s)
	}
	press(a, "!")
	if s := screen(a); strings.Contains(s, "! shows it all") {
		t.Errorf("the message still cut under the list:\n%s", s)
	}
	var list []string
	for i := 0; i < 30; i++ {
		d := a.overlay.(*cautionsDialog)
		if i == 0 || d.top > 0 {
			list = append(list, d.lines[1+max(0, len(list)-d.top):]...)
		}
		press(a, "down")
	}
	if !strings.Contains(unwrap(strings.Join(list, "\n")), strings.TrimSpace(long)) {
		t.Errorf("the cautions list does not show the whole message:\n%s", strings.Join(list, "\n"))
	}
}

// ! lists every caution simulate prints (checks.Cautions), scrollable,
// also after taking the optimizer's program.
func TestCautionsListedLikeSimulate(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	fastOptimizer(a)
	press(a, "o")
	press(a, "y")
	want := checks.Cautions(a.Method(), a.sh.sys, a.Result())
	if len(want) == 0 {
		t.Skip("no cautions for this program")
	}
	press(a, "!")
	d, ok := a.overlay.(*cautionsDialog)
	if !ok {
		t.Fatalf("! opened %T", a.overlay)
	}
	var seen strings.Builder
	for i := 0; i < 40; i++ {
		seen.WriteString(screen(a) + "\n")
		press(a, "down")
	}
	for _, w := range want {
		if !strings.Contains(unwrap(seen.String()), w) {
			t.Errorf("caution not listed: %s", w)
		}
	}
	if len(d.body) > d.h-1 && d.top == 0 {
		t.Error("↓ did not scroll a long list")
	}
	press(a, "esc")
	if a.overlay != nil {
		t.Error("esc did not close the list")
	}
}

// On a terminal too small to draw in, keys never reach the hidden dialog
// (typing once gave "45q" in a value): only q acts, and its question is
// shown and answered there.
func TestTooSmallOnlyQuits(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "-", "enter") // a change, and the value's prompt open
	p, ok := a.overlay.(*promptDialog)
	if !ok {
		t.Fatalf("no prompt: %T", a.overlay)
	}
	before := p.ti.Value()
	send(a, tea.WindowSizeMsg{Width: 60, Height: 20})
	if press(a, "4", "5", "+", "u", "o") {
		t.Fatal("quit")
	}
	if got := p.ti.Value(); got != before {
		t.Errorf("the hidden prompt took keys: %q, was %q", got, before)
	}
	if a.job != nil || len(a.undo) != 1 {
		t.Errorf("keys acted on the hidden screen: job %v, %d undo", a.job != nil, len(a.undo))
	}
	if press(a, "q") {
		t.Fatal("q quit with unsaved changes without asking")
	}
	if s := screen(a); !strings.Contains(s, "s save and quit") || !strings.Contains(s, "q quits") {
		t.Errorf("the question is not shown on the small screen:\n%s", s)
	}
	if !press(a, "d") {
		t.Error("d did not quit")
	}
	// nothing unsaved: q quits at once
	a, _ = newApp(t, 60, 20)
	if !press(a, "q") {
		t.Error("q did not quit a small, clean screen")
	}
}

// After an edit re-sorts the peak table, the selection stays on the
// compound edited, so that the next edit lands on it too.
func TestPeakSelectionFollowsCompound(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "tab", "tab")
	for i := 0; i < 8; i++ {
		press(a, "down")
	}
	name := func() string {
		return a.Method().Compounds[a.Result().Peaks[a.peaks.sel].Compound].Name
	}
	if name() != "beta-pinene" {
		t.Fatalf("selected %s", name())
	}
	row := a.peaks.sel
	press(a, "enter", "ctrl+u", "-58", "enter") // ΔH: now after myrcene
	if name() != "beta-pinene" {
		t.Errorf("after the re-sort the selection moved to %s", name())
	}
	if a.peaks.sel == row {
		t.Fatal("the edit did not move beta-pinene in the table")
	}
	press(a, "enter", "ctrl+u", "-58.5", "enter")
	for _, c := range a.Method().Compounds {
		if c.Name == "beta-pinene" && c.DHkJ != -58.5 {
			t.Errorf("the second edit missed beta-pinene: ΔH %v", c.DHkJ)
		}
		if c.Name == "myrcene" && c.DHkJ == -58.5 {
			t.Error("the second edit landed on myrcene")
		}
	}
	if !strings.Contains(screen(a), "›11 beta-pinene") {
		t.Errorf("the marked row is not beta-pinene:\n%s", screen(a))
	}
}

// ↑/↓ step a program value and ←/→ a setting: the key list says so.
func TestArrowStepsListed(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	was := a.Method().Oven.InitialC
	press(a, "up")
	if a.Method().Oven.InitialC <= was {
		t.Fatal("↑ did not step the start temperature")
	}
	press(a, "?")
	if s := screen(a); !strings.Contains(s, "+/- ↑/↓ step") {
		t.Errorf("the key list does not name ↑/↓ as a step:\n%s", s)
	}
	press(a, "esc", "shift+tab", "?")
	if s := screen(a); !strings.Contains(s, "+/- ←/→ step or choice") {
		t.Errorf("the settings' key list does not name ←/→:\n%s", s)
	}
}

// a adds ramps up to what a method file holds, and says that limit; a
// method with more ramps than the optimizer's goal.ramps (1–5) edits.
func TestAddRampLimit(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	m := a.Method().Clone()
	m.Oven.Ramps = nil
	for i := 0; i < 7; i++ {
		m.Oven.Ramps = append(m.Oven.Ramps, methodfile.Ramp{RateCMin: 5, FinalC: 60 + 10*float64(i), HoldMin: 0.1})
	}
	if !a.apply(m, "seven ramps", "") {
		t.Fatalf("a 7-ramp program refused: %s", a.message)
	}
	press(a, "a")
	if n := len(a.Method().Oven.Ramps); n != 8 {
		t.Fatalf("a on 7 ramps: %d ramps (%s)", n, a.message)
	}
	m = a.Method().Clone()
	for len(m.Oven.Ramps) < methodfile.MaxRamps-1 {
		m.Oven.Ramps = append(m.Oven.Ramps, methodfile.Ramp{RateCMin: 5, FinalC: m.Oven.Ramps[len(m.Oven.Ramps)-1].FinalC + 1})
	}
	if !a.apply(m, "29 ramps", "") {
		t.Fatalf("29 ramps refused: %s", a.message)
	}
	press(a, "a")
	if n := len(a.Method().Oven.Ramps); n != methodfile.MaxRamps {
		t.Fatalf("a on %d ramps: %d (%s)", methodfile.MaxRamps-1, n, a.message)
	}
	press(a, "a")
	if n := len(a.Method().Oven.Ramps); n != methodfile.MaxRamps {
		t.Errorf("%d ramps", n)
	}
	if want := fmt.Sprintf("%d ramps at most", methodfile.MaxRamps); !strings.Contains(a.message, want) {
		t.Errorf("limit message %q, want %q", a.message, want)
	}
}

// Save as to an existing folder is refused with a clear message (not
// "replace it?").
func TestSaveAsFolderRefused(t *testing.T) {
	a, path := newApp(t, 80, 24)
	dir := t.TempDir()
	press(a, "-", "W", "ctrl+u", dir, "enter")
	if _, ok := a.overlay.(*confirmDialog); ok {
		t.Fatal("asked to replace a folder")
	}
	if !strings.Contains(a.message, "is a folder") || !strings.Contains(a.message, "not saved") {
		t.Errorf("message %q", a.message)
	}
	if st, err := os.Stat(dir); err != nil || !st.IsDir() {
		t.Error("the folder is gone")
	}
	if !a.Dirty() || a.Path() != path {
		t.Error("the method's file changed")
	}
}

// Text of any length from the file (title, phase, compound names) never
// pushes the screen past its height.
func TestLongFileTextKeepsScreenSize(t *testing.T) {
	m := demoMethod(t)
	m.Title = strings.Repeat("a very long method title ", 20)
	m.Column.Phase = strings.Repeat("poly(dimethylsiloxane) ", 20)
	for i := range m.Compounds {
		m.Compounds[i].Name = fmt.Sprintf("compound-%d-%s", i, strings.Repeat("x", 60))
	}
	a, err := New(m, Options{Name: "long.toml", NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, size := range [][2]int{{80, 24}, {100, 30}, {200, 60}} {
		send(a, tea.WindowSizeMsg{Width: size[0], Height: size[1]})
		for _, k := range []string{"", "tab", "tab", "tab", "!", "esc", "?"} {
			if k != "" {
				press(a, k)
			}
			s := screen(a)
			if n := strings.Count(s, "\n") + 1; n != size[1] {
				t.Fatalf("%dx%d after %q: %d lines:\n%s", size[0], size[1], k, n, s)
			}
			for i, l := range strings.Split(s, "\n") {
				if ansi.StringWidth(l) > size[0] {
					t.Errorf("%dx%d after %q: line %d is %d wide: %q", size[0], size[1], k, i, ansi.StringWidth(l), l)
				}
			}
		}
		press(a, "esc")
	}
}
