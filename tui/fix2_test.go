package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

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
