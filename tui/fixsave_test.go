package tui

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/methodfile"
)

// openFile opens a copy of the test file name (in testdata/) at 80×24 and
// returns the App, the copy's path and its text.
func openFile(t *testing.T, name string) (*App, string, string) {
	t.Helper()
	orig, err := os.ReadFile(filepath.Join("..", "testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, orig, 0o644); err != nil {
		t.Fatal(err)
	}
	m, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	a, err := New(m, Options{Path: path, Name: name, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	return a, path, string(orig)
}

// lineDiff lists the lines of a and b that differ, position by position
// (the texts must have as many lines).
func lineDiff(t *testing.T, a, b string) []string {
	t.Helper()
	la, lb := strings.Split(a, "\n"), strings.Split(b, "\n")
	if len(la) != len(lb) {
		t.Fatalf("%d lines became %d:\n%s", len(la), len(lb), b)
	}
	var out []string
	for i := range la {
		if la[i] != lb[i] {
			out = append(out, la[i]+" → "+lb[i])
		}
	}
	return out
}

// W writes the user's text with only the change placed, as ctrl+s does in
// the file itself: comments, quotes, numbers and layout kept.
func TestSaveAsKeepsTheText(t *testing.T) {
	a, path, orig := openFile(t, "commented.toml")
	press(a, "+") // start 50 → 51 °C
	other := filepath.Join(filepath.Dir(path), "copy.toml")
	press(a, "W", "ctrl+u", other, "enter")
	if a.Dirty() || a.path != other {
		t.Fatalf("not saved to %s: %s", other, a.message)
	}
	got, err := os.ReadFile(other)
	if err != nil {
		t.Fatal(err)
	}
	d := lineDiff(t, orig, string(got))
	if len(d) != 1 || !strings.Contains(d[0], "initial_c = 51          # start") {
		t.Errorf("save as changed more than the start temperature: %q", d)
	}
	if b, _ := os.ReadFile(path); string(b) != orig {
		t.Error("save as changed the original file")
	}
	// A second save as starts from the text written last.
	press(a, "+")
	third := filepath.Join(filepath.Dir(path), "third.toml")
	press(a, "W", "ctrl+u", third, "enter")
	got3, _ := os.ReadFile(third)
	if d := lineDiff(t, orig, string(got3)); len(d) != 1 || !strings.Contains(d[0], "initial_c = 52          # start") {
		t.Errorf("second save as: %q", d)
	}
	if m, err := methodfile.ReadFile(third); err != nil || m.Oven.InitialC != 52 {
		t.Errorf("the copy does not read back as saved: %v", err)
	}
}

// Replacing another file (y to the question) writes the method's own text,
// not the replaced file's with the method's values.
func TestSaveAsReplaceWritesOwnText(t *testing.T) {
	a, path, orig := openFile(t, "commented.toml")
	other := filepath.Join(filepath.Dir(path), "other.toml")
	demo, _ := os.ReadFile(filepath.Join("..", "testdata", "demo.toml"))
	os.WriteFile(other, demo, 0o644)
	press(a, "+", "W", "ctrl+u", other, "enter", "y")
	got, _ := os.ReadFile(other)
	if d := lineDiff(t, orig, string(got)); len(d) != 1 {
		t.Errorf("the replaced file is not the method's text with the change: %q", d)
	}
}

// The built-in demo saved under a name is the demo's own text with the
// change placed.
func TestSaveAsDemoKeepsItsText(t *testing.T) {
	text, err := os.ReadFile(filepath.Join("..", "testdata", "demo.toml"))
	if err != nil {
		t.Fatal(err)
	}
	m, err := methodfile.Parse("demo.toml (built in)", text)
	if err != nil {
		t.Fatal(err)
	}
	a, err := New(m, Options{Name: "demo.toml (built in)", Text: text, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	out := filepath.Join(t.TempDir(), "mine.toml")
	press(a, "+", "ctrl+s") // no file yet: ctrl+s asks for a name too
	if _, ok := a.overlay.(*promptDialog); !ok {
		t.Fatalf("ctrl+s on the demo did not ask for a name: %T", a.overlay)
	}
	press(a, "ctrl+u", out, "enter")
	got, err := os.ReadFile(out)
	if err != nil {
		t.Fatalf("not saved: %v (%s)", err, a.message)
	}
	if d := lineDiff(t, string(text), string(got)); len(d) != 1 || !strings.Contains(d[0], "initial_c") {
		t.Errorf("the demo saved as is not its text with the change: %q", d)
	}
}

// W opens with the current name selected: a typed path replaces it (it
// used to be appended: esc.toml/tmp/x.toml); an arrow key edits it. The
// demo offers its own name the same way.
func TestSaveAsPromptReplacesName(t *testing.T) {
	a, path, _ := openFile(t, "commented.toml")
	other := filepath.Join(filepath.Dir(path), "typed.toml")
	press(a, "W")
	if s := screen(a); !strings.Contains(s, "["+path+"]") && !strings.Contains(s, "["+filepath.Base(path)) {
		t.Errorf("the current name is not shown selected:\n%s", s)
	}
	press(a, other, "enter")
	if _, err := os.Stat(other); err != nil || a.path != other {
		t.Fatalf("typing a path did not replace the name: %v, %s", err, a.message)
	}
	// ← then typing edits the name instead
	press(a, "W", "left", "left", "left", "left", "left", "2")
	if d, ok := a.overlay.(*promptDialog); !ok || d.ti.Value() != strings.TrimSuffix(other, ".toml")+"2.toml" {
		t.Errorf("← did not start editing the name: %T %v", a.overlay, a.overlay)
	}
	press(a, "esc")
	// backspace clears it
	press(a, "W", "backspace", "x.toml")
	if d, ok := a.overlay.(*promptDialog); !ok || d.ti.Value() != "x.toml" {
		t.Errorf("backspace did not clear the name")
	}
	press(a, "esc")

	text, _ := os.ReadFile(filepath.Join("..", "testdata", "demo.toml"))
	m, _ := methodfile.Parse("demo.toml (built in)", text)
	b, err := New(m, Options{Name: "demo.toml (built in)", Text: text, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	b.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	press(b, "W")
	if s := screen(b); !strings.Contains(s, "save as: [demo.toml]") {
		t.Errorf("the demo's save as does not offer its name selected:\n%s", s)
	}
	out := filepath.Join(t.TempDir(), "d.toml")
	press(b, out, "enter")
	if _, err := os.Stat(out); err != nil {
		t.Errorf("demo save as: %v (%s)", err, b.message)
	}
}

// A program value typed off the oven's keypad step is put on it (decimal
// rounding, half-way values away from zero), shown and saved so, and the
// status line says it.
func TestTypedProgramValueOnKeypadStep(t *testing.T) {
	a, path := newApp(t, 80, 24)
	ramp := func() methodfile.Ramp { return a.Method().Oven.Ramps[0] }
	typeAt := func(moves int, text string) {
		t.Helper()
		for i := 0; i < moves; i++ {
			press(a, "right")
		}
		press(a, "enter", text, "enter")
		for i := 0; i < moves; i++ {
			press(a, "left")
		}
	}
	typeAt(2, "12.345")
	if got := ramp().RateCMin; got != 12.3 {
		t.Errorf("rate 12.345 set as %v, want 12.3", got)
	}
	if !strings.Contains(unwrap(a.message), "12.345 → 12.3 °C/min (the oven's step is 0.1)") {
		t.Errorf("the status line does not say the step: %q", a.message)
	}
	if s := screen(a); !strings.Contains(s, "12.3 °C/min") || strings.Contains(s, "12.35") {
		t.Errorf("the screen does not show 12.3:\n%s", s)
	}
	typeAt(2, "12.35") // 12.3499… in binary: a float rounding gives 12.3
	if got := ramp().RateCMin; got != 12.4 {
		t.Errorf("rate 12.35 set as %v, want 12.4", got)
	}
	typeAt(0, "50.04")
	if got := a.Method().Oven.InitialC; got != 50 {
		t.Errorf("start 50.04 set as %v, want 50", got)
	}
	typeAt(1, "1.005")
	if got := a.Method().Oven.InitialHoldMin; got != 1.01 {
		t.Errorf("hold 1.005 set as %v, want 1.01", got)
	}
	typeAt(3, "240.06")
	if got := ramp().FinalC; got != 240.1 {
		t.Errorf("final 240.06 set as %v, want 240.1", got)
	}
	// on the step already: no note
	typeAt(2, "13.5")
	if strings.Contains(a.message, "→") {
		t.Errorf("a value on the step got a note: %q", a.message)
	}
	// what is saved is what is shown, and no keypad caution is left
	press(a, "ctrl+s")
	m, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if r := m.Oven.Ramps[0]; r.RateCMin != 13.5 || r.FinalC != 240.1 || m.Oven.InitialHoldMin != 1.01 {
		t.Errorf("saved %+v, hold %v", r, m.Oven.InitialHoldMin)
	}
	for _, n := range m.Advice() {
		if strings.Contains(n.Msg, "step") {
			t.Errorf("a keypad caution remains: %s", n)
		}
	}
}

// lineOfNth is the 1-based line of the n-th line of text starting with
// prefix.
func lineOfNth(text, prefix string, n int) int {
	for i, l := range strings.Split(text, "\n") {
		if strings.HasPrefix(strings.TrimSpace(l), prefix) {
			if n--; n == 0 {
				return i + 1
			}
		}
	}
	return 0
}

// An error about a ramp the file does not have names its key, no line of
// another ramp; a ramp's line after a removal is its own in the file, and
// after a save it is the line in the file written.
func TestErrorLinesOfRampsNotInFile(t *testing.T) {
	a, path, orig := openFile(t, "commented.toml")
	name := filepath.Base(path)
	// ramp 1's rate is on its own line
	press(a, "right", "right", "enter", "150", "enter")
	want := fmt.Sprintf("%s:%d: oven.ramp[1].rate_c_min:", name, lineOfNth(orig, "rate_c_min", 1))
	if !strings.Contains(unwrap(a.message), want) {
		t.Errorf("ramp 1: want %q in %q", want, a.message)
	}
	// a ramp added here: no line (the file has two ramps)
	press(a, "left", "left", "a") // ramp 3's rate is selected
	press(a, "enter", "150", "enter")
	msg := unwrap(a.message)
	if !strings.Contains(msg, name+": oven.ramp[3].rate_c_min: 150 °C/min") {
		t.Errorf("added ramp: %q", msg)
	}
	press(a, "u") // back to two ramps
	// ramp 1 removed: ramp 1 is now the file's second ramp, on its lines
	a.program.list.sel = 2 // ramp 1's rate
	press(a, "x")
	if got := a.Method().Oven.Ramps[0].RateCMin; got != 20 {
		t.Fatalf("x removed the wrong ramp: rate %v left", got)
	}
	if n := len(a.Method().Oven.Ramps); n != 1 {
		t.Fatalf("%d ramps after x", n)
	}
	a.program.list.sel = 2 // ramp 1's rate
	press(a, "enter", "150", "enter")
	want = fmt.Sprintf("%s:%d: oven.ramp[1].rate_c_min:", name, lineOfNth(orig, "rate_c_min", 2))
	if !strings.Contains(unwrap(a.message), want) {
		t.Errorf("after removing ramp 1: want %q in %q", want, a.message)
	}
	// saved under another name: its name and its lines
	other := filepath.Join(filepath.Dir(path), "saved.toml")
	press(a, "W", other, "enter")
	saved, err := os.ReadFile(other)
	if err != nil {
		t.Fatal(err)
	}
	a.program.list.sel = 2
	press(a, "enter", "150", "enter")
	want = fmt.Sprintf("%s:%d: oven.ramp[1].rate_c_min:", other, lineOfNth(string(saved), "rate_c_min", 1))
	if !strings.Contains(unwrap(a.message), want) {
		t.Errorf("after save as: want %q in %q", want, a.message)
	}
}
