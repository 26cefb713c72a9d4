// Package optimizer searches oven temperature programs for the shortest run
// (or oven cycle) in which every counted pair reaches the target resolution,
// within the column's and the oven's limits. It uses gonum's Nelder–Mead
// simplex method (stepped in the calling goroutine, nelder.go) from several
// seeded starts in parallel, over variables mapped so that every point
// tried is a valid program.
package optimizer

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"
	"time"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/robust"
)

// Progress is a report of the search so far.
type Progress struct {
	Evaluations   int
	Feasible      bool
	Objective     float64 // s, of the best program so far
	MinResolution float64
	Program       model.Program // best so far as it would be saved; a copy
	Carrier       CarrierSetting
	Elapsed       time.Duration
}

// Settings tune the search. The zero value means the defaults.
type Settings struct {
	Seed        uint64 // default 1
	Starts      int    // random starting points per stage (besides the seeds); default 10
	Evaluations int    // budget per start; default 2000
	Restarts    int    // Nelder–Mead restarts from the best point; default 2
	Workers     int    // parallel starts; default runtime.GOMAXPROCS(0)
	// CarrierProbes is how many flow (or pressure) settings the carrier
	// search tries besides the method's own; default 8.
	CarrierProbes int
	// PolishEvaluations bounds the keypad-grid search at the end; default 800.
	PolishEvaluations int
	// Progress, when set, is called from one goroutine about every
	// ProgressInterval (default 100 ms) and once at the end.
	Progress         func(Progress)
	ProgressInterval time.Duration
}

// Status is how a search ended.
type Status int

// The statuses.
const (
	// Met: the returned program meets the target resolution (and the
	// robust margin) exactly as saved.
	Met Status = iota
	// NotMet: no program within the limits was found that meets the target;
	// the returned program is the best found.
	NotMet
)

// CarrierSetting is the carrier flow (constant flow, mL/min at 25 °C and
// 101.325 kPa) or inlet gauge pressure (constant pressure, kPa) of a
// result, on the keypad steps.
type CarrierSetting struct {
	Mode      model.PressureMode
	FlowMLMin float64
	InletKPa  float64
}

// Result is the outcome of a search.
type Result struct {
	Status   Status
	Canceled bool // the context ended the search early
	// Offer is true when the program should be offered to the user: the
	// target is met and, after an early stop, the program also beats the
	// method's current one.
	Offer bool
	// Oven is the program exactly as saved, in the file's units, every
	// value on the keypad steps (locked values as the method has them);
	// Program is the same in SI units.
	Oven      Oven
	Program   model.Program
	Carrier   CarrierSetting
	System    *model.System // of the chosen carrier setting
	Objective Objective
	Sim       model.Result // a fresh simulation of Program on System
	Robust    RobustReport
	// Limiting are the counted pairs (indices into Sim.Pairs) below the
	// target, worst first; empty when Met.
	Limiting    []int
	Explanation string
	Evaluations int
	Elapsed     time.Duration
}

// Feasible reports whether the target was met.
func (r *Result) Feasible() bool { return r.Status == Met }

// Optimize runs the search: Nelder–Mead from seeded starts over programs of
// 1..Ramps ramps at the method's carrier setting, then a search over the
// carrier setting (golden-section on a log scale, each probe a short
// program search seeded from the best so far), then a coordinate search on
// the keypad grid so that the saved program meets the target as saved. It
// returns an error only for an impossible problem (bad limits, a lock that
// names a missing ramp); a target that cannot be reached is Status NotMet
// with an explanation.
func Optimize(ctx context.Context, p Problem, s Settings) (*Result, error) {
	begin := time.Now()
	if err := p.check(); err != nil {
		return nil, err
	}
	s = s.withDefaults()
	sh := newShared(p, s, begin)
	sh.ctx = ctx
	stopProgress := sh.startProgress(ctx)
	defer stopProgress()

	start, err := sh.startRig()
	if err != nil {
		return nil, err
	}
	best, stages := sh.programStages(ctx, start)
	if p.varyCarrier() && ctx.Err() == nil {
		best = sh.carrierSearch(ctx, best)
	}
	// end on the keypad grid from the best program and from each ramp
	// stage's best, so that more ramps are never worse on the grid either
	oven, f := sh.polish(ctx, best)
	rg := best.rg
	for _, c := range stages {
		if ctx.Err() != nil {
			break // stopped: return promptly with what there is
		}
		if c.f >= infeasibleBase && f < infeasibleBase {
			continue
		}
		if o2, f2 := sh.polish(ctx, c); f2 < f {
			oven, f, rg = o2, f2, c.rg
		}
	}
	stopProgress()
	return sh.finish(ctx, rg, oven)
}

// candidate is the best point of a search on one rig.
type candidate struct {
	rg   *rig
	sp   *space
	x    []float64
	f    float64
	prog model.Program // untrimmed
}

// programStages: with no ramp-specific locks, 1..Ramps ramps, each seeded
// with the previous stage's optimum, so more ramps are never worse.
func (sh *shared) programStages(ctx context.Context, rg *rig) (candidate, []candidate) {
	p := &sh.p
	best := candidate{f: math.Inf(1)}
	var stages []candidate
	first := p.Ramps
	if !p.rampLocks() {
		first = 1
	}
	for n := first; n <= p.Ramps; n++ {
		sp := newSpace(*p, n)
		var seeds [][]float64
		if best.sp != nil {
			seeds = append(seeds, sp.embed(best.prog))
		}
		if x, ok := sp.fromProgram(p.Start); ok {
			seeds = append(seeds, x)
		}
		if n >= 2 {
			seeds = append(seeds, sp.plateauSeeds()...)
		}
		x, f := sh.stage(ctx, rg, sp, seeds, sh.s.Starts, sh.s.Evaluations, sh.s.Restarts, uint64(n), screen{})
		c := candidate{rg: rg, sp: sp, x: x, f: f, prog: sp.program(x)}
		stages = append(stages, c)
		if f < best.f || best.sp == nil {
			best = c
		}
		if ctx.Err() != nil {
			break
		}
	}
	return best, stages
}

func (s Settings) withDefaults() Settings {
	if s.Seed == 0 {
		s.Seed = 1
	}
	if s.Starts <= 0 {
		s.Starts = 10
	}
	if s.Evaluations <= 0 {
		s.Evaluations = 2000
	}
	if s.Restarts <= 0 {
		s.Restarts = 2
	}
	if s.Workers <= 0 {
		s.Workers = runtime.GOMAXPROCS(0)
	}
	if s.CarrierProbes <= 0 {
		s.CarrierProbes = 8
	}
	if s.PolishEvaluations <= 0 {
		s.PolishEvaluations = 800
	}
	if s.ProgressInterval <= 0 {
		s.ProgressInterval = 100 * time.Millisecond
	}
	return s
}

// shared is the state of one Optimize call that the parallel starts share:
// counters, the carrier settings built so far and the best program so far.
type shared struct {
	p     Problem
	s     Settings
	begin time.Time
	evals atomic.Int64

	rigMu sync.Mutex
	rigs  map[float64]*rig
	// ctx is the Optimize call's context (stopped reports it ended)
	ctx context.Context
	// approx ≥ 0 while the carrier search screens the robust margin by the
	// loss measured at the method's own setting (see evaluator.approx)
	approx float64

	mu      sync.Mutex
	bestF   float64
	bestRs  float64
	bestP   model.Program
	bestC   CarrierSetting
	hasBest bool
}

func newShared(p Problem, s Settings, begin time.Time) *shared {
	return &shared{p: p, s: s, begin: begin, bestF: math.Inf(1), rigs: map[float64]*rig{}, approx: -1}
}

func (sh *shared) stopped() bool { return sh.ctx != nil && sh.ctx.Err() != nil }

func (sh *shared) offer(f, rs float64, prog model.Program, rg *rig) {
	sh.mu.Lock()
	if f < sh.bestF {
		sh.bestF, sh.bestRs, sh.hasBest = f, rs, true
		sh.bestP = prog.Clone()
		sh.bestC = sh.setting(rg.value)
	}
	sh.mu.Unlock()
}

func (sh *shared) report() {
	if sh.s.Progress == nil {
		return
	}
	sh.mu.Lock()
	pr := Progress{
		Evaluations:   int(sh.evals.Load()),
		Feasible:      sh.bestF < infeasibleBase,
		Objective:     sh.bestF,
		MinResolution: sh.bestRs,
		Program:       sh.bestP.Clone(),
		Carrier:       sh.bestC,
		Elapsed:       time.Since(sh.begin),
	}
	has := sh.hasBest
	sh.mu.Unlock()
	if has {
		sh.s.Progress(pr)
	}
}

func (sh *shared) startProgress(ctx context.Context) func() {
	if sh.s.Progress == nil {
		return func() {}
	}
	done := make(chan struct{})
	var wg sync.WaitGroup
	var once sync.Once
	wg.Add(1)
	go func() {
		defer wg.Done()
		t := time.NewTicker(sh.s.ProgressInterval)
		defer t.Stop()
		for {
			select {
			case <-done:
				return
			case <-ctx.Done():
				return
			case <-t.C:
				sh.report()
			}
		}
	}()
	return func() { once.Do(func() { close(done); wg.Wait() }) }
}

// screen is how a stage screens its starts: every search makes its first
// at evaluations and is held there; then the first starts (the seeds
// carried over from earlier searches) and the keep best of the others go
// on, exactly as if never held (nelderMead.run), and the rest stop. The
// zero value runs every start to its end.
type screen struct{ at, keep, first int }

// stage runs the seeded starts of one space in parallel, then restarts from
// the best point; it returns the best point and its score.
func (sh *shared) stage(ctx context.Context, rg *rig, sp *space, seeds [][]float64, nStarts, evals, restarts int, stage uint64, sc screen) ([]float64, float64) {
	rng := rand.New(rand.NewPCG(sh.s.Seed, stage^uint64(math.Float64bits(rg.value))))
	starts := append([][]float64(nil), seeds...)
	for len(starts) < nStarts+len(seeds) {
		x := make([]float64, sp.dim)
		for i := range x {
			x[i] = rng.Float64()
		}
		starts = append(starts, x)
	}
	out := make([]*search, len(starts))
	// each worker takes one search at a time
	parallel := func(idx []int, do func(i int)) {
		jobs := make(chan int)
		var wg sync.WaitGroup
		for w := 0; w < sh.s.Workers; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for i := range jobs {
					do(i)
				}
			}()
		}
		for _, i := range idx {
			if ctx.Err() != nil {
				break
			}
			jobs <- i
		}
		close(jobs)
		wg.Wait()
	}
	if sc.at <= 0 || sc.at >= evals || len(starts) <= sc.first+sc.keep {
		sc = screen{at: evals}
	}
	all := make([]int, len(starts))
	for i := range all {
		all[i] = i
	}
	parallel(all, func(i int) {
		s := sh.newSearch(ctx, rg, sp, starts[i], 0.25, evals)
		s.run(sc.at)
		out[i] = s
	})
	if sc.at < evals {
		var rest []int
		for i := sc.first; i < len(out); i++ {
			if out[i] != nil && !out[i].ended() {
				rest = append(rest, i)
			}
		}
		score := func(i int) float64 { _, f := out[i].best(); return f }
		sort.SliceStable(rest, func(a, b int) bool { return score(rest[a]) < score(rest[b]) })
		rest = rest[:min(len(rest), sc.keep)]
		var goOn []int
		for i := 0; i < sc.first && i < len(out); i++ {
			if out[i] != nil && !out[i].ended() {
				goOn = append(goOn, i)
			}
		}
		sort.Ints(rest)
		parallel(append(goOn, rest...), func(i int) { out[i].run(evals) })
	}
	bi, f := -1, math.Inf(1)
	var x []float64
	for i, s := range out {
		if s == nil {
			continue // not started: stopped
		}
		if sx, sf := s.best(); bi < 0 || sf < f {
			bi, x, f = i, sx, sf
		}
	}
	if bi < 0 {
		return starts[0], math.Inf(1)
	}
	for r := 0; r < restarts && ctx.Err() == nil; r++ {
		x2, f2 := sh.run(ctx, rg, sp, x, 0.05/float64(r+1), evals)
		if f2 < f {
			x, f = x2, f2
		}
	}
	return x, f
}

// search is one Nelder–Mead search from a start on one rig.
type search struct {
	ev *evaluator
	nm *nelderMead // nil when the space has no variables
	x0 []float64
}

func (sh *shared) newSearch(ctx context.Context, rg *rig, sp *space, x0 []float64, size float64, evals int) *search {
	ev := newEvaluator(sh, rg, sp)
	ev.approx = sh.approx
	s := &search{ev: ev, x0: x0}
	if sp.dim == 0 {
		ev.f(x0)
		return s
	}
	s.nm = newNelderMead(ev.f, func() bool { return ctx.Err() != nil }, x0, size, evals)
	return s
}

func (s *search) ended() bool { return s.nm == nil || s.nm.done() }

// run goes on until the search ends or has made until evaluations.
func (s *search) run(until int) {
	if s.nm != nil {
		s.nm.run(until)
	}
}

// best is the best point so far and its score.
func (s *search) best() ([]float64, float64) {
	if s.ev.bestX == nil {
		return s.x0, math.Inf(1)
	}
	return s.ev.bestX, s.ev.bestF
}

// run is one Nelder–Mead search from x0 with the given simplex size.
func (sh *shared) run(ctx context.Context, rg *rig, sp *space, x0 []float64, size float64, evals int) ([]float64, float64) {
	s := sh.newSearch(ctx, rg, sp, x0, size, evals)
	s.run(evals)
	return s.best()
}

// finish simulates the saved program afresh, reports the robust margin and
// explains a miss.
func (sh *shared) finish(ctx context.Context, rg *rig, oven Oven) (*Result, error) {
	p := &sh.p
	r := &Result{Objective: p.Objective, Canceled: ctx.Err() != nil, System: rg.sys, Carrier: sh.setting(rg.value)}
	ev := newEvaluator(sh, rg, nil)
	f, saved, _ := ev.scoreOven(oven)
	r.Oven = saved
	r.Program = saved.Model()
	if err := rg.sys.Simulate(r.Program, &r.Sim); err != nil {
		return nil, fmt.Errorf("optimizer: the saved program does not simulate: %v", err)
	}
	unchecked := RobustReport{On: true, Nominal: r.Sim.MinResolution, Worst: math.NaN(), LowZ: math.NaN(), LowPair: -1, Margin: math.NaN()}
	if p.Robust.On() && sh.stopped() && !rg.set.Built() {
		r.Robust = unchecked // stopped before the tolerances could be checked
	} else if err := p.robust(rg, r.Program, &r.Sim, &ev.rsc, math.Inf(-1), &r.Robust); errors.Is(err, robust.ErrStopped) {
		r.Robust = unchecked
	} else if err != nil {
		return nil, fmt.Errorf("optimizer: robust check: %v", err)
	}
	r.Status = Met
	if f >= infeasibleBase {
		r.Status = NotMet
		r.Limiting = limitingPairs(&r.Sim, p.MinResolution)
		r.Explanation = sh.explainMiss(ev, r)
	}
	r.Offer = r.Status == Met
	if r.Canceled {
		if r.Status != Met {
			r.Explanation = "stopped before a program meeting the target was found; " + r.Explanation
		} else if better, ok := sh.beatsStart(f); !better {
			r.Offer = false
			if ok {
				r.Explanation = "stopped early: no program faster than the current one was found yet"
			}
		}
	}
	r.Evaluations = int(sh.evals.Load())
	r.Elapsed = time.Since(sh.begin)
	sh.report()
	return r, nil
}

// beatsStart reports whether objective f beats the method's own program
// (as it is, on the method's carrier setting); ok is false when the method's
// program does not simulate or does not meet the target (then any program
// that does is better).
func (sh *shared) beatsStart(f float64) (better, ok bool) {
	p := &sh.p
	var res model.Result
	if err := p.System.Simulate(p.Start, &res); err != nil {
		return true, false
	}
	if res.Critical >= 0 && res.MinResolution < p.MinResolution {
		return true, false
	}
	t := res.RunTime
	if p.Objective == CycleTime {
		t = res.CycleTime
	}
	return f < t, true
}

// limitingPairs are the counted pairs below the target, worst first.
func limitingPairs(res *model.Result, target float64) []int {
	var idx []int
	for i, pr := range res.Pairs {
		if pr.Counts && pr.Resolution < target {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return res.Pairs[idx[a]].Resolution < res.Pairs[idx[b]].Resolution })
	return idx
}
