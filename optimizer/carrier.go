package optimizer

import (
	"context"
	"math"
	"time"

	"github.com/rampwise/rampwise/model"
)

// The carrier setting a rig stands for is a flow in mL/min (constant flow)
// or an inlet gauge pressure in kPa (constant pressure), converted as a
// method file's carrier is.
func (sh *shared) carrierOf(value float64) model.Carrier {
	car := sh.p.System.Cond.Carrier
	if car.Mode == model.ConstantPressure {
		car.InletGauge = value * 1000
	} else {
		car.Flow = value * 1e-6 / 60
	}
	return car
}

func (sh *shared) setting(value float64) CarrierSetting {
	c := CarrierSetting{Mode: sh.p.System.Cond.Carrier.Mode}
	if c.Mode == model.ConstantPressure {
		c.InletKPa = value
	} else {
		c.FlowMLMin = value
	}
	return c
}

func (sh *shared) startValue() float64 {
	car := sh.p.System.Cond.Carrier
	if car.Mode == model.ConstantPressure {
		return sig12(car.InletGauge / 1000)
	}
	return sig12(car.Flow * 60e6)
}

func (sh *shared) carrierStep() float64 {
	if sh.p.System.Cond.Carrier.Mode == model.ConstantPressure {
		return sh.p.Steps.PressureKPa
	}
	return sh.p.Steps.FlowMLMin
}

// rigFor is the rig of a carrier setting (built once per Optimize call).
func (sh *shared) rigFor(value float64) (*rig, error) {
	sh.rigMu.Lock()
	defer sh.rigMu.Unlock()
	if rg, ok := sh.rigs[value]; ok {
		return rg, nil
	}
	var sys *model.System
	if value == sh.startValue() {
		sys = sh.p.System
	} else {
		cond, err := model.NewConditions(sh.p.System.Cond.Column, sh.carrierOf(value))
		if err != nil {
			return nil, err
		}
		sys, err = model.NewSystem(cond, sh.p.System.Compounds, sh.p.System.Oven)
		if err != nil {
			return nil, err
		}
	}
	rg := newRig(value, sys, sh.p.Robust)
	if sh.ctx != nil {
		rg.set.Stop = sh.ctx.Done()
	}
	sh.rigs[value] = rg
	return rg, nil
}

// startRig is the method's own carrier setting, or, when the optimizer
// varies it, that setting on the keypad step and inside the allowed range.
func (sh *shared) startRig() (*rig, error) {
	v := sh.startValue()
	if sh.p.varyCarrier() {
		lo, hi := sh.carrierRange()
		st := sh.carrierStep()
		v = roundGrid(math.Min(math.Max(v, lo), hi), st)
	}
	return sh.rigFor(v)
}

// carrierRange is the range (file units, on the keypad step) the carrier
// setting may take: the given flow limits, or else the flows (pressures)
// that keep the average linear velocity at the middle of the oven range
// between 0.5× and 3× the optimum of the model's plate height for a
// typical solute (the median target, k = 2); within the inlet-pressure
// limits over the whole oven range.
func (sh *shared) carrierRange() (lo, hi float64) {
	p := &sh.p
	base := p.System.Cond
	mode := base.Carrier.Mode
	tMid := (p.Limits.OvenMin + p.maxFinal()) / 2
	// the setting as one number: mL/min or kPa
	cond := func(v float64) *model.Conditions {
		c, err := model.NewConditions(base.Column, sh.carrierOf(v))
		if err != nil {
			return nil
		}
		return c
	}
	var cp *model.Compound
	var targets []int
	for i := range p.System.Compounds {
		if p.System.Compounds[i].Target {
			targets = append(targets, i)
		}
	}
	if len(targets) == 0 {
		targets = []int{0}
	}
	cp = &p.System.Compounds[targets[len(targets)/2]]
	height := func(v float64) float64 {
		c := cond(v)
		if c == nil {
			return math.Inf(1)
		}
		return c.PlateHeight(tMid, 2, c.DiffusionCoefficient(cp, tMid))
	}
	velocity := func(v float64) float64 {
		c := cond(v)
		if c == nil {
			return 0
		}
		return c.AverageVelocity(tMid)
	}
	// golden-section minimum of H over a wide log range of settings
	a, b := math.Log(1e-3), math.Log(1e3)
	if mode == model.ConstantFlow {
		a, b = math.Log(1e-3), math.Log(500)
	}
	g := (math.Sqrt(5) - 1) / 2
	for i := 0; i < 80; i++ {
		c, d := b-g*(b-a), a+g*(b-a)
		if height(math.Exp(c)) < height(math.Exp(d)) {
			b = d
		} else {
			a = c
		}
	}
	opt := math.Exp((a + b) / 2)
	uOpt := velocity(opt)
	// setting for a velocity (velocity rises with the setting)
	forVelocity := func(u float64) float64 {
		x, y := math.Log(1e-4), math.Log(1e4)
		for i := 0; i < 80; i++ {
			m := (x + y) / 2
			if velocity(math.Exp(m)) < u {
				x = m
			} else {
				y = m
			}
		}
		return math.Exp((x + y) / 2)
	}
	lo, hi = forVelocity(0.5*uOpt), forVelocity(3*uOpt)
	if mode == model.ConstantFlow {
		if p.Limits.MinFlow > 0 {
			lo = p.Limits.MinFlow * 60e6
		}
		if p.Limits.MaxFlow > 0 {
			hi = p.Limits.MaxFlow * 60e6
		}
		// inlet limits: the pressure rises with temperature at constant flow
		inlet := func(v, t float64) float64 {
			c := cond(v)
			if c == nil {
				return math.Inf(1)
			}
			return c.InletGauge(t)
		}
		if p.Limits.MaxInlet > 0 && inlet(hi, p.maxFinal()) > p.Limits.MaxInlet {
			x, y := lo, hi
			for i := 0; i < 60; i++ {
				m := (x + y) / 2
				if inlet(m, p.maxFinal()) > p.Limits.MaxInlet {
					y = m
				} else {
					x = m
				}
			}
			hi = x
		}
		if p.Limits.MinInlet > 0 && inlet(lo, p.Limits.OvenMin) < p.Limits.MinInlet {
			x, y := lo, hi
			for i := 0; i < 60; i++ {
				m := (x + y) / 2
				if inlet(m, p.Limits.OvenMin) < p.Limits.MinInlet {
					x = m
				} else {
					y = m
				}
			}
			lo = y
		}
	} else {
		if p.Limits.MaxInlet > 0 {
			hi = math.Min(hi, p.Limits.MaxInlet/1000)
		}
		lo = math.Max(lo, p.Limits.MinInlet/1000)
	}
	st := sh.carrierStep()
	lo, hi = ceilGrid(lo, st), floorGrid(hi, st)
	if lo <= 0 {
		lo = st
	}
	if hi < lo {
		hi = lo
	}
	return lo, hi
}

// CarrierRange is the range of the carrier flow (mL/min; inlet kPa at
// constant pressure) the optimizer searches for problem p.
func CarrierRange(p Problem) (lo, hi float64, err error) {
	if err := p.check(); err != nil {
		return 0, 0, err
	}
	sh := newShared(p, Settings{}.withDefaults(), time.Time{})
	lo, hi = sh.carrierRange()
	return lo, hi, nil
}

// rescaled is prog moved to another carrier setting: holds and times
// scaled by the ratio of the holdup times at mid-range, rates by its
// inverse, temperatures kept.
func rescaled(prog model.Program, from, to *model.System, p *Problem) model.Program {
	t := (p.Limits.OvenMin + p.maxFinal()) / 2
	f := to.Cond.HoldupTimeAt(t) / from.Cond.HoldupTimeAt(t)
	q := prog.Clone()
	q.InitialHold *= f
	for i := range q.Ramps {
		q.Ramps[i].Rate = math.Min(math.Max(q.Ramps[i].Rate/f, p.Limits.MinRate), p.Limits.MaxRate)
		q.Ramps[i].Hold *= f
	}
	return q
}

// carrierSearch varies the carrier setting: a few probes spread over the
// range on a log scale, then golden-section refinement around the best;
// each probe is a short program search seeded from the best so far.
func (sh *shared) carrierSearch(ctx context.Context, best candidate) candidate {
	lo, hi := sh.carrierRange()
	st := sh.carrierStep()
	if hi-lo < st/2 {
		return best
	}
	// screen the robust margin by the loss it costs at the best program so
	// far; the chosen setting is then searched with the exact checks
	if sh.p.Robust.On() {
		ev := newEvaluator(sh, best.rg, nil)
		ev.score(best.prog, math.Inf(-1))
		var rep RobustReport
		if err := sh.p.robust(best.rg, ev.q, &ev.res, &ev.rsc, math.Inf(-1), &rep); err == nil && rep.Nominal-rep.Margin >= 0 {
			sh.approx = rep.Nominal - rep.Margin
		} else {
			sh.approx = 0
		}
	}
	start := best
	from := best // the candidate each probe is seeded from
	tried := map[float64]candidate{best.rg.value: best}
	probe := func(v float64) candidate {
		v = roundGrid(math.Min(math.Max(v, lo), hi), st)
		if c, ok := tried[v]; ok {
			return c
		}
		rg, err := sh.rigFor(v)
		if err != nil {
			c := candidate{f: math.Inf(1)}
			tried[v] = c
			return c
		}
		if best.sp != nil && best.f < from.f {
			from = best
		}
		sp := newSpace(sh.p, from.sp.n)
		seeds := [][]float64{sp.invert(rescaled(from.prog, from.rg.sys, rg.sys, &sh.p)), append([]float64(nil), from.x...)}
		x, f := sh.stage(ctx, rg, sp, seeds, 1, sh.s.Evaluations/3, 1, uint64(100+len(tried)), screen{})
		c := candidate{rg: rg, sp: sp, x: x, f: f, prog: sp.program(x)}
		tried[v] = c
		if c.f < best.f {
			best = c
		}
		return c
	}
	// coarse probes, evenly spaced in log between lo and hi (robust screen)
	n := sh.s.CarrierProbes / 2
	if n < 2 {
		n = 2
	}
	la, lb := math.Log(lo), math.Log(hi)
	for i := 0; i <= n && ctx.Err() == nil; i++ {
		probe(math.Exp(la + (lb-la)*float64(i)/float64(n)))
	}
	// golden-section refinement in the bracket around the best, with the
	// exact robust checks (their scores are not comparable with the screen's)
	h := (lb - la) / float64(n)
	a, b := math.Max(math.Log(best.rg.value)-h, la), math.Min(math.Log(best.rg.value)+h, lb)
	if sh.approx >= 0 && ctx.Err() == nil {
		sh.approx = -1
		from = best
		tried = map[float64]candidate{start.rg.value: start}
		best = start
		probe(from.rg.value)
	}
	g := (math.Sqrt(5) - 1) / 2
	for i := 0; i < sh.s.CarrierProbes-n && ctx.Err() == nil; i++ {
		c, d := b-g*(b-a), a+g*(b-a)
		if probe(math.Exp(c)).f < probe(math.Exp(d)).f {
			b = d
		} else {
			a = c
		}
	}
	// hill-climb in small steps from the best setting: the golden-section
	// bracket assumes one minimum, and each probe's search is short
	// (probes made before the best program was found were seeded worse:
	// search those settings again from it)
	tried = map[float64]candidate{best.rg.value: best}
	for _, f := range []float64{1.04, 1 / 1.04} {
		for k := 0; k < 3 && ctx.Err() == nil; k++ {
			was := best.rg.value
			if c := probe(was * f); c.rg == nil || c.rg.value == was || best.rg.value == was {
				break
			}
		}
	}
	sh.approx = -1
	if best.rg == start.rg {
		return start
	}
	if ctx.Err() == nil {
		// a fuller program search at the chosen setting, from the best point,
		// with the exact robust checks
		chosen := best
		seeds := [][]float64{best.x}
		if best.sp.n >= 2 {
			seeds = append(seeds, best.sp.plateauSeeds()...)
		}
		x, f := sh.stage(ctx, best.rg, best.sp, seeds, sh.s.Starts/2, sh.s.Evaluations, sh.s.Restarts, 99, screen{})
		best = candidate{rg: chosen.rg, sp: chosen.sp, x: x, f: f, prog: chosen.sp.program(x)}
		best = sh.neighbourSearch(ctx, best, lo, hi)
		if best.f >= start.f && start.f < infeasibleBase {
			return start
		}
	}
	return best
}

// neighbourSearch runs the same fuller program search (from the best
// program rescaled, and the plateau seeds) at the settings a few per cent
// either side of the chosen one, walking on while that improves: the short
// probes of the hill-climb can miss a better plateau at a nearby setting
// that a fuller search finds. The plateau seeds are screened there (a
// quarter of the budget each, then the best six go on).
func (sh *shared) neighbourSearch(ctx context.Context, best candidate, lo, hi float64) candidate {
	st := sh.carrierStep()
	done := map[float64]bool{best.rg.value: true}
	for _, fac := range []float64{1.03, 1 / 1.03} {
		for k := 0; k < 3 && ctx.Err() == nil; k++ {
			v := roundGrid(math.Min(math.Max(best.rg.value*fac, lo), hi), st)
			if done[v] {
				break
			}
			done[v] = true
			rg, err := sh.rigFor(v)
			if err != nil {
				break
			}
			sp := newSpace(sh.p, best.sp.n)
			seeds := [][]float64{sp.invert(rescaled(best.prog, best.rg.sys, rg.sys, &sh.p)), append([]float64(nil), best.x...)}
			if sp.n >= 2 {
				seeds = append(seeds, sp.plateauSeeds()...)
			}
			evals := sh.s.Evaluations / 3
			x, f := sh.stage(ctx, rg, sp, seeds, 0, evals, sh.s.Restarts, 98, screen{at: evals / 4, keep: 6, first: 2})
			if f >= best.f {
				break
			}
			best = candidate{rg: rg, sp: sp, x: x, f: f, prog: sp.program(x)}
		}
	}
	return best
}
