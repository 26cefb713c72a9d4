package model

import (
	"fmt"
	"strconv"
	"strings"
)

// ValueKind is what a ProgramValue stands for.
type ValueKind int

// The kinds of value: the five program values of MODEL.md §4 and the two
// carrier values a sweep may vary.
const (
	InitialTemp   ValueKind = iota // initial_c, °C
	InitialHold                    // initial_hold_min, min
	RampRate                       // rate_N, °C/min
	RampFinal                      // final_N, °C
	RampHold                       // hold_N, min
	CarrierFlow                    // flow_ml_min, mL/min (constant flow)
	InletPressure                  // inlet_kpa, kPa gauge (constant pressure)
)

var valueKinds = [...]struct{ name, unit string }{
	InitialTemp:   {"initial_c", "°C"},
	InitialHold:   {"initial_hold_min", "min"},
	RampRate:      {"rate", "°C/min"},
	RampFinal:     {"final", "°C"},
	RampHold:      {"hold", "min"},
	CarrierFlow:   {"flow_ml_min", "mL/min"},
	InletPressure: {"inlet_kpa", "kPa"},
}

// PerRamp reports whether the kind belongs to one ramp (rate, final, hold).
func (k ValueKind) PerRamp() bool { return k == RampRate || k == RampFinal || k == RampHold }

// InProgram reports whether the kind is a value of the oven program (one the
// optimizer varies and goal.lock may hold fixed).
func (k ValueKind) InProgram() bool { return k >= InitialTemp && k <= RampHold }

// ProgramValue names one value of a method the optimizer, goal.lock or a
// sweep refers to: Kind, and for a per-ramp kind the ramp it belongs to
// (numbered from 1; 0 otherwise). Its String is the name used in method
// files and on the command line: initial_c, initial_hold_min, rate_N,
// final_N, hold_N, flow_ml_min, inlet_kpa.
type ProgramValue struct {
	Kind ValueKind
	Ramp int
}

// String is the value's name as written in files and on the command line.
func (v ProgramValue) String() string {
	if v.Kind < 0 || int(v.Kind) >= len(valueKinds) {
		return fmt.Sprintf("ValueKind(%d)", int(v.Kind))
	}
	if v.Kind.PerRamp() {
		return valueKinds[v.Kind].name + "_" + strconv.Itoa(v.Ramp)
	}
	return valueKinds[v.Kind].name
}

// Unit is the unit of the value in files and on screens.
func (v ProgramValue) Unit() string {
	if v.Kind < 0 || int(v.Kind) >= len(valueKinds) {
		return ""
	}
	return valueKinds[v.Kind].unit
}

// MaxRampNumber is the highest ramp number a value name may carry.
const MaxRampNumber = 99

// ParseProgramValue reads a value name (initial_c, rate_2, flow_ml_min, …).
// It checks the form only; whether the ramp exists is the caller's question
// (see ProgramValues).
func ParseProgramValue(s string) (ProgramValue, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for k, d := range valueKinds {
		kind := ValueKind(k)
		if !kind.PerRamp() {
			if t == d.name {
				return ProgramValue{Kind: kind}, nil
			}
			continue
		}
		num, ok := strings.CutPrefix(t, d.name+"_")
		if !ok {
			continue
		}
		n, err := strconv.Atoi(num)
		if err != nil || n < 1 || n > MaxRampNumber || strconv.Itoa(n) != num {
			return ProgramValue{}, fmt.Errorf("%q: the ramp number must be a whole number from 1 (as in %s_1)", s, d.name)
		}
		return ProgramValue{Kind: kind, Ramp: n}, nil
	}
	return ProgramValue{}, fmt.Errorf("%q is not a program value (use initial_c, initial_hold_min, rate_N, final_N or hold_N)", s)
}

// ProgramValues lists the program values of a program with n ramps, in
// order: initial_c, initial_hold_min, then rate, final, hold of each ramp.
func ProgramValues(n int) []ProgramValue {
	out := []ProgramValue{{Kind: InitialTemp}, {Kind: InitialHold}}
	for i := 1; i <= n; i++ {
		out = append(out, ProgramValue{RampRate, i}, ProgramValue{RampFinal, i}, ProgramValue{RampHold, i})
	}
	return out
}

// ValueNames is the names of vs joined by ", ", for messages.
func ValueNames(vs []ProgramValue) string {
	s := make([]string, len(vs))
	for i, v := range vs {
		s[i] = v.String()
	}
	return strings.Join(s, ", ")
}

// Valid reports whether v is a program value of a program with n ramps.
func (v ProgramValue) Valid(n int) bool {
	if !v.Kind.InProgram() {
		return false
	}
	if v.Kind.PerRamp() {
		return v.Ramp >= 1 && v.Ramp <= n
	}
	return v.Ramp == 0
}

// Get is the value in a program (SI units: K, s, K/s). ok is false for a
// ramp the program does not have or a non-program kind.
func (v ProgramValue) Get(p Program) (x float64, ok bool) {
	switch v.Kind {
	case InitialTemp:
		return p.Initial, true
	case InitialHold:
		return p.InitialHold, true
	}
	if !v.Kind.PerRamp() || v.Ramp < 1 || v.Ramp > len(p.Ramps) {
		return 0, false
	}
	r := p.Ramps[v.Ramp-1]
	switch v.Kind {
	case RampRate:
		return r.Rate, true
	case RampFinal:
		return r.Final, true
	}
	return r.Hold, true
}

// Objective is what "fastest" means for a method: what the optimizer
// minimises among programs that meet the target.
type Objective int

// The objectives.
const (
	// RunTime is the time the last peak elutes plus the tail.
	RunTime Objective = iota
	// CycleTime is the run time plus cool-down and equilibration.
	CycleTime
)

// Objectives lists every objective, in the order a choice cycles.
var Objectives = []Objective{RunTime, CycleTime}

// String is the objective as written in a method file.
func (o Objective) String() string {
	if o == CycleTime {
		return "cycle-time"
	}
	return "run-time"
}

// ParseObjective reads an objective as written in a method file.
func ParseObjective(s string) (Objective, error) {
	for _, o := range Objectives {
		if s == o.String() {
			return o, nil
		}
	}
	return RunTime, fmt.Errorf("%q is not one of run-time, cycle-time", s)
}
