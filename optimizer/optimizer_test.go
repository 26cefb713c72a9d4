package optimizer

import (
	"context"
	"math"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/robust/methodtol"
)

// problemFromMethod is what methodsearch.Problem builds (that package
// imports this one, so its tests cannot be used here).
func problemFromMethod(m *methodfile.Method, sys *model.System) Problem {
	l := m.Limits
	p := Problem{
		System: sys, Start: m.ModelProgram(), Ramps: m.Goal.Ramps, Lock: append([]model.ProgramValue(nil), m.Goal.Lock...),
		Limits: Limits{
			OvenMin:  l.OvenMinC + model.ZeroCelsius,
			MaxTemp:  m.Column.MaxTempC + model.ZeroCelsius,
			MaxRate:  l.MaxRateCMin / 60,
			MaxHold:  l.MaxHoldMin * 60,
			MaxInlet: l.MaxInletKPa * 1000,
			MinInlet: l.MinInletKPa * 1000,
		},
		Steps:         Steps{TempC: l.TempStepC, RateCMin: l.RateStepCMin, HoldMin: l.HoldStepMin, FlowMLMin: l.FlowStepMLMin, PressureKPa: l.PressureStepKPa},
		MinResolution: m.Goal.MinResolution,
		Objective:     m.Goal.Objective,
		Tail:          m.Goal.TailMin * 60,
		MinFirstK:     m.Goal.MinFirstK,
		Robust:        methodtol.FromMethod(m),
	}
	p.StartOven = ovenFromModel(p.Start)
	if m.Injection.HasDetector {
		p.Limits.Detector = m.Injection.DetectorTempC + model.ZeroCelsius
	}
	return p
}

func demoProblem(t testing.TB) Problem {
	t.Helper()
	m, err := methodfile.ReadFile("../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	sys, err := m.System()
	if err != nil {
		t.Fatal(err)
	}
	return problemFromMethod(m, sys)
}

func TestDemoMeetsTarget(t *testing.T) {
	p := demoProblem(t)
	r, err := Optimize(context.Background(), p, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("status %v run %.3f min Rs %.3f evals %d elapsed %v program %+v carrier %+v robust %+v", r.Status, r.Sim.RunTime/60, r.Sim.MinResolution, r.Evaluations, r.Elapsed, r.Oven, r.Carrier, r.Robust)
	if !r.Feasible() {
		t.Fatalf("demo target not met: %s", r.Explanation)
	}
	checkResult(t, p, r)
}

// checkResult: the returned program, exactly as saved, is on the keypad
// steps, keeps every limit and lock, lets every compound elute, and the
// reported figures are a fresh simulation of it on a System built afresh
// for the returned carrier setting.
func checkResult(t *testing.T, p Problem, r *Result) {
	t.Helper()
	p.check()
	l := p.Limits
	st := p.Steps
	o := r.Oven
	prog := o.Model()
	if !prog.Equal(r.Program) {
		t.Errorf("Program %+v is not Oven %+v in SI units", r.Program, o)
	}
	lk := p.lockFlags()
	so := p.StartOven
	grid := func(what string, x, step float64, locked bool) {
		if !locked && !OnGrid(x, step) {
			t.Errorf("%s = %v is not on the keypad step %v", what, x, step)
		}
	}
	grid("initial_c", o.InitialC, st.TempC, lk.initial)
	grid("initial_hold_min", o.InitialHoldMin, st.HoldMin, lk.initialHold)
	if lk.initial && o.InitialC != so.InitialC {
		t.Errorf("locked initial_c %v changed to %v", so.InitialC, o.InitialC)
	}
	if lk.initialHold && o.InitialHoldMin != so.InitialHoldMin {
		t.Errorf("locked initial_hold_min %v changed to %v", so.InitialHoldMin, o.InitialHoldMin)
	}
	for i, rp := range o.Ramps {
		n := i + 1
		grid(model.ProgramValue{Kind: model.RampRate, Ramp: n}.String(), rp.RateCMin, st.RateCMin, lk.rate[n])
		grid(model.ProgramValue{Kind: model.RampFinal, Ramp: n}.String(), rp.FinalC, st.TempC, lk.final[n])
		grid(model.ProgramValue{Kind: model.RampHold, Ramp: n}.String(), rp.HoldMin, st.HoldMin, lk.hold[n])
		if i < len(so.Ramps) {
			if (lk.rate[n] && rp.RateCMin != so.Ramps[i].RateCMin) || (lk.final[n] && rp.FinalC != so.Ramps[i].FinalC) || (lk.hold[n] && rp.HoldMin != so.Ramps[i].HoldMin) {
				t.Errorf("ramp %d: a locked value changed: %+v, method %+v", n, rp, so.Ramps[i])
			}
		}
	}
	for n := 1; n <= 5; n++ {
		if lk.anyRamp(n) && n > len(o.Ramps) {
			t.Errorf("ramp %d has a locked value but was dropped", n)
		}
	}
	if err := prog.Validate(l.MaxTemp); err != nil {
		t.Errorf("returned program invalid: %v", err)
	}
	if !lk.initial && prog.Initial < l.OvenMin-1e-9 {
		t.Errorf("initial %v below oven minimum %v", prog.Initial, l.OvenMin)
	}
	hold := func(what string, temp, h float64) {
		if h > l.MaxHold+1e-6 && !p.isBakeout(temp, h) {
			t.Errorf("%s %v s over the hold limit", what, h)
		}
		if h > 0 && temp > l.MaxIsothermal+1e-9 {
			t.Errorf("%s at %.2f °C above max_isothermal", what, temp-model.ZeroCelsius)
		}
	}
	hold("initial hold", prog.Initial, prog.InitialHold)
	for i, rp := range prog.Ramps {
		if rp.Rate > p.maxRateTo(rp.Final)*(1+1e-12) || rp.Final > p.maxFinal()+1e-9 {
			t.Errorf("ramp %d breaks a limit: %+v", i+1, rp)
		}
		hold("hold", rp.Final, rp.Hold)
	}
	// a System built afresh for the returned carrier setting
	car := p.System.Cond.Carrier
	if car.Mode == model.ConstantFlow {
		car.Flow = r.Carrier.FlowMLMin * 1e-6 / 60
		grid("flow", r.Carrier.FlowMLMin, st.FlowMLMin, !p.varyCarrier())
	} else {
		car.InletGauge = r.Carrier.InletKPa * 1000
		grid("inlet", r.Carrier.InletKPa, st.PressureKPa, !p.varyCarrier())
	}
	cond, err := model.NewConditions(p.System.Cond.Column, car)
	if err != nil {
		t.Fatal(err)
	}
	sys, err := model.NewSystem(cond, p.System.Compounds, p.System.Oven)
	if err != nil {
		t.Fatal(err)
	}
	var fresh model.Result
	if err := sys.Simulate(prog, &fresh); err != nil {
		t.Fatal(err)
	}
	if math.Abs(fresh.MinResolution-r.Sim.MinResolution) > 1e-12 || math.Abs(fresh.RunTime-r.Sim.RunTime) > 1e-9 {
		t.Errorf("reported Rs %v run %v, fresh %v %v", r.Sim.MinResolution, r.Sim.RunTime, fresh.MinResolution, fresh.RunTime)
	}
	if !r.Feasible() {
		return
	}
	if fresh.MinResolution < p.MinResolution {
		t.Errorf("claims met with Rs %v < %v", fresh.MinResolution, p.MinResolution)
	}
	for _, pk := range fresh.Peaks {
		if !pk.Eluted {
			t.Errorf("%s does not elute in the returned program", p.System.Compounds[pk.Compound].Name)
		}
	}
	if fresh.RunTime < fresh.LastPeak+p.Tail-1e-9 {
		t.Errorf("run ends %.4f min, before the last peak %.4f plus the tail", fresh.RunTime/60, fresh.LastPeak/60)
	}
	if r.Robust.On && r.Robust.Margin < p.MinResolution {
		t.Errorf("claims met with robust margin %v < %v", r.Robust.Margin, p.MinResolution)
	}
	if cond.Carrier.Mode == model.ConstantFlow && l.MaxInlet > 0 && cond.InletGauge(prog.MaxTemp()) > l.MaxInlet {
		t.Errorf("inlet pressure over the limit")
	}
}

// The carrier range on the demo: 0.5×–3× the optimum velocity of the
// model's plate height; the optimum itself lies inside.
func TestDemoCarrierRange(t *testing.T) {
	p := demoProblem(t)
	lo, hi, err := CarrierRange(p)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("demo flow range %.2f–%.2f mL/min", lo, hi)
	if !(lo > 0.05 && lo < hi && hi < 20) || !OnGrid(lo, 0.01) || !OnGrid(hi, 0.01) {
		t.Errorf("implausible flow range %v–%v mL/min for 30 m × 0.25 mm helium", lo, hi)
	}
}
