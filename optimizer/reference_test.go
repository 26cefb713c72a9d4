package optimizer

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"testing"
	"time"

	"github.com/rampwise/rampwise/model"
)

// deReference is an independent global search under the same rules as the
// optimizer's returned program (test-only): differential evolution
// (DE/rand/1/bin, F = 0.6, CR = 0.9; Storn & Price, J. Global Optim. 11,
// 341, 1997) with restarts, over the same program values (and the carrier
// setting unless it is locked), every candidate scored exactly as the
// optimizer scores its saved program: put on the keypad grid, cut, and
// simulated afresh with every limit, the target and the robust margin.
// It returns the best objective (s; ≥ infeasibleBase when none met).
func deReference(t testing.TB, p Problem, evals int, seed uint64) (float64, Oven, float64) {
	t.Helper()
	if err := p.check(); err != nil {
		t.Fatal(err)
	}
	sh := newShared(p, Settings{}.withDefaults(), time.Now())
	sp := newSpace(sh.p, p.Ramps)
	vary := sh.p.varyCarrier()
	lo, hi := sh.carrierRange()
	dim := sp.dim
	if vary {
		dim++
	}
	evs := map[*rig]*evaluator{}
	start, err := sh.startRig()
	if err != nil {
		t.Fatal(err)
	}
	score := func(x []float64) (float64, Oven, float64) {
		rg := start
		if vary {
			v := roundGrid(math.Exp(math.Log(lo)+clamp01(x[dim-1])*(math.Log(hi)-math.Log(lo))), sh.carrierStep())
			if rg, err = sh.rigFor(v); err != nil {
				t.Fatal(err)
			}
		}
		ev := evs[rg]
		if ev == nil {
			ev = newEvaluator(sh, rg, nil)
			evs[rg] = ev
		}
		prog := sp.programInto(x[:sp.dim])
		f, saved, _ := ev.scoreOven(sh.p.snap(prog))
		return f, saved, rg.value
	}
	rng := rand.New(rand.NewPCG(seed, 77))
	np := min(max(10*dim, 20), 60)
	bestF, bestO, bestC := math.Inf(1), Oven{}, 0.0
	restarts := 4
	for rs := 0; rs < restarts; rs++ {
		pop := make([][]float64, np)
		fit := make([]float64, np)
		for i := range pop {
			pop[i] = make([]float64, dim)
			for j := range pop[i] {
				pop[i][j] = rng.Float64()
			}
			fit[i], _, _ = score(pop[i])
		}
		trial := make([]float64, dim)
		for used := np; used < evals/restarts; {
			for i := 0; i < np && used < evals/restarts; i++ {
				a, b, c := rng.IntN(np), rng.IntN(np), rng.IntN(np)
				jr := rng.IntN(dim)
				for j := 0; j < dim; j++ {
					if j == jr || rng.Float64() < 0.9 {
						trial[j] = clamp01(pop[a][j] + 0.6*(pop[b][j]-pop[c][j]))
					} else {
						trial[j] = pop[i][j]
					}
				}
				f, _, _ := score(trial)
				used++
				if f <= fit[i] {
					copy(pop[i], trial)
					fit[i] = f
				}
			}
		}
		for i := range pop {
			if fit[i] < bestF {
				bestF = fit[i]
				_, bestO, bestC = score(pop[i])
			}
		}
	}
	return bestF, bestO, bestC
}

// generated is an invented method of nc compounds for the reference test:
// a homologous-like series with scattered retention and a few close pairs.
func generated(t testing.TB, nc, ramps int, seed uint64) Problem {
	rng := rand.New(rand.NewPCG(seed, 5))
	var comps []model.Compound
	for i := 0; i < nc; i++ {
		n := 5 + 14*float64(i)/float64(nc) + 0.3*rng.Float64()
		c := model.Compound{Name: fmt.Sprintf("g%02d", i), DH: -(9 + 4.9*n) * 1000, DS: -(44 + 6*n) + 0.8*rng.NormFloat64(), Target: rng.Float64() < 0.85}
		if i%6 == 2 && i > 0 {
			// a close pair whose selectivity grows at low temperature
			prev := comps[i-1]
			c.DH, c.DS, c.Target = prev.DH-(0.25+0.1*rng.Float64())*1000, prev.DS-0.55, true
		}
		comps = append(comps, c)
	}
	p := smallProblem(t, comps, ramps)
	p.Limits.MaxRate = 60 * perMin
	p.MinResolution = 1.5
	return p
}

func fullReference() bool { return os.Getenv("RAMPWISE_REFERENCE") == "full" }

// The optimizer's objective is within 0.5 % of the independent global
// search's under the same rules. The full comparison (100× the optimizer's
// evaluations, the demo with its robust margin and flow search, generated
// methods of 10–60 compounds and 1–5 ramps) runs with
// RAMPWISE_REFERENCE=full; by default two small cases at 20× run.
func TestAgainstGlobalReference(t *testing.T) {
	if testing.Short() || raceEnabled {
		t.Skip("global reference search skipped in -short and -race runs")
	}
	type tc struct {
		name string
		p    Problem
	}
	factor := 20
	var cases []tc
	if fullReference() {
		factor = 100
		cases = append(cases, tc{"demo", demoProblem(t)})
		for _, c := range []struct{ nc, ramps int }{{10, 1}, {20, 2}, {30, 3}, {45, 4}, {60, 5}} {
			cases = append(cases, tc{fmt.Sprintf("%d compounds %d ramps", c.nc, c.ramps), generated(t, c.nc, c.ramps, uint64(c.nc))})
		}
	} else {
		for _, c := range []struct{ nc, ramps int }{{10, 1}, {12, 2}} {
			p := generated(t, c.nc, c.ramps, uint64(c.nc))
			p.Lock = []model.ProgramValue{FlowLock}
			cases = append(cases, tc{fmt.Sprintf("%d compounds %d ramps, flow locked", c.nc, c.ramps), p})
		}
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := Optimize(context.Background(), c.p, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			got := r.Sim.RunTime
			if c.p.Objective == CycleTime {
				got = r.Sim.CycleTime
			}
			ref, oven, car := deReference(t, c.p, factor*r.Evaluations, 11)
			if ref >= infeasibleBase {
				if r.Feasible() {
					t.Logf("optimizer %.4f min; the reference found no feasible program", got/60)
					return
				}
				t.Skip("neither found a feasible program")
			}
			if !r.Feasible() {
				t.Fatalf("the reference met the target (%.4f min, %+v) but the optimizer did not: %s", ref/60, oven, r.Explanation)
			}
			ratio := got / ref
			t.Logf("ratio %.4f: optimizer %.4f min (%d evaluations, %+v, %+v), reference %.4f min (%d× evaluations, %+v, carrier %v)",
				ratio, got/60, r.Evaluations, r.Oven, r.Carrier, ref/60, factor, oven, car)
			if ratio > 1.005 {
				t.Errorf("optimizer %.4f min is %.2f %% above the reference %.4f min", got/60, 100*(ratio-1), ref/60)
			}
		})
	}
}

// raceEnabled is set under the race detector (race_test.go).
var raceEnabled bool

// The generated 20-compound, 2-ramp method, where the optimizer once
// missed a higher plateau at a slightly faster flow: its objective must be
// within 0.5 % of the best program the full reference run
// (RAMPWISE_REFERENCE=full, differential evolution at 100× the
// optimizer's evaluations) found. That program is kept here and scored
// afresh under the same rules, so the comparison is with a program that
// really meets the target, not with a stored number.
func TestTwentyCompoundsTwoRampsReference(t *testing.T) {
	if testing.Short() || raceEnabled {
		t.Skip("skipped in -short and -race runs")
	}
	p := generated(t, 20, 2, 20)
	if err := p.check(); err != nil {
		t.Fatal(err)
	}
	sh := newShared(p, Settings{}.withDefaults(), time.Now())
	rg, err := sh.rigFor(2.42)
	if err != nil {
		t.Fatal(err)
	}
	refOven := Oven{InitialC: 35, InitialHoldMin: 0.54, Ramps: []Ramp{{RateCMin: 59.9, FinalC: 138.1, HoldMin: 2.9}, {RateCMin: 60, FinalC: 259.2, HoldMin: 0.03}}}
	ref, _, _ := newEvaluator(sh, rg, nil).scoreOven(refOven)
	if ref >= infeasibleBase {
		t.Fatalf("the reference program no longer meets the target (score %g)", ref)
	}
	r, err := Optimize(context.Background(), p, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Feasible() {
		t.Fatalf("the optimizer did not meet the target: %s", r.Explanation)
	}
	ratio := r.Sim.RunTime / ref
	t.Logf("ratio %.4f: optimizer %.4f min (%+v, %+v), reference %.4f min", ratio, r.Sim.RunTime/60, r.Oven, r.Carrier, ref/60)
	if ratio > 1.005 {
		t.Errorf("optimizer %.4f min is %.2f %% above the reference %.4f min", r.Sim.RunTime/60, 100*(ratio-1), ref/60)
	}
}
