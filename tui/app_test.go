package tui

import (
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

func demoMethod(t testing.TB) *methodfile.Method {
	t.Helper()
	m, err := methodfile.ReadFile("../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// newApp opens the demo saved to a temporary file, sized w×h.
func newApp(t testing.TB, w, h int) (*App, string) {
	t.Helper()
	m := demoMethod(t)
	path := filepath.Join(t.TempDir(), "demo.toml")
	if err := methodfile.WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	m, _ = methodfile.ReadFile(path)
	a, err := New(m, Options{Path: path, Name: "demo.toml", NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: w, Height: h})
	return a, path
}

// press sends keys: names such as "right", "enter", "esc", "tab",
// "ctrl+s", or plain text typed rune by rune. Each key's commands run to
// completion before the next key (background work included), so a test
// sees what the user sees once the work is done. It reports whether the
// program asked to quit.
func press(a *App, keys ...string) (quit bool) {
	special := map[string]tea.KeyType{
		"right": tea.KeyRight, "left": tea.KeyLeft, "up": tea.KeyUp, "down": tea.KeyDown,
		"enter": tea.KeyEnter, "esc": tea.KeyEsc, "tab": tea.KeyTab, "ctrl+s": tea.KeyCtrlS,
		"backspace": tea.KeyBackspace, "ctrl+u": tea.KeyCtrlU, "ctrl+c": tea.KeyCtrlC,
		"pgdown": tea.KeyPgDown, "pgup": tea.KeyPgUp, "shift+tab": tea.KeyShiftTab,
	}
	for _, k := range keys {
		if kt, ok := special[k]; ok {
			quit = send(a, tea.KeyMsg{Type: kt}) || quit
			continue
		}
		for _, r := range k {
			quit = send(a, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}}) || quit
		}
	}
	return quit
}

// send gives a message to the app and runs the commands it returns.
func send(a *App, msg tea.Msg) (quit bool) {
	_, cmd := a.Update(msg)
	return runCmd(a, cmd)
}

func runCmd(a *App, cmd tea.Cmd) (quit bool) {
	if cmd == nil {
		return false
	}
	switch msg := cmd().(type) {
	case nil:
	case tea.QuitMsg:
		return true
	case tea.BatchMsg:
		for _, c := range msg {
			quit = runCmd(a, c) || quit
		}
	default:
		quit = send(a, msg)
	}
	return quit
}

func screen(a *App) string { return ansi.Strip(a.View()) }

func TestEditRampRateMovesPeaks(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	before := a.Result().Peaks[len(a.Result().Peaks)-1].RetentionTime
	press(a, "right", "right", "-") // select ramp 1 rate, one step down
	if got := a.Method().Oven.Ramps[0].RateCMin; got != 11.5 {
		t.Fatalf("rate %v, want 11.5", got)
	}
	after := a.Result().Peaks[len(a.Result().Peaks)-1].RetentionTime
	if !(after > before) {
		t.Errorf("slower ramp: last peak %v → %v, want later", before, after)
	}
	if !strings.Contains(screen(a), "11.5 °C/min") {
		t.Error("screen does not show the new rate")
	}
	if !a.Dirty() {
		t.Error("not marked modified")
	}
}

func TestInvalidValueRefused(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	orig := a.Method().Clone()
	press(a, "right", "right", "right", "enter", "ctrl+u", "400", "enter")
	if !a.Method().Equal(orig) {
		t.Error("invalid final temperature changed the method")
	}
	if s := screen(a); !strings.Contains(s, "above the column maximum") {
		t.Errorf("no message:\n%s", s)
	}
	press(a, "left", "left", "left", "enter", "ctrl+u", "0", "enter") // initial hold 0 is fine
	press(a, "right", "right", "enter", "ctrl+u", "0", "enter")       // rate 0 is not
	if a.Method().Oven.Ramps[0].RateCMin != 12 {
		t.Error("zero rate accepted")
	}
	if s := screen(a); !strings.Contains(s, "rate_c_min") {
		t.Errorf("no rate message:\n%s", s)
	}
	press(a, "right", "enter", "ctrl+u", "10", "enter") // final below the start
	if a.Method().Oven.Ramps[0].FinalC != 240 {
		t.Error("non-increasing final accepted")
	}
}

func TestUndoRedoExact(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	orig := a.Method().Clone()
	press(a, "right", "right", "]", "]", "right", "-", "a")
	edited := a.Method().Clone()
	if edited.Equal(orig) {
		t.Fatal("edits did nothing")
	}
	press(a, "u", "u", "u", "u")
	if !a.Method().Equal(orig) {
		t.Errorf("undo did not restore the program exactly:\n%+v\n%+v", a.Method().Oven, orig.Oven)
	}
	press(a, "U", "U", "U", "U")
	if !a.Method().Equal(edited) {
		t.Error("redo did not restore the edits")
	}
}

func TestTooSmallAndPlaceholder(t *testing.T) {
	m := demoMethod(t)
	a, err := New(m, Options{NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(a.View(), "starting") {
		t.Error("no placeholder before the first size")
	}
	a.Update(tea.WindowSizeMsg{Width: 60, Height: 20})
	if !strings.Contains(a.View(), "at least 80×24") {
		t.Errorf("small terminal: %q", a.View())
	}
}

func TestHydrogenCaution(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "tab", "tab", "tab") // settings
	for i := 0; i < 5; i++ {
		press(a, "down")
	}
	press(a, "+")
	if a.Method().Carrier.Gas != model.Hydrogen {
		t.Fatalf("gas %q", a.Method().Carrier.Gas)
	}
	// the safety text is never cut: wrapped whole in the settings, with
	// settings still to choose from, and in the cautions list
	if s := screen(a); !strings.Contains(unwrap(s), model.HydrogenCaution) || !strings.Contains(s, "› carrier gas") {
		t.Errorf("no whole hydrogen caution, or no settings:\n%s", s)
	}
	press(a, "tab", "tab", "!")
	if s := screen(a); !strings.Contains(unwrap(s), model.HydrogenCaution) {
		t.Errorf("no whole hydrogen caution in the cautions list:\n%s", s)
	}
}

// unwrap joins wrapped screen lines (each with its indent) into one text.
func unwrap(s string) string {
	var words []string
	for _, l := range strings.Split(s, "\n") {
		words = append(words, strings.Fields(strings.TrimLeft(l, " ⚠"))...)
	}
	return strings.Join(words, " ")
}

func TestToggleTargetAndEditCompound(t *testing.T) {
	a, _ := newApp(t, 100, 30)
	press(a, "tab", "tab") // peaks
	ci := a.Result().Peaks[0].Compound
	was := a.Method().Compounds[ci].Target
	press(a, "t")
	if a.Method().Compounds[ci].Target == was {
		t.Error("target not toggled")
	}
	press(a, "enter", "ctrl+u", "-25.5", "enter")
	if got := a.Method().Compounds[ci].DHkJ; got != -25.5 {
		t.Errorf("ΔH %v", got)
	}
}

func TestSaveWritesLoadableMethod(t *testing.T) {
	a, path := newApp(t, 80, 24)
	press(a, "right", "right", "-", "ctrl+s")
	if a.Dirty() {
		t.Error("still modified after save")
	}
	back, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !back.Equal(a.Method()) {
		t.Error("saved file loads back different")
	}
}

func TestQuitAsksWithUnsavedChanges(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "-")
	if press(a, "q") {
		t.Fatal("quit without asking")
	}
	if !strings.Contains(screen(a), "unsaved changes") {
		t.Error("no question")
	}
	// y and n are no answer: "y" to "save them?" could mean either
	for _, k := range []string{"y", "n", "Y"} {
		if press(a, k) {
			t.Fatalf("%s quit", k)
		}
		if _, ok := a.overlay.(*confirmDialog); !ok {
			t.Fatalf("%s closed the question", k)
		}
	}
	for _, want := range []string{"s save and quit", "d discard", "esc stay"} {
		if !strings.Contains(screen(a), want) {
			t.Errorf("question does not say %q:\n%s", want, screen(a))
		}
	}
	if !press(a, "d") {
		t.Error("d did not quit")
	}
	if p, _ := a.guard.WriteRecovery(); p != "" {
		t.Error("discarded changes still held for recovery")
	}
	// s saves, then quits
	a, path := newApp(t, 80, 24)
	press(a, "-", "q")
	if !press(a, "s") {
		t.Fatal("s did not quit")
	}
	if back, err := methodfile.ReadFile(path); err != nil || !back.Equal(a.Method()) {
		t.Errorf("s quit without saving: %v", err)
	}
	// ctrl+c asks the same question
	a, _ = newApp(t, 80, 24)
	press(a, "-", "ctrl+c")
	if press(a, "y") || !strings.Contains(screen(a), "d discard") {
		t.Error("ctrl+c: y quit, or not the same question")
	}
}

// The recovery file written on SIGHUP/SIGTERM holds the unsaved method, and
// the next start offers it.
func TestRecoveryFile(t *testing.T) {
	a, path := newApp(t, 80, 24)
	press(a, "right", "right", "]")
	rp, err := a.guard.WriteRecovery()
	if err != nil || rp != RecoveryPath(path) {
		t.Fatalf("recovery %q %v", rp, err)
	}
	back, err := methodfile.ReadFile(rp)
	if err != nil {
		t.Fatal(err)
	}
	if !back.Equal(a.Method()) {
		t.Error("recovery file differs from the unsaved method")
	}
	orig, _ := methodfile.ReadFile(path)
	b, err := New(orig, Options{Path: path, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	b.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	if !strings.Contains(screen(b), "restore") {
		t.Error("no restore offer")
	}
	press(b, "r")
	if !b.Method().Equal(back) {
		t.Error("restore did not bring the unsaved method back")
	}
	// The recovery stays until the method is saved, then goes.
	if _, err := os.Stat(rp); err != nil {
		t.Error("recovery file removed before the method was saved")
	}
	press(b, "ctrl+s")
	if _, err := os.Stat(rp); err == nil {
		t.Error("recovery file left after the save")
	}
	if FindRecovery(path) != nil {
		t.Error("a recovery is offered again after the save")
	}
}

func TestSweepViewAndExport(t *testing.T) {
	a, path := newApp(t, 100, 32)
	press(a, "right", "right", "s")
	sv, ok := a.overlay.(*sweepDialog)
	if !ok || sv.spec.value.String() != "rate_1" {
		t.Fatalf("no sweep view: %q", a.message)
	}
	if s := screen(a); !strings.Contains(s, "window diagram") || !strings.Contains(s, "now 12") || !strings.Contains(s, "ramp 1 rate (°C/min)") {
		t.Errorf("sweep view not shown:\n%s", s)
	}
	found := false
	for _, p := range sv.pts {
		if p.Value == 12 && p.MinRs == a.Result().MinResolution {
			found = true
		}
		if p.Value > a.Method().Limits.MaxRateCMin {
			t.Errorf("swept %v °C/min, beyond the oven's limit", p.Value)
		}
	}
	if !found {
		t.Error("the sweep's point at the current value differs from the simulation")
	}
	press(a, "esc", "e")
	base := strings.TrimSuffix(path, ".toml")
	for _, f := range []string{base + ".png", base + ".md"} {
		if _, err := os.Stat(f); err != nil {
			t.Errorf("export: %v (%s)", err, a.message)
		}
	}
}

func TestFitFromRunsFile(t *testing.T) {
	a, _ := newApp(t, 100, 32)
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	press(a, "F")
	press(a, runs, "enter")
	if _, ok := a.overlay.(*fitDialog); !ok {
		t.Fatalf("no fit: %s", a.message)
	}
	if s := screen(a); !strings.Contains(s, "calibration") || !strings.Contains(s, "myrcene") {
		t.Errorf("fit panel not shown:\n%s", s)
	}
	press(a, "y")
	if a.overlay != nil || !strings.Contains(a.message, "fitted") {
		t.Errorf("not taken: %s", a.message)
	}
	press(a, "F", "/nonexistent/runs.toml", "enter")
	if !strings.Contains(a.message, "/nonexistent/runs.toml") {
		t.Errorf("bad runs file message: %s", a.message)
	}
}

func TestCompareColumnsView(t *testing.T) {
	a, _ := newApp(t, 100, 32)
	a.optSettings.Starts = 4
	press(a, "C", "ctrl+u", "20,30", "enter")
	rd, ok := a.overlay.(*rankingDialog)
	if !ok || len(rd.out) != 2 {
		t.Fatalf("no ranking: %s", a.message)
	}
	if s := screen(a); !strings.Contains(s, "column ranking") || !strings.Contains(s, "time min") || !strings.Contains(s, "mL/min") {
		t.Errorf("ranking not shown with headers and flow:\n%s", s)
	}
	want := rd.out[0].Method.Column.LengthM
	press(a, "enter")
	if a.Method().Column.LengthM != want {
		t.Errorf("length %v, want the chosen %v", a.Method().Column.LengthM, want)
	}
}

// Accepting a program with fewer ramps than the selected value's ramp
// must not leave the selection outside the program.
func TestSelectionSurvivesShorterProgram(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "a", "a") // three ramps
	for i := 0; i < 10; i++ {
		press(a, "right")
	}
	m := a.Method().Clone()
	m.Oven.Ramps = m.Oven.Ramps[:1]
	a.apply(m, "test", "")
	a.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	press(a, "+", "enter", "esc", "right", "left")
	if a.program.list.sel >= len(programFields(a.Method())) {
		t.Errorf("selection %d outside %d values", a.program.list.sel, len(programFields(a.Method())))
	}
}

// Random keystrokes, dialogs included (the key list, prompts, questions,
// the window diagram, the optimizer's result, the ranking), never panic,
// always draw exactly the terminal's size, and never leave an invalid
// method.
func TestRandomKeysNeverPanic(t *testing.T) {
	a, _ := newApp(t, 90, 28)
	a.optSettings = optimizer.Settings{Workers: 1, Starts: 1, Evaluations: 200}
	rng := rand.New(rand.NewPCG(42, 1))
	names := []string{"right", "left", "up", "down", "enter", "esc", "tab", "shift+tab", "backspace", "pgdown", "pgup"}
	runes := []rune("+-[]ax0123456789.-uUtsh jkl?qynvWFCoV!")
	w, h := 90, 28
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	verify, _ := filepath.Abs("../testdata/lab/verify.csv")
	// random keys reach W (save as) with random names: whatever they
	// write lands in a folder of the test's own, never in the source tree
	t.Chdir(t.TempDir())
	dialogs := map[string]bool{}
	for i := 0; i < 3000; i++ {
		if rng.IntN(3) == 0 {
			press(a, names[rng.IntN(len(names))])
		} else {
			r := runes[rng.IntN(len(runes))]
			if r == 'C' && rng.IntN(4) != 0 {
				continue // ranking columns is slow: now and then
			}
			send(a, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}})
		}
		switch i % 1000 {
		case 300: // open the dialogs random keys rarely reach
			a.overlay, a.pending = nil, nil
			press(a, "F", runs, "enter")
		case 700:
			a.overlay, a.pending = nil, nil
			press(a, "C", "ctrl+u", "20,30", "enter")
		case 500:
			a.overlay, a.pending = nil, nil
			press(a, "V", verify, "enter")
		case 900:
			a.overlay, a.pending = nil, nil
			press(a, "P")
		}
		if i%500 == 0 {
			w, h = 80+rng.IntN(60), 24+rng.IntN(30)
			a.Update(tea.WindowSizeMsg{Width: w, Height: h})
		}
		if a.overlay != nil {
			dialogs[fmt.Sprintf("%T", a.overlay)] = true
		}
		v := a.View()
		if n := strings.Count(v, "\n") + 1; n != h {
			t.Fatalf("key %d: %d lines on a %d-line terminal (%T)", i, n, h, a.overlay)
		}
		for _, l := range strings.Split(v, "\n") {
			if lw := ansi.StringWidth(l); lw > w {
				t.Fatalf("key %d: a line %d wide on a %d-wide terminal (%T): %q", i, lw, w, a.overlay, l)
			}
		}
	}
	if err := validate(a.Method()); err != nil {
		t.Errorf("method became invalid: %v", err)
	}
	if len(dialogs) < 5 {
		t.Errorf("the keys reached only %v", dialogs)
	}
	t.Logf("dialogs reached: %v", dialogs)
}
