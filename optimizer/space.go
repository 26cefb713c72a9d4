package optimizer

import (
	"math"

	"github.com/rampwise/rampwise/model"
)

// The kinds of program value a search variable can stand for.
const (
	varInitial     = model.InitialTemp
	varInitialHold = model.InitialHold
	varRate        = model.RampRate
	varFinal       = model.RampFinal
	varHold        = model.RampHold
)

type varRef struct {
	kind model.ValueKind
	ramp int
}

// space maps points x ∈ ℝ^dim to valid programs with n ramps. Each unlocked
// value is a fraction c = clamp(x, 0, 1) of its allowed range: the initial
// temperature in [OvenMin, MaxTemp − n·gap], holds in [0, MaxHold], rates
// logarithmically in [MinRate, MaxRate], and each final temperature in
// (previous + gap, MaxTemp − (ramps left)·gap], so finals strictly increase
// and none exceeds the column maximum. Clamping (rather than a sigmoid)
// lets a hold reach exactly zero and a temperature its limit.
type space struct {
	p    *Problem
	n    int
	dim  int
	vars []varRef
	// index of the variable for each value, −1 when locked
	at   [5 + 3*5]int
	prog model.Program // scratch
}

func slot(kind model.ValueKind, ramp int) int {
	switch kind {
	case varInitial:
		return 0
	case varInitialHold:
		return 1
	}
	return 2 + 3*ramp + int(kind-varRate)
}

func newSpace(p Problem, n int) *space {
	sp := &space{p: &p, n: n}
	for i := range sp.at {
		sp.at[i] = -1
	}
	add := func(kind model.ValueKind, ramp int) {
		if p.locked(model.ProgramValue{Kind: kind, Ramp: rampNumber(kind, ramp)}) {
			return
		}
		sp.at[slot(kind, ramp)] = len(sp.vars)
		sp.vars = append(sp.vars, varRef{kind, ramp})
	}
	add(varInitial, 0)
	add(varInitialHold, 0)
	for r := 0; r < n; r++ {
		add(varRate, r)
		add(varFinal, r)
		add(varHold, r)
	}
	sp.dim = len(sp.vars)
	sp.prog.Ramps = make([]model.Ramp, n)
	return sp
}

func rampNumber(kind model.ValueKind, ramp int) int {
	if kind == varInitial || kind == varInitialHold {
		return 0
	}
	return ramp + 1
}

func (sp *space) clone() *space {
	c := *sp
	c.vars = append([]varRef(nil), sp.vars...)
	c.prog.Ramps = make([]model.Ramp, sp.n)
	return &c
}

func clamp01(x float64) float64 {
	if x < 0 || x != x {
		return 0
	}
	if x > 1 {
		return 1
	}
	return x
}

// value gives the fraction for a slot, or ok=false when it is locked.
func (sp *space) frac(x []float64, kind model.ValueKind, ramp int) (float64, bool) {
	i := sp.at[slot(kind, ramp)]
	if i < 0 {
		return 0, false
	}
	return clamp01(x[i]), true
}

func (sp *space) startRamp(r int) model.Ramp {
	if r < len(sp.p.Start.Ramps) {
		return sp.p.Start.Ramps[r]
	}
	return model.Ramp{}
}

// bounds of the final temperature of ramp r after prev.
func (sp *space) finalRange(r int, prev float64) (lo, hi float64) {
	return prev + tempGap, sp.p.maxFinal() - float64(sp.n-1-r)*tempGap
}

func (sp *space) rateOf(c float64) float64 {
	l := sp.p.Limits
	return l.MinRate * math.Pow(l.MaxRate/l.MinRate, c)
}

// programInto maps x into the space's scratch program and returns it (its
// ramps alias the scratch; clone to keep it).
func (sp *space) programInto(x []float64) model.Program {
	l := sp.p.Limits
	pr := &sp.prog
	if c, ok := sp.frac(x, varInitial, 0); ok {
		hi := sp.p.maxFinal() - float64(sp.n)*tempGap
		pr.Initial = l.OvenMin + (hi-l.OvenMin)*c
	} else {
		pr.Initial = sp.p.Start.Initial
	}
	if c, ok := sp.frac(x, varInitialHold, 0); ok {
		pr.InitialHold = l.MaxHold * c
		if pr.Initial > l.MaxIsothermal {
			pr.InitialHold = 0 // no hold above the isothermal limit
		}
	} else {
		pr.InitialHold = sp.p.Start.InitialHold
	}
	prev := pr.Initial
	for r := 0; r < sp.n; r++ {
		st := sp.startRamp(r)
		rp := &pr.Ramps[r]
		if c, ok := sp.frac(x, varRate, r); ok {
			rp.Rate = sp.rateOf(c)
		} else {
			rp.Rate = st.Rate
		}
		if c, ok := sp.frac(x, varFinal, r); ok {
			lo, hi := sp.finalRange(r, prev)
			if hi < lo {
				hi = lo
			}
			rp.Final = lo + (hi-lo)*c
		} else {
			rp.Final = st.Final
		}
		if c, ok := sp.frac(x, varHold, r); ok {
			rp.Hold = l.MaxHold * c
			if rp.Final > l.MaxIsothermal {
				rp.Hold = 0
			}
		} else {
			rp.Hold = st.Hold
		}
		// a ramp reaching into a rate band heats no faster than the band allows
		if sp.at[slot(varRate, r)] >= 0 {
			if m := sp.p.maxRateTo(rp.Final); rp.Rate > m {
				rp.Rate = m
			}
		}
		prev = rp.Final
	}
	return *pr
}

// program maps x to a new program (a copy).
func (sp *space) program(x []float64) model.Program {
	return sp.clone().programInto(x).Clone()
}

// invert returns the point whose program is q (n ramps), as near as the
// limits allow.
func (sp *space) invert(q model.Program) []float64 {
	l := sp.p.Limits
	x := make([]float64, sp.dim)
	set := func(kind model.ValueKind, ramp int, c float64) {
		if i := sp.at[slot(kind, ramp)]; i >= 0 {
			x[i] = clamp01(c)
		}
	}
	hi := sp.p.maxFinal() - float64(sp.n)*tempGap
	set(varInitial, 0, (q.Initial-l.OvenMin)/(hi-l.OvenMin))
	if l.MaxHold > 0 {
		set(varInitialHold, 0, q.InitialHold/l.MaxHold)
	}
	// follow the mapping forward so each final is inverted against the
	// previous value the mapping will actually produce
	prev := sp.clone().programInto(x).Initial
	for r := 0; r < sp.n && r < len(q.Ramps); r++ {
		qr := q.Ramps[r]
		set(varRate, r, math.Log(qr.Rate/l.MinRate)/math.Log(l.MaxRate/l.MinRate))
		lo, fhi := sp.finalRange(r, prev)
		if fhi > lo {
			set(varFinal, r, (qr.Final-lo)/(fhi-lo))
		}
		if l.MaxHold > 0 {
			set(varHold, r, qr.Hold/l.MaxHold)
		}
		prev = sp.clone().programInto(x).Ramps[r].Final
	}
	return x
}

// withRamps reshapes q to n ramps: extra ramps are dropped, missing ones are
// made by splitting the last ramp at its middle temperature (same rate, no
// hold in between), which leaves the program unchanged.
func withRamps(q model.Program, n int, tmax float64) model.Program {
	q = q.Clone()
	if len(q.Ramps) == 0 {
		q.Ramps = []model.Ramp{{Rate: 10.0 / 60, Final: math.Min(tmax, q.Initial+100)}}
		if q.Ramps[0].Final <= q.Initial {
			q.Ramps[0].Final = q.Initial + tempGap
		}
	}
	for len(q.Ramps) < n {
		last := q.Ramps[len(q.Ramps)-1]
		prev := q.Initial
		if len(q.Ramps) > 1 {
			prev = q.Ramps[len(q.Ramps)-2].Final
		}
		mid := (prev + last.Final) / 2
		q.Ramps[len(q.Ramps)-1] = model.Ramp{Rate: last.Rate, Final: mid}
		q.Ramps = append(q.Ramps, last)
	}
	q.Ramps = q.Ramps[:n]
	return q
}

// embed is the point of a program of fewer ramps in this space.
func (sp *space) embed(q model.Program) []float64 {
	return sp.invert(withRamps(q, sp.n, sp.p.maxFinal()))
}

// fromProgram is the point of the method's own program.
func (sp *space) fromProgram(q model.Program) ([]float64, bool) {
	if err := q.Validate(sp.p.Limits.MaxTemp); err != nil {
		return nil, false
	}
	return sp.embed(q), true
}

// plateauSeeds are starting points of the shape a chromatographer tries
// for a hard pair: start at a fraction c0 of the start range, jump at the
// fastest rate to a plateau (fraction f of the first final's range), hold
// there (fraction h of the hold limit), then heat at the fastest rate to the
// top. Values the space does not vary are left to the mapping.
func (sp *space) plateauSeeds() [][]float64 {
	if sp.n < 1 {
		return nil
	}
	var out [][]float64
	for _, c0 := range []float64{0, 0.1} {
		for _, f := range []float64{0.05, 0.12, 0.2, 0.3} {
			for _, h := range []float64{0.2, 0.6} {
				x := make([]float64, sp.dim)
				set := func(kind model.ValueKind, ramp int, v float64) {
					if i := sp.at[slot(kind, ramp)]; i >= 0 {
						x[i] = v
					}
				}
				set(varInitial, 0, c0)
				set(varInitialHold, 0, 0.1)
				set(varRate, 0, 1)
				set(varFinal, 0, f)
				set(varHold, 0, h)
				for r := 1; r < sp.n; r++ {
					set(varRate, r, 1)
					set(varFinal, r, 1)
					set(varHold, r, 0)
				}
				out = append(out, x)
			}
		}
	}
	return out
}
