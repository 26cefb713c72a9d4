package optimizer

import (
	"context"
	"runtime"
	"sort"
	"sync"
)

// Candidate is one search to rank: a column (its system) with the goal and
// limits to use.
type Candidate struct {
	Source string // where it came from, for the caller
	// Problem builds the search; it is called on a worker, so building the
	// system's tables runs in parallel.
	Problem func() (Problem, error)
}

// Outcome is a candidate optimized.
type Outcome struct {
	Source string
	Index  int // the candidate's position in the list given to Compare
	Result *Result
	Err    error
	// Time is the objective the result achieved, in s (run or cycle time).
	Time float64
	// InletStart and InletEnd are the inlet gauge pressures (Pa) the
	// program needs at its start and at its highest temperature.
	InletStart, InletEnd float64
	MaxTemp              float64 // K, the highest oven temperature used
}

// Compare optimizes every candidate, several at once (each search on one
// core, so the outcome of each equals Optimize on it alone with the same
// seed), and ranks them: candidates that meet the target first, fastest
// first; then the others, best minimum resolution first. progress (may be
// nil) is told how many are done.
func Compare(ctx context.Context, cands []Candidate, s Settings, progress func(done, total int)) []Outcome {
	out := make([]Outcome, len(cands))
	workers := s.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	s.Workers = 1
	s.Progress = nil
	jobs := make(chan int)
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				out[i] = runCandidate(ctx, cands[i], s)
				out[i].Index = i
				mu.Lock()
				done++
				if progress != nil {
					progress(done, len(cands))
				}
				mu.Unlock()
			}
		}()
	}
	for i := range cands {
		jobs <- i
	}
	close(jobs)
	wg.Wait()
	sort.SliceStable(out, func(a, b int) bool { return better(out[a], out[b]) })
	return out
}

func better(a, b Outcome) bool {
	if (a.Err == nil) != (b.Err == nil) {
		return a.Err == nil
	}
	if a.Err != nil {
		return false
	}
	fa, fb := a.Result.Feasible(), b.Result.Feasible()
	if fa != fb {
		return fa
	}
	if fa {
		return a.Time < b.Time
	}
	return a.Result.Sim.MinResolution > b.Result.Sim.MinResolution
}

func runCandidate(ctx context.Context, c Candidate, s Settings) Outcome {
	o := Outcome{Source: c.Source}
	p, err := c.Problem()
	if err != nil {
		o.Err = err
		return o
	}
	r, err := Optimize(ctx, p, s)
	if err != nil {
		o.Err = err
		return o
	}
	o.Result = r
	o.Time = r.Sim.RunTime
	if p.Objective == CycleTime {
		o.Time = r.Sim.CycleTime
	}
	o.MaxTemp = r.Program.MaxTemp()
	o.InletStart = r.System.Cond.InletGauge(r.Program.Initial)
	o.InletEnd = r.System.Cond.InletGauge(o.MaxTemp)
	return o
}
