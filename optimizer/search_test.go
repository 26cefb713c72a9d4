package optimizer

import (
	"context"
	"math"
	"reflect"
	"testing"
	"time"

	"github.com/rampwise/rampwise/model"
)

const perMin = 1.0 / 60

func smallProblem(t testing.TB, comps []model.Compound, ramps int) Problem {
	t.Helper()
	col := model.Column{Length: 15, Diameter: 0.25e-3, Film: 0.25e-6, MaxTemp: 300 + model.ZeroCelsius}
	car := model.Carrier{Gas: model.Helium, Mode: model.ConstantFlow, Flow: 1.2e-6 / 60}
	cond, err := model.NewConditions(col, car)
	if err != nil {
		t.Fatal(err)
	}
	sys, err := model.NewSystem(cond, comps, model.DefaultOven())
	if err != nil {
		t.Fatal(err)
	}
	return Problem{
		System:        sys,
		Start:         model.Program{Initial: 313.15, InitialHold: 60, Ramps: []model.Ramp{{Rate: 10 * perMin, Final: 523.15}}},
		Ramps:         ramps,
		Limits:        Limits{OvenMin: 308.15, MaxTemp: col.MaxTemp, MaxRate: 40 * perMin, MaxHold: 600},
		MinResolution: 1.5,
		Tail:          30,
	}
}

// invented compounds: an easy series and one close pair whose selectivity
// grows at low temperature
func smallCompounds() []model.Compound {
	mk := func(name string, n, tweak float64) model.Compound {
		return model.Compound{Name: name, DH: -(9 + 4.9*n) * 1000, DS: -(44 + 6*n) + tweak, Target: true}
	}
	return []model.Compound{mk("a", 6, 0), mk("b", 8.0, 0), mk("c", 8.06, -0.25), mk("d", 10, 0)}
}

// The optimizer's run time is within 1 % of an exhaustive grid of one-ramp
// programs, or better.
func TestAgainstGrid(t *testing.T) {
	p := smallProblem(t, smallCompounds(), 1)
	r, err := Optimize(context.Background(), p, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Feasible() {
		t.Fatalf("not met: %s", r.Explanation)
	}
	checkResult(t, p, r)
	sh := newShared(p, Settings{}.withDefaults(), time.Now())
	sh.p.check()
	rg, err := sh.startRig()
	if err != nil {
		t.Fatal(err)
	}
	ev := newEvaluator(sh, rg, nil)
	best := math.Inf(1)
	l := p.Limits
	for t0 := l.OvenMin; t0 <= 250+model.ZeroCelsius; t0 += 5 {
		for h0 := 0.0; h0 <= l.MaxHold; h0 += 30 {
			for rate := 1.0; rate <= 40; rate += 1 {
				for _, final := range []float64{t0 + 20, t0 + 50, t0 + 100, l.MaxTemp} {
					if final <= t0 || final > l.MaxTemp {
						continue
					}
					prog := model.Program{Initial: t0, InitialHold: h0, Ramps: []model.Ramp{{Rate: rate * perMin, Final: final, Hold: l.MaxHold}}}
					if f, _ := ev.score(prog, math.Inf(1)); f < best {
						best = f
					}
				}
			}
		}
	}
	if best >= infeasibleBase {
		t.Fatal("grid found no feasible program")
	}
	got := r.Sim.RunTime
	t.Logf("optimizer %.4f min, grid %.4f min, %d evaluations", got/60, best/60, r.Evaluations)
	if got > best*1.01 {
		t.Errorf("optimizer %.4f min is worse than the grid optimum %.4f min by more than 1 %%", got/60, best/60)
	}
}

// More ramps never give a worse result than fewer.
func TestMoreRampsNeverWorse(t *testing.T) {
	prev := math.Inf(1)
	for n := 1; n <= 3; n++ {
		p := smallProblem(t, smallCompounds(), n)
		p.Lock = []model.ProgramValue{FlowLock} // the ramp stages are what is tested
		r, err := Optimize(context.Background(), p, Settings{Starts: 6})
		if err != nil {
			t.Fatal(err)
		}
		if !r.Feasible() {
			t.Fatalf("%d ramps: not met", n)
		}
		checkResult(t, p, r)
		if r.Sim.RunTime > prev*(1+1e-9) {
			t.Errorf("%d ramps: %.4f min, worse than %.4f with fewer", n, r.Sim.RunTime/60, prev/60)
		}
		prev = r.Sim.RunTime
	}
}

// A pair with identical retention parameters is reported unreachable, that
// pair named, within a bounded search.
func TestIdenticalPairUnreachable(t *testing.T) {
	comps := smallCompounds()
	twin := comps[1]
	twin.Name = "b-twin"
	comps = append(comps, twin)
	p := smallProblem(t, comps, 2)
	start := time.Now()
	r, err := Optimize(context.Background(), p, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Feasible() {
		t.Fatal("identical pair reported separable")
	}
	if len(r.Limiting) == 0 {
		t.Fatal("no limiting pair")
	}
	pr := r.Sim.Pairs[r.Limiting[0]]
	names := map[string]bool{comps[pr.First].Name: true, comps[pr.Second].Name: true}
	if !names["b"] || !names["b-twin"] {
		t.Errorf("limiting pair %v, want b / b-twin", names)
	}
	if r.Explanation == "" {
		t.Error("no explanation")
	}
	t.Logf("%v, %d evaluations: %s", time.Since(start), r.Evaluations, r.Explanation)
	checkResult(t, p, r)
}

func TestLockedValuesStay(t *testing.T) {
	p := smallProblem(t, smallCompounds(), 2)
	p.Start = model.Program{Initial: 318.15, InitialHold: 45, Ramps: []model.Ramp{{Rate: 7 * perMin, Final: 400}, {Rate: 20 * perMin, Final: 560, Hold: 30}}}
	p.Lock = []model.ProgramValue{{Kind: model.InitialTemp}, {Kind: model.RampRate, Ramp: 1}}
	r, err := Optimize(context.Background(), p, Settings{Starts: 6})
	if err != nil {
		t.Fatal(err)
	}
	if r.Program.Initial != p.Start.Initial {
		t.Errorf("initial %v, locked at %v", r.Program.Initial, p.Start.Initial)
	}
	if len(r.Program.Ramps) == 0 || r.Program.Ramps[0].Rate != p.Start.Ramps[0].Rate {
		t.Errorf("rate_1 moved: %+v", r.Program.Ramps)
	}
	checkResult(t, p, r)
}

func TestSameSeedSameResult(t *testing.T) {
	p := demoProblem(t)
	a, err := Optimize(context.Background(), p, Settings{Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Optimize(context.Background(), p, Settings{Seed: 7, Workers: 1})
	if !reflect.DeepEqual(a.Program, b.Program) {
		t.Errorf("same seed, different programs:\n%+v\n%+v", a.Program, b.Program)
	}
}

// Cancellation returns within 100 ms with the best program so far.
func TestCancelReturnsQuickly(t *testing.T) {
	p := demoProblem(t)
	ctx, cancel := context.WithCancel(context.Background())
	var got int
	progress := func(pr Progress) {
		got++
	}
	done := make(chan time.Time, 1)
	go func() {
		_, err := Optimize(ctx, p, Settings{Starts: 500, Evaluations: 100000, Progress: progress, ProgressInterval: 10 * time.Millisecond})
		if err != nil {
			t.Error(err)
		}
		done <- time.Now()
	}()
	time.Sleep(150 * time.Millisecond)
	at := time.Now()
	cancel()
	end := <-done
	// A search that ignored the cancel would run its 500 starts for many
	// seconds; 2 s leaves room for a loaded machine and the race detector
	// while still telling the two apart.
	if d := end.Sub(at); d > 2*time.Second {
		t.Errorf("cancel took %v", d)
	}
	if got == 0 {
		t.Error("no progress reported")
	}
}

func BenchmarkOptimizeDemo(b *testing.B) {
	p := demoProblem(b)
	b.ReportAllocs()
	evals := 0
	for i := 0; i < b.N; i++ {
		r, err := Optimize(context.Background(), p, Settings{Workers: 1})
		if err != nil {
			b.Fatal(err)
		}
		evals += r.Evaluations
	}
	b.ReportMetric(float64(evals)/b.Elapsed().Seconds(), "evals/s")
	b.ReportMetric(float64(evals)/float64(b.N), "evals/op")
}

// Everything injected leaves the column (MODEL.md §6): a late non-target
// must elute within the run, or within an explicit bake-out step, which the
// optimizer then appends and counts in the run.
func TestLateNonTargetElutes(t *testing.T) {
	late := model.Compound{Name: "late matrix", DH: -(9 + 4.9*22) * 1000, DS: -(44 + 6*22), Target: false}
	p := smallProblem(t, append(smallCompounds(), late), 1)
	p.Lock = []model.ProgramValue{FlowLock}
	r, err := Optimize(context.Background(), p, Settings{Starts: 8})
	if err != nil || !r.Feasible() {
		t.Fatalf("%v %v", err, r.Explanation)
	}
	checkResult(t, p, r)
	var lastTR float64
	for _, pk := range r.Sim.Peaks {
		if p.System.Compounds[pk.Compound].Name == late.Name {
			lastTR = pk.RetentionTime
		}
	}
	if r.Sim.RunTime < lastTR+p.Tail-1e-9 {
		t.Errorf("run %.3f min ends before the late non-target %.3f min plus the tail", r.Sim.RunTime/60, lastTR/60)
	}
	pb := smallProblem(t, append(smallCompounds(), late), 1)
	pb.Lock = []model.ProgramValue{FlowLock}
	pb.Bakeout = Bakeout{On: true, Temp: 295 + model.ZeroCelsius, Hold: 120}
	rb, err := Optimize(context.Background(), pb, Settings{Starts: 8})
	if err != nil || !rb.Feasible() {
		t.Fatalf("%v %v", err, rb.Explanation)
	}
	checkResult(t, pb, rb)
	t.Logf("without bake-out %.3f min %+v; with %.3f min %+v", r.Sim.RunTime/60, r.Oven, rb.Sim.RunTime/60, rb.Oven)
	if rb.Sim.RunTime > r.Sim.RunTime+1e-9 {
		t.Errorf("the bake-out option made the run longer: %.3f > %.3f min", rb.Sim.RunTime/60, r.Sim.RunTime/60)
	}
	// a compound that needs a slow climb to the top without a bake-out is
	// covered faster by a bake-out step with its own hold
	heavy := model.Compound{Name: "heavy matrix", DH: -(9 + 4.9*34) * 1000, DS: -(44 + 6*34), Target: false}
	ph := smallProblem(t, append(smallCompounds(), heavy), 1)
	ph.Lock = []model.ProgramValue{FlowLock}
	ph.Limits.MaxHold = 60
	rh, err := Optimize(context.Background(), ph, Settings{Starts: 8})
	if err != nil {
		t.Fatal(err)
	}
	checkResult(t, ph, rh)
	without := rh.Sim.RunTime
	t.Logf("without bake-out %.3f min %+v %s", without/60, rh.Oven, rh.Explanation)
	ph.Bakeout = Bakeout{On: true, Temp: 300 + model.ZeroCelsius, Hold: 600}
	rh, err = Optimize(context.Background(), ph, Settings{Starts: 8})
	if err != nil || !rh.Feasible() {
		t.Fatalf("%v %v", err, rh.Explanation)
	}
	checkResult(t, ph, rh)
	// the run ends in the bake-out step (held at most bakeout_min) rather
	// than in a hold the hold limit allows
	last := rh.Oven.Ramps[len(rh.Oven.Ramps)-1]
	if last.FinalC != 300 || last.HoldMin*60 <= ph.Limits.MaxHold {
		t.Errorf("the program does not end with the bake-out step: %+v", rh.Oven)
	}
	t.Logf("with bake-out %.3f min %+v", rh.Sim.RunTime/60, rh.Oven)
	if rh.Feasible() && rh.Sim.RunTime >= without {
		t.Errorf("the bake-out did not shorten the run: %.3f ≥ %.3f min", rh.Sim.RunTime/60, without/60)
	}
}
