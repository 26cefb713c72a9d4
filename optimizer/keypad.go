package optimizer

import (
	"math"
	"strconv"

	"github.com/rampwise/rampwise/model"
)

// Ramp is one ramp in the file's units: °C/min, °C, min.
type Ramp = model.FileRamp

// Oven is an oven program in the file's units (°C, min, °C/min), the form
// in which it is saved and typed into an oven's keypad: model.FileProgram,
// converted as a method file's oven is.
type Oven model.FileProgram

// Clone returns a deep copy.
func (o Oven) Clone() Oven { return Oven(model.FileProgram(o).Clone()) }

// Model is the program in SI units, converted exactly as a method file's
// oven is (model.FileProgram.Program: °C + 273.15, min × 60, °C/min ÷ 60).
func (o Oven) Model() model.Program { return model.FileProgram(o).Program() }

// modelInto is Model writing into q's ramps (no allocation once q has room).
func (o Oven) modelInto(q *model.Program) { model.FileProgram(o).ProgramInto(q) }

// ovenFromModel converts to file units as a method file's oven is
// (model.FileProgramOf: rounded to 12 significant digits so that a value
// typed into a file comes back as typed).
func ovenFromModel(p model.Program) Oven { return Oven(model.FileProgramOf(p)) }

func sig12(x float64) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 12, 64), 64)
	return v
}

// decimals is the number of decimals a keypad step has (0.1 → 1, 0.25 → 2).
func decimals(step float64) int {
	for d := 0; d < 10; d++ {
		s := step * math.Pow(10, float64(d))
		if math.Abs(s-math.Round(s)) < 1e-9*math.Max(1, s) {
			return d
		}
	}
	return 10
}

// gridValue is n steps as the decimal number the keypad shows (n × 0.1 is
// 83.1, not 83.10000000000001).
func gridValue(n, step float64) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(n*step, 'f', decimals(step), 64), 64)
	return v
}

// OnGrid reports whether x is exactly a keypad value of step.
func OnGrid(x, step float64) bool { return x == gridValue(math.Round(x/step), step) }

func roundGrid(x, step float64) float64 { return gridValue(math.Round(x/step), step) }
func ceilGrid(x, step float64) float64  { return gridValue(math.Ceil(x/step-1e-9), step) }
func floorGrid(x, step float64) float64 { return gridValue(math.Floor(x/step+1e-9), step) }

// cutOven is the saved form of prog (on the grid) ending at end (s): the
// ramp or hold the run ends in is cut, the cut rounded up to the next
// keypad step so the run never ends before end; later steps are dropped; a
// run past the program stretches the last hold. Locked values are never
// changed (end is at least their locked end, see lockedEnd). ok is false
// when the last hold would have to stretch but is locked.
func cutOven(o Oven, end float64, st Steps, l *locks) (Oven, bool) {
	endMin := end / 60
	q := Oven{InitialC: o.InitialC, InitialHoldMin: o.InitialHoldMin}
	t := o.InitialHoldMin
	if endMin <= t+1e-12 || len(o.Ramps) == 0 {
		if len(o.Ramps) == 0 && endMin > t+1e-12 {
			if l.initialHold {
				return q, false
			}
		}
		if !l.initialHold {
			q.InitialHoldMin = ceilGrid(math.Max(0, endMin), st.HoldMin)
		}
		return q, true
	}
	prev := o.InitialC
	for i, r := range o.Ramps {
		d := (r.FinalC - prev) / r.RateCMin
		if t+d >= endMin-1e-12 {
			f := ceilGrid(prev+r.RateCMin*(endMin-t), st.TempC)
			if f <= prev {
				f = gridValue(math.Floor(prev/st.TempC+1e-9)+1, st.TempC)
			}
			if f >= r.FinalC || l.final[i+1] {
				f = r.FinalC
			}
			h := 0.0
			if l.hold[i+1] {
				h = r.HoldMin
			}
			q.Ramps = append(q.Ramps, Ramp{RateCMin: r.RateCMin, FinalC: f, HoldMin: h})
			return q, true
		}
		t += d
		if t+r.HoldMin >= endMin-1e-12 {
			h := ceilGrid(endMin-t, st.HoldMin)
			if h > r.HoldMin || l.hold[i+1] {
				h = r.HoldMin
			}
			q.Ramps = append(q.Ramps, Ramp{RateCMin: r.RateCMin, FinalC: r.FinalC, HoldMin: h})
			return q, true
		}
		t += r.HoldMin
		q.Ramps = append(q.Ramps, r)
		prev = r.FinalC
	}
	n := len(q.Ramps)
	if l.hold[n] {
		return q, false
	}
	q.Ramps[n-1].HoldMin = ceilGrid(q.Ramps[n-1].HoldMin+endMin-t, st.HoldMin)
	return q, true
}
