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
	hold, _ := s.elute(nc, p)
	res.HoldupTime = hold.RetentionTime

	res.Peaks = res.Peaks[:0]
	res.TargetsNotEluted = 0
	for i := 0; i < nc; i++ {
		pk, _ := s.elute(i, p)
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

// elute integrates ζ and the variance for table i (compound i, or the
// unretained solute for i = len(Compounds)) through the program, then through
// an endless hold at the final temperature. It returns the peak and the
// index of the step in which it elutes (0 the initial hold, 2r−1 ramp r,
// 2r its hold, −1 after the program).
func (s *System) elute(i int, p Program) (Peak, int) {
	tab := s.tables[i]
	var zeta, vz, t float64 // ζ, ∫ H dζ (m), time
	// holdStep handles a hold at temperature temp of length h (Inf: endless).
	holdStep := func(temp, h float64) (Peak, bool) {
		st := s.Cond.state(temp)
		g, q, k := s.exact(i, temp, st, math.Pow(temp, 1.75))
		if !(g > 0) { // retention beyond float range: never elutes
			return Peak{Compound: i, RetentionTime: math.Inf(1), Sigma: math.Inf(1), ElutionTemp: temp, RetentionFactor: k}, true
		}
		if zeta+g*h >= 1 {
			dt := (1 - zeta) / g
			vz += q * dt
			return s.peak(i, t+dt, temp, k, st.tm, vz), true
		}
		zeta += g * h
		vz += q * h
		t += h
		return Peak{}, false
	}
	if pk, ok := holdStep(p.Initial, p.InitialHold); ok {
		return pk, 0
	}
	prev := p.Initial
	ba := s.basisAt(prev)
	phiA, psiA := ba.phi(tab), ba.psi(tab)
	for r, rp := range p.Ramps {
		bb := s.basisAt(rp.Final)
		phiB, psiB := bb.phi(tab), bb.psi(tab)
		dz := (phiB - phiA) / rp.Rate
		if zeta+dz >= 1 {
			target := phiA + rp.Rate*(1-zeta)
			te, be := s.invert(tab, target, prev, rp.Final)
			vz += (be.psi(tab) - psiA) / rp.Rate
			st := s.Cond.state(te)
			var k float64
			if i < len(s.Compounds) {
				k = math.Exp(s.Compounds[i].LnK(te)) / s.Cond.beta
			}
			return s.peak(i, t+(te-prev)/rp.Rate, te, k, st.tm, vz), 2*r + 1
		}
		zeta += dz
		vz += (psiB - psiA) / rp.Rate
		t += (rp.Final - prev) / rp.Rate
		if pk, ok := holdStep(rp.Final, rp.Hold); ok {
			return pk, 2*r + 2
		}
		prev, phiA, psiA = rp.Final, phiB, psiB
	}
	pk, _ := holdStep(prev, math.Inf(1))
	return pk, -1
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
