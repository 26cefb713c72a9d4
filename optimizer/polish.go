package optimizer

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/rampwise/rampwise/model"
)

// gridBounds are the search bounds on the keypad grid, in file units.
type gridBounds struct {
	ovenMin, maxFinal, maxIso float64 // °C
	minRate                   float64 // °C/min
	maxHold                   float64 // min
}

func (p *Problem) gridBounds() gridBounds {
	st := p.Steps
	return gridBounds{
		ovenMin:  ceilGrid(p.Limits.OvenMin-model.ZeroCelsius, st.TempC),
		maxFinal: floorGrid(p.maxFinal()-model.ZeroCelsius, st.TempC),
		maxIso:   p.Limits.MaxIsothermal - model.ZeroCelsius,
		minRate:  ceilGrid(p.Limits.MinRate*60, st.RateCMin),
		maxHold:  floorGrid(p.Limits.MaxHold/60, st.HoldMin),
	}
}

func (p *Problem) maxRateGrid(finalC float64) float64 {
	return floorGrid(p.maxRateTo(finalC+model.ZeroCelsius)*60, p.Steps.RateCMin)
}

// snap puts a continuous program on the keypad grid: each free value to the
// nearest step inside the limits, locked values exactly as the method has
// them.
func (p *Problem) snap(prog model.Program) Oven {
	st := p.Steps
	gb := p.gridBounds()
	lk := p.lockFlags()
	so := p.StartOven
	clamp := func(x, lo, hi float64) float64 { return math.Min(math.Max(x, lo), hi) }
	o := Oven{}
	if lk.initial {
		o.InitialC = so.InitialC
	} else {
		o.InitialC = clamp(roundGrid(prog.Initial-model.ZeroCelsius, st.TempC), gb.ovenMin, gb.maxFinal)
	}
	if lk.initialHold {
		o.InitialHoldMin = so.InitialHoldMin
	} else {
		o.InitialHoldMin = clamp(roundGrid(prog.InitialHold/60, st.HoldMin), 0, gb.maxHold)
		if o.InitialC > gb.maxIso {
			o.InitialHoldMin = 0
		}
	}
	prev := o.InitialC
	for i, r := range prog.Ramps {
		n := i + 1
		var sr Ramp
		if i < len(so.Ramps) {
			sr = so.Ramps[i]
		}
		var q Ramp
		if lk.final[n] {
			q.FinalC = sr.FinalC
		} else {
			q.FinalC = clamp(roundGrid(r.Final-model.ZeroCelsius, st.TempC), prev+st.TempC, gb.maxFinal)
		}
		if lk.rate[n] {
			q.RateCMin = sr.RateCMin
		} else {
			q.RateCMin = clamp(roundGrid(r.Rate*60, st.RateCMin), gb.minRate, p.maxRateGrid(q.FinalC))
		}
		if lk.hold[n] {
			q.HoldMin = sr.HoldMin
		} else {
			q.HoldMin = clamp(roundGrid(r.Hold/60, st.HoldMin), 0, gb.maxHold)
			if q.FinalC > gb.maxIso {
				q.HoldMin = 0
			}
		}
		o.Ramps = append(o.Ramps, q)
		prev = q.FinalC
	}
	return o
}

// validGrid reports whether o keeps the search bounds (locked values are
// the method's and pass).
func (p *Problem) validGrid(o Oven, lk *locks, gb gridBounds) bool {
	if !lk.initial && (o.InitialC < gb.ovenMin || o.InitialC > gb.maxFinal) {
		return false
	}
	if !lk.initialHold && (o.InitialHoldMin < 0 || o.InitialHoldMin > gb.maxHold || (o.InitialHoldMin > 0 && o.InitialC > gb.maxIso)) {
		return false
	}
	prev := o.InitialC
	for i, r := range o.Ramps {
		n := i + 1
		if r.FinalC <= prev || (!lk.final[n] && r.FinalC > gb.maxFinal) {
			return false
		}
		if !lk.rate[n] && (r.RateCMin < gb.minRate || r.RateCMin > p.maxRateGrid(r.FinalC)) {
			return false
		}
		if !lk.hold[n] && (r.HoldMin < 0 || r.HoldMin > gb.maxHold || (r.HoldMin > 0 && r.FinalC > gb.maxIso)) {
			return false
		}
		prev = r.FinalC
	}
	return true
}

// polish ends the search on the keypad grid: from the best continuous
// program snapped to the steps, a coordinate search (each free value moved
// by ±1, 2, 5, 20 steps, first improvement kept) on the objective of the
// program exactly as saved, with the target and the robust margin checked
// without any margin.
func (sh *shared) polish(ctx context.Context, best candidate) (Oven, float64) {
	p := &sh.p
	ev := newEvaluator(sh, best.rg, nil)
	lk := p.lockFlags()
	gb := p.gridBounds()
	cur := p.snap(best.prog)
	curF, _, _ := ev.scoreOven(cur)
	sh.evals.Add(1)
	type field struct {
		ptr  func(o *Oven) *float64
		step float64
	}
	var fields []field
	st := p.Steps
	if !lk.initial {
		fields = append(fields, field{func(o *Oven) *float64 { return &o.InitialC }, st.TempC})
	}
	if !lk.initialHold {
		fields = append(fields, field{func(o *Oven) *float64 { return &o.InitialHoldMin }, st.HoldMin})
	}
	for i := range cur.Ramps {
		i, n := i, i+1
		if !lk.rate[n] {
			fields = append(fields, field{func(o *Oven) *float64 { return &o.Ramps[i].RateCMin }, st.RateCMin})
		}
		if !lk.final[n] {
			fields = append(fields, field{func(o *Oven) *float64 { return &o.Ramps[i].FinalC }, st.TempC})
		}
		if !lk.hold[n] {
			fields = append(fields, field{func(o *Oven) *float64 { return &o.Ramps[i].HoldMin }, st.HoldMin})
		}
	}
	budget := sh.s.PolishEvaluations
	deltas := []float64{1, -1, 2, -2, 5, -5, 20, -20}
	for improved := true; improved && budget > 0 && ctx.Err() == nil; {
		improved = false
		for _, fd := range fields {
			for _, d := range deltas {
				if budget <= 0 {
					break
				}
				try := cur.Clone()
				v := fd.ptr(&try)
				*v = gridValue(math.Round(*v/fd.step)+d, fd.step)
				if !p.validGrid(try, &lk, gb) {
					continue
				}
				budget--
				sh.evals.Add(1)
				if f, _, _ := ev.scoreOven(try); f < curF-1e-9 {
					cur, curF, improved = try, f, true
					break
				}
			}
		}
	}
	return cur, curF
}

// explainMiss says why the saved program misses: a limit, the robust
// margin, or the resolution itself.
func (sh *shared) explainMiss(ev *evaluator, r *Result) string {
	p := &sh.p
	res := &r.Sim
	end := r.Program.RunTime()
	var late []string
	for _, pk := range res.Peaks {
		if pk.RetentionTime > end {
			late = append(late, r.System.Compounds[pk.Compound].Name)
		}
	}
	if len(late) > 0 {
		last := res.Peaks[len(res.Peaks)-1]
		at := "never below the highest temperature allowed"
		if !math.IsInf(last.RetentionTime, 0) && last.RetentionTime < 1e12 {
			at = fmt.Sprintf("only after %.1f min", last.RetentionTime/60)
		}
		return fmt.Sprintf("%s would elute %s within the limits (highest temperature %.0f °C, longest hold %.1f min): everything injected must leave the column; a less retentive column (thinner film, shorter column, another phase) or a bake-out step (goal.bakeout_c, goal.bakeout_min) is needed",
			strings.Join(late, ", "), at, p.maxFinal()-model.ZeroCelsius, p.Limits.MaxHold/60)
	}
	if miss := ev.limitMiss(r.Program, end, res); miss > 0 {
		if p.MinFirstK > 0 {
			for _, pk := range res.Peaks {
				if r.System.Compounds[pk.Compound].Target {
					if pk.RetentionFactor < p.MinFirstK {
						return fmt.Sprintf("the first target %s elutes with k(Te) = %.2f (k at its elution temperature), below goal.min_first_k = %g, in every program found: start cooler (lower limits.oven_min_c) or use a thicker film",
							r.System.Compounds[pk.Compound].Name, pk.RetentionFactor, p.MinFirstK)
					}
					break
				}
			}
		}
		return "the best program found breaks an instrument limit (hold length or temperature, inlet pressure, rate band); relax the limits"
	}
	if len(r.Limiting) == 0 && r.Robust.On && r.Robust.Margin < p.MinResolution {
		rb := r.Robust
		if !math.IsNaN(rb.Worst) && rb.Worst < p.MinResolution {
			return fmt.Sprintf("the target is met at the nominal point (Rs %.3f) but not at every corner of the tolerances in goal.robust: Rs %.3f at %s; a longer column or looser tolerances would be needed",
				rb.Nominal, rb.Worst, rb.Corner)
		}
		return fmt.Sprintf("the target is met at the nominal point (Rs %.3f) but Rs − %g·σ = %.3f for the retention parameters' uncertainty: better calibrated parameters (more scouting runs) or a longer column would be needed",
			rb.Nominal, rb.Z, rb.LowZ)
	}
	if len(r.Limiting) == 0 {
		return "the best program found breaks a limit; relax the limits"
	}
	return explain(p, res, r.Limiting, r.System)
}
