package tui

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/methodfile"
)

// The method line says goal.ramps is the optimizer's limit, not the
// program's count: the demo's program has 1 ramp, goal.ramps is 2.
func TestMethodLineSaysOptimizerRamps(t *testing.T) {
	for _, w := range []int{80, 120} {
		a, _ := newApp(t, w, 24)
		got := strings.Join(a.methodLines(1000), " ")
		if len(a.sh.method.Oven.Ramps) == a.sh.method.Goal.Ramps {
			t.Fatalf("the test needs a program whose ramp count differs from goal.ramps")
		}
		if !strings.Contains(got, "optimizer: run-time, up to 2 ramps") || strings.Contains(got, "goal run-time, 2 ramps") {
			t.Errorf("method line %q", got)
		}
		a.sh.method.Goal.Ramps = 1
		if got := strings.Join(a.methodLines(1000), " "); !strings.Contains(got, "up to 1 ramp ·") {
			t.Errorf("one ramp: %q", got)
		}
	}
}

// appWith is the demo with the given ramps, on a w×h terminal.
func appWith(t *testing.T, ramps []methodfile.Ramp, w, h int) *App {
	t.Helper()
	m := demoMethod(t)
	m.Oven.Ramps = ramps
	path := filepath.Join(t.TempDir(), "ramps.toml")
	if err := methodfile.WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	a, err := New(m, Options{Path: path, Name: "ramps.toml", NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: w, Height: h})
	return a
}

func rampsUpTo(n int) []methodfile.Ramp {
	var rs []methodfile.Ramp
	for i := 0; i < n; i++ {
		rs = append(rs, methodfile.Ramp{RateCMin: 10 + float64(i), FinalC: 100 + 20*float64(i), HoldMin: 0.5})
	}
	return rs
}

// Every ramp of a two-ramp program (what the optimizer gives the demo) is
// on screen at 80×24, whatever is selected, with no hint of more; the
// screen keeps its size.
func TestProgramShowsEveryRampAt80x24(t *testing.T) {
	a := appWith(t, rampsUpTo(2), 80, 24)
	for sel := 0; sel < 8; sel++ {
		s := screen(a)
		for _, want := range []string{"start", "100.0 °C", "120.0 °C", "│ 1:", "│ 2:"} {
			if !strings.Contains(s, want) {
				t.Errorf("selection %d: %q not on screen:\n%s", sel, want, s)
			}
		}
		if strings.Contains(s, "more →") || strings.Contains(s, "← ") {
			t.Errorf("selection %d: a hint of hidden steps where none is hidden:\n%s", sel, s)
		}
		if n := strings.Count(s, "\n") + 1; n != 24 {
			t.Fatalf("%d lines", n)
		}
		press(a, "right")
	}
	if got := len(a.program.lines); got != 3 {
		t.Errorf("the program takes %d rows, want 3", got)
	}
}

// More ramps than the rows hold: the hints say how many steps are hidden
// on each side and the arrow that reaches them, and → reaches them all.
func TestProgramHintsReachHiddenRamps(t *testing.T) {
	a := appWith(t, rampsUpTo(6), 80, 24)
	prog := func() string { return strings.Join(a.program.lines, "\n") }
	if !strings.Contains(prog(), "4 more →") {
		t.Fatalf("no hint of the 4 hidden ramps:\n%s", prog())
	}
	seen := map[int]bool{}
	for i := 0; i < 2+3*6; i++ {
		for r := 1; r <= 6; r++ {
			if strings.Contains(prog(), fmt.Sprintf("│ %d:", r)) {
				seen[r] = true
			}
		}
		press(a, "right")
	}
	if len(seen) != 6 {
		t.Errorf("ramps seen with →: %v", seen)
	}
	press(a, "left") // the last value, the 6th ramp's hold
	if !strings.Contains(prog(), "← 4 more") || strings.Contains(prog(), "more →") {
		t.Errorf("at the end: want only the hint of the steps before:\n%s", prog())
	}
	// a taller terminal gives the program more rows: all of it shows
	b := appWith(t, rampsUpTo(6), 80, 44)
	if s := strings.Join(b.program.lines, "\n"); strings.Contains(s, "more") || !strings.Contains(s, "│ 6:") {
		t.Errorf("80×44 should show all 6 ramps:\n%s", s)
	}
}
