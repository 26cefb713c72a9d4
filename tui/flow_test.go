package tui

import (
	"bytes"
	"path/filepath"
	"reflect"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/teatest"

	"github.com/rampwise/rampwise/model/methodfile"
)

func keyRune(r rune) tea.KeyMsg { return tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}} }

func waitScreen(t *testing.T, tm *teatest.TestModel, text string) {
	t.Helper()
	teatest.WaitFor(t, tm.Output(), func(b []byte) bool { return bytes.Contains(b, []byte(text)) },
		teatest.WithDuration(20*time.Second), teatest.WithCheckInterval(20*time.Millisecond))
}

// edit → re-simulated on screen
func TestFlowEditResimulates(t *testing.T) {
	a, _ := newApp(t, 100, 30)
	tm := teatest.NewTestModel(t, a, teatest.WithInitialTermSize(100, 30))
	tm.Send(tea.KeyMsg{Type: tea.KeyRight})
	tm.Send(tea.KeyMsg{Type: tea.KeyRight})
	tm.Send(keyRune('['))
	tm.Send(keyRune('['))
	waitScreen(t, tm, "2.0 °C/min")
	tm.Send(keyRune('q'))
	waitScreen(t, tm, "unsaved changes")
	tm.Send(keyRune('d'))
	final := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*App)
	if final.Method().Oven.Ramps[0].RateCMin != 2 {
		t.Errorf("rate %v", final.Method().Oven.Ramps[0].RateCMin)
	}
	if got := final.Result().RunTime / 60; got < 90 {
		t.Errorf("run time %v min after slowing the ramp to 2 °C/min", got)
	}
}

// optimize → accept → the program changed and the target is met
func TestFlowOptimizeAccept(t *testing.T) {
	a, _ := newApp(t, 100, 30)
	before := a.Method().Oven
	tm := teatest.NewTestModel(t, a, teatest.WithInitialTermSize(100, 30))
	tm.Send(keyRune('o'))
	waitScreen(t, tm, "target met")
	tm.Send(tea.KeyMsg{Type: tea.KeyEnter})
	waitScreen(t, tm, "took the optimized program")
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlS})
	waitScreen(t, tm, "saved to")
	tm.Send(keyRune('q'))
	final := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*App)
	if reflect.DeepEqual(final.Method().Oven, before) {
		t.Error("program unchanged after accepting")
	}
	if rs := final.Result().MinResolution; rs < final.Method().Goal.MinResolution {
		t.Errorf("accepted program has Rs %v", rs)
	}
	// save → the file on disk loads back equal
	back, err := methodfile.ReadFile(final.Path())
	if err != nil {
		t.Fatal(err)
	}
	if !back.Equal(final.Method()) {
		t.Error("saved method differs")
	}
}

// esc during the run cancels; the best program so far is offered only when it meets the target and beats the current one
func TestFlowOptimizeCancel(t *testing.T) {
	a, _ := newApp(t, 100, 30)
	a.optSettings.Starts = 400
	a.optSettings.Evaluations = 50000
	tm := teatest.NewTestModel(t, a, teatest.WithInitialTermSize(100, 30))
	tm.Send(keyRune('o'))
	waitScreen(t, tm, "evaluations")
	tm.Send(tea.KeyMsg{Type: tea.KeyEsc})
	waitScreen(t, tm, "stopped early")
	tm.Send(tea.KeyMsg{Type: tea.KeyEsc})
	tm.Send(keyRune('q'))
	tm.WaitFinished(t, teatest.WithFinalTimeout(10*time.Second))
}

// fit in the background → review → take it, end to end
func TestFlowFitInBackground(t *testing.T) {
	a, _ := newApp(t, 100, 30)
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	tm := teatest.NewTestModel(t, a, teatest.WithInitialTermSize(100, 30))
	tm.Send(keyRune('F'))
	waitScreen(t, tm, "scouting runs file")
	tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(runs)})
	tm.Send(tea.KeyMsg{Type: tea.KeyEnter})
	waitScreen(t, tm, "→ fitted")
	tm.Send(keyRune('y'))
	waitScreen(t, tm, "took the fitted parameters")
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlC})
	waitScreen(t, tm, "d discard and quit")
	tm.Send(keyRune('d'))
	tm.WaitFinished(t, teatest.WithFinalTimeout(10*time.Second))
}

// ctrl+c while the optimizer runs with unsaved changes stops the search
// and asks, like q
func TestFlowInterruptDuringOptimize(t *testing.T) {
	a, _ := newApp(t, 100, 30)
	a.optSettings.Starts = 400
	a.optSettings.Evaluations = 50000
	tm := teatest.NewTestModel(t, a, teatest.WithInitialTermSize(100, 30))
	tm.Send(keyRune('-'))
	tm.Send(keyRune('o'))
	waitScreen(t, tm, "evaluations")
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlC})
	waitScreen(t, tm, "d discard and quit")
	tm.Send(keyRune('d'))
	final := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*App)
	if final.job != nil {
		t.Error("the search was not stopped")
	}
}
