package tui

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// newAppFrom opens a copy of a testdata method file (byte for byte), sized w×h.
func newAppFrom(t *testing.T, file string, w, h int) *App {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("..", "testdata", file))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), file)
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	m, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	a, err := New(m, Options{Path: path, Name: file, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: w, Height: h})
	return a
}

// The optimizer varies the carrier flow with the program: the result
// dialog says the change (before the user takes it) at 80×24, next to the
// robust margin, and the message after taking it says it again.
func TestResultShowsCarrierChange(t *testing.T) {
	a := newAppFrom(t, "commented.toml", 80, 24)
	fastOptimizer(a)
	before := a.Method().Carrier.FlowMLMin
	press(a, "o")
	d, ok := a.overlay.(*resultDialog)
	if !ok {
		t.Fatalf("no result: %s", a.message)
	}
	after := d.after.Carrier.FlowMLMin
	if after == before {
		t.Fatalf("the optimizer kept the flow (%g): the repro expects a change", after)
	}
	s := screen(a)
	want := "flow " + fmtNum(before, 2, 2) + " → " + fmtNum(after, 2, 2) + " mL/min"
	if !strings.Contains(s, want) {
		t.Errorf("%q not on the 80×24 screen:\n%s", want, s)
	}
	if d.res.Robust.On {
		for _, w := range []string{"nominal Rs", "worst Rs", "Rs ± σ", "worst at"} {
			if !strings.Contains(s, w) {
				t.Errorf("robust margin %q not shown at 80×24:\n%s", w, s)
			}
		}
	}
	press(a, "enter")
	if !strings.Contains(a.message, want) {
		t.Errorf("message after taking it: %q, want %q in it", a.message, want)
	}
	if got := a.Method().Carrier.FlowMLMin; got != after {
		t.Errorf("flow taken %g, want %g", got, after)
	}
}

// Adding a coolant moves only a defaulted lowest start: an explicit
// limits.oven_min_c (the demo's 35.0) stays, also in the saved file, and a
// program starting below it is said as advice; a file without it follows
// the coolant (coolant + 10 °C).
func TestCoolantKeepsExplicitOvenMin(t *testing.T) {
	a, path := newApp(t, 80, 24) // the demo sets oven_min_c = 35.0
	pickSetting(t, a, "limits.coolant_c")
	press(a, "-")
	if got := a.Method().Limits.OvenMinC; got != 35 {
		t.Fatalf("explicit oven_min_c became %g (%s)", got, a.message)
	}
	press(a, "esc", "ctrl+s")
	m, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !m.Limits.HasCoolant || m.Limits.OvenMinC != 35 {
		t.Fatalf("saved limits %+v, want the coolant and oven_min_c 35", m.Limits)
	}
	a.setFocus(paneProgram)
	a.program.list.sel = 0
	press(a, "enter", "ctrl+u", "-20", "enter")
	if a.Method().Oven.InitialC != -20 {
		t.Fatalf("start -20 °C refused with a coolant: %s", a.message)
	}
	pickSetting(t, a, "limits.coolant_c")
	press(a, "-") // another coolant temperature: the start is below the lowest
	if got := a.Method().Limits.OvenMinC; got != 35 {
		t.Fatalf("explicit oven_min_c became %g", got)
	}
	if !strings.Contains(a.message, "stays 35.0 °C") || !strings.Contains(a.message, "starts below it") {
		t.Errorf("no advice about the start below the explicit lowest: %q", a.message)
	}

	b := newAppFrom(t, "commented.toml", 80, 24) // no oven_min_c: the default
	pickSetting(t, b, "limits.coolant_c")
	press(b, "-")
	if got := b.Method().Limits.OvenMinC; got != defaultCoolantC+10 {
		t.Errorf("defaulted oven_min_c %g, want it to follow the coolant to %g (%s)", got, defaultCoolantC+10, b.message)
	}
}

// The cryogen caution in the settings is never cut, at any size: either
// whole (wrapped) or one whole sentence that points to !; no line of the
// settings ends in "…" inside safety text.
func TestCryogenCautionWhole(t *testing.T) {
	for _, size := range [][2]int{{80, 24}, {120, 40}, {100, 30}} {
		a, _ := newApp(t, size[0], size[1])
		pickSetting(t, a, "carrier.gas")
		press(a, "+") // hydrogen too: less room
		pickSetting(t, a, "limits.coolant_c")
		press(a, "-", "esc")
		a.setFocus(paneSettings)
		a.refresh()
		s := screen(a)
		flat := strings.Join(strings.Fields(s), " ")
		whole := strings.Contains(flat, strings.Join(strings.Fields(model.CryogenCaution), " "))
		short := strings.Contains(flat, cryogenShort)
		if !whole && !short {
			t.Errorf("%dx%d: the cryogen caution is neither whole nor pointed to:\n%s", size[0], size[1], s)
		}
		for _, l := range strings.Split(s, "\n") {
			if strings.Contains(l, "⚠") && strings.HasSuffix(strings.TrimSpace(l), "…") {
				t.Errorf("%dx%d: safety text cut: %q", size[0], size[1], l)
			}
		}
	}
}

// After a (add ramp) at 80×24 the new ramp's rate is selected and on the
// screen, also when the earlier ramps fill the line.
func TestAddRampSelectsIt(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	have := len(a.Method().Oven.Ramps)
	for n := have + 1; n <= have+3; n++ {
		press(a, "a")
		m := a.Method()
		if len(m.Oven.Ramps) != n {
			t.Fatalf("a gave %d ramps, want %d: %s", len(m.Oven.Ramps), n, a.message)
		}
		f := programFields(m)[a.program.list.sel]
		if f.ramp != n || f.pv.Kind != model.RampRate {
			t.Fatalf("after adding ramp %d the selection is %s", n, f.key)
		}
		want := fmt.Sprintf("%d: [", n)
		if s := screen(a); !strings.Contains(s, want) {
			t.Errorf("ramp %d not shown selected (%q):\n%s", n, want, s)
		}
	}
}

// An optional value not set shows "none" alone, never "none °C"; a set
// coolant shows at the oven's keypad precision like the other temperatures.
func TestNoneWithoutUnit(t *testing.T) {
	for _, size := range [][2]int{{80, 24}, {120, 40}} {
		a, _ := newApp(t, size[0], size[1])
		pickSetting(t, a, "limits.coolant_c")
		s := screen(a)
		if strings.Contains(s, "none °C") || !strings.Contains(s, "[none]") {
			t.Errorf("%dx%d: coolant not shown as [none]:\n%s", size[0], size[1], s)
		}
		press(a, "-", "esc")
		if s := screen(a); !strings.Contains(s, "[-50.0 °C]") {
			t.Errorf("%dx%d: coolant not at keypad precision:\n%s", size[0], size[1], s)
		}
		if !strings.HasPrefix(a.message, "limits.coolant_c = -50.0 °C") {
			t.Errorf("message %q", a.message)
		}
		press(a, "enter", "ctrl+u", "none", "enter")
		if a.Method().Limits.HasCoolant || !strings.HasPrefix(a.message, "limits.coolant_c = none") || strings.Contains(a.message, "none °C") {
			t.Errorf("clearing the coolant: %+v, %q", a.Method().Limits, a.message)
		}
	}
}

// On a terminal smaller than 80×24 the message fits its width whole (the
// terminal would cut a longer line): both sizes are said.
func TestTooSmallMessageWhole(t *testing.T) {
	for _, size := range [][2]int{{60, 20}, {40, 12}, {79, 30}} {
		a, _ := newApp(t, 80, 24)
		press(a, "-") // unsaved: q asks
		a.Update(tea.WindowSizeMsg{Width: size[0], Height: size[1]})
		press(a, "q")
		v := a.View()
		for _, l := range strings.Split(v, "\n") {
			if w := ansi.StringWidth(l); w > size[0] {
				t.Errorf("%dx%d: line %q is %d wide", size[0], size[1], l, w)
			}
		}
		flat := strings.Join(strings.Fields(v), " ")
		for _, want := range []string{fmt.Sprintf("at least %d×%d", MinWidth, MinHeight), fmt.Sprintf("this one is %d×%d.", size[0], size[1]), "q quits", "d discard and quit"} {
			if !strings.Contains(flat, want) {
				t.Errorf("%dx%d: %q missing:\n%s", size[0], size[1], want, v)
			}
		}
	}
}

// No title line of a pane or a dialog (the lines starting with ▸) is cut
// with "…" at 80×24 or 120×40: whole items are left out instead.
func TestTitlesNotCut(t *testing.T) {
	for _, sc := range screens {
		for _, size := range [][2]int{{80, 24}, {120, 40}} {
			a, _ := newApp(t, size[0], size[1])
			sc.setup(t, a)
			a.refresh()
			for _, l := range strings.Split(screen(a), "\n") {
				if strings.HasPrefix(l, "▸") && strings.HasSuffix(strings.TrimSpace(l), "…") {
					t.Errorf("%s %dx%d: title cut: %q", sc.name, size[0], size[1], l)
				}
			}
		}
	}
}

// The C prompt says how the groups are separated, whole at 80×24; a save
// as refused (an existing file not written here) replaces the last message.
func TestComparePromptAndRefusedSaveAs(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "C")
	flat := strings.Join(strings.Fields(screen(a)), " ")
	if !strings.Contains(flat, "a space between the groups") {
		t.Errorf("C prompt does not say the groups are separated by a space:\n%s", screen(a))
	}
	press(a, "esc")
	other := filepath.Join(t.TempDir(), "other.toml")
	if err := os.WriteFile(other, []byte("# someone else's\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	a.say(msgGood, "exported e.png (figure) and e.md (method sheet)")
	press(a, "W", "ctrl+u", other, "enter")
	if strings.Contains(a.message, "exported") || !strings.Contains(a.message, "not saved") {
		t.Errorf("while asking to replace, the message is %q", a.message)
	}
	press(a, "n")
	if strings.Contains(a.message, "exported") || !strings.Contains(a.message, "not saved") {
		t.Errorf("after refusing, the message is %q", a.message)
	}
	if b, _ := os.ReadFile(other); string(b) != "# someone else's\n" {
		t.Errorf("the other file changed: %q", b)
	}
}
