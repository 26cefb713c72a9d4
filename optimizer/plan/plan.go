// Package plan answers one question for a method and its scouting runs so
// far: what to inject next so that the next injection is the last.
//
// It returns one of three actions:
//
//   - inject: a scouting program, within every instrument limit of the
//     method, chosen to shrink the uncertainty of the resolution of the
//     pairs that are or could become critical near the optimum. The
//     criterion is the expected reduction of the variance of those
//     resolutions (a linear, "L-optimum" design: Atkinson, Donev & Tobias,
//     Optimum Experimental Designs, with SAS, Oxford 2007, §10.1; with one
//     pair it is c-optimum). The variances come from first-order propagation
//     of each compound's (ΔH, ΔS) covariance; a candidate run updates that
//     covariance by its retention-time sensitivities (a Bayesian update
//     with the retention-time SD as the measurement error).
//   - verify: the optimized program, when its predicted minimum resolution
//     minus z standard deviations (parameters and measurement) meets the
//     target and, when [goal.robust] gives instrument tolerances, every
//     corner of them meets it too; one injection should then confirm it.
//   - done: a measured run already meets the target, and its program is no
//     slower than the optimized one by more than Settings.Tolerance.
package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// Action is what to do next.
type Action string

// The three actions of FORMAT.md's `plan --json`.
const (
	Inject Action = "inject"
	Verify Action = "verify"
	Done   Action = "done"
)

// Settings tune a plan. The zero value means the defaults.
type Settings struct {
	// Optimizer searches the optimized program (its defaults when zero).
	Optimizer optimizer.Settings
	// WidthScatter is the relative SD of a measured half-height width; it
	// adds to the SD of a measured resolution. Default 0.03 (from memory:
	// typical integration repeatability of a width).
	WidthScatter float64
	// MinZ is the least number of standard deviations the predicted
	// resolution must clear the target by before a verification run is
	// advised; [goal.robust] retention_sigma raises it. Default 2.
	MinZ float64
	// MaxMargin is how far the planner may raise the optimizer's target
	// above the goal to make room for the margin, as a fraction of the
	// target. Default 0.2.
	MaxMargin float64
	// Tolerance: a measured run that meets the target counts as the
	// verification of the optimized program when its run (or cycle) time
	// is at most (1 + Tolerance) times the optimized one's. Default 0.05.
	Tolerance float64
}

func (s Settings) withDefaults() Settings {
	if s.WidthScatter <= 0 {
		s.WidthScatter = 0.03
	}
	if s.MinZ <= 0 {
		s.MinZ = 2
	}
	if s.MaxMargin <= 0 {
		s.MaxMargin = 0.2
	}
	if s.Tolerance <= 0 {
		s.Tolerance = 0.05
	}
	return s
}

// Plan is the advice.
type Plan struct {
	Action Action
	// Oven is the program to inject (inject, verify) or the verified one
	// (done), exactly on the method's keypad steps.
	Oven methodfile.Oven
	// Carrier is the carrier setting of that run (the method's).
	Carrier methodfile.Carrier
	Reason  string
	// ExpectedMinResolution is the predicted minimum resolution of the
	// optimized program; ExpectedSD its standard deviation (parameters and
	// measurement); SDAfter (inject) the SD expected once the planned run
	// is fitted.
	ExpectedMinResolution float64
	ExpectedSD            float64
	SDAfter               float64
	CriticalPair          [2]string
	// Optimized is the optimized program under the current parameters.
	Optimized methodfile.Oven
	// Method holds the current parameters (fitted from the runs, updated
	// by single runs) with the planned program as its oven program.
	Method *methodfile.Method
	Fit    *calibrate.Report // nil without runs
	// Estimated names the compounds whose parameters come only from the
	// formula estimate (large uncertainty).
	Estimated []string
	// VerifiedBy (done) is the run that verified the program, with its
	// measured minimum resolution.
	VerifiedBy            string
	MeasuredMinResolution float64
	// RetentionSDMin is the retention-time SD used (min).
	RetentionSDMin float64
	// Compounds are the method's compound names, in method order (for a
	// runs-file block to paste).
	Compounds []string
}

// Next plans the next injection for method m and its runs (nil or empty
// when none were made yet).
func Next(ctx context.Context, m *methodfile.Method, runs *methodfile.Runs, s Settings) (*Plan, error) {
	s = s.withDefaults()
	st, err := newState(m, runs)
	if err != nil {
		return nil, err
	}
	z := math.Max(s.MinZ, m.Goal.Robust.RetentionSigma)
	target := m.Goal.MinResolution

	// the optimized program: first at the target, then with the target
	// raised until the margin fits (or the raise would pass MaxMargin)
	var best *evaluation
	var bestOven methodfile.Oven
	extra := 0.0
	for iter := 0; iter < 5; iter++ {
		oven, feasible, err := st.optimize(ctx, target+extra, s.Optimizer)
		if err != nil {
			return nil, err
		}
		ev, err := st.evaluate(oven, z, s.WidthScatter)
		if err != nil {
			return nil, err
		}
		ev.feasible = feasible
		if best == nil || ev.ok || (ev.deficit < best.deficit && !best.ok) {
			best, bestOven = ev, oven
		}
		if ev.ok || !feasible || ctx.Err() != nil {
			break
		}
		next := extra + ev.deficit + 0.01
		if next > s.MaxMargin*target {
			break
		}
		extra = next
	}
	p := &Plan{
		Optimized:             bestOven,
		Carrier:               st.m.Carrier,
		ExpectedMinResolution: best.minRs,
		ExpectedSD:            best.sd,
		CriticalPair:          best.pair,
		Fit:                   st.fit,
		Estimated:             st.estimated,
		RetentionSDMin:        st.sigmaT / 60,
	}
	for _, c := range m.Compounds {
		p.Compounds = append(p.Compounds, c.Name)
	}

	// done: a measured run meets the target and is about as fast
	if runs != nil {
		optTime := st.duration(bestOven)
		for i := len(runs.Runs) - 1; i >= 0; i-- {
			r := &runs.Runs[i]
			j := st.judge(r)
			if !j.met {
				continue
			}
			if st.duration(r.Oven) <= (1+s.Tolerance)*optTime {
				p.Action, p.Oven = Done, r.Oven
				p.VerifiedBy, p.MeasuredMinResolution = r.Name, j.minRs
				p.Reason = fmt.Sprintf("run %q meets the target as measured (min Rs %.2f ≥ %.2f, %s) with a program within %.0f %% of the optimized one; no further injection is needed",
					r.Name, j.minRs, target, strings.Join(j.pair[:], " / "), 100*s.Tolerance)
				p.Method = st.withOven(r.Oven)
				return p, nil
			}
		}
	}

	if best.ok {
		p.Action, p.Oven = Verify, bestOven
		p.Reason = fmt.Sprintf("the optimized program's predicted min Rs %.2f ± %.2f (%s) clears the target %.2f by %.1f standard deviations%s: inject it once to verify",
			best.minRs, best.sd, strings.Join(best.pair[:], " / "), target, z, best.cornerText)
		p.Method = st.withOven(bestOven)
		return p, nil
	}

	// inject: the scouting run that shrinks the Rs variance the most
	d, err := st.design(bestOven, target, z)
	if err != nil {
		return nil, err
	}
	if d == nil || (!best.feasible && best.cannotHelp(target, z)) {
		p.Action, p.Oven = Done, bestOven
		p.Reason = fmt.Sprintf("no program within the limits meets the target %.2f (best min Rs %.2f ± %.2f, %s), and further scouting runs would not change that: change the column, the carrier or the goal",
			target, best.minRs, best.sd, strings.Join(best.pair[:], " / "))
		p.Method = st.withOven(bestOven)
		return p, nil
	}
	p.Action, p.Oven, p.SDAfter = Inject, d.oven, d.sdAfter
	why := fmt.Sprintf("the predicted min Rs %.2f of the optimized program is uncertain by ± %.2f (%s): it must clear the target %.2f by %.1f standard deviations",
		best.minRs, best.sd, strings.Join(best.pair[:], " / "), target, z)
	if !best.feasible {
		why = fmt.Sprintf("with the current parameters no program reaches the target %.2f (best min Rs %.2f ± %.2f, %s), but they are uncertain",
			target, best.minRs, best.sd, strings.Join(best.pair[:], " / "))
	} else if best.sdOK && best.cornerText != "" {
		why = fmt.Sprintf("the optimized program's predicted min Rs %.2f ± %.2f does not hold at every instrument tolerance%s", best.minRs, best.sd, best.cornerText)
	}
	p.Reason = fmt.Sprintf("%s; this scouting run is expected to shrink that to ± %.2f (%d pairs that are or could become critical weighed)",
		why, d.sdAfter, d.pairs)
	if len(st.estimated) > 0 {
		p.Reason += fmt.Sprintf("; %s: parameters only estimated from the formula (± %.0f kJ/mol)", strings.Join(st.estimated, ", "), formulaSDkJ)
	}
	p.Method = st.withOven(d.oven)
	return p, nil
}

// state is the current knowledge: the method with updated parameters, each
// compound's covariance and the retention-time SD.
type state struct {
	m         *methodfile.Method // current parameters
	sys       *model.System
	sens      *sensSystem
	cov       []cov2
	sigmaT    float64 // s
	fit       *calibrate.Report
	estimated []string
	corners   []*model.System
	cornerTag []string
	cornerSh  []float64 // oven offset of each corner, K
}

func newState(m *methodfile.Method, runs *methodfile.Runs) (*state, error) {
	if len(m.Compounds) == 0 {
		return nil, errors.New("plan: the method has no compounds")
	}
	st := &state{m: m.Clone(), sigmaT: m.Goal.Robust.RetentionTimeSDMin * 60}
	if st.sigmaT <= 0 {
		st.sigmaT = 0.002 * 60
	}
	prior := make([]cov2, len(m.Compounds))
	for i, c := range m.Compounds {
		prior[i] = priorCov(m, c)
		if c.FromFormula {
			st.estimated = append(st.estimated, c.Name)
		}
	}
	st.cov = append([]cov2(nil), prior...)
	if runs == nil || len(runs.Runs) == 0 {
		return st, st.build()
	}
	rep, err := calibrate.Fit(m, runs, calibrate.Options{})
	if err != nil {
		return nil, err
	}
	st.fit = rep
	st.m = rep.Method.Clone()
	st.m.Compounds = st.m.Compounds[:len(m.Compounds)] // compounds only in the runs are not planned for
	fitted := map[string]bool{}
	var ssr, dof float64
	for _, c := range rep.Compounds {
		fitted[c.Name] = c.Fitted
		if c.Fitted && c.Runs > 2 {
			ssr += c.RMS * c.RMS * float64(c.Runs) * 3600
			dof += float64(c.Runs - 2)
		}
	}
	// pooled residual SD (s); with few degrees of freedom never below
	// the assumed retention-time SD
	if dof > 0 {
		pooled := math.Sqrt(ssr / dof)
		if dof >= 10 || pooled > st.sigmaT {
			st.sigmaT = pooled
		}
	}
	// sensitivities of every run at the current parameters
	type obs struct {
		run int
		t   float64 // s
	}
	seen := make([][]obs, len(m.Compounds))
	index := map[string]int{}
	for i, c := range m.Compounds {
		index[c.Name] = i
	}
	for ri := range runs.Runs {
		for name, t := range runs.Runs[ri].Retention {
			if i, ok := index[name]; ok {
				seen[i] = append(seen[i], obs{ri, t * 60})
			}
		}
	}
	s2 := st.sigmaT * st.sigmaT
	for i := range st.m.Compounds {
		if len(seen[i]) == 0 {
			continue
		}
		c := &st.m.Compounds[i]
		if fitted[c.Name] && len(seen[i]) >= 2 {
			var info cov2
			for _, o := range seen[i] {
				_, j, err := st.retention(&runs.Runs[o.run], *c)
				if err != nil {
					return nil, err
				}
				info = info.add(outer(j))
			}
			if inv, ok := info.scale(1 / s2).inverse(); ok {
				st.cov[i] = inv
				continue
			}
		}
		// one run (or a degenerate fit): Bayesian update of the prior by
		// iterated Gauss–Newton (the iterated extended Kalman step)
		th0 := [2]float64{c.DHkJ * 1000, c.DS}
		th := th0
		var post cov2
		for it := 0; it < 6; it++ {
			cc := *c
			cc.DHkJ, cc.DS = th[0]/1000, th[1]
			post = prior[i]
			pinv, ok := prior[i].inverse()
			if !ok {
				break
			}
			info := pinv
			var rhs [2]float64
			pb := pinv.mul([2]float64{th0[0] - th[0], th0[1] - th[1]})
			rhs = pb
			for _, o := range seen[i] {
				t, j, err := st.retention(&runs.Runs[o.run], cc)
				if err != nil {
					return nil, err
				}
				info = info.add(outer(j).scale(1 / s2))
				r := (o.t - t) / s2
				rhs[0] += j[0] * r
				rhs[1] += j[1] * r
			}
			inv, ok := info.inverse()
			if !ok {
				break
			}
			post = inv
			step := inv.mul(rhs)
			th[0] += step[0]
			th[1] += step[1]
			if math.Abs(step[0]) < 1 && math.Abs(step[1]) < 1e-3 {
				break
			}
		}
		if th[0] < 0 && !math.IsNaN(th[1]) {
			c.DHkJ, c.DS = th[0]/1000, th[1]
			st.cov[i] = post
		}
	}
	return st, st.build()
}

// priorCov is a compound's covariance before the runs: its standard errors
// when the file has them, the formula estimate's when its parameters come
// from the formula, otherwise [goal.robust]'s prior.
func priorCov(m *methodfile.Method, c methodfile.Compound) cov2 {
	switch {
	case c.HasSE:
		h, s := c.DHSE*1000, c.DSSE
		// never exactly zero: a singular prior would freeze the parameter
		h, s = math.Max(h, 1), math.Max(s, 1e-3)
		return cov2{h * h, c.DHDSCorr * h * s, s * s}
	case c.FromFormula:
		return formulaCov()
	}
	h, s := m.Goal.Robust.PriorDHkJ*1000, m.Goal.Robust.PriorDS
	if h <= 0 {
		h = 2000
	}
	if s <= 0 {
		s = 4
	}
	return cov2{h * h, 0, s * s}
}

// retention is compound c's retention time (s) in run r and its
// derivatives with respect to (ΔH, ΔS), by the direct quadrature of the
// model (model.Conditions.RetentionTime).
func (st *state) retention(r *methodfile.Run, c methodfile.Compound) (float64, [2]float64, error) {
	rm := st.m.RunMethod(r)
	car, err := rm.ModelCarrier()
	if err != nil {
		return 0, [2]float64{}, err
	}
	cond, err := model.NewConditions(rm.ModelColumn(), car)
	if err != nil {
		return 0, [2]float64{}, err
	}
	tmp := &methodfile.Method{Compounds: []methodfile.Compound{c}}
	mcs, err := tmp.ModelCompounds()
	if err != nil {
		return 0, [2]float64{}, err
	}
	mc := mcs[0]
	prog := rm.ModelProgram()
	t, _ := cond.RetentionTime(&mc, prog)
	mh := mc
	mh.DH += stepDH
	th, _ := cond.RetentionTime(&mh, prog)
	ms := mc
	ms.DS += stepDS
	ts, _ := cond.RetentionTime(&ms, prog)
	if math.IsInf(t, 0) || math.IsNaN(t) || math.IsInf(th, 0) || math.IsInf(ts, 0) {
		return t, [2]float64{}, nil
	}
	return t, [2]float64{(th - t) / stepDH, (ts - t) / stepDS}, nil
}

// build makes the systems for the current parameters: nominal, the
// sensitivity copies and the instrument-tolerance corners.
func (st *state) build() error {
	sys, err := st.m.System()
	if err != nil {
		return err
	}
	st.sys = sys
	st.sens, err = newSensSystem(sys.Cond, sys.Compounds, sys.Oven)
	if err != nil {
		return err
	}
	rb := st.m.Goal.Robust
	if rb.OvenOffsetC == 0 && rb.FlowPct == 0 && rb.EfficiencyPct == 0 {
		return nil
	}
	for _, dT := range []float64{-rb.OvenOffsetC, rb.OvenOffsetC} {
		for _, df := range []float64{-rb.FlowPct, rb.FlowPct} {
			cm := st.m.Clone()
			cm.Column.PlateHeight *= 1 + rb.EfficiencyPct/100
			cm.Column.MaxTempC += math.Abs(dT) + 1 // room for the hotter oven
			cm.Carrier.FlowMLMin *= 1 + df/100
			cm.Carrier.InletKPa *= 1 + df/100
			cs, err := cm.System()
			if err != nil {
				return err
			}
			st.corners = append(st.corners, cs)
			st.cornerSh = append(st.cornerSh, dT)
			st.cornerTag = append(st.cornerTag, fmt.Sprintf("oven %+g °C, flow %+g %%, efficiency −%g %%", dT, df, rb.EfficiencyPct))
		}
	}
	return nil
}

func (st *state) withOven(o methodfile.Oven) *methodfile.Method {
	m := st.m.Clone()
	m.Oven = o
	m.Oven.Ramps = append([]methodfile.Ramp(nil), o.Ramps...)
	return m
}

// optimize runs the optimizer on the current parameters for target rs and
// returns its program on the keypad steps.
func (st *state) optimize(ctx context.Context, rs float64, s optimizer.Settings) (methodfile.Oven, bool, error) {
	m := st.m.Clone()
	m.Goal.MinResolution = rs
	prob := optimizer.FromMethod(m, st.sys)
	res, err := optimizer.Optimize(ctx, prob, s)
	if err != nil {
		return methodfile.Oven{}, false, err
	}
	oven := onSteps(methodfile.ProgramFromModel(res.Program), st.m.Limits)
	return oven, res.Feasible(), nil
}

// duration is the program's run time or cycle time (the goal's objective),
// s, as the current model predicts.
func (st *state) duration(o methodfile.Oven) float64 {
	p := methodfile.ProgramToModel(o)
	if st.m.Goal.Objective != "cycle-time" {
		return p.RunTime()
	}
	cool, err := st.sys.Oven.Cooldown(p.FinalTemp(), p.Initial)
	if err != nil {
		return p.RunTime()
	}
	return p.RunTime() + cool + st.sys.Oven.Equilibration
}

// evaluation is how sure the current knowledge is that a program meets the
// target.
type evaluation struct {
	minRs, sd  float64 // nominal minimum Rs and the SD of that pair's Rs
	pair       [2]string
	deficit    float64 // how far the worst lower bound or corner falls short
	ok         bool
	sdOK       bool // the z·SD margin alone holds
	feasible   bool
	cornerText string
	lowest     float64 // lowest Rs − z·SD over the pairs
}

// cannotHelp: the best program misses the target by more than the
// uncertainty could explain.
func (e *evaluation) cannotHelp(target, z float64) bool {
	return e.minRs+z*e.sd < target
}

// evaluate simulates the program as saved and judges its margin.
func (st *state) evaluate(o methodfile.Oven, z, widthScatter float64) (*evaluation, error) {
	target := st.m.Goal.MinResolution
	prog := methodfile.ProgramToModel(o)
	if err := st.sens.eval(prog); err != nil {
		return nil, err
	}
	s := st.sens
	order := make([]int, 0, s.n)
	missing := 0
	for i := 0; i < s.n; i++ {
		if s.eluted[i] {
			order = append(order, i)
		} else if st.sys.Compounds[i].Target {
			missing++
		}
	}
	sort.Slice(order, func(a, b int) bool { return s.t[order[a]] < s.t[order[b]] })
	ev := &evaluation{minRs: math.NaN(), lowest: math.Inf(1)}
	for k := 0; k+1 < len(order); k++ {
		a, b := order[k], order[k+1]
		if !st.sys.Compounds[a].Target && !st.sys.Compounds[b].Target {
			continue
		}
		rs, ga, gb := s.resolution(a, b)
		sp := rsSD(ga, gb, st.cov[a], st.cov[b])
		sd := math.Hypot(sp, st.measurementSD(rs, a, b, widthScatter))
		if low := rs - z*sd; low < ev.lowest {
			ev.lowest, ev.sd = low, sd
		}
		if math.IsNaN(ev.minRs) || rs < ev.minRs {
			ev.minRs = rs
			ev.pair = [2]string{st.sys.Compounds[a].Name, st.sys.Compounds[b].Name}
		}
	}
	if math.IsNaN(ev.minRs) {
		ev.minRs, ev.sd, ev.lowest = math.Inf(1), 0, math.Inf(1)
	}
	// the SD reported is that of the pair with the lowest bound; the
	// critical pair's own SD when both are the same pair
	ev.deficit = math.Max(0, target-ev.lowest)
	ev.sdOK = ev.deficit == 0
	if missing > 0 {
		ev.deficit = math.Max(ev.deficit, target)
		ev.sdOK = false
	}
	worst, tag := math.Inf(1), ""
	var res model.Result
	for ci, cs := range st.corners {
		cp := prog.Clone()
		cp.Initial += st.cornerSh[ci]
		for r := range cp.Ramps {
			cp.Ramps[r].Final += st.cornerSh[ci]
		}
		if err := cs.Simulate(cp, &res); err != nil {
			return nil, err
		}
		rs := res.MinResolution
		if res.TargetsNotEluted > 0 {
			rs = 0
		}
		if res.Critical >= 0 && rs < worst {
			worst, tag = rs, st.cornerTag[ci]
		}
	}
	if len(st.corners) > 0 {
		if worst < target {
			ev.deficit = math.Max(ev.deficit, target-worst)
			ev.cornerText = fmt.Sprintf(" (worst corner %s: Rs %.2f)", tag, worst)
		} else {
			ev.cornerText = fmt.Sprintf(", and every instrument-tolerance corner keeps Rs ≥ %.2f (worst %.2f at %s)", target, worst, tag)
		}
	}
	ev.ok = ev.deficit == 0
	return ev, nil
}

// measurementSD is the SD of a measured resolution from the scatter of the
// measured widths (relative widthScatter each) and of the retention times.
func (st *state) measurementSD(rs float64, a, b int, widthScatter float64) float64 {
	sa, sb := st.sens.sigma[a], st.sens.sigma[b]
	w := rs * widthScatter * math.Hypot(sa, sb) / (sa + sb)
	t := math.Sqrt2 * st.sigmaT / (2 * (sa + sb))
	return math.Hypot(w, t)
}
