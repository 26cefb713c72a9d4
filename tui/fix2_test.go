package tui

import (
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/methodfile"
)

// newAppFrom opens a testdata method saved to a temporary file, sized w×h.
func newAppFrom(t *testing.T, file string, w, h int) *App {
	t.Helper()
	m, err := methodfile.ReadFile(filepath.Join("..", "testdata", file))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), file)
	if err := methodfile.WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	m, _ = methodfile.ReadFile(path)
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
