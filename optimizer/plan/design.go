package plan

import (
	"math"
	"sort"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// maxScoutMin is the longest scouting run considered, min: an injection
// is meant to cost 30–60 minutes of instrument time, not hours.
const maxScoutMin = 60

// designChoice is the chosen scouting run.
type designChoice struct {
	oven    methodfile.Oven
	score   float64 // summed squared shortfall of the margin
	sdAfter float64 // SD of the critical pair's Rs after the run
	pairs   int
	// next (when the design looks ahead) is the run planned after this
	// one, and nextSDAfter the critical pair's SD after both
	next        methodfile.Oven
	nextSDAfter float64
}

// pairSens is one pair's resolution gradients at the optimized program.
type pairSens struct {
	a, b     int
	ga, gb   [2]float64
	rs       float64
	sm2      float64 // variance of a measured Rs (one run's scatter)
	critical bool
}

// scoutLimits are the bounds every scouting program keeps: the lowest
// start, the highest temperature (column maximum, detector − 20 °C, the
// highest hold and the inlet-pressure limit), the rates and holds.
type scoutLimits struct {
	lowC, highC float64
	maxRate     float64
	maxHoldMin  float64
	bands       []methodfile.RateBand
}

func (st *state) scoutLimits() scoutLimits {
	l := st.m.Limits
	sl := scoutLimits{lowC: l.OvenMinC, highC: st.m.Column.MaxTempC, maxRate: l.MaxRateCMin, maxHoldMin: l.MaxHoldMin, bands: l.RateBands}
	if st.m.Injection.HasDetector {
		sl.highC = math.Min(sl.highC, st.m.Injection.DetectorTempC-20) // common practice
	}
	if st.m.Column.HasMaxIsothermal {
		sl.highC = math.Min(sl.highC, st.m.Column.MaxIsothermalC)
	}
	if l.MaxInletKPa > 0 {
		cond := st.sys.Cond
		if t, over := cond.OverPressure(l.MaxInletKPa*1000, sl.lowC+model.ZeroCelsius, sl.highC+model.ZeroCelsius); over {
			sl.highC = t - model.ZeroCelsius - 1
		}
	}
	if sl.maxHoldMin <= 0 {
		sl.maxHoldMin = 10
	}
	sl.highC = math.Floor(sl.highC/stepOr(l.TempStepC, 0.1)) * stepOr(l.TempStepC, 0.1)
	return sl
}

// rateTo is the highest rate allowed for a ramp that ends at finalC: the
// oven's limit lowered by every rate band the ramp reaches into.
func (sl scoutLimits) rateTo(finalC float64) float64 {
	r := sl.maxRate
	for _, b := range sl.bands {
		if finalC > b.AboveC {
			r = math.Min(r, b.MaxRateCMin)
		}
	}
	return r
}

// design picks, among scouting programs within the limits, the one after
// which the summed squared shortfall of the margin,
// Σ max(0, target − Rs + z·SD_after)², over the pairs that are or could
// become critical at the optimized programs is least.
//
// ahead > 0 looks that many further scouting runs ahead (the injection
// budget leaves room for them before the verification): the run chosen is
// then the more informative one of the best pair of runs (the score after
// both, Σ over the same pairs), since one run of a compound tells only one
// combination of ΔH and ΔS (its retention near one temperature), and a
// myopic choice pins the combination the current optimum needs and leaves
// the one the next optimum needs open. Pairs are searched exhaustively
// over the candidates (a few dozen): one look ahead is enough, as two runs
// at different elution temperatures determine both parameters.
func (st *state) design(progs []methodfile.Oven, target, z, widthScatter float64, made, ahead int) (*designChoice, error) {
	var pairs []pairSens
	for pi, o := range progs {
		ps, err := st.criticalPairs(o, target, widthScatter, pi == 0)
		if err != nil {
			return nil, err
		}
		pairs = append(pairs, ps...)
	}
	if len(pairs) == 0 {
		return nil, nil
	}
	// the distinct pairs weighed (a pair critical at several of the
	// programs is counted once)
	distinct := map[[2]int]bool{}
	for _, p := range pairs {
		distinct[[2]int{min(p.a, p.b), max(p.a, p.b)}] = true
	}
	s := st.sens
	s2 := st.sigmaT * st.sigmaT
	var starts []float64
	for _, o := range progs {
		starts = append(starts, o.InitialC)
	}
	cands := st.candidates(starts)
	sl := st.scoutLimits()
	// the optimized programs continued to the top measure where the
	// optimum is; for the first two scouting runs linear ramps only (common
	// practice for scouting): a step program's elution temperatures move
	// with the parameters, so its predicted information is the less
	// reliable the rougher they are, and two linear ramps already tell ΔH
	// from ΔS
	if made >= 2 && ahead <= 0 {
		for _, o := range progs {
			cands = append(cands, st.continued(o, sl)...)
		}
	}
	// each candidate's retention-time sensitivities (zero for a compound
	// that does not elute), simulated once
	type candidate struct {
		oven methodfile.Oven
		dur  float64
		dt   [][2]float64
		low  bool // starts at the lowest oven start
	}
	var cs []candidate
	for _, cand := range cands {
		prog := methodfile.ProgramToModel(cand)
		if prog.RunTime() > maxScoutMin*60 {
			continue
		}
		if err := s.eval(prog); err != nil {
			continue
		}
		dt := make([][2]float64, s.n)
		for i := 0; i < s.n; i++ {
			if s.eluted[i] {
				dt[i] = s.dt[i]
			}
		}
		cs = append(cs, candidate{oven: cand, dur: prog.RunTime(), dt: dt, low: cand.InitialC <= sl.lowC})
	}
	if len(cs) == 0 {
		return nil, nil
	}
	post := make([]cov2, s.n)
	// score is the shortfall after the runs whose sensitivities are given,
	// and the critical pair's SD then
	score := func(runs ...[][2]float64) (float64, float64) {
		for i := 0; i < s.n; i++ {
			post[i] = st.cov[i]
			for _, dt := range runs {
				if dt[i] != ([2]float64{}) {
					post[i] = post[i].update(dt[i], s2)
				}
			}
		}
		sc, critSD := 0.0, 0.0
		for _, p := range pairs {
			v := post[p.a].quad(p.ga) + post[p.b].quad(p.gb)
			// the shortfall of the margin this pair would still leave,
			// the verification's own scatter included (at the program that
			// would hold the margin were the parameters known, that
			// scatter alone uses the margin up: every parameter SD left
			// there is a shortfall)
			if short := target - p.rs + z*math.Sqrt(math.Max(v, 0)+p.sm2); short > 0 {
				sc += short * short
			}
			if p.critical {
				critSD = math.Sqrt(math.Max(v, 0))
			}
		}
		return sc, critSD
	}
	single := make([]float64, len(cs))
	singleSD := make([]float64, len(cs))
	for i := range cs {
		single[i], singleSD[i] = score(cs[i].dt)
	}
	// choose is the shortest among those within 2 % of the least score
	choose := func(scores []float64, dur func(int) float64) int {
		least := math.Inf(1)
		for _, v := range scores {
			least = math.Min(least, v)
		}
		best, bestTime := -1, math.Inf(1)
		for i, v := range scores {
			if v <= 1.02*least+1e-12 && dur(i) < bestTime {
				best, bestTime = i, dur(i)
			}
		}
		return best
	}
	if ahead <= 0 || len(cs) < 2 {
		i := choose(single, func(i int) float64 { return cs[i].dur })
		return &designChoice{oven: cs[i].oven, score: single[i], sdAfter: singleSD[i], pairs: len(distinct)}, nil
	}
	type pairRuns struct{ a, b int }
	var prs []pairRuns
	var pairScore, pairSD []float64
	// the first run of all starts at the lowest oven start (common
	// practice: nothing is lost in the solvent front, and the early
	// compounds are measured at the low temperatures a method may hold)
	first := made == 0
	for a := range cs {
		for b := a + 1; b < len(cs); b++ {
			if first && !cs[a].low && !cs[b].low {
				continue
			}
			v, sd := score(cs[a].dt, cs[b].dt)
			prs = append(prs, pairRuns{a, b})
			pairScore = append(pairScore, v)
			pairSD = append(pairSD, sd)
		}
	}
	if len(prs) == 0 {
		i := choose(single, func(i int) float64 { return cs[i].dur })
		return &designChoice{oven: cs[i].oven, score: single[i], sdAfter: singleSD[i], pairs: len(distinct)}, nil
	}
	k := choose(pairScore, func(i int) float64 { return cs[prs[i].a].dur + cs[prs[i].b].dur })
	a, b := prs[k].a, prs[k].b
	// the run of the pair that is the more informative alone goes first
	// (the one from the lowest start, for the first run of all)
	if first {
		if !cs[a].low || (cs[b].low && single[b] < single[a]) {
			a, b = b, a
		}
	} else if single[b] < single[a] || (single[b] == single[a] && cs[b].dur < cs[a].dur) {
		a, b = b, a
	}
	return &designChoice{oven: cs[a].oven, score: single[a], sdAfter: singleSD[a], pairs: len(distinct),
		next: cs[b].oven, nextSDAfter: pairSD[k]}, nil
}

// criticalPairs are the pairs with a target that are, or within three
// standard deviations could become, critical at program o (Rs − 3 SD
// below twice the target), with their gradients; the least
// adjacent one is marked critical when mark is set.
func (st *state) criticalPairs(o methodfile.Oven, target, widthScatter float64, mark bool) ([]pairSens, error) {
	if err := st.sens.eval(methodfile.ProgramToModel(o)); err != nil {
		return nil, err
	}
	s := st.sens
	var pairs []pairSens
	critRs := math.Inf(1)
	crit := -1
	var order []int
	for i := 0; i < s.n; i++ {
		if s.eluted[i] {
			order = append(order, i)
		}
	}
	sort.Slice(order, func(a, b int) bool { return s.t[order[a]] < s.t[order[b]] })
	for x := 0; x < len(order); x++ {
		for y := x + 1; y < len(order); y++ {
			a, b := order[x], order[y]
			if !st.sys.Compounds[a].Target && !st.sys.Compounds[b].Target {
				continue
			}
			rs, ga, gb := s.resolution(a, b)
			sd := rsSD(ga, gb, st.cov[a], st.cov[b])
			if rs-3*sd > 2*target {
				continue
			}
			sm := st.measurementSD(rs, a, b, widthScatter)
			pairs = append(pairs, pairSens{a: a, b: b, ga: ga, gb: gb, rs: rs, sm2: sm * sm})
			if y == x+1 && rs < critRs {
				critRs, crit = rs, len(pairs)-1
			}
		}
	}
	if crit >= 0 && mark {
		pairs[crit].critical = true
	}
	return pairs, nil
}

// candidates are linear scouting ramps from a few starts (the lowest oven
// temperature, 20 and 40 °C above it, and the given starts) at rates across
// the oven's range to the highest allowed temperature; each ends with a hold long enough for every compound to
// elute, with room for its retention uncertainty.
func (st *state) candidates(extra []float64) []methodfile.Oven {
	sl := st.scoutLimits()
	var out []methodfile.Oven
	starts := []float64{sl.lowC, sl.lowC + 20, sl.lowC + 40}
	for _, t := range extra {
		if t >= sl.lowC && t < sl.highC {
			starts = append(starts, t)
		}
	}
	rates := []float64{2, 3, 4, 5, 7, 10, 15, 20, 25, 30, 40, 50, 60, 80, 100}
	for _, t0 := range starts {
		if t0 >= sl.highC {
			continue
		}
		for _, r := range rates {
			r = math.Min(r, sl.rateTo(sl.highC))
			o := methodfile.Oven{InitialC: t0, InitialHoldMin: 1, Ramps: []methodfile.Ramp{{RateCMin: r, FinalC: sl.highC}}}
			out = append(out, st.finish(o, sl))
			if r >= sl.rateTo(sl.highC) {
				break
			}
		}
	}
	return out
}

// continued is the optimized program continued to the highest allowed
// temperature, so that what elutes after it is measured too.
func (st *state) continued(opt methodfile.Oven, sl scoutLimits) []methodfile.Oven {
	var out []methodfile.Oven
	if len(opt.Ramps) > 0 || opt.InitialC < sl.highC {
		o := opt
		o.Ramps = append([]methodfile.Ramp(nil), opt.Ramps...)
		last := o.InitialC
		rate := 10.0
		if n := len(o.Ramps); n > 0 {
			last, rate = o.Ramps[n-1].FinalC, o.Ramps[n-1].RateCMin
		}
		// a last step of a few degrees only is no ramp: end there
		if last < sl.highC-5 {
			o.Ramps = append(o.Ramps, methodfile.Ramp{RateCMin: math.Min(rate, sl.rateTo(sl.highC)), FinalC: sl.highC})
		}
		out = append(out, st.finish(o, sl))
	}
	return out
}

// finish sets the last hold so that every compound elutes before the end
// (predicted time plus three SDs of its retention time plus half a minute,
// at most the longest hold) and puts the program on the keypad steps.
func (st *state) finish(o methodfile.Oven, sl scoutLimits) methodfile.Oven {
	o = onSteps(o, st.m.Limits)
	if len(o.Ramps) == 0 {
		return o
	}
	last := &o.Ramps[len(o.Ramps)-1]
	last.HoldMin = sl.maxHoldMin
	prog := methodfile.ProgramToModel(o)
	if err := st.sens.eval(prog); err != nil {
		return o
	}
	s := st.sens
	end := 0.0
	for i := 0; i < s.n; i++ {
		if math.IsInf(s.t[i], 0) || s.t[i] > s.end {
			continue
		}
		// the SD of a retention time along the ΔH, ΔS directions
		sd := math.Sqrt(math.Max(0, st.cov[i].quad(s.dt[i])))
		end = math.Max(end, s.t[i]+3*sd+30)
	}
	rampEnd := prog.RunTime() - last.HoldMin*60
	hold := math.Max(0, end-rampEnd) / 60
	last.HoldMin = math.Min(sl.maxHoldMin, hold)
	return onSteps(o, st.m.Limits)
}
