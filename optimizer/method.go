package optimizer

import (
	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// FromMethod builds the problem a method file describes: its goal, its
// limits and its program as the start.
func FromMethod(m *methodfile.Method, sys *model.System) Problem {
	return Problem{
		System: sys,
		Start:  m.ModelProgram(),
		Ramps:  m.Goal.Ramps,
		Lock:   append([]model.ProgramValue(nil), m.Goal.Lock...),
		Limits: Limits{
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
func KeypadProgram(m *methodfile.Method, sys *model.System, r *Result) (methodfile.Oven, model.Result, error) {
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
