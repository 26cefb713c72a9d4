// Package plan answers one question for a method and its scouting runs so
// far: what to inject next so that the next injection is the last.
//
// It returns one of three actions:
//
//   - inject: a scouting program, within every instrument limit of the
//     method, chosen to shrink the uncertainty of the resolution of the
//     pairs that are or could become critical near the optimum: the run
//     after which the summed squared shortfall of the margin,
//     Σ max(0, target − Rs + z·SD_after)², is least, SD_after being each
//     pair's expected posterior SD. This is expected reduction of the Rs
//     variance weighted towards the pairs that would block a verification,
//     a Bayesian linear design (Atkinson, Donev & Tobias, Optimum
//     Experimental Designs, with SAS, Oxford 2007, criteria of optimality:
//     linear and c-optimality; Chaloner & Verdinelli, Statistical Science
//     10, 1995, 273); the weighting is ours. The variances come from
//     first-order propagation of each compound's (ΔH, ΔS) covariance; a
//     candidate run updates that covariance by its retention-time
//     sensitivities (a Bayesian update with the retention-time SD as the
//     measurement error).
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
	"math/rand/v2"
	"sort"
	"strings"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/robust"
	"github.com/rampwise/rampwise/optimizer"
	"github.com/rampwise/rampwise/optimizer/methodsearch"
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
	// advised; [goal.robust] retention_sigma raises it. Default 3 (a
	// failed verification costs an injection: about 1 in 700 per pair).
	MinZ float64
	// MaxMargin is how far the planner may raise the optimizer's target
	// above the goal to make room for the margin, as a fraction of the
	// target. Default 1 (a robust program up to twice the target).
	MaxMargin float64
	// Slower: before the budget's last injection, a robust program is
	// advised for verification when it is at most (1 + Slower) times as
	// long as the program that would hold the margin were the parameters
	// known (the measurement's scatter and the instrument tolerances
	// alone); otherwise a scouting run is expected to buy a faster method.
	// Default 0.25.
	Slower float64
	// Draws is how many draws of the parameters from their uncertainty
	// are optimized to find the pairs that could become critical near the
	// optimum, for the design of a scouting run. Default 3.
	Draws int
	// Tolerance: a measured run that meets the target counts as the
	// verification of the optimized program when its run (or cycle) time
	// is at most (1 + Tolerance) times that of the program now optimized
	// (at the target, or holding the margin when one does; at most 1.25
	// times while two or more injections are left in the budget). Default
	// 1: after a passing verification a program predicted faster is
	// mentioned, not demanded; a slow scouting ramp that happens to meet
	// the target is not taken for the method.
	Tolerance float64
	// Injections is the injection budget, the verification run included:
	// with the runs made so far one short of it, a program that holds the
	// margin is advised for verification however much knowing the
	// parameters better would shorten it, and while two or more scouting
	// runs remain, each is designed together with the next. Default 3
	// (two scouting runs at different elution temperatures determine both
	// parameters of every compound; the third injection verifies).
	Injections int
}

func (s Settings) withDefaults() Settings {
	if s.WidthScatter <= 0 {
		s.WidthScatter = 0.03
	}
	if s.MinZ <= 0 {
		s.MinZ = 3
	}
	if s.MaxMargin <= 0 {
		s.MaxMargin = 1
	}
	if s.Slower <= 0 {
		s.Slower = 0.25
	}
	if s.Draws <= 0 {
		s.Draws = 3
	}
	if s.Tolerance <= 0 {
		s.Tolerance = 1
	}
	if s.Injections <= 0 {
		s.Injections = 3
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
	// measurement); SDAfter (inject) the parameters' part of that SD
	// expected once the planned run is fitted.
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
	// Compounds are the method's compound names in the order the program
	// is predicted to elute them (those not predicted to elute last, in
	// method order), for a runs-file block to paste.
	Compounds []string
	// RunName names the planned run (inject, verify): scout-N or
	// verify-N, not taken by a run so far.
	RunName string
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

	// the optimized program at the bare target (the file's own margin),
	// then the optimizer with the planner's margin as its constraint (the
	// posterior SD of every pair's Rs and one run's measurement scatter, z
	// raised for the pairs near the target at the bare optimum), then, if
	// the program found still falls short (the count of pairs near the
	// target changed, or first order was not enough), the target raised
	// until the margin fits: the robust program
	nomOven, feasible, err := st.optimize(ctx, target, s.Optimizer, nil)
	if err != nil {
		return nil, err
	}
	nominal, err := st.evaluate(nomOven, z, s.WidthScatter)
	if err != nil {
		return nil, err
	}
	nominal.feasible = feasible
	var robust *evaluation
	var robustOven methodfile.Oven
	tried := []methodfile.Oven{nomOven} // programs the search went to
	// the optimizer's margin starts at the planner's z; it is raised to a
	// program's own count of pairs near the target once one is found (the
	// count at the bare optimum, where many pairs only just meet the
	// target, would make it depend on where the search began)
	vm := &verifyMargin{z: z, widthScatter: s.WidthScatter}
	if nominal.ok {
		robust, robustOven = nominal, nomOven
	} else if feasible {
		// raise by the shortfall; when the raised target cannot be met
		// within the limits, halve the raise
		lo, step := 0.0, 0.0
		for iter := 0; iter < 12 && ctx.Err() == nil && (iter == 0 || step >= 0.01); iter++ {
			extra := lo + step
			if extra > s.MaxMargin*target {
				step = s.MaxMargin*target - lo
				if step < 0.01 {
					break
				}
				continue
			}
			oven, ok, err := st.optimize(ctx, target+extra, s.Optimizer, vm)
			if err != nil {
				return nil, err
			}
			if !ok {
				if iter == 0 {
					break // the margin itself cannot be met: raising will not help
				}
				step /= 2
				continue
			}
			ev, err := st.evaluate(oven, z, s.WidthScatter)
			if err != nil {
				return nil, err
			}
			tried = append(tried, oven)
			if ev.ok {
				robust, robustOven = ev, oven
				// the least raise that holds: bisect between the last
				// raise that did not and this one
				hi := extra
				for b := 0; b < 3 && hi-lo > 0.02 && ctx.Err() == nil; b++ {
					mid := (lo + hi) / 2
					mo, ok, err := st.optimize(ctx, target+mid, s.Optimizer, vm)
					if err != nil {
						return nil, err
					}
					if !ok {
						lo = mid
						continue
					}
					me, err := st.evaluate(mo, z, s.WidthScatter)
					if err != nil {
						return nil, err
					}
					tried = append(tried, mo)
					if me.ok {
						hi = mid
						if st.duration(mo) < st.duration(robustOven) {
							robust, robustOven = me, mo
						}
					} else {
						lo = mid
					}
				}
				break
			}
			if ev.z > vm.z {
				vm.z = ev.z // more pairs near the target here
			}
			// a raised target may lead where the parameters are less
			// known: never raise by more than the last step
			if iter == 0 {
				step = ev.deficit + 0.01
			} else {
				lo, step = extra, math.Min(ev.deficit+0.01, step)
			}
		}
	}
	// A raised target can lead where the parameters are less known. The
	// robust counterpart instead: optimize on the method whose near-critical
	// pairs are moved, each pair's two compounds along the direction that
	// lowers its resolution most, by z parameter SDs (first order), with the
	// target raised by the measurement's part of the margin only.
	if robust == nil && feasible {
		o := nomOven
		for it := 0; it < 3 && ctx.Err() == nil; it++ {
			pm, extra, err := st.pessimistic(o, z, s.WidthScatter)
			if err != nil {
				return nil, err
			}
			po, ok, err := st.optimizeMethod(ctx, pm, target+extra, s.Optimizer)
			if err != nil {
				return nil, err
			}
			if !ok {
				break
			}
			ev, err := st.evaluate(po, z, s.WidthScatter)
			if err != nil {
				return nil, err
			}
			tried = append(tried, po)
			if ev.ok {
				robust, robustOven = ev, po
				break
			}
			o = po
		}
	}
	// the method's own program, when it keeps every limit and holds the
	// margin, is a robust program too: the advice never asks for a slower
	// one than the program the user already has
	if own := onSteps(st.m.Oven, st.m.Limits); len(own.Ramps) > 0 && st.withOven(own).Validate() == nil {
		if ev, err := st.evaluate(own, z, s.WidthScatter); err == nil && ev.ok && (robust == nil || st.duration(own) < st.duration(robustOven)) {
			robust, robustOven = ev, own
			tried = append(tried, own)
		}
	}
	best, bestOven := nominal, nomOven
	if robust != nil {
		best, bestOven = robust, robustOven
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

	// done: a measured run meets the target, and no robust program is
	// clearly faster
	if st.runs != nil {
		for i := len(st.runs.Runs) - 1; i >= 0; i-- {
			r := &st.runs.Runs[i]
			j := st.judge(r)
			if !j.met {
				continue
			}
			ref := st.duration(bestOven)
			ev, err := st.evaluate(onSteps(r.Oven, st.m.Limits), z, s.WidthScatter)
			// measured to meet it; the model, which now knows this run,
			// must agree within the parameters' uncertainty
			if err != nil || !(ev.ok || ev.lowestParam >= target) {
				continue
			}
			// the run's program is the method when it is at most f times
			// as long as the program now optimized (at the target, or
			// holding the margin when one does): f = 1 + Tolerance at the
			// budget's last injection, 1.25 while more are left (a
			// verified program much slower than the one now predicted is
			// then worth one more injection); a slow scouting ramp that
			// happens to separate everything is not taken for a method run
			// for months
			f := 1 + s.Tolerance
			if len(st.runs.Runs) < s.Injections-1 {
				f = math.Min(f, 1.25)
			}
			limit := f * math.Max(ref, st.duration(nomOven))
			if dr := st.duration(r.Oven); dr <= limit {
				p.Action, p.Oven = Done, r.Oven
				p.VerifiedBy, p.MeasuredMinResolution = r.Name, j.minRs
				p.Reason = fmt.Sprintf("run %q meets the target as measured (min Rs %.2f ≥ %.2f, %s): its program is verified; no further injection is needed",
					r.Name, j.minRs, target, strings.Join(j.pair[:], " / "))
				if robust != nil && dr > 1.02*ref {
					p.Reason += fmt.Sprintf(" (a program predicted to hold the margin in %.2f min instead of %.2f exists; verify it too if the time matters)", ref/60, dr/60)
				}
				p.Method = st.withOven(r.Oven)
				return st.complete(p, runs), nil
			}
		}
	}

	made := 0
	if st.runs != nil {
		made = len(st.runs.Runs)
	}
	last := made+1 >= s.Injections // the verification is the budget's last injection
	// the program that would hold the margin were the parameters known
	// (the measurement's scatter and the instrument tolerances alone):
	// what scouting could at best bring the robust program down to, and
	// where the verified program will be once the parameters are known
	// (often slower or colder than the bare optimum), so that a scouting
	// run pins them there too
	var knownOven methodfile.Oven
	knownOK := false
	knownOven, knownOK, err = st.optimize(ctx, target, s.Optimizer, vm.known())
	if err != nil {
		return nil, err
	}
	if robust != nil && (last || !knownOK || st.duration(robustOven) <= (1+s.Slower)*st.duration(knownOven)) {
		p.Action, p.Oven = Verify, robustOven
		zText := fmt.Sprintf("z = %.1f", z)
		if robust.near > 1 {
			zText = fmt.Sprintf("z = %.1f raised to %.1f for the %d pairs near the target", z, robust.z, robust.near)
		}
		p.Reason = fmt.Sprintf("the optimized program's predicted min Rs %.2f (%s) clears the target %.2f by %.1f standard deviations (± %.2f, of which the parameters ± %.2f; %s)%s: inject it once to verify",
			robust.minRs, strings.Join(robust.pair[:], " / "), target, robust.z, robust.sd, robust.sp, zText, robust.cornerText)
		if robust != nominal {
			p.Reason += marginPrice(st.duration(robustOven), st.duration(nomOven))
		}
		if knownOK && st.duration(robustOven) > (1+s.Slower)*st.duration(knownOven) {
			p.Reason += fmt.Sprintf("; with the parameters known a program of %.2f min would hold the margin, but the budget of %d injections (--injections) leaves no scouting run for it", st.duration(knownOven)/60, s.Injections)
		}
		p.Method = st.withOven(robustOven)
		return st.complete(p, runs), nil
	}
	robustNote := ""
	if robust != nil {
		robustNote = fmt.Sprintf("; a program that holds the margin exists (%.2f min, min Rs %.2f ± %.2f, the parameters ± %.2f), but with the parameters known one would take %.2f min: a scouting run is expected to buy the faster method",
			st.duration(robustOven)/60, robust.minRs, robust.sd, robust.sp, st.duration(knownOven)/60)
	}
	bestOven, best = nomOven, nominal
	// the figures reported are those of the program the reason speaks of
	p.Optimized, p.ExpectedMinResolution, p.ExpectedSD, p.CriticalPair = nomOven, nominal.minRs, nominal.sd, nominal.pair

	// inject: the scouting run that shrinks the Rs variance the most
	// where the optimum could be: the optimized programs of a few draws of
	// the parameters from their uncertainty, so that the pairs critical
	// there are weighed too
	for k := 0; k < s.Draws && ctx.Err() == nil; k++ {
		o, ok, err := st.optimizeDraw(ctx, target, s.Optimizer, uint64(k+1), vm.known())
		if err != nil {
			return nil, err
		}
		if ok {
			tried = append(tried, o)
		}
	}
	if knownOK {
		tried = append(tried, knownOven)
	}
	// scouting runs left in the budget after this one, before the
	// verification
	ahead := s.Injections - 2 - made
	d, err := st.design(tried, target, z, s.WidthScatter, made, ahead)
	if err != nil {
		return nil, err
	}
	if d == nil || (!best.feasible && best.cannotHelp(target, z)) {
		p.Action, p.Oven = Done, bestOven
		p.Reason = fmt.Sprintf("no program within the limits meets the target %.2f (best min Rs %.2f ± %.2f, %s), and further scouting runs would not change that: change the column, the carrier or the goal",
			target, best.minRs, best.sd, strings.Join(best.pair[:], " / "))
		p.Method = st.withOven(bestOven)
		return st.complete(p, runs), nil
	}
	p.Action, p.Oven, p.SDAfter = Inject, d.oven, d.sdAfter
	why := fmt.Sprintf("the predicted min Rs %.2f of the optimized program is uncertain by %s (%s): it must clear the target %.2f by %.1f standard deviations",
		best.minRs, pm(best.sd), strings.Join(best.pair[:], " / "), target, z)
	if !best.feasible {
		why = fmt.Sprintf("with the current parameters no program within the limits meets the target %.2f with the method's margin ([goal.robust]; best min Rs %.2f %s, %s), but they are uncertain",
			target, best.minRs, pm(best.sd), strings.Join(best.pair[:], " / "))
	} else if best.sdOK && best.cornerText != "" {
		why = fmt.Sprintf("the optimized program's predicted min Rs %.2f ± %.2f does not hold at every instrument tolerance%s", best.minRs, best.sd, best.cornerText)
	}
	p.Reason = fmt.Sprintf("%s%s; this scouting run is expected to shrink the parameters' part of that to ± %.2f (%s of compounds weighed that %s or could become critical, those whose order may swap included)",
		why, robustNote, d.sdAfter, pairsText(d.pairs), isAre(d.pairs))
	if made+1 > s.Injections {
		p.Reason += fmt.Sprintf("; this run goes beyond the budget of %d injections (--injections), since no program holds the margin yet", s.Injections)
	}
	if ahead > 0 && len(d.next.Ramps) > 0 {
		p.Reason += fmt.Sprintf(", and with the scouting run planned after it (%s) to ± %.2f", d.next.Describe(), d.nextSDAfter)
	}
	if len(st.estimated) > 0 {
		p.Reason += fmt.Sprintf("; %s: parameters only estimated from the formula (± %.0f kJ/mol)", strings.Join(st.estimated, ", "), formulaSDkJ)
	}
	p.Method = st.withOven(d.oven)
	return st.complete(p, runs), nil
}

// complete names the planned run and orders the compounds as the program
// is predicted to elute them.
func (st *state) complete(p *Plan, runs *methodfile.Runs) *Plan {
	if p.Action != Done {
		p.RunName = NextRunName(p.Action, runs)
	}
	if err := st.sens.eval(methodfile.ProgramToModel(p.Oven)); err == nil {
		s := st.sens
		idx := map[string]int{}
		for i := 0; i < s.n; i++ {
			idx[st.sys.Compounds[i].Name] = i
		}
		at := func(name string) float64 {
			if i, ok := idx[name]; ok && s.eluted[i] {
				return s.t[i]
			}
			return math.Inf(1)
		}
		sort.SliceStable(p.Compounds, func(a, b int) bool { return at(p.Compounds[a]) < at(p.Compounds[b]) })
	}
	return p
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
	runs      *methodfile.Runs // as fitted (assigned names filled in)
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
	if rep.Runs != nil {
		runs = rep.Runs // with the assigned names of unnamed peaks
	}
	st.runs = runs
	fitted := map[string]bool{}
	for _, c := range rep.Compounds {
		fitted[c.Name] = c.Fitted
	}
	excluded := map[[2]string]bool{}
	for _, o := range rep.Outliers {
		if o.Excluded {
			excluded[[2]string{o.Run, o.Compound}] = true
		}
	}
	// the fit's pooled residual SD; with few degrees of freedom never
	// below the assumed retention-time SD
	if !rep.SDAssumed && rep.DOF > 0 && rep.ResidualSDMin > 0 {
		pooled := rep.ResidualSDMin * 60
		if rep.DOF >= 10 || pooled > st.sigmaT {
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
			if i, ok := index[name]; ok && !excluded[[2]string{runs.Runs[ri].Name, name}] {
				seen[i] = append(seen[i], obs{ri, t * 60})
			}
		}
	}
	s2 := st.sigmaT * st.sigmaT
	for i := range st.m.Compounds {
		if len(seen[i]) == 0 {
			continue
		}
		// The method's value, with its uncertainty, is the prior; the runs
		// update it (maximum a posteriori by iterated Gauss–Newton, the
		// iterated extended Kalman step), starting from the fit's values.
		// With runs that tell ΔH from ΔS this is the fit; with one run, or
		// runs eluting a compound at nearly one temperature, the prior
		// keeps the direction the runs cannot see.
		c := &st.m.Compounds[i]
		orig := m.Compounds[i]
		th0 := [2]float64{orig.DHkJ * 1000, orig.DS}
		if orig.RefTempC != c.RefTempC {
			// the fit refers ΔH and ΔS to 100 °C: refer the prior there too
			mc := model.Compound{DH: th0[0], DS: th0[1], RefTemp: orig.RefTempC + model.ZeroCelsius}
			tr := c.RefTempC + model.ZeroCelsius
			th0 = [2]float64{mc.DH + orig.DCp*(tr-mc.RefTemp), mc.DS + orig.DCp*math.Log(tr/mc.RefTemp)}
		}
		pinv, ok := prior[i].inverse()
		if !ok {
			continue
		}
		th := [2]float64{c.DHkJ * 1000, c.DS}
		if !fitted[c.Name] {
			th = th0
		}
		var post cov2
		converged := false
		for it := 0; it < 12; it++ {
			cc := *c
			cc.DHkJ, cc.DS = th[0]/1000, th[1]
			info := pinv
			rhs := pinv.mul([2]float64{th0[0] - th[0], th0[1] - th[1]})
			for _, o := range seen[i] {
				t, j, err := st.retention(&runs.Runs[o.run], cc)
				if err != nil {
					return nil, err
				}
				if math.IsInf(t, 0) || math.IsNaN(t) {
					continue
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
			// damp steps far beyond the prior's reach
			if f := math.Abs(step[0]) / 5000; f > 1 {
				step[0], step[1] = step[0]/f, step[1]/f
			}
			th[0] += step[0]
			th[1] += step[1]
			if math.Abs(step[0]) < 0.5 && math.Abs(step[1]) < 1e-3 {
				converged = true
				break
			}
		}
		if converged && th[0] < 0 && !math.IsNaN(th[1]) {
			c.DHkJ, c.DS = th[0]/1000, th[1]
			st.cov[i] = post
			continue
		}
		// no convergence: the fit's values (or the method's) with the
		// fit's information added to the prior
		var info cov2
		for _, o := range seen[i] {
			_, j, err := st.retention(&runs.Runs[o.run], *c)
			if err != nil {
				return nil, err
			}
			info = info.add(outer(j).scale(1 / s2))
		}
		if inv, ok := pinv.add(info).inverse(); ok {
			st.cov[i] = inv
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
			st.cornerTag = append(st.cornerTag, robust.CornerName(robust.Tolerances{OvenOffset: rb.OvenOffsetC, FlowPct: rb.FlowPct, EfficiencyPct: rb.EfficiencyPct},
				dT, df, 1+rb.EfficiencyPct/100))
		}
	}
	return nil
}

// marginPrice says what the margin costs: the robust program's duration
// against the one that only just meets the target (seconds), as durations
// (a percentage of a short program reads as an alarm; a robust program
// found shorter is said so, not "-53 % longer").
func marginPrice(robustS, nominalS float64) string {
	if robustS > nominalS {
		return fmt.Sprintf("; it takes %.2f min against %.2f min for the program that only just meets the target (%.1f× as long), the price of the margin",
			robustS/60, nominalS/60, robustS/nominalS)
	}
	return fmt.Sprintf("; it takes %.2f min (the nominal optimum found takes %.2f min)", robustS/60, nominalS/60)
}

func pairsText(n int) string {
	if n == 1 {
		return "1 pair"
	}
	return fmt.Sprintf("%d pairs", n)
}

func isAre(n int) string {
	if n == 1 {
		return "is"
	}
	return "are"
}

func (st *state) withOven(o methodfile.Oven) *methodfile.Method {
	m := st.m.Clone()
	m.Oven = o
	m.Oven.Ramps = append([]methodfile.Ramp(nil), o.Ramps...)
	return m
}

// verifyMargin is the planner's margin given to the optimizer as its
// robust constraint: every pair's Rs − z·SD ≥ the target, the SD the
// posterior SD of the parameters' part and one measured run's scatter.
type verifyMargin struct {
	z, widthScatter float64
	// exact: the parameters taken as known (the measurement's scatter
	// alone)
	exact bool
}

// known is the margin with the parameters taken as known.
func (vm *verifyMargin) known() *verifyMargin {
	k := *vm
	k.exact = true
	return &k
}

// optimize runs the optimizer on the current parameters for target rs
// (with the planner's margin vm when not nil) and returns its program on
// the keypad steps.
func (st *state) optimize(ctx context.Context, rs float64, s optimizer.Settings, vm *verifyMargin) (methodfile.Oven, bool, error) {
	m := st.m.Clone()
	m.Goal.MinResolution = rs
	res, err := optimizer.Optimize(ctx, st.problem(m, st.sys, vm), s)
	if err != nil {
		return methodfile.Oven{}, false, err
	}
	oven := onSteps(methodfile.ProgramFromModel(res.Program), st.m.Limits)
	return oven, res.Feasible(), nil
}

// problem is the optimizer's problem for m (every instrument limit and
// the [goal.robust] margin are constraints there) with two changes: the
// carrier setting is locked, since the planner's uncertainty, scouting runs
// and runs-file block are for the method's carrier; and the retention part
// of the optimizer's margin uses the planner's posterior covariance of each
// compound (the runs and the prior combined) instead of the file's
// standard errors. The planner then judges the margin once more with its
// own z and the measurement's scatter (evaluate).
func (st *state) problem(m *methodfile.Method, sys *model.System, vm *verifyMargin) optimizer.Problem {
	prob := methodsearch.Problem(m, sys)
	if vm != nil {
		prob.Robust.Z = vm.z
		prob.Robust.MeasureSD = st.sigmaT
		prob.Robust.WidthScatter = vm.widthScatter
	}
	kind := model.CarrierFlow
	if m.Carrier.Mode == model.ConstantPressure {
		kind = model.InletPressure
	}
	prob.Lock = append(prob.Lock, model.ProgramValue{Kind: kind})
	if vm != nil && vm.exact {
		prob.Robust.Retention = make([]optimizer.RetentionSE, len(sys.Compounds))
		for i := range prob.Robust.Retention {
			prob.Robust.Retention[i] = optimizer.RetentionSE{DH: 1e-3, DS: 1e-6}
		}
	} else if prob.Robust.Z > 0 && len(st.cov) == len(sys.Compounds) {
		prob.Robust.Retention = make([]optimizer.RetentionSE, len(st.cov))
		for i, c := range st.cov {
			h, sd := math.Sqrt(math.Max(c.hh, 0)), math.Sqrt(math.Max(c.ss, 0))
			corr := 0.0
			if h > 0 && sd > 0 {
				corr = math.Max(-1, math.Min(1, c.hs/(h*sd)))
			}
			prob.Robust.Retention[i] = optimizer.RetentionSE{DH: h, DS: sd, Corr: corr}
		}
	}
	return prob
}

// optimizeMethod runs the optimizer on method m (the current one with
// other parameters) for target rs.
func (st *state) optimizeMethod(ctx context.Context, m *methodfile.Method, rs float64, s optimizer.Settings) (methodfile.Oven, bool, error) {
	m = m.Clone()
	m.Goal.MinResolution = rs
	sys, err := m.System()
	if err != nil {
		return methodfile.Oven{}, false, nil // an implausible shift: no program
	}
	res, err := optimizer.Optimize(ctx, st.problem(m, sys, nil), s)
	if err != nil {
		return methodfile.Oven{}, false, err
	}
	return onSteps(methodfile.ProgramFromModel(res.Program), st.m.Limits), res.Feasible(), nil
}

// pessimistic is the method with the compounds of every pair with a
// target whose bound at program o falls short of the target plus half a
// unit moved to the first-order worst case on their joint uncertainty
// ellipsoid: Δθ = −z Σ g / √(gᵀ Σ g) for the pair's stacked gradient g (a
// compound in several such pairs takes the move of its weakest pair), and
// the largest measurement part of the margin, z × that SD, over those
// pairs.
func (st *state) pessimistic(o methodfile.Oven, z, widthScatter float64) (*methodfile.Method, float64, error) {
	target := st.m.Goal.MinResolution
	if err := st.sens.eval(methodfile.ProgramToModel(o)); err != nil {
		return nil, 0, err
	}
	s := st.sens
	var order []int
	for i := 0; i < s.n; i++ {
		if s.eluted[i] {
			order = append(order, i)
		}
	}
	sort.Slice(order, func(a, b int) bool { return s.t[order[a]] < s.t[order[b]] })
	move := make([][2]float64, s.n)
	bound := make([]float64, s.n)
	for i := range bound {
		bound[i] = math.Inf(1)
	}
	extra := 0.0
	for k := 0; k+1 < len(order); k++ {
		a, b := order[k], order[k+1]
		if !st.sys.Compounds[a].Target && !st.sys.Compounds[b].Target {
			continue
		}
		rs, ga, gb := s.resolution(a, b)
		sp := rsSD(ga, gb, st.cov[a], st.cov[b])
		sm := st.measurementSD(rs, a, b, widthScatter)
		low := rs - z*math.Hypot(sp, sm)
		if low > target+0.5 || !(sp > 0) {
			continue
		}
		extra = math.Max(extra, z*sm)
		da, db := st.cov[a].mul(ga), st.cov[b].mul(gb)
		for _, x := range []struct {
			i int
			d [2]float64
		}{{a, da}, {b, db}} {
			if low < bound[x.i] {
				bound[x.i] = low
				move[x.i] = [2]float64{-z * x.d[0] / sp, -z * x.d[1] / sp}
			}
		}
	}
	m := st.m.Clone()
	m.Compounds = append([]methodfile.Compound(nil), st.m.Compounds...)
	for i := range m.Compounds {
		c := &m.Compounds[i]
		if dh := c.DHkJ + move[i][0]/1000; dh < 0 {
			c.DHkJ, c.DS = dh, c.DS+move[i][1]
		}
	}
	return m, extra + 0.01, nil
}

// optimizeDraw optimizes, at the target, the method with every compound's
// parameters drawn from their uncertainty (Gaussian, seeded by the
// optimizer's seed and draw, so that a plan repeats exactly).
func (st *state) optimizeDraw(ctx context.Context, target float64, s optimizer.Settings, draw uint64, vm *verifyMargin) (methodfile.Oven, bool, error) {
	seed := s.Seed
	if seed == 0 {
		seed = 1
	}
	rng := rand.New(rand.NewPCG(seed, draw))
	m := st.m.Clone()
	m.Compounds = append([]methodfile.Compound(nil), st.m.Compounds...)
	for i := range m.Compounds {
		c := st.cov[i]
		// Cholesky of the 2×2 covariance
		l11 := math.Sqrt(math.Max(c.hh, 0))
		var l21, l22 float64
		if l11 > 0 {
			l21 = c.hs / l11
			l22 = math.Sqrt(math.Max(c.ss-l21*l21, 0))
		}
		// at most three SDs, so that a draw stays a plausible compound
		z1 := math.Max(-3, math.Min(3, rng.NormFloat64()))
		z2 := math.Max(-3, math.Min(3, rng.NormFloat64()))
		m.Compounds[i].DHkJ += l11 * z1 / 1000
		m.Compounds[i].DS += l21*z1 + l22*z2
		if !(m.Compounds[i].DHkJ < 0) {
			m.Compounds[i].DHkJ = st.m.Compounds[i].DHkJ
			m.Compounds[i].DS = st.m.Compounds[i].DS
		}
	}
	m.Goal.MinResolution = target
	sys, err := m.System()
	if err != nil {
		return methodfile.Oven{}, false, nil // an implausible draw: skip it
	}
	res, err := optimizer.Optimize(ctx, st.problem(m, sys, vm), s)
	if err != nil {
		return methodfile.Oven{}, false, nil
	}
	return onSteps(methodfile.ProgramFromModel(res.Program), st.m.Limits), res.Feasible(), nil
}

// duration is the program's run time or cycle time (the goal's objective),
// s, as the current model predicts.
func (st *state) duration(o methodfile.Oven) float64 {
	p := methodfile.ProgramToModel(o)
	if st.m.Goal.Objective != model.CycleTime {
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
	minRs, sd  float64 // nominal minimum Rs and the SD of the weakest pair's Rs
	sp         float64 // the parameters' part of sd
	pair       [2]string
	deficit    float64 // how far the worst lower bound or corner falls short
	ok         bool
	sdOK       bool // the z·SD margin alone holds
	feasible   bool
	cornerText string
	lowest     float64 // lowest Rs − z·SD over the pairs
	// lowestParam is the lowest Rs − z·SD with the parameters' SD alone
	// (for a program already measured)
	lowestParam float64
	z           float64 // the z used, raised for the number of pairs near the target
	near        int     // that number
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
	ev := &evaluation{minRs: math.NaN(), lowest: math.Inf(1), lowestParam: math.Inf(1)}
	type pairSD struct{ rs, sd, sp float64 }
	var ps []pairSD
	for k := 0; k+1 < len(order); k++ {
		a, b := order[k], order[k+1]
		if !st.sys.Compounds[a].Target && !st.sys.Compounds[b].Target {
			continue
		}
		rs, ga, gb := s.resolution(a, b)
		sp := rsSD(ga, gb, st.cov[a], st.cov[b])
		sd := math.Hypot(sp, st.measurementSD(rs, a, b, widthScatter))
		ps = append(ps, pairSD{rs, sd, sp})
		if math.IsNaN(ev.minRs) || rs < ev.minRs {
			ev.minRs = rs
			ev.pair = [2]string{st.sys.Compounds[a].Name, st.sys.Compounds[b].Name}
		}
	}
	// Several pairs near the target each get a chance to fail: the bound
	// uses z raised for their number (Šidák: each pair at 1 − (1 − α)^(1/k)
	// with α = Φ(−z)), counting the pairs within four SDs of the target.
	k := 0
	for _, p := range ps {
		if p.rs-4*p.sd < target {
			k++
		}
	}
	zk := z
	if k > 1 {
		alpha := 0.5 * math.Erfc(z/math.Sqrt2)
		each := -math.Expm1(math.Log1p(-alpha) / float64(k))
		zk = math.Sqrt2 * math.Erfinv(1-2*each)
	}
	ev.z, ev.near = zk, k
	for _, p := range ps {
		ev.lowestParam = math.Min(ev.lowestParam, p.rs-zk*p.sp)
		if low := p.rs - zk*p.sd; low < ev.lowest {
			ev.lowest, ev.sd, ev.sp = low, p.sd, p.sp
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

// pm is "± x" for a resolution SD, in words when it is so large that the
// figure means nothing (rough starting parameters).
func pm(sd float64) string {
	if sd > 10 {
		return "± more than 10 (the parameters are only rough)"
	}
	return fmt.Sprintf("± %.2f", sd)
}
