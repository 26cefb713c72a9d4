// Package optimizer searches oven temperature programs for the shortest run
// (or oven cycle) in which every counted pair reaches the target resolution,
// within the column's and the oven's limits. It uses gonum's Nelder–Mead
// simplex method from several seeded starts in parallel, over variables
// mapped so that every point tried is a valid program.
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

	"gonum.org/v1/gonum/optimize"

	"github.com/rampwise/rampwise/model"
)

// Objective is what the optimizer minimises among programs that meet the target.
type Objective = model.Objective

// The objectives.
const (
	RunTime   = model.RunTime
	CycleTime = model.CycleTime
)

// Limits bound the programs the optimizer may return (SI units: K, K/s, s, Pa).
type Limits struct {
	OvenMin  float64 // lowest initial temperature
	MaxTemp  float64 // column maximum
	MaxRate  float64 // highest ramp rate
	MaxHold  float64 // longest hold
	MinRate  float64 // lowest ramp rate; zero means 0.1 °C/min
	MaxInlet float64 // highest inlet gauge pressure; zero means no limit
}

// Problem is one optimization.
type Problem struct {
	System *model.System
	// Start is the method's current program: the values of locked variables
	// and one of the starting points.
	Start         model.Program
	Ramps         int // ramps the optimizer may use, 1..5
	Lock          []model.ProgramValue
	Limits        Limits
	MinResolution float64
	Objective     Objective
	Tail          float64 // s kept after the last peak
}

// Progress is a report of the search so far.
type Progress struct {
	Evaluations   int
	Feasible      bool
	Objective     float64 // s, of the best program so far
	MinResolution float64
	Program       model.Program // best so far, trimmed; a copy
	Elapsed       time.Duration
}

// Settings tune the search. The zero value means the defaults.
type Settings struct {
	Seed        uint64 // default 1
	Starts      int    // seeded starting points per stage; default 24
	Evaluations int    // budget per start; default 2500
	Restarts    int    // Nelder–Mead restarts from the best point; default 3
	Workers     int    // parallel starts; default runtime.GOMAXPROCS(0)
	// Progress, when set, is called from one goroutine about every
	// ProgressInterval (default 100 ms) and once at the end.
	Progress         func(Progress)
	ProgressInterval time.Duration
}

// Status is how a search ended.
type Status int

// The statuses.
const (
	// Met: the returned program meets the target resolution.
	Met Status = iota
	// NotMet: no program within the limits was found that meets the target;
	// the returned program maximises the minimum resolution.
	NotMet
)

// Result is the outcome of a search.
type Result struct {
	Status    Status
	Canceled  bool          // the context ended the search early
	Program   model.Program // trimmed to end at the run time
	Objective Objective
	Sim       model.Result // a fresh simulation of Program
	// Limiting are the counted pairs (indices into Sim.Pairs) below the
	// target, worst first; empty when Met.
	Limiting    []int
	Explanation string
	Evaluations int
	Elapsed     time.Duration
}

// Feasible reports whether the target was met.
func (r *Result) Feasible() bool { return r.Status == Met }

const (
	infeasibleBase = 1e7 // added to the objective of a program that fails the target
	maxRunTime     = 1e5 // s; a slower program counts as failing
	tempGap        = 1.0 // K between consecutive finals the mapping keeps
	// resolutionMargin is kept above the target so that rounding the
	// program to what an oven's keypad takes (0.01 °C, 0.001 min) cannot
	// drop a pair below it.
	resolutionMargin = 0.002
)

// Optimize runs the search. It returns an error only for an impossible
// problem (bad limits, a lock that names a missing ramp); a target that
// cannot be reached is Status NotMet with an explanation.
func Optimize(ctx context.Context, p Problem, s Settings) (*Result, error) {
	begin := time.Now()
	if err := p.check(); err != nil {
		return nil, err
	}
	s = s.withDefaults()
	sh := newShared(p, s, begin)
	stopProgress := sh.startProgress(ctx)

	var best []float64
	var bestF = math.Inf(1)
	var bestSpace *space
	var bestProg model.Program
	// Stages: with no ramp-specific locks, 1..Ramps ramps, each seeded with
	// the previous stage's optimum, so more ramps are never worse.
	first := p.Ramps
	if !p.rampLocks() {
		first = 1
	}
	for n := first; n <= p.Ramps; n++ {
		sp := newSpace(p, n)
		var seeds [][]float64
		if bestSpace != nil {
			seeds = append(seeds, sp.embed(bestProg))
		}
		if len(p.Start.Ramps) >= 1 || n >= 1 {
			if x, ok := sp.fromProgram(p.Start); ok {
				seeds = append(seeds, x)
			}
		}
		x, f := sh.stage(ctx, sp, seeds, uint64(n))
		if f < bestF || bestSpace == nil {
			best, bestF, bestSpace = x, f, sp
			bestProg = sp.program(x)
		}
		if ctx.Err() != nil {
			break
		}
	}
	stopProgress()
	return sh.finish(ctx, bestSpace, best)
}

func (p *Problem) check() error {
	if p.System == nil {
		return errors.New("optimizer: no system")
	}
	if p.Ramps < 1 || p.Ramps > 5 {
		return fmt.Errorf("optimizer: ramps must be 1..5, got %d", p.Ramps)
	}
	l := p.Limits
	if !(l.MaxTemp > l.OvenMin) {
		return fmt.Errorf("optimizer: the lowest start temperature %.1f °C is not below the column maximum %.1f °C", l.OvenMin-model.ZeroCelsius, l.MaxTemp-model.ZeroCelsius)
	}
	if !(l.MaxRate > 0) || l.MaxHold < 0 {
		return errors.New("optimizer: ramp-rate limit must be positive and hold limit not negative")
	}
	if !(p.MinResolution > 0) {
		return errors.New("optimizer: target resolution must be positive")
	}
	if p.Limits.MinRate == 0 {
		p.Limits.MinRate = 0.1 / 60
	}
	if p.Limits.MinRate > p.Limits.MaxRate {
		p.Limits.MinRate = p.Limits.MaxRate / 10
	}
	for _, name := range p.Lock {
		n := name.Ramp
		if !name.Valid(model.MaxRampNumber) {
			return fmt.Errorf("optimizer: %s is not a program value to lock", name)
		}
		if n > 0 && n > len(p.Start.Ramps) {
			return fmt.Errorf("optimizer: %s is locked but the method's program has only %d ramps", name, len(p.Start.Ramps))
		}
		if n > p.Ramps {
			return fmt.Errorf("optimizer: %s is locked but the goal allows only %d ramps", name, p.Ramps)
		}
	}
	return nil
}

func (p *Problem) rampLocks() bool {
	for _, name := range p.Lock {
		if name.Kind.PerRamp() {
			return true
		}
	}
	return false
}

func (p *Problem) locked(v model.ProgramValue) bool {
	for _, l := range p.Lock {
		if l == v {
			return true
		}
	}
	return false
}

func (s Settings) withDefaults() Settings {
	if s.Seed == 0 {
		s.Seed = 1
	}
	if s.Starts <= 0 {
		s.Starts = 24
	}
	if s.Evaluations <= 0 {
		s.Evaluations = 2500
	}
	if s.Restarts <= 0 {
		s.Restarts = 3
	}
	if s.Workers <= 0 {
		s.Workers = runtime.GOMAXPROCS(0)
	}
	if s.ProgressInterval <= 0 {
		s.ProgressInterval = 100 * time.Millisecond
	}
	return s
}

// shared is the state of one Optimize call that the parallel starts share:
// counters and the best program so far, behind a mutex.
type shared struct {
	p     Problem
	s     Settings
	begin time.Time
	evals atomic.Int64

	mu      sync.Mutex
	bestF   float64
	bestRs  float64
	bestP   model.Program
	hasBest bool
}

func newShared(p Problem, s Settings, begin time.Time) *shared {
	return &shared{p: p, s: s, begin: begin, bestF: math.Inf(1)}
}

func (sh *shared) offer(f, rs float64, prog model.Program) {
	sh.mu.Lock()
	if f < sh.bestF {
		sh.bestF, sh.bestRs, sh.bestP, sh.hasBest = f, rs, prog.Clone(), true
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
	return func() { close(done); wg.Wait() }
}

// evaluator scores points of a space; one per goroutine (it owns a Result).
type evaluator struct {
	sh  *shared
	sp  *space
	res model.Result
	// best point this evaluator has seen
	bestX []float64
	bestF float64
}

func (e *evaluator) f(x []float64) float64 {
	e.sh.evals.Add(1)
	prog := e.sp.programInto(x)
	f, rs := e.sh.score(prog, &e.res)
	if f < e.bestF {
		e.bestF = f
		e.bestX = append(e.bestX[:0], x...)
		e.sh.offer(f, rs, prog.TrimTo(e.res.RunTime))
	}
	return f
}

// score is the objective of a program: its run or cycle time in s when it
// meets every limit and the target, otherwise infeasibleBase plus a measure
// of how far it misses (so that the search first climbs toward the target).
func (sh *shared) score(prog model.Program, res *model.Result) (f, rs float64) {
	p := &sh.p
	if err := p.System.SimulateTrimmed(prog, p.Tail, res); err != nil {
		return 2 * infeasibleBase, math.NaN()
	}
	t := res.RunTime
	if p.Objective == CycleTime {
		t = res.CycleTime
	}
	rs = res.MinResolution
	if math.IsNaN(rs) {
		rs = math.Inf(1) // no counted pair: nothing to resolve
	}
	miss := 0.0
	if target := p.MinResolution + resolutionMargin; rs < target {
		miss += target - rs
	}
	if res.TargetsNotEluted > 0 || t > maxRunTime {
		miss += 10
	}
	// the final hold the trim needs must stay within the hold limit
	if over := finalHold(prog, res.RunTime) - p.Limits.MaxHold; over > 1e-9 {
		miss += 1 + over/60
	}
	if p.Limits.MaxInlet > 0 {
		if over := p.System.Cond.InletGauge(prog.TempAt(res.RunTime)) - p.Limits.MaxInlet; over > 0 && p.System.Cond.Carrier.Mode == model.ConstantFlow {
			miss += 1 + over/1e5
		}
	}
	if miss > 0 {
		return infeasibleBase + 1e5*miss + math.Min(t, maxRunTime)*1e-3, res.MinResolution
	}
	return t, res.MinResolution
}

// finalHold is the length of the last hold of prog trimmed to end.
func finalHold(prog model.Program, end float64) float64 {
	q := prog.TrimTo(end)
	if len(q.Ramps) == 0 {
		return 0 // the initial hold is bounded by the mapping; a cut ramp holds nothing
	}
	if end > prog.RunTime() {
		return q.Ramps[len(q.Ramps)-1].Hold
	}
	return 0
}

// stage runs the seeded starts of one space in parallel, then restarts from
// the best point; it returns the best point and its score.
func (sh *shared) stage(ctx context.Context, sp *space, seeds [][]float64, stage uint64) ([]float64, float64) {
	rng := rand.New(rand.NewPCG(sh.s.Seed, stage))
	starts := append([][]float64(nil), seeds...)
	for len(starts) < sh.s.Starts+len(seeds) {
		x := make([]float64, sp.dim)
		for i := range x {
			x[i] = rng.Float64()
		}
		starts = append(starts, x)
	}
	type outcome struct {
		x []float64
		f float64
	}
	out := make([]outcome, len(starts))
	jobs := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < sh.s.Workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				x, f := sh.run(ctx, sp, starts[i], 0.25)
				out[i] = outcome{x, f}
			}
		}()
	}
	for i := range starts {
		if ctx.Err() != nil {
			break
		}
		jobs <- i
	}
	close(jobs)
	wg.Wait()
	bi := -1
	for i, o := range out {
		if o.x != nil && (bi < 0 || o.f < out[bi].f) {
			bi = i
		}
	}
	if bi < 0 {
		return starts[0], math.Inf(1)
	}
	x, f := out[bi].x, out[bi].f
	for r := 0; r < sh.s.Restarts && ctx.Err() == nil; r++ {
		x2, f2 := sh.run(ctx, sp, x, 0.05/float64(r+1))
		if f2 < f {
			x, f = x2, f2
		}
	}
	return x, f
}

// run is one Nelder–Mead search from x0 with the given simplex size.
func (sh *shared) run(ctx context.Context, sp *space, x0 []float64, size float64) ([]float64, float64) {
	ev := &evaluator{sh: sh, sp: sp.clone(), bestF: math.Inf(1)}
	if sp.dim == 0 {
		return x0, ev.f(x0)
	}
	prob := optimize.Problem{
		Func: ev.f,
		Status: func() (optimize.Status, error) {
			if ctx.Err() != nil {
				return optimize.Failure, ctx.Err()
			}
			return optimize.NotTerminated, nil
		},
	}
	settings := &optimize.Settings{
		FuncEvaluations: sh.s.Evaluations,
		Converger:       &optimize.FunctionConverge{Absolute: 1e-4, Relative: 1e-9, Iterations: 60},
		Concurrent:      1,
	}
	optimize.Minimize(prob, append([]float64(nil), x0...), settings, &optimize.NelderMead{SimplexSize: size})
	if ev.bestX == nil {
		return x0, math.Inf(1)
	}
	return ev.bestX, ev.bestF
}

// finish simulates the best program afresh, trims it, and explains a miss.
func (sh *shared) finish(ctx context.Context, sp *space, x []float64) (*Result, error) {
	p := &sh.p
	r := &Result{Objective: p.Objective, Canceled: ctx.Err() != nil}
	prog := sp.program(x)
	var tmp model.Result
	if err := p.System.SimulateTrimmed(prog, p.Tail, &tmp); err != nil {
		return nil, fmt.Errorf("optimizer: best program does not simulate: %v", err)
	}
	r.Program = prog.TrimTo(tmp.RunTime).Simplify()
	// never return a program beyond the limits: a final hold the trim
	// stretched past the hold limit is cut back (late peaks then show as
	// not eluted, and the result says so)
	holdCut := false
	if n := len(r.Program.Ramps); n > 0 && r.Program.Ramps[n-1].Hold > p.Limits.MaxHold {
		r.Program.Ramps[n-1].Hold = p.Limits.MaxHold
		holdCut = true
	} else if n == 0 && r.Program.InitialHold > p.Limits.MaxHold && !p.locked(model.ProgramValue{Kind: model.InitialHold}) {
		r.Program.InitialHold = p.Limits.MaxHold
		holdCut = true
	}
	if err := p.System.Simulate(r.Program, &r.Sim); err != nil {
		return nil, fmt.Errorf("optimizer: trimmed program does not simulate: %v", err)
	}
	f, _ := sh.score(prog, &tmp)
	r.Status = Met
	if f >= infeasibleBase || holdCut {
		r.Status = NotMet
		r.Limiting = limitingPairs(&r.Sim, p.MinResolution)
		r.Explanation = explain(p, &r.Sim, r.Limiting)
		if holdCut {
			r.Explanation = explainLate(p, &r.Sim, &tmp)
		}
	}
	r.Evaluations = int(sh.evals.Load())
	r.Elapsed = time.Since(sh.begin)
	sh.report()
	return r, nil
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
