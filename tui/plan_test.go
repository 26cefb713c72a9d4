package tui

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/optimizer"
	"github.com/rampwise/rampwise/optimizer/plan"
)

// P plans the next run in the background and shows its action, program and
// reason; enter takes the program into the method as one undoable edit;
// after a measured run is added (F, a runs file) the plan updates from the
// runs, planned from the method as it was before their fit.
func TestPlanNextRun(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	a.optSettings = optimizer.Settings{Workers: 1, Starts: 4}
	before := a.Method()
	press(a, "P")
	d, ok := a.overlay.(*planDialog)
	if !ok {
		t.Fatalf("no plan: %T %s", a.overlay, a.message)
	}
	if d.v.runs != 0 || d.v.path != "" {
		t.Errorf("planned from %d runs in %q, want the method's values", d.v.runs, d.v.path)
	}
	s := screen(a)
	if !strings.Contains(s, "next run:") || !strings.Contains(s, "initial temperature") {
		t.Errorf("plan screen:\n%s", s)
	}
	full := strings.Join(d.body(), "\n")
	if !strings.Contains(full, "why: ") || !strings.Contains(full, "[[run]]") {
		t.Errorf("no reason or run block:\n%s", full)
	}
	want := d.v.p.Oven
	press(a, "enter")
	if a.overlay != nil || a.Method().Oven.Describe() != want.Describe() {
		t.Fatalf("the planned program was not taken: %s vs %s (%s)", a.Method().Oven.Describe(), want.Describe(), a.message)
	}
	press(a, "u")
	if a.Method() != before {
		t.Error("u did not undo taking the planned program")
	}
	// a measured run added: the fit review, then the plan again, from the runs
	runs, _ := filepath.Abs("../testdata/lab/runs.toml")
	press(a, "P", "F")
	if _, ok := a.overlay.(*promptDialog); !ok {
		t.Fatalf("F in the plan did not ask for a runs file: %T", a.overlay)
	}
	press(a, runs, "enter")
	if _, ok := a.overlay.(*fitDialog); !ok {
		t.Fatalf("no fit review: %T %s", a.overlay, a.message)
	}
	press(a, "y")
	d2, ok := a.overlay.(*planDialog)
	if !ok {
		t.Fatalf("the plan did not update after the fit: %T %s", a.overlay, a.message)
	}
	if d2.v.runs == 0 || d2.v.path != runs {
		t.Errorf("updated plan from %d runs in %q", d2.v.runs, d2.v.path)
	}
	if pm := a.planMethod(); pm.Compounds[0].DHkJ != before.Compounds[0].DHkJ {
		t.Errorf("planned from the fitted values (%v), not the prior (%v): the runs would count twice", pm.Compounds[0].DHkJ, before.Compounds[0].DHkJ)
	}
	if d2.v.p.Action == plan.Inject && strings.Contains(screen(a), "from the method's values") {
		t.Error("the updated plan says it comes from the method's values")
	}
}

// esc stops the planner: no plan opens afterwards.
func TestPlanCancel(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	a.Update(keyRune('P')) // starts the job without running it
	if _, ok := a.overlay.(*progressDialog); !ok {
		t.Fatalf("no progress while planning: %T", a.overlay)
	}
	id := a.job.id
	press(a, "esc")
	if a.job != nil || a.overlay != nil {
		t.Fatalf("esc left the job %v / %T", a.job, a.overlay)
	}
	send(a, doneMsg{id: id, v: planOutcome{p: &plan.Plan{}}})
	if a.overlay != nil {
		t.Errorf("a cancelled plan opened: %T", a.overlay)
	}
}
