package optimizer

import (
	"errors"
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
)

// Objective is what the optimizer minimises among programs that meet the
// target: the run time (the end of the saved program: the last peak plus
// the tail, or later where a lock, a keypad step or a bake-out ends it
// later) or the cycle time (run plus cool-down and equilibration).
type Objective = model.Objective

// The objectives.
const (
	RunTime   = model.RunTime
	CycleTime = model.CycleTime
)

// FlowLock in Problem.Lock keeps the carrier flow (or, at constant
// pressure, the inlet pressure) as the method has it (goal.lock "flow").
var FlowLock = model.ProgramValue{Kind: model.CarrierFlow}

func isCarrierLock(v model.ProgramValue) bool {
	return v.Kind == model.CarrierFlow || v.Kind == model.InletPressure
}

// RateBand lowers the ramp-rate limit above a temperature: a ramp whose
// final temperature is above Above (K) heats at most at MaxRate (K/s).
type RateBand struct{ Above, MaxRate float64 }

// Limits bound the programs the optimizer may return (SI units: K, K/s, s,
// Pa, m³/s). Every one is a hard constraint of the search.
type Limits struct {
	OvenMin  float64 // lowest initial temperature
	MaxTemp  float64 // column maximum: the programmed maximum
	MaxRate  float64 // highest ramp rate
	MaxHold  float64 // longest hold
	MinRate  float64 // lowest ramp rate; zero means 0.1 °C/min
	MaxInlet float64 // highest inlet gauge pressure; zero means no limit
	MinInlet float64 // lowest inlet gauge pressure (0: inlets cannot regulate below ambient)
	// MaxIsothermal bounds every hold (a hold at a higher temperature is
	// refused); zero means MaxTemp.
	MaxIsothermal float64
	// Detector is the detector temperature; when nonzero the program stays
	// at or below Detector − 20 °C (common practice: the effluent must not
	// condense in a cooler detector).
	Detector  float64
	RateBands []RateBand
	// MinFlow and MaxFlow bound the constant-flow setting (m³/s) when the
	// optimizer varies it; zero means the range that keeps the average
	// linear velocity between 0.5× and 3× the optimum of the model's plate
	// height. At constant pressure the inlet-pressure limits and the same
	// velocity band bound the pressure.
	MinFlow, MaxFlow float64
}

// DetectorMargin is how far (K) the program stays below the detector
// temperature (common practice).
const DetectorMargin = 20.0

// Steps are the keypad steps of the oven and inlet, in the file's units;
// every value the optimizer returns lies on them. Zero means the default.
type Steps struct {
	TempC       float64 // default 0.1 °C
	RateCMin    float64 // default 0.1 °C/min
	HoldMin     float64 // default 0.01 min
	FlowMLMin   float64 // default 0.01 mL/min
	PressureKPa float64 // default 0.1 kPa
}

func (s Steps) withDefaults() Steps {
	def := func(x *float64, d float64) {
		if !(*x > 0) {
			*x = d
		}
	}
	def(&s.TempC, 0.1)
	def(&s.RateCMin, 0.1)
	def(&s.HoldMin, 0.01)
	def(&s.FlowMLMin, 0.01)
	def(&s.PressureKPa, 0.1)
	return s
}

// Bakeout is an optional step appended after the last target for late
// non-targets: a ramp at the fastest allowed rate to Temp, held Hold.
type Bakeout struct {
	On   bool
	Temp float64 // K
	Hold float64 // s
}

// Problem is one optimization.
type Problem struct {
	System *model.System
	// Start is the method's current program: the values of locked variables
	// and one of the starting points.
	Start model.Program
	// StartOven is Start in the file's units, exactly as the method has it
	// (locked values are returned exactly so); zero means derived from Start.
	StartOven Oven
	Ramps     int // ramps the optimizer may use, 1..5
	Lock      []model.ProgramValue
	Limits    Limits
	Steps     Steps
	// MinResolution is the target of every counted pair, in (0, 100].
	MinResolution float64
	Objective     Objective
	Tail          float64 // s kept after the last peak
	// MinFirstK: the first target elutes with k at elution ≥ this.
	MinFirstK float64
	Bakeout   Bakeout
	Robust    Robust
}

func (p *Problem) check() error {
	if p.System == nil {
		return errors.New("optimizer: no system")
	}
	if p.Ramps < 1 || p.Ramps > 5 {
		return fmt.Errorf("optimizer: ramps must be 1..5, got %d", p.Ramps)
	}
	p.Steps = p.Steps.withDefaults()
	l := &p.Limits
	if !(l.MaxTemp > l.OvenMin) {
		return fmt.Errorf("optimizer: the lowest start temperature %.1f °C is not below the column maximum %.1f °C", l.OvenMin-model.ZeroCelsius, l.MaxTemp-model.ZeroCelsius)
	}
	if !(l.MaxRate > 0) || l.MaxHold < 0 {
		return errors.New("optimizer: ramp-rate limit must be positive and hold limit not negative")
	}
	if !(p.MinResolution > 0) || p.MinResolution > 100 {
		return errors.New("optimizer: target resolution must be in (0, 100]")
	}
	if l.MinRate == 0 {
		l.MinRate = 0.1 / 60
	}
	if l.MinRate > l.MaxRate {
		l.MinRate = l.MaxRate / 10
	}
	if l.MaxIsothermal == 0 || l.MaxIsothermal > l.MaxTemp {
		l.MaxIsothermal = l.MaxTemp
	}
	if hi := p.maxFinal(); !(hi > l.OvenMin) {
		return fmt.Errorf("optimizer: the highest programmed temperature %.1f °C (column maximum, detector − 20 °C) is not above the lowest start %.1f °C",
			hi-model.ZeroCelsius, l.OvenMin-model.ZeroCelsius)
	}
	if p.Bakeout.On {
		if p.Bakeout.Temp > p.maxFinal()+1e-9 {
			return fmt.Errorf("optimizer: bake-out at %.1f °C is above the highest programmed temperature %.1f °C (column maximum, detector − 20 °C)", p.Bakeout.Temp-model.ZeroCelsius, p.maxFinal()-model.ZeroCelsius)
		}
		if p.Bakeout.Temp > l.MaxIsothermal+1e-9 {
			return fmt.Errorf("optimizer: bake-out at %.1f °C is above the column's isothermal limit %.1f °C", p.Bakeout.Temp-model.ZeroCelsius, l.MaxIsothermal-model.ZeroCelsius)
		}
	}
	if r := p.Robust.Retention; r != nil && len(r) != len(p.System.Compounds) {
		return errors.New("optimizer: retention standard errors must be given for every compound")
	}
	for _, name := range p.Lock {
		if isCarrierLock(name) {
			continue
		}
		n := name.Ramp
		if !name.Valid(model.MaxRampNumber) {
			return fmt.Errorf("optimizer: %s is not a program value to lock", name)
		}
		if n > 0 && n > len(p.Start.Ramps) {
			return fmt.Errorf("optimizer: %s is locked but the method's program has only %d ramps", name, len(p.Start.Ramps))
		}
		if n > p.Ramps {
			return fmt.Errorf("optimizer: %s is locked but the goal allows only %d ramps", name, p.Ramps)
		}
	}
	if p.StartOven.InitialC == 0 && p.StartOven.Ramps == nil {
		p.StartOven = ovenFromModel(p.Start)
	}
	return nil
}

// maxFinal is the highest temperature a program may reach: the column
// maximum, and the detector − 20 °C when a detector temperature is given.
func (p *Problem) maxFinal() float64 {
	hi := p.Limits.MaxTemp
	if d := p.Limits.Detector; d > 0 && d-DetectorMargin < hi {
		hi = d - DetectorMargin
	}
	return hi
}

// maxRateTo is the fastest rate (K/s) of a ramp that ends at final: the
// oven's limit, lowered by every rate band the ramp reaches into.
func (p *Problem) maxRateTo(final float64) float64 {
	r := p.Limits.MaxRate
	for _, b := range p.Limits.RateBands {
		if final > b.Above+1e-9 && b.MaxRate < r {
			r = b.MaxRate
		}
	}
	return r
}

func (p *Problem) rampLocks() bool {
	for _, v := range p.Lock {
		if v.Kind.PerRamp() {
			return true
		}
	}
	return false
}

func (p *Problem) locked(v model.ProgramValue) bool {
	for _, l := range p.Lock {
		if l == v {
			return true
		}
	}
	return false
}

// varyCarrier reports whether the optimizer varies the flow (or pressure).
func (p *Problem) varyCarrier() bool {
	for _, l := range p.Lock {
		if isCarrierLock(l) {
			return false
		}
	}
	return true
}

// locks is the lock list as flags, for the hot path.
type locks struct {
	initial, initialHold bool
	rate, final, hold    [6]bool // by ramp number 1..5
}

func (p *Problem) lockFlags() locks {
	var l locks
	for _, v := range p.Lock {
		n := v.Ramp
		if v.Kind.PerRamp() && (n < 1 || n > 5) {
			continue
		}
		switch v.Kind {
		case model.InitialTemp:
			l.initial = true
		case model.InitialHold:
			l.initialHold = true
		case model.RampRate:
			l.rate[n] = true
		case model.RampFinal:
			l.final[n] = true
		case model.RampHold:
			l.hold[n] = true
		}
	}
	return l
}

func (l *locks) anyRamp(n int) bool { return l.rate[n] || l.final[n] || l.hold[n] }

// lockedEnd is the earliest end of prog that keeps every locked value: a
// locked hold runs to its end, a locked final temperature is reached, a
// ramp with a locked rate is entered (it keeps at least one temperature
// step, step K), and a locked value of a later ramp keeps all before it.
func (l *locks) lockedEnd(prog model.Program, step float64) float64 {
	end := 0.0
	t := prog.InitialHold
	if l.initialHold {
		end = t
	}
	prev := prog.Initial
	for i, r := range prog.Ramps {
		n := i + 1
		d := (r.Final - prev) / r.Rate
		switch {
		case l.hold[n]:
			end = math.Max(end, t+d+r.Hold)
		case l.final[n]:
			end = math.Max(end, t+d)
		case l.rate[n]:
			end = math.Max(end, t+math.Min(d, step/r.Rate))
		}
		t += d + r.Hold
		prev = r.Final
	}
	return end
}

// lastLocked reports whether the value a trim would stretch past the end
// of prog (its last hold) is locked.
func (l *locks) lastLocked(prog model.Program) bool {
	if n := len(prog.Ramps); n > 0 {
		return l.hold[n]
	}
	return l.initialHold
}

func sq(x float64) float64 { return x * x }
