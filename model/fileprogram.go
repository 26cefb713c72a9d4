package model

import "strconv"

// FileRamp is one ramp in a method file's units: °C/min, °C, min.
type FileRamp struct {
	RateCMin float64
	FinalC   float64
	HoldMin  float64
}

// FileProgram is an oven program in a method file's units (°C, min,
// °C/min): the form in which it is saved, shown and typed into an oven's
// keypad. It is the one conversion between those units and Program's SI
// units; the method file's oven table and the optimizer's result are this
// type.
type FileProgram struct {
	InitialC       float64
	InitialHoldMin float64
	Ramps          []FileRamp
}

// Clone returns a deep copy.
func (o FileProgram) Clone() FileProgram {
	c := o
	c.Ramps = append([]FileRamp(nil), o.Ramps...)
	return c
}

// Equal reports whether two programs are the same step for step.
func (o FileProgram) Equal(q FileProgram) bool {
	if o.InitialC != q.InitialC || o.InitialHoldMin != q.InitialHoldMin || len(o.Ramps) != len(q.Ramps) {
		return false
	}
	for i := range o.Ramps {
		if o.Ramps[i] != q.Ramps[i] {
			return false
		}
	}
	return true
}

// Program is o in SI units: °C + 273.15, min × 60, °C/min ÷ 60, not
// rounded (the values in the file are the ones the oven runs).
func (o FileProgram) Program() Program {
	var p Program
	o.ProgramInto(&p)
	return p
}

// ProgramInto is Program writing into p, reusing its ramps.
func (o FileProgram) ProgramInto(p *Program) {
	p.Initial, p.InitialHold = o.InitialC+ZeroCelsius, o.InitialHoldMin*60
	p.Ramps = p.Ramps[:0]
	for _, r := range o.Ramps {
		p.Ramps = append(p.Ramps, Ramp{Rate: r.RateCMin / 60, Final: r.FinalC + ZeroCelsius, Hold: r.HoldMin * 60})
	}
}

// FileProgramOf is p in a method file's units, with the conversion's
// rounding error dropped so that a value typed into a file or on a keypad
// step comes back exactly as typed (50 °C, not 50.00000000000006) and what
// is shown is what is saved: temperatures to 1e-10 °C (their error is
// absolute, a few 1e-14 °C from adding 273.15, so 12 significant digits
// would not do near 0 °C), rates and holds to 12 significant digits (their
// error is relative). Putting the values on the oven's keypad steps is the
// caller's (the steps are the method's).
func FileProgramOf(p Program) FileProgram {
	o := FileProgram{InitialC: fileCelsius(p.Initial), InitialHoldMin: sig12(p.InitialHold / 60)}
	for _, r := range p.Ramps {
		o.Ramps = append(o.Ramps, FileRamp{RateCMin: sig12(r.Rate * 60), FinalC: fileCelsius(r.Final), HoldMin: sig12(r.Hold / 60)})
	}
	return o
}

// fileCelsius is t (K) in °C to 10 decimals.
func fileCelsius(t float64) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(t-ZeroCelsius, 'f', 10, 64), 64)
	return v
}

// sig12 is x rounded to 12 significant digits.
func sig12(x float64) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 12, 64), 64)
	return v
}
