package optimizer

import (
	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/robust"
)

// FromMethod builds the problem a method file describes: its goal, its
// limits (all of them hard constraints), its keypad steps, its robust
// tolerances and its program as the start.
func FromMethod(m *methodfile.Method, sys *model.System) Problem {
	obj := RunTime
	if m.Goal.Objective == "cycle-time" {
		obj = CycleTime
	}
	l := m.Limits
	p := Problem{
		System:    sys,
		Start:     m.ModelProgram(),
		StartOven: ovenFromFile(m.Oven),
		Ramps:     m.Goal.Ramps,
		Lock:      append([]string(nil), m.Goal.Lock...),
		Limits: Limits{
			OvenMin:  l.OvenMinC + model.ZeroCelsius,
			MaxTemp:  m.Column.MaxTempC + model.ZeroCelsius,
			MaxRate:  l.MaxRateCMin / 60,
			MaxHold:  l.MaxHoldMin * 60,
			MaxInlet: l.MaxInletKPa * 1000,
			MinInlet: l.MinInletKPa * 1000,
			MinFlow:  l.MinFlowMLMin * 1e-6 / 60,
			MaxFlow:  l.MaxFlowMLMin * 1e-6 / 60,
		},
		Steps: Steps{TempC: l.TempStepC, RateCMin: l.RateStepCMin, HoldMin: l.HoldStepMin,
			FlowMLMin: l.FlowStepMLMin, PressureKPa: l.PressureStepKPa},
		MinResolution: m.Goal.MinResolution,
		Objective:     obj,
		Tail:          m.Goal.TailMin * 60,
		MinFirstK:     m.Goal.MinFirstK,
	}
	if m.Column.HasMaxIsothermal {
		p.Limits.MaxIsothermal = m.Column.MaxIsothermalC + model.ZeroCelsius
	}
	if m.Injection.HasDetector {
		p.Limits.Detector = m.Injection.DetectorTempC + model.ZeroCelsius
	}
	for _, b := range l.RateBands {
		p.Limits.RateBands = append(p.Limits.RateBands, RateBand{Above: b.AboveC + model.ZeroCelsius, MaxRate: b.MaxRateCMin / 60})
	}
	if m.Goal.HasBakeout {
		p.Bakeout = Bakeout{On: true, Temp: m.Goal.BakeoutC + model.ZeroCelsius, Hold: m.Goal.BakeoutMin * 60}
	}
	p.Robust = robust.FromMethod(m)
	return p
}

func ovenFromFile(o methodfile.Oven) Oven {
	r := Oven{InitialC: o.InitialC, InitialHoldMin: o.InitialHoldMin, Ramps: []Ramp{}}
	for _, rp := range o.Ramps {
		r.Ramps = append(r.Ramps, Ramp{RateCMin: rp.RateCMin, FinalC: rp.FinalC, HoldMin: rp.HoldMin})
	}
	return r
}

// FileOven is a result's program as a method file's oven.
func FileOven(o Oven) methodfile.Oven {
	r := methodfile.Oven{InitialC: o.InitialC, InitialHoldMin: o.InitialHoldMin}
	for _, rp := range o.Ramps {
		r.Ramps = append(r.Ramps, methodfile.Ramp{RateCMin: rp.RateCMin, FinalC: rp.FinalC, HoldMin: rp.HoldMin})
	}
	return r
}

// Apply is the method m with the result's program and carrier setting,
// exactly as the optimizer checked them (every value on the keypad steps).
func Apply(m *methodfile.Method, r *Result) *methodfile.Method {
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

// KeypadProgram is the result's program as saved (on the keypad steps) and
// its simulation on the result's carrier setting.
func KeypadProgram(m *methodfile.Method, sys *model.System, r *Result) (methodfile.Oven, model.Result, error) {
	return FileOven(r.Oven), r.Sim, nil
}

// Robustness is how the method's own program fares under its
// [goal.robust] tolerances (robust.Check): nominal Rs, the worst corner and
// which, and Rs ± σ of the critical pair, for the UI and the method sheet.
func Robustness(m *methodfile.Method, sys *model.System) (RobustReport, error) {
	return robust.Check(m, sys)
}
