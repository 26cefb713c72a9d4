package plan

import (
	"math"
	"sort"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// judgement is a measured run held against the target.
type judgement struct {
	met   bool
	minRs float64
	pair  [2]string
}

// judge computes a run's measured resolutions: its peaks in measured order,
// Rs = 1.18 (t2 − t1) / (w½,1 + w½,2) for each adjacent pair with a target
// (the half-height form of Rs = Δt / (2 (σ1 + σ2)), MODEL.md §6), taking a
// missing width from the model's prediction for that run. The target is met
// when every target compound was measured and every counted pair reaches
// it. Until the `check` command's judgement is available as a package, this
// is the planner's own.
func (st *state) judge(r *methodfile.Run) judgement {
	j := judgement{minRs: math.Inf(1)}
	rm := st.m.RunMethod(r)
	sys, err := rm.System()
	if err != nil {
		return j
	}
	var res model.Result
	if err := sys.Simulate(rm.ModelProgram(), &res); err != nil {
		return j
	}
	predicted := map[string]float64{}
	for _, pk := range res.Peaks {
		predicted[sys.Compounds[pk.Compound].Name] = pk.HalfWidth() / 60
	}
	type peak struct {
		name   string
		t, w   float64
		target bool
	}
	var peaks []peak
	for _, c := range st.m.Compounds {
		t, ok := r.Retention[c.Name]
		if !ok {
			if c.Target {
				return j
			}
			continue
		}
		w, ok := r.Widths[c.Name]
		if !ok {
			w = predicted[c.Name]
		}
		peaks = append(peaks, peak{c.Name, t, w, c.Target})
	}
	sort.Slice(peaks, func(a, b int) bool { return peaks[a].t < peaks[b].t })
	for i := 0; i+1 < len(peaks); i++ {
		a, b := peaks[i], peaks[i+1]
		if !a.target && !b.target {
			continue
		}
		rs := 2 * math.Sqrt(2*math.Ln2) / 2 * (b.t - a.t) / (a.w + b.w)
		if rs < j.minRs {
			j.minRs, j.pair = rs, [2]string{a.name, b.name}
		}
	}
	j.met = !math.IsInf(j.minRs, 1) && j.minRs >= st.m.Goal.MinResolution
	return j
}
