// Package methodsearch connects the optimizer to method files: the search
// problem a method describes, the result applied to the method, and the ranking of
// candidate columns given as methods. The optimizer itself knows only the
// model.
package methodsearch

import (
	"context"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/robust/methodtol"
	"github.com/rampwise/rampwise/optimizer"
)

// Problem builds the search a method file describes: its goal, its limits
// (all of them hard constraints), its keypad steps, its robust tolerances
// and its program as the start.
func Problem(m *methodfile.Method, sys *model.System) optimizer.Problem {
	l := m.Limits
	p := optimizer.Problem{
		System:    sys,
		Start:     m.ModelProgram(),
		StartOven: ovenFromFile(m.Oven),
		Ramps:     m.Goal.Ramps,
		Lock:      append([]model.ProgramValue(nil), m.Goal.Lock...),
		Limits: optimizer.Limits{
			OvenMin:  l.OvenMinC + model.ZeroCelsius,
			MaxTemp:  m.Column.MaxTempC + model.ZeroCelsius,
			MaxRate:  l.MaxRateCMin / 60,
			MaxHold:  l.MaxHoldMin * 60,
			MaxInlet: l.MaxInletKPa * 1000,
			MinInlet: l.MinInletKPa * 1000,
			MinFlow:  l.MinFlowMLMin * 1e-6 / 60,
			MaxFlow:  l.MaxFlowMLMin * 1e-6 / 60,
		},
		Steps: optimizer.Steps{TempC: l.TempStepC, RateCMin: l.RateStepCMin, HoldMin: l.HoldStepMin,
			FlowMLMin: l.FlowStepMLMin, PressureKPa: l.PressureStepKPa},
		MinResolution: m.Goal.MinResolution,
		Objective:     m.Goal.Objective,
		Tail:          m.Goal.TailMin * 60,
		MinFirstK:     m.Goal.MinFirstK,
		Robust:        methodtol.FromMethod(m),
	}
	if m.Column.HasMaxIsothermal {
		p.Limits.MaxIsothermal = m.Column.MaxIsothermalC + model.ZeroCelsius
	}
	if m.Injection.HasDetector {
		p.Limits.Detector = m.Injection.DetectorTempC + model.ZeroCelsius
	}
	for _, b := range l.RateBands {
		p.Limits.RateBands = append(p.Limits.RateBands, optimizer.RateBand{Above: b.AboveC + model.ZeroCelsius, MaxRate: b.MaxRateCMin / 60})
	}
	if m.Goal.HasBakeout {
		p.Bakeout = optimizer.Bakeout{On: true, Temp: m.Goal.BakeoutC + model.ZeroCelsius, Hold: m.Goal.BakeoutMin * 60}
	}
	return p
}

func ovenFromFile(o methodfile.Oven) optimizer.Oven {
	r := optimizer.Oven{InitialC: o.InitialC, InitialHoldMin: o.InitialHoldMin, Ramps: []optimizer.Ramp{}}
	for _, rp := range o.Ramps {
		r.Ramps = append(r.Ramps, optimizer.Ramp{RateCMin: rp.RateCMin, FinalC: rp.FinalC, HoldMin: rp.HoldMin})
	}
	return r
}

// FileOven is a result's program as a method file's oven.
func FileOven(o optimizer.Oven) methodfile.Oven {
	r := methodfile.Oven{InitialC: o.InitialC, InitialHoldMin: o.InitialHoldMin}
	for _, rp := range o.Ramps {
		r.Ramps = append(r.Ramps, methodfile.Ramp{RateCMin: rp.RateCMin, FinalC: rp.FinalC, HoldMin: rp.HoldMin})
	}
	return r
}

// Apply is the method m with the result's program and carrier setting,
// exactly as the optimizer checked them (every value on the keypad steps).
func Apply(m *methodfile.Method, r *optimizer.Result) *methodfile.Method {
	after := m.Clone()
	after.Oven = FileOven(r.Oven)
	if r.Carrier.Mode == model.ConstantPressure {
		if r.Carrier.InletKPa > 0 {
			after.Carrier.InletKPa = r.Carrier.InletKPa
		}
	} else if r.Carrier.FlowMLMin > 0 {
		after.Carrier.FlowMLMin = r.Carrier.FlowMLMin
	}
	return after
}

// KeypadProgram is the result's program as saved (every value on the keypad
// steps, checked as saved) and its simulation on the result's carrier
// setting. Use Apply to take the carrier setting too.
func KeypadProgram(m *methodfile.Method, sys *model.System, r *optimizer.Result) (methodfile.Oven, model.Result, error) {
	return FileOven(r.Oven), r.Sim, nil
}

// Robustness is how the method's own program fares under its
// [goal.robust] tolerances: nominal Rs, the worst corner and which, and
// Rs ± σ of the critical pair (for the UI; methodtol.Check).
func Robustness(m *methodfile.Method, sys *model.System) (optimizer.RobustReport, error) {
	return methodtol.Check(m, sys)
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
