package model

import (
	"fmt"
	"math"
)

// Peak is one compound's predicted peak. Times in s, temperatures in K.
type Peak struct {
	Compound        int     // index into System.Compounds
	RetentionTime   float64 // tR, s
	Sigma           float64 // σ_t, s
	ElutionTemp     float64 // Te = T(tR), K
	RetentionFactor float64 // k(Te)
	// Eluted is false when the peak comes after the end of the program (the
	// model then keeps the oven at the final temperature).
	Eluted bool
}

// HalfWidth is the width at half height, 2 sqrt(2 ln 2) σ, in s.
func (p Peak) HalfWidth() float64 { return 2.3548200450309493 * p.Sigma }

// Pair is two adjacent eluted peaks.
type Pair struct {
	First, Second int // compound indices, in elution order
	Resolution    float64
	// Counts is true when at least one of the two compounds is a target.
	Counts bool
}

// Result is what a program does. Simulate fills it; reuse one Result to
// evaluate many programs without allocating.
type Result struct {
	HoldupTime float64 // s, of the program (k = 0)
	RunTime    float64 // s, end of the last hold
	CycleTime  float64 // s, run + cool-down + equilibration
	Cooldown   float64 // s
	Peaks      []Peak  // sorted by retention time
	Pairs      []Pair  // adjacent eluted peaks, in order
	// MinResolution is the smallest counted Rs; NaN when no pair counts.
	MinResolution float64
	// Critical is the index in Pairs of the critical pair, −1 when none.
	Critical int
	// LastPeak is the retention time of the last peak, eluted or not, in s.
	LastPeak float64
	// TargetsNotEluted counts the targets that elute after the run.
	TargetsNotEluted int

	steps []step // scratch: the program prepared for all compounds
}

// Simulate evaluates the program p (MODEL.md §4–6): the elution of every
// compound by the fundamental equation ζ(tR) = 1, evaluated with the
// program-independent tables, the band variance integrated along the path,
// the resolution of adjacent pairs and the critical pair, and the cycle
// time. It allocates nothing once res has room for the compounds.
func (s *System) Simulate(p Program, res *Result) error {
	if err := p.Validate(s.Cond.Column.MaxTemp); err != nil {
		return err
	}
	if p.Initial < s.lo {
		return fmt.Errorf("model: initial temperature %.1f °C is below the model's range (%.1f °C)", p.Initial-ZeroCelsius, s.lo-ZeroCelsius)
	}
	res.RunTime = p.RunTime()
	cool, err := s.Oven.Cooldown(p.FinalTemp(), p.Initial)
	if err != nil {
		return err
	}
	res.Cooldown = cool
	res.CycleTime = res.RunTime + cool + s.Oven.Equilibration

	nc := len(s.Compounds)
	s.prepare(p, res)
	hold := s.elute(nc, res.steps)
	res.HoldupTime = hold.RetentionTime

	res.Peaks = res.Peaks[:0]
	res.TargetsNotEluted = 0
	for i := 0; i < nc; i++ {
		pk := s.elute(i, res.steps)
		pk.Eluted = pk.RetentionTime <= res.RunTime
		if !pk.Eluted && s.Compounds[i].Target {
			res.TargetsNotEluted++
		}
		res.Peaks = append(res.Peaks, pk)
	}
	sortPeaks(res.Peaks)
	res.LastPeak = res.Peaks[len(res.Peaks)-1].RetentionTime
	s.pairs(res)
	return nil
}

// SimulateTrimmed evaluates p as the optimizer uses it (MODEL.md §4, §6):
// the peaks that elute within p make the run, which ends tail seconds after
// the last of them; a target that elutes after p ends is a failure
// (TargetsNotEluted), a non-target after it is left out of the run. After
// the program the oven is taken to stay at the final temperature, so the
// result equals Simulate of p.TrimTo(res.RunTime). It allocates nothing once
// res has room.
func (s *System) SimulateTrimmed(p Program, tail float64, res *Result) error {
	if err := p.Validate(s.Cond.Column.MaxTemp); err != nil {
		return err
	}
	if p.Initial < s.lo {
		return fmt.Errorf("model: initial temperature %.1f °C is below the model's range (%.1f °C)", p.Initial-ZeroCelsius, s.lo-ZeroCelsius)
	}
	nc := len(s.Compounds)
	s.prepare(p, res)
	res.HoldupTime = s.elute(nc, res.steps).RetentionTime
	res.Peaks = res.Peaks[:0]
	end := p.RunTime()
	last := math.Inf(-1)
	res.TargetsNotEluted = 0
	for i := 0; i < nc; i++ {
		pk := s.elute(i, res.steps)
		if pk.RetentionTime <= end {
			last = math.Max(last, pk.RetentionTime)
		} else if s.Compounds[i].Target {
			res.TargetsNotEluted++
		}
		res.Peaks = append(res.Peaks, pk)
	}
	sortPeaks(res.Peaks)
	if math.IsInf(last, -1) {
		last = end // nothing elutes within the program
	}
	res.RunTime = last + tail
	for i := range res.Peaks {
		res.Peaks[i].Eluted = res.Peaks[i].RetentionTime <= res.RunTime
	}
	res.LastPeak = res.Peaks[len(res.Peaks)-1].RetentionTime
	cool, err := s.Oven.Cooldown(p.TempAt(res.RunTime), p.Initial)
	if err != nil {
		return err
	}
	res.Cooldown = cool
	res.CycleTime = res.RunTime + cool + s.Oven.Equilibration
	s.pairs(res)
	return nil
}

// pairs fills the adjacent pairs of eluted peaks, the minimum resolution over
// counted pairs and the critical pair: Rs = (t2 − t1) / (2 (σ1 + σ2)).
func (s *System) pairs(res *Result) {
	res.Pairs = res.Pairs[:0]
	res.MinResolution = math.NaN()
	res.Critical = -1
	for i := 0; i+1 < len(res.Peaks); i++ {
		a, b := res.Peaks[i], res.Peaks[i+1]
		if !a.Eluted || !b.Eluted {
			break
		}
		pr := Pair{
			First:      a.Compound,
			Second:     b.Compound,
			Resolution: (b.RetentionTime - a.RetentionTime) / (2 * (a.Sigma + b.Sigma)),
			Counts:     s.Compounds[a.Compound].Target || s.Compounds[b.Compound].Target,
		}
		res.Pairs = append(res.Pairs, pr)
		if pr.Counts && (res.Critical < 0 || pr.Resolution < res.MinResolution) {
			res.MinResolution = pr.Resolution
			res.Critical = len(res.Pairs) - 1
		}
	}
}

// sortPeaks orders by retention time, ties by compound index (insertion
// sort: no allocation, and programs change the order little).
func sortPeaks(p []Peak) {
	for i := 1; i < len(p); i++ {
		x := p[i]
		j := i - 1
		for j >= 0 && (p[j].RetentionTime > x.RetentionTime || (p[j].RetentionTime == x.RetentionTime && p[j].Compound > x.Compound)) {
			p[j+1] = p[j]
			j--
		}
		p[j+1] = x
	}
}

// step is one program segment prepared once per Simulate for all
// compounds: a hold (rate 0) at temp for dur, or a ramp from ta to temp.
type step struct {
	ta, temp, rate, dur float64
	ba, bb              basis    // Hermite bases at ta and temp (ramps)
	st                  gasState // gas state at temp (holds)
	t175                float64  // temp^1.75 (holds)
}

// prepare fills res.steps for program p: every hold of nonzero length, every
// ramp, and the endless hold at the final temperature last.
func (s *System) prepare(p Program, res *Result) {
	res.steps = res.steps[:0]
	hold := func(temp, h float64) {
		if h > 0 {
			res.steps = append(res.steps, step{temp: temp, dur: h, st: s.Cond.state(temp), t175: math.Pow(temp, 1.75)})
		}
	}
	hold(p.Initial, p.InitialHold)
	prev := p.Initial
	ba := s.basisAt(prev)
	for _, r := range p.Ramps {
		bb := s.basisAt(r.Final)
		res.steps = append(res.steps, step{ta: prev, temp: r.Final, rate: r.Rate, dur: (r.Final - prev) / r.Rate, ba: ba, bb: bb})
		hold(r.Final, r.Hold)
		prev, ba = r.Final, bb
	}
	hold(prev, math.Inf(1))
}

// elute integrates ζ and the variance for table i (compound i, or the
// unretained solute for i = len(Compounds)) through the prepared steps,
// the last of which is an endless hold at the final temperature.
func (s *System) elute(i int, steps []step) Peak {
	tab := s.tables[i]
	var zeta, vz, t float64 // ζ, ∫ H dζ (m), time
	for n := range steps {
		sp := &steps[n]
		if sp.rate == 0 {
			g, q, k := s.exact(i, sp.temp, sp.st, sp.t175)
			if !(g > 0) { // retention beyond float range: never elutes
				return Peak{Compound: i, RetentionTime: math.Inf(1), Sigma: math.Inf(1), ElutionTemp: sp.temp, RetentionFactor: k}
			}
			if zeta+g*sp.dur >= 1 {
				dt := (1 - zeta) / g
				vz += q * dt
				return s.peak(i, t+dt, sp.temp, k, sp.st.tm, vz)
			}
			zeta += g * sp.dur
			vz += q * sp.dur
			t += sp.dur
			continue
		}
		phiA, phiB := sp.ba.phi(tab), sp.bb.phi(tab)
		psiA := sp.ba.psi(tab)
		dz := (phiB - phiA) / sp.rate
		if zeta+dz >= 1 {
			target := phiA + sp.rate*(1-zeta)
			te, be := s.invert(tab, target, sp.ta, sp.temp, sp.ba.j, sp.bb.j)
			vz += (be.psi(tab) - psiA) / sp.rate
			var k float64
			if i < len(s.Compounds) {
				k = math.Exp(s.Compounds[i].LnK(te)) / s.Cond.beta
			}
			return s.peak(i, t+(te-sp.ta)/sp.rate, te, k, s.holdupAt(be, te), vz)
		}
		zeta += dz
		vz += (sp.bb.psi(tab) - psiA) / sp.rate
		t += sp.dur
	}
	// unreachable: the last step is endless
	return Peak{Compound: i, RetentionTime: math.Inf(1), Sigma: math.Inf(1)}
}

// peak assembles a peak: σ_t² = [tM(Te)(1 + k(Te))]² σ_ζ² + σ0², with
// σ_ζ² = (1/L) ∫ H dζ (MODEL.md §5).
func (s *System) peak(i int, tr, te, k, tm, vz float64) Peak {
	speed := tm * (1 + k)
	s0 := s.Cond.Carrier.InitialBand
	return Peak{
		Compound:        i,
		RetentionTime:   tr,
		Sigma:           math.Sqrt(speed*speed*vz/s.Cond.Column.Length + s0*s0),
		ElutionTemp:     te,
		RetentionFactor: k,
	}
}

// NotElutedTargets names, in elution order, the targets of r (a result of
// s) that elute after the program ends; nil when every target elutes.
func (s *System) NotElutedTargets(r *Result) []string {
	if r.TargetsNotEluted == 0 {
		return nil
	}
	var out []string
	for _, pk := range r.Peaks {
		if !pk.Eluted && pk.Compound >= 0 && pk.Compound < len(s.Compounds) && s.Compounds[pk.Compound].Target {
			out = append(out, s.Compounds[pk.Compound].Name)
		}
	}
	return out
}
