package optimizer

import (
	"context"
	"strings"
	"testing"
	"time"

	"github.com/rampwise/rampwise/model"
)

// The example: goal.lock = ["final_1", "hold_1"] on the demo is
// honoured by the trim (checkResult compares every locked value).
func TestDemoLocksHonoured(t *testing.T) {
	p := demoProblem(t)
	p.Lock = []model.ProgramValue{{Kind: model.RampFinal, Ramp: 1}, {Kind: model.RampHold, Ramp: 1}}
	p.Robust = Robust{}
	r, err := Optimize(context.Background(), p, Settings{Starts: 6})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%v %.3f min %+v %s", r.Status, r.Sim.RunTime/60, r.Oven, r.Explanation)
	checkResult(t, p, r)
	if len(r.Oven.Ramps) == 0 || r.Oven.Ramps[0].FinalC != 240 || r.Oven.Ramps[0].HoldMin != 2 {
		t.Errorf("locked final_1 = 240 °C and hold_1 = 2 min changed: %+v", r.Oven)
	}
}

// Instrument limits bind the search: a rate band, the isothermal limit and
// the detector − 20 °C rule (checkResult checks each on the saved program).
func TestLimitsAreHard(t *testing.T) {
	p := demoProblem(t)
	p.Robust = Robust{}
	p.Limits.RateBands = []RateBand{{Above: 150 + model.ZeroCelsius, MaxRate: 15 * perMin}}
	p.Limits.MaxIsothermal = 250 + model.ZeroCelsius
	p.Limits.Detector = 260 + model.ZeroCelsius
	r, err := Optimize(context.Background(), p, Settings{Starts: 6})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%v %.3f min %+v %s", r.Status, r.Sim.RunTime/60, r.Oven, r.Explanation)
	checkResult(t, p, r)
	for _, rp := range r.Oven.Ramps {
		if rp.FinalC > 150 && rp.RateCMin > 15 {
			t.Errorf("ramp into the band above 150 °C at %v °C/min", rp.RateCMin)
		}
		if rp.FinalC > 240 {
			t.Errorf("final %v °C above the detector 260 °C − 20", rp.FinalC)
		}
	}
}

// min_first_k: a first target too close to the void fails with the reason.
func TestMinFirstK(t *testing.T) {
	p := smallProblem(t, smallCompounds(), 1)
	p.Lock = []model.ProgramValue{FlowLock}
	p.MinFirstK = 50
	r, err := Optimize(context.Background(), p, Settings{Starts: 4})
	if err != nil {
		t.Fatal(err)
	}
	if r.Feasible() || !strings.Contains(r.Explanation, "min_first_k") {
		t.Errorf("first-k rule not enforced: %v %s", r.Status, r.Explanation)
	}
}

// An early stop offers a program only when it meets the target and beats
// the method's own program.
func TestEarlyStopOffersOnlyBetter(t *testing.T) {
	p := demoProblem(t)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r, err := Optimize(ctx, p, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Offer || !r.Canceled || !strings.HasPrefix(r.Explanation, "stopped") {
		t.Errorf("stopped before any search: offer %v, canceled %v, %q", r.Offer, r.Canceled, r.Explanation)
	}
	// against a start program that already meets the target
	p.Robust = Robust{}
	p.Lock = []model.ProgramValue{FlowLock}
	full, err := Optimize(context.Background(), p, Settings{Starts: 4})
	if err != nil || !full.Feasible() {
		t.Fatalf("%v %v", err, full.Explanation)
	}
	p.Start = full.Program
	if err := p.check(); err != nil {
		t.Fatal(err)
	}
	sh := newShared(p, Settings{}.withDefaults(), time.Now())
	if better, ok := sh.beatsStart(full.Sim.RunTime * 1.5); better || !ok {
		t.Errorf("a program 1.5× slower than the current one counts as better (%v, %v)", better, ok)
	}
	if better, _ := sh.beatsStart(full.Sim.RunTime * 0.9); !better {
		t.Error("a faster program does not count as better")
	}
}
