package optimizer

import (
	"math"

	"github.com/rampwise/rampwise/model"
)

const (
	infeasibleBase = 1e7 // added to the objective of a program that fails the target
	maxRunTime     = 1e5 // s; a slower program counts as failing
	tempGap        = 1.0 // K between consecutive finals the mapping keeps
	// searchMargin is kept above the target (and robust margin) during the
	// continuous search, so that the keypad polish starts from a program
	// that is still feasible after rounding to the steps.
	searchMargin = 0.0005
)

// evaluator scores programs on one rig; one per goroutine (it owns its
// buffers, so scoring allocates nothing).
type evaluator struct {
	p   *Problem
	sh  *shared
	sp  *space
	rg  *rig
	lk  locks
	res model.Result
	alt model.Result
	q   model.Program // the candidate as it would be saved (continuous)
	qb  model.Program
	pr  model.Program
	rsc robustScratch
	rep RobustReport
	// best point this evaluator has seen (for Nelder–Mead runs)
	bestX []float64
	bestF float64
	// approx ≥ 0 replaces the robust checks by a margin: nominal Rs − approx
	// must reach the target (the carrier search's screen); negative: exact.
	approx float64
}

func newEvaluator(sh *shared, rg *rig, sp *space) *evaluator {
	e := &evaluator{p: &sh.p, sh: sh, rg: rg, lk: sh.p.lockFlags(), bestF: math.Inf(1), approx: -1}
	if sp != nil {
		e.sp = sp.clone()
	}
	return e
}

// f is the Nelder–Mead objective of point x.
func (e *evaluator) f(x []float64) float64 {
	e.sh.evals.Add(1)
	prog := e.sp.programInto(x)
	f, rs := e.score(prog, e.bestF)
	if f < e.bestF {
		e.bestF = f
		e.bestX = append(e.bestX[:0], x...)
		e.sh.offer(f, rs, e.q, e.rg)
	}
	return f
}

// ending is where the run of prog ends: option A, after every compound
// plus the tail; with a bake-out, option B, after the last target plus the
// tail followed by the bake-out step, when that is shorter. It fills e.q
// (and e.res with the simulation whose peaks belong to e.q) and returns the
// end and whether the saved form is possible (a locked last hold cannot
// stretch).
func (e *evaluator) ending(prog model.Program) (en runEnd) {
	p := e.p
	comps := e.rg.sys.Compounds
	lastAll, lastTarget := math.Inf(-1), math.Inf(-1)
	late := 0
	for _, pk := range e.res.Peaks {
		if math.IsInf(pk.RetentionTime, 1) || pk.RetentionTime > maxRunTime {
			late++
			continue
		}
		lastAll = math.Max(lastAll, pk.RetentionTime)
		if comps[pk.Compound].Target {
			lastTarget = math.Max(lastTarget, pk.RetentionTime)
		}
	}
	if late > 0 {
		return runEnd{end: prog.RunTime(), late: late}
	}
	lockEnd := e.lk.lockedEnd(prog, p.Steps.TempC)
	end := math.Max(lastAll+p.Tail, lockEnd)
	ok := !(end > prog.RunTime() && e.lk.lastLocked(prog))
	prog.TrimInto(end, &e.q)
	if p.Bakeout.On && !math.IsInf(lastTarget, -1) && lastAll > lastTarget+p.Tail {
		endT := math.Max(lastTarget+p.Tail, lockEnd)
		if endT <= prog.RunTime() || !e.lk.lastLocked(prog) {
			prog.TrimInto(endT, &e.qb)
			p.appendBakeout(&e.qb)
			if err := e.rg.sys.Simulate(e.qb, &e.alt); err == nil {
				endB := e.qb.RunTime()
				all := true
				for _, pk := range e.alt.Peaks {
					if pk.RetentionTime > endB {
						all = false
						break
					}
				}
				if all && (e.objective(e.qb, endB) < e.objective(e.q, end) || !ok) {
					e.q.Ramps = append(e.q.Ramps[:0], e.qb.Ramps...)
					e.q.Initial, e.q.InitialHold = e.qb.Initial, e.qb.InitialHold
					e.res, e.alt = e.alt, e.res
					return runEnd{end: endB, cut: endT, baked: true, ok: true}
				}
			}
		}
	}
	return runEnd{end: end, cut: end, ok: ok}
}

// runEnd is where a run ends: end, after the saved program's last step;
// cut, where the program itself is cut (before the bake-out step when
// baked); ok is false when a locked last hold would have to stretch; late
// counts compounds that never elute.
type runEnd struct {
	end, cut  float64
	baked, ok bool
	late      int
}

// appendBakeout adds the bake-out step: a ramp at the fastest rate allowed
// up to the bake-out temperature (on the rate step), then its hold; when
// the run already ends as hot, the hold is added where it ends.
func (p *Problem) appendBakeout(q *model.Program) {
	b := p.Bakeout
	if q.FinalTemp() >= b.Temp-1e-9 {
		if n := len(q.Ramps); n > 0 {
			q.Ramps[n-1].Hold += b.Hold
		} else {
			q.InitialHold += b.Hold
		}
		return
	}
	rate := floorGrid(p.maxRateTo(b.Temp)*60, p.Steps.RateCMin) / 60
	q.Ramps = append(q.Ramps, model.Ramp{Rate: rate, Final: b.Temp, Hold: b.Hold})
}

func (e *evaluator) objective(q model.Program, end float64) float64 {
	if e.p.Objective == CycleTime {
		cool, err := e.rg.sys.Oven.Cooldown(q.FinalTemp(), q.Initial)
		if err != nil {
			return maxRunTime
		}
		return end + cool + e.rg.sys.Oven.Equilibration
	}
	return end
}

// limitMiss measures how far the saved program q (ending at end, peaks in
// res) breaks the instrument limits and the rules other than resolution:
// holds (length, and temperature against max_isothermal), inlet pressure,
// every compound eluting, and the first target's retention factor.
func (e *evaluator) limitMiss(q model.Program, end float64, res *model.Result) float64 {
	p := e.p
	l := &p.Limits
	miss := 0.0
	hold := func(temp, h float64) {
		if h <= 1e-9 {
			return
		}
		if over := h - l.MaxHold; over > 1e-6 && !p.isBakeout(temp, h) {
			miss += 1 + over/60
		}
		if over := temp - l.MaxIsothermal; over > 1e-9 {
			miss += 1 + over/10
		}
	}
	hold(q.Initial, q.InitialHold)
	for _, r := range q.Ramps {
		hold(r.Final, r.Hold)
		if over := r.Rate - p.maxRateTo(r.Final); over > 1e-12 {
			miss += 1 + over*60
		}
	}
	if over := q.FinalTemp() - p.maxFinal(); over > 1e-9 {
		miss += 1 + over/10
	}
	cond := e.rg.sys.Cond
	if cond.Carrier.Mode == model.ConstantFlow {
		if l.MaxInlet > 0 {
			if over := cond.InletGauge(q.FinalTemp()) - l.MaxInlet; over > 0 {
				miss += 1 + over/1e5
			}
		}
		if under := l.MinInlet - cond.InletGauge(q.Initial); under > 0 {
			miss += 1 + under/1e5
		}
	}
	comps := e.rg.sys.Compounds
	for _, pk := range res.Peaks {
		if pk.RetentionTime > end+1e-9 {
			miss += 10
		}
	}
	if p.MinFirstK > 0 {
		for _, pk := range res.Peaks {
			if comps[pk.Compound].Target {
				if pk.RetentionFactor < p.MinFirstK {
					miss += (p.MinFirstK - pk.RetentionFactor) / p.MinFirstK
				}
				break
			}
		}
	}
	return miss
}

// score is the objective of program prog (the untrimmed point of the
// search): the run or cycle time of its saved form when it meets every
// limit, the target and (when its objective is below robustBelow) the
// robust margin; otherwise infeasibleBase plus a measure of how far it
// misses, so the search first climbs toward feasibility.
func (e *evaluator) score(prog model.Program, robustBelow float64) (f, rs float64) {
	p := e.p
	if err := e.rg.sys.Simulate(prog, &e.res); err != nil {
		return 2 * infeasibleBase, math.NaN()
	}
	en := e.ending(prog)
	if en.late > 0 {
		return infeasibleBase + 1e5*(10+float64(en.late)) + maxRunTime*1e-3, math.NaN()
	}
	end := en.end
	obj := e.objective(e.q, end)
	miss := e.limitMiss(e.q, end, &e.res)
	if !en.ok {
		miss += 10
	}
	rs, _, _ = minCounted(e.res.Peaks, e.rg.sys.Compounds, end, 1, e.rg.sys.Cond.Carrier.InitialBand)
	target := p.MinResolution + searchMargin
	if rs < target {
		miss += target - rs
	}
	if obj > maxRunTime {
		miss += 10
	}
	if miss > 0 {
		return infeasibleBase + 1e5*miss + math.Min(obj, maxRunTime)*1e-3, rs
	}
	if p.Robust.On() && obj < robustBelow && e.approx >= 0 {
		if m := rs - e.approx; m < target {
			return infeasibleBase + 1e5*(target-m) + obj*1e-3, rs
		}
	} else if p.Robust.On() && obj < robustBelow {
		if err := p.robust(e.rg, e.q, &e.res, &e.rsc, target, &e.rep); err != nil {
			return 2 * infeasibleBase, rs
		}
		if e.rep.Margin < target {
			return infeasibleBase + 1e5*(target-e.rep.Margin) + obj*1e-3, rs
		}
	}
	return obj, rs
}

// scoreOven evaluates an oven program on the keypad grid exactly as it
// would be saved: the saved form (cut and rounded up to the steps) is
// simulated afresh and must meet every limit, the target and the robust
// margin with no margin of its own. It returns the saved form too.
func (e *evaluator) scoreOven(o Oven) (f float64, saved Oven, res *model.Result) {
	p := e.p
	o.modelInto(&e.pr)
	if err := e.pr.Validate(p.Limits.MaxTemp); err != nil {
		return 3 * infeasibleBase, o, nil
	}
	if err := e.rg.sys.Simulate(e.pr, &e.res); err != nil {
		return 3 * infeasibleBase, o, nil
	}
	en := e.ending(e.pr)
	if en.late > 0 {
		return infeasibleBase + 1e5*(10+float64(en.late)) + maxRunTime*1e-3, o, nil
	}
	saved, ok := cutOven(o, en.cut, p.Steps, &e.lk)
	if !en.ok || !ok {
		return infeasibleBase + 1e6 + maxRunTime*1e-3, saved, nil
	}
	if en.baked {
		saved = p.bakeoutOven(saved)
	}
	saved.modelInto(&e.q)
	if err := e.rg.sys.Simulate(e.q, &e.res); err != nil {
		return 3 * infeasibleBase, saved, nil
	}
	end := e.q.RunTime()
	obj := e.objective(e.q, end)
	miss := e.limitMiss(e.q, end, &e.res)
	rs := e.res.MinResolution
	if math.IsNaN(rs) {
		rs = math.Inf(1)
	}
	if rs < p.MinResolution {
		miss += p.MinResolution - rs
	}
	if miss > 0 {
		return infeasibleBase + 1e5*miss + math.Min(obj, maxRunTime)*1e-3, saved, &e.res
	}
	if p.Robust.On() {
		if e.sh.stopped() && !e.rg.set.Built() {
			// stopped before the tolerances were ever checked on this
			// setting: building them now would delay the stop
			return infeasibleBase + 1e5 + obj*1e-3, saved, &e.res
		}
		if err := p.robust(e.rg, e.q, &e.res, &e.rsc, p.MinResolution, &e.rep); err != nil {
			return 3 * infeasibleBase, saved, &e.res
		}
		if e.rep.Margin < p.MinResolution {
			return infeasibleBase + 1e5*(p.MinResolution-e.rep.Margin) + obj*1e-3, saved, &e.res
		}
	}
	return obj, saved, &e.res
}

// bakeoutOven is appendBakeout on the file's units and keypad grid.
func (p *Problem) bakeoutOven(o Oven) Oven {
	b := p.Bakeout
	tc, hm := sig12(b.Temp-model.ZeroCelsius), sig12(b.Hold/60)
	final := o.InitialC
	if n := len(o.Ramps); n > 0 {
		final = o.Ramps[n-1].FinalC
	}
	if final >= tc-1e-9 {
		if n := len(o.Ramps); n > 0 {
			o.Ramps[n-1].HoldMin = ceilGrid(o.Ramps[n-1].HoldMin+hm, p.Steps.HoldMin)
		} else {
			o.InitialHoldMin = ceilGrid(o.InitialHoldMin+hm, p.Steps.HoldMin)
		}
		return o
	}
	rate := floorGrid(p.maxRateTo(b.Temp)*60, p.Steps.RateCMin)
	o.Ramps = append(o.Ramps, Ramp{RateCMin: rate, FinalC: tc, HoldMin: hm})
	return o
}

// isBakeout reports whether a hold of h s at temp is (at most) the
// bake-out step, which the hold limit does not bound.
func (p *Problem) isBakeout(temp, h float64) bool {
	return p.Bakeout.On && math.Abs(temp-p.Bakeout.Temp) < 1e-9 && h <= p.Bakeout.Hold+1e-6
}
