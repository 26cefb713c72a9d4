package plan

import (
	"context"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// With no runs yet and a budget of 3, the first scouting run is a linear
// ramp from the lowest oven start, designed with the one planned after it.
func TestFirstRunPlannedWithTheNext(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the optimizer several times")
	}
	_, rough := newSample(t, 6016)
	p, err := Next(context.Background(), rough, nil, Settings{Optimizer: testOptimizer})
	if err != nil {
		t.Fatal(err)
	}
	if p.Action != Inject {
		t.Fatalf("action %s, want inject: %s", p.Action, p.Reason)
	}
	if p.Oven.InitialC != rough.Limits.OvenMinC || len(p.Oven.Ramps) != 1 {
		t.Errorf("first run %+v: want one linear ramp from the lowest start %.1f °C", p.Oven, rough.Limits.OvenMinC)
	}
	if !strings.Contains(p.Reason, "planned after it") {
		t.Errorf("the reason does not name the run planned after it: %s", p.Reason)
	}
	if err := p.Method.Validate(); err != nil {
		t.Error(err)
	}
}

// Two scouting runs made and a budget of 3: a program that holds the
// margin is verified, however much faster one would be with the parameters
// known; with a larger budget and no slack for slower programs, the same
// knowledge asks for another scouting run instead.
func TestBudgetDecidesVerifyOrScout(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the optimizer several times")
	}
	truth, rough := newSample(t, 6002)
	l := &lab{truth: truth, rng: rand.New(rand.NewPCG(6002, 99))}
	for i, r := range []float64{5, 20} {
		o := methodfile.Oven{InitialC: 35, InitialHoldMin: 1, Ramps: []methodfile.Ramp{{RateCMin: r, FinalC: 300, HoldMin: 5}}}
		if _, err := l.inject(string(rune('a'+i)), o); err != nil {
			t.Fatal(err)
		}
	}
	runs, err := l.runsFile(rough)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Next(context.Background(), rough, runs, Settings{Optimizer: testOptimizer, Injections: 3, Slower: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	if p.Action != Verify {
		t.Fatalf("budget 3 after 2 runs: action %s, want verify: %s", p.Action, p.Reason)
	}
	t.Logf("budget 3: verify %.2f min: %s", methodfile.ProgramToModel(p.Oven).RunTime()/60, p.Reason)
	if !strings.Contains(p.Reason, "leaves no scouting run") {
		t.Errorf("the budget's end is not named in the reason: %s", p.Reason)
	}
	q, err := Next(context.Background(), rough, runs, Settings{Optimizer: testOptimizer, Injections: 6, Slower: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	if q.Action != Inject {
		t.Fatalf("budget 6, no slack: action %s, want inject: %s", q.Action, q.Reason)
	}
	if !strings.Contains(q.Reason, "with the parameters known") {
		t.Errorf("the reason does not give the faster program's duration: %s", q.Reason)
	}
}

// The advice does not depend on the program the method happens to hold:
// with the demo's oven set to the program plan advised for verification,
// plan still advises a verification, of a program no slower.
func TestAdviceIndependentOfTheMethodsProgram(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the optimizer several times")
	}
	m, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	s := Settings{Optimizer: optimizer.Settings{Workers: 1}} // the command's effort
	p, err := Next(context.Background(), m, nil, s)
	if err != nil {
		t.Fatal(err)
	}
	if p.Action != Verify {
		t.Fatalf("demo: action %s, want verify: %s", p.Action, p.Reason)
	}
	m2 := m.Clone()
	m2.Oven = p.Oven
	q, err := Next(context.Background(), m2, nil, s)
	if err != nil {
		t.Fatal(err)
	}
	d1, d2 := methodfile.ProgramToModel(p.Oven).RunTime(), methodfile.ProgramToModel(q.Oven).RunTime()
	if q.Action != Verify || d2 > d1*1.001 {
		t.Errorf("with the advised program as the method's: %s of %.2f min (first advice %.2f min): %s", q.Action, d2/60, d1/60, q.Reason)
	}
}
