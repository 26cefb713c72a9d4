// Package methodsearch connects the optimizer to method files: the search
// problem a method describes, the keypad-rounded result, and the ranking of
// candidate columns given as methods. The optimizer itself knows only the
// model.
package methodsearch

import (
	"context"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// Problem builds the search a method file describes: its goal, its limits
// and its program as the start.
func Problem(m *methodfile.Method, sys *model.System) optimizer.Problem {
	return optimizer.Problem{
		System: sys,
		Start:  m.ModelProgram(),
		Ramps:  m.Goal.Ramps,
		Lock:   append([]model.ProgramValue(nil), m.Goal.Lock...),
		Limits: optimizer.Limits{
			OvenMin:  m.Limits.OvenMinC + model.ZeroCelsius,
			MaxTemp:  m.Column.MaxTempC + model.ZeroCelsius,
			MaxRate:  m.Limits.MaxRateCMin / 60,
			MaxHold:  m.Limits.MaxHoldMin * 60,
			MaxInlet: m.Limits.MaxInletKPa * 1000,
		},
		MinResolution: m.Goal.MinResolution,
		Objective:     m.Goal.Objective,
		Tail:          m.Goal.TailMin * 60,
	}
}

// KeypadProgram is the result's program as the oven's keypad takes it
// (methodfile.KeypadRound) and its simulation; when rounding would lose the
// target that the exact program meets, the exact program is kept.
func KeypadProgram(m *methodfile.Method, sys *model.System, r *optimizer.Result) (methodfile.Oven, model.Result, error) {
	var res model.Result
	oven := methodfile.KeypadRound(methodfile.ProgramFromModel(r.Program))
	err := sys.Simulate(methodfile.ProgramToModel(oven), &res)
	lost := err == nil && r.Feasible() && res.Critical >= 0 && res.MinResolution < m.Goal.MinResolution
	if err != nil || lost {
		oven = methodfile.ProgramFromModel(r.Program)
		err = sys.Simulate(methodfile.ProgramToModel(oven), &res)
	}
	return oven, res, err
}

// Candidate is one column to try: a method (its phase's compounds, its
// goal and limits) with the dimensions to use.
type Candidate struct {
	Source string // where the method came from
	Method *methodfile.Method
}

// Outcome is a candidate optimized.
type Outcome struct {
	optimizer.Outcome
	Method *methodfile.Method
}

// Compare ranks the candidates as optimizer.Compare does, building each
// one's system on a worker.
func Compare(ctx context.Context, cands []Candidate, s optimizer.Settings, progress func(done, total int)) []Outcome {
	oc := make([]optimizer.Candidate, len(cands))
	for i, c := range cands {
		m := c.Method
		oc[i] = optimizer.Candidate{Source: c.Source, Problem: func() (optimizer.Problem, error) {
			sys, err := m.System()
			if err != nil {
				return optimizer.Problem{}, err
			}
			return Problem(m, sys), nil
		}}
	}
	ranked := optimizer.Compare(ctx, oc, s, progress)
	out := make([]Outcome, len(ranked))
	for i, o := range ranked {
		out[i] = Outcome{Outcome: o, Method: cands[o.Index].Method}
	}
	return out
}
