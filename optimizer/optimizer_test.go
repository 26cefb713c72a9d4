package optimizer

import (
	"context"
	"math"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

func demoProblem(t testing.TB) Problem {
	t.Helper()
	m, err := methodfile.ReadFile("../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	sys, err := m.System()
	if err != nil {
		t.Fatal(err)
	}
	// what methodsearch.Problem builds (that package imports this one)
	return Problem{
		System: sys, Start: m.ModelProgram(), Ramps: m.Goal.Ramps, Lock: m.Goal.Lock,
		Limits: Limits{
			OvenMin:  m.Limits.OvenMinC + model.ZeroCelsius,
			MaxTemp:  m.Column.MaxTempC + model.ZeroCelsius,
			MaxRate:  m.Limits.MaxRateCMin / 60,
			MaxHold:  m.Limits.MaxHoldMin * 60,
			MaxInlet: m.Limits.MaxInletKPa * 1000,
		},
		MinResolution: m.Goal.MinResolution, Objective: m.Goal.Objective, Tail: m.Goal.TailMin * 60,
	}
}

func TestDemoMeetsTarget(t *testing.T) {
	p := demoProblem(t)
	r, err := Optimize(context.Background(), p, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("status %v run %.3f min Rs %.3f evals %d elapsed %v program %+v", r.Status, r.Sim.RunTime/60, r.Sim.MinResolution, r.Evaluations, r.Elapsed, r.Program)
	if !r.Feasible() {
		t.Fatalf("demo target not met: %s", r.Explanation)
	}
	checkResult(t, p, r)
}

// checkResult: every limit holds and the reported figures are a fresh
// simulation of the returned program.
func checkResult(t *testing.T, p Problem, r *Result) {
	t.Helper()
	l := p.Limits
	prog := r.Program
	if err := prog.Validate(l.MaxTemp); err != nil {
		t.Errorf("returned program invalid: %v", err)
	}
	if !p.locked(model.ProgramValue{Kind: model.InitialTemp}) && prog.Initial < l.OvenMin-1e-9 {
		t.Errorf("initial %v below oven minimum %v", prog.Initial, l.OvenMin)
	}
	if prog.InitialHold > l.MaxHold+1e-9 {
		t.Errorf("initial hold %v over limit", prog.InitialHold)
	}
	for i, rp := range prog.Ramps {
		if rp.Rate > l.MaxRate*(1+1e-12) || rp.Hold > l.MaxHold+1e-6 || rp.Final > l.MaxTemp {
			t.Errorf("ramp %d breaks a limit: %+v", i+1, rp)
		}
	}
	var fresh model.Result
	if err := p.System.Simulate(prog, &fresh); err != nil {
		t.Fatal(err)
	}
	if math.Abs(fresh.MinResolution-r.Sim.MinResolution) > 1e-12 || math.Abs(fresh.RunTime-r.Sim.RunTime) > 1e-9 {
		t.Errorf("reported Rs %v run %v, fresh %v %v", r.Sim.MinResolution, r.Sim.RunTime, fresh.MinResolution, fresh.RunTime)
	}
	if r.Feasible() && fresh.MinResolution < p.MinResolution {
		t.Errorf("claims met with Rs %v < %v", fresh.MinResolution, p.MinResolution)
	}
	for _, pk := range fresh.Peaks {
		if !pk.Eluted && p.System.Compounds[pk.Compound].Target && r.Feasible() {
			t.Errorf("target %s does not elute in the returned program", p.System.Compounds[pk.Compound].Name)
		}
	}
}
