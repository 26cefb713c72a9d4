package model

import (
	"fmt"
	"math"
)

// Ramp is one step of an oven program: heat at Rate to Final, then hold.
type Ramp struct {
	Rate  float64 // K/s, > 0
	Final float64 // K
	Hold  float64 // s, ≥ 0
}

// Program is an oven temperature program: Initial held InitialHold, then the
// ramps in order (MODEL.md §4). Temperatures in K, times in s.
type Program struct {
	Initial     float64
	InitialHold float64
	Ramps       []Ramp
}

// Clone returns a deep copy.
func (p Program) Clone() Program {
	q := p
	q.Ramps = append([]Ramp(nil), p.Ramps...)
	return q
}

// Equal reports whether two programs are the same value by value.
func (p Program) Equal(q Program) bool {
	if p.Initial != q.Initial || p.InitialHold != q.InitialHold || len(p.Ramps) != len(q.Ramps) {
		return false
	}
	for i := range p.Ramps {
		if p.Ramps[i] != q.Ramps[i] {
			return false
		}
	}
	return true
}

// RunTime is the end of the last hold, in s.
func (p Program) RunTime() float64 {
	t := p.InitialHold
	prev := p.Initial
	for _, r := range p.Ramps {
		t += (r.Final-prev)/r.Rate + r.Hold
		prev = r.Final
	}
	return t
}

// FinalTemp is the temperature at the end of the program, K.
func (p Program) FinalTemp() float64 {
	if len(p.Ramps) == 0 {
		return p.Initial
	}
	return p.Ramps[len(p.Ramps)-1].Final
}

// MaxTemp is the highest temperature the program reaches, K.
func (p Program) MaxTemp() float64 { return p.FinalTemp() }

// TempAt is the oven temperature T(t) at time t (s); after the end of the
// program the oven stays at the final temperature.
func (p Program) TempAt(t float64) float64 {
	if t <= p.InitialHold {
		return p.Initial
	}
	t -= p.InitialHold
	prev := p.Initial
	for _, r := range p.Ramps {
		d := (r.Final - prev) / r.Rate
		if t <= d {
			return prev + r.Rate*t
		}
		t -= d
		if t <= r.Hold {
			return r.Final
		}
		t -= r.Hold
		prev = r.Final
	}
	return prev
}

// TrimTo returns the program cut to end at time end (s): a ramp is cut where
// the run ends and a hold shortened; steps after end are dropped. A program
// shorter than end gets its last hold extended.
func (p Program) TrimTo(end float64) Program {
	var q Program
	p.TrimInto(end, &q)
	return q
}

// TrimInto is TrimTo writing into q, reusing its ramps (no allocation once
// q holds as many ramps as p: the optimizer's search calls it for every
// evaluation). q must not share p's ramps.
func (p Program) TrimInto(end float64, q *Program) {
	q.Initial, q.InitialHold = p.Initial, p.InitialHold
	q.Ramps = q.Ramps[:0]
	if end <= p.InitialHold || len(p.Ramps) == 0 {
		q.InitialHold = math.Max(0, end)
		return
	}
	t := p.InitialHold
	prev := p.Initial
	for _, r := range p.Ramps {
		d := (r.Final - prev) / r.Rate
		if t+d >= end {
			f := prev + r.Rate*(end-t)
			if f > prev {
				q.Ramps = append(q.Ramps, Ramp{Rate: r.Rate, Final: f})
			}
			return
		}
		t += d
		if t+r.Hold >= end {
			q.Ramps = append(q.Ramps, Ramp{Rate: r.Rate, Final: r.Final, Hold: end - t})
			return
		}
		t += r.Hold
		q.Ramps = append(q.Ramps, r)
		prev = r.Final
	}
	q.Ramps[len(q.Ramps)-1].Hold += end - t
}

// Simplify merges consecutive ramps of the same rate with no hold between
// them into one; the temperature profile is unchanged.
func (p Program) Simplify() Program {
	q := Program{Initial: p.Initial, InitialHold: p.InitialHold}
	for _, r := range p.Ramps {
		if n := len(q.Ramps); n > 0 {
			last := &q.Ramps[n-1]
			if last.Hold == 0 && math.Abs(last.Rate-r.Rate) <= 1e-12*r.Rate {
				last.Final, last.Hold = r.Final, r.Hold
				continue
			}
		}
		q.Ramps = append(q.Ramps, r)
	}
	return q
}

// Validate checks the program against the column maximum tmax (K): rates
// positive, finals strictly increasing, holds not negative, everything finite.
// The error names the step (initial, ramp N).
func (p Program) Validate(tmax float64) error {
	ok := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	if !ok(p.Initial) || p.Initial <= 0 {
		return fmt.Errorf("model: initial temperature must be a finite temperature")
	}
	if p.Initial > tmax {
		return fmt.Errorf("model: initial temperature %.1f °C is above the column maximum %.1f °C", p.Initial-ZeroCelsius, tmax-ZeroCelsius)
	}
	if !ok(p.InitialHold) || p.InitialHold < 0 {
		return fmt.Errorf("model: initial hold must not be negative")
	}
	prev := p.Initial
	for i, r := range p.Ramps {
		n := i + 1
		switch {
		case !ok(r.Rate) || r.Rate <= 0:
			return fmt.Errorf("model: ramp %d: rate must be positive", n)
		case !ok(r.Final):
			return fmt.Errorf("model: ramp %d: final temperature must be finite", n)
		case r.Final <= prev:
			return fmt.Errorf("model: ramp %d: final temperature %.1f °C is not above the previous %.1f °C", n, r.Final-ZeroCelsius, prev-ZeroCelsius)
		case r.Final > tmax:
			return fmt.Errorf("model: ramp %d: final temperature %.1f °C is above the column maximum %.1f °C", n, r.Final-ZeroCelsius, tmax-ZeroCelsius)
		case !ok(r.Hold) || r.Hold < 0:
			return fmt.Errorf("model: ramp %d: hold must not be negative", n)
		}
		prev = r.Final
	}
	if !(p.RunTime() > 0) || math.IsInf(p.RunTime(), 0) {
		return fmt.Errorf("model: the program has zero length (give an initial hold or a ramp)")
	}
	return nil
}
