package tui

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/robust"
	"github.com/rampwise/rampwise/model/robust/methodtol"
	"github.com/rampwise/rampwise/optimizer"
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

// The optimizer's result at 80×24, with a two-ramp current program (the
// program then takes 3 rows) and the status message: the run time, the
// nominal, worst-corner and Rs − 2σ figures of both programs, the carrier
// and every step of the new program show without scrolling.
func TestResultKeyRowsWithoutScrolling(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	a.name = "demo (built in, a name long enough to wrap the title).toml"
	press(a, "a") // a second ramp: the program takes 3 rows
	if a.rows.title != 2 || a.rows.program != 3 {
		t.Fatalf("want a 2-row title and a 3-row program: %+v", a.rows)
	}
	fastOptimizer(a)
	press(a, "o")
	d, ok := a.overlay.(*resultDialog)
	if !ok {
		t.Fatalf("no result: %s", a.message)
	}
	s := screen(a)
	if n := strings.Count(s, "\n") + 1; n != 24 {
		t.Fatalf("%d lines", n)
	}
	target := a.Method().Goal.MinResolution
	r, now := d.res.Robust, d.nowRob
	want := []string{
		"run time", fmt.Sprintf("%.2f min", a.res.RunTime/60), fmt.Sprintf("%.2f min", d.afterR.RunTime/60),
		"nominal Rs", format.RsNumber(a.res.MinResolution, target), format.RsNumber(d.afterR.MinResolution, target),
		"worst corner", format.RsNumber(now.Worst, target) + " " + format.Verdict(now.Worst, target), format.RsNumber(r.Worst, target) + " " + format.Verdict(r.Worst, target),
		"Rs − 2σ", format.RsNumber(now.LowZ, target), format.RsNumber(r.LowZ, target),
		carrierChange(a.Method().Carrier, d.after.Carrier),
	}
	for i, rp := range d.after.Oven.Ramps {
		want = append(want, fmt.Sprintf(" %-5d %7s %7s", i+1, fmtNum(rp.RateCMin, 1, 2), fmtNum(rp.FinalC, 1, 2)))
	}
	for _, w := range want {
		if !strings.Contains(s, w) {
			t.Errorf("80×24 result lacks %q:\n%s", w, s)
		}
	}
	if d.off != 0 {
		t.Errorf("scrolled by %d", d.off)
	}
}

// A result that needs more rows than the lower pane has (five ramps) takes
// them from the chart, which keeps minChartRows and has them back once the
// result closes; the screen keeps its height throughout.
func TestResultTakesRowsFromChart(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	a.name = "demo (built in, a name long enough to wrap the title).toml"
	a.refresh()
	chartRowsNow := func() int { return len(strings.Split(a.chart.View(), "\n")) }
	before := chartRowsNow()
	after := a.Method().Clone()
	after.Oven.Ramps = rampsUpTo(5)
	sys, _ := after.System()
	var sim model.Result
	if err := sys.Simulate(after.ModelProgram(), &sim); err != nil {
		t.Fatal(err)
	}
	d := newResultDialog(&a.sh, &optimizer.Result{Status: optimizer.Met}, after, sim)
	a.open(d)
	a.refresh()
	with := chartRowsNow()
	if with >= before || with < minChartRows {
		t.Errorf("chart rows %d before, %d with the result", before, with)
	}
	s := screen(a)
	if n := strings.Count(s, "\n") + 1; n != 24 {
		t.Fatalf("%d lines", n)
	}
	for i := range after.Oven.Ramps {
		if !strings.Contains(s, fmt.Sprintf(" %-5d %7s", i+1, fmtNum(after.Oven.Ramps[i].RateCMin, 1, 2))) {
			t.Errorf("ramp %d not shown:\n%s", i+1, s)
		}
	}
	press(a, "n")
	if got := chartRowsNow(); got != before {
		t.Errorf("chart rows %d after closing, want %d", got, before)
	}
	if n := strings.Count(screen(a), "\n") + 1; n != 24 {
		t.Fatalf("%d lines after closing", n)
	}
}

// After the optimizer's program is taken, the summary gives its worst
// corner and lowest Rs − 2σ, as model/robust computes them for the method
// now (methodtol.Check, a separate path), equal to what the optimizer
// reported; a hand edit changes them with the program.
func TestSummaryRobustAfterTaking(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	fastOptimizer(a)
	press(a, "o")
	d, ok := a.overlay.(*resultDialog)
	if !ok {
		t.Fatalf("no result: %s", a.message)
	}
	opt := d.res.Robust
	press(a, "y")
	target := a.Method().Goal.MinResolution
	check := func(when string) robust.Report {
		t.Helper()
		rep, err := methodtol.Check(a.Method(), a.sh.sys)
		if err != nil {
			t.Fatal(err)
		}
		s := unwrap(screen(a))
		w := "worst corner " + format.RsNumber(rep.Worst, target) + ", Rs − 2σ " + format.RsNumber(rep.LowZ, target)
		if !strings.Contains(s, w) {
			t.Errorf("%s: the summary lacks %q:\n%s", when, w, screen(a))
		}
		return rep
	}
	rep := check("taken")
	if format.RsNumber(rep.Worst, target) != format.RsNumber(opt.Worst, target) || format.RsNumber(rep.LowZ, target) != format.RsNumber(opt.LowZ, target) {
		t.Errorf("the method's robust figures %v / %v differ from the optimizer's %v / %v", rep.Worst, rep.LowZ, opt.Worst, opt.LowZ)
	}
	if format.Met(math.Min(rep.Worst, rep.LowZ), target) && !strings.Contains(unwrap(screen(a)), format.RsNumber(rep.LowZ, target)+" met") {
		t.Errorf("no verdict on the margin:\n%s", screen(a))
	}
	// the figures are never split from their names by the wrap
	for w := 80; w <= 140; w++ {
		for _, l := range a.summaryLines(w) {
			if strings.HasSuffix(l, " Rs") || strings.HasSuffix(l, " worst") || strings.HasPrefix(l, " − ") || strings.HasPrefix(l, " corner") {
				t.Errorf("width %d: a robust figure split: %q", w, a.summaryLines(w))
			}
			if strings.Contains(l, nbsp) {
				t.Errorf("width %d: a no-break space left in %q", w, l)
			}
		}
	}
	a.setFocus(paneProgram)
	a.program.list.sel = 0
	undo := len(a.undo)
	press(a, "[") // the start 10 °C lower
	if len(a.undo) != undo+1 {
		t.Fatalf("the edit was refused: %s", a.message)
	}
	after := check("edited")
	if after.Worst == rep.Worst {
		t.Errorf("the worst corner did not change with the program: %v", after.Worst)
	}
}

// At 80×24 the verification list and the window diagrams cut nothing:
// every row keeps its last column (the confidence of an assigned peak),
// the window diagram's legend and range stand whole, and where the list is
// scrolled is said; at 120×40 too.
func TestVerificationAndWindowDiagramUncut(t *testing.T) {
	run, _ := filepath.Abs("../testdata/lab/verify.csv")
	for _, size := range [][2]int{{80, 24}, {120, 40}} {
		a, _ := newApp(t, size[0], size[1])
		press(a, "V", run, "enter")
		d, ok := a.overlay.(*verifyDialog)
		if !ok {
			t.Fatalf("no verification dialog: %s", a.message)
		}
		s := screen(a)
		noCut(t, fmt.Sprintf("verification %dx%d", size[0], size[1]), s)
		if !strings.Contains(s, "assigned") || (d.rows() < len(d.body()) && !strings.Contains(s, "rows 1–")) {
			t.Errorf("%dx%d: no assigned column or no row position:\n%s", size[0], size[1], s)
		}
		// every assigned row shows its confidence
		for i, c := range d.v.ck.Compounds {
			if i >= d.rows() {
				break
			}
			if c.Assigned && !strings.Contains(s, fmt.Sprintf("%.2f\n", c.AssignedConfidence)) && !strings.Contains(s, fmt.Sprintf("%.2f \n", c.AssignedConfidence)) {
				t.Errorf("%dx%d: %s's confidence %.2f not shown:\n%s", size[0], size[1], c.Name, c.AssignedConfidence, s)
			}
		}
		press(a, "pgdown", "pgdown", "pgdown")
		noCut(t, "verification scrolled", screen(a))

		for _, keys := range [][]string{{"right", "right", "s"}, {"shift+tab", "s"}} {
			b, _ := newApp(t, size[0], size[1])
			press(b, keys...)
			sd, ok := b.overlay.(*sweepDialog)
			if !ok {
				t.Fatalf("no window diagram: %s", b.message)
			}
			s := screen(b)
			noCut(t, "window diagram", s)
			rng := fmt.Sprintf("%s %s–%s %s, within the method's limits", sd.spec.label, trimNum(round(sd.lo(), 3)), trimNum(round(sd.hi(), 3)), sd.spec.unit)
			for _, want := range []string{"left: min Rs (solid)", "right: run time, min (dotted)", rng} {
				if !strings.Contains(s, want) {
					t.Errorf("%dx%d window diagram lacks %q:\n%s", size[0], size[1], want, s)
				}
			}
		}
	}
}

// noCut fails on a line that ends in "…" (a cut) and on a screen that is
// wider than it should be.
func noCut(t *testing.T, what, s string) {
	t.Helper()
	for i, l := range strings.Split(s, "\n") {
		if strings.HasSuffix(strings.TrimRight(l, " "), "…") {
			t.Errorf("%s: line %d cut: %q", what, i, l)
		}
	}
}

func TestPackItems(t *testing.T) {
	st := DefaultStyles(true)
	items := []styledItem{{st.Dim, "alpha beta"}, {st.Dim, ""}, {st.Dim, "gamma"}, {st.Dim, strings.TrimSpace(strings.Repeat("long words ", 3))}}
	got := packItems(items, 20)
	want := []string{" alpha beta · gamma", " long words long", " words long words"}
	if strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("packItems = %q, want %q", got, want)
	}
}
