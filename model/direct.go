package model

import "math"

// RetentionTime solves ζ(tR) = 1 for one compound under program p by direct
// integration (6-point Gauss–Legendre over cells of at most 1 K on ramps,
// exact on holds), without the tables of a System: the right tool when the
// compound's parameters change at every call, as in calibration. It returns
// tR (s) and the elution temperature (K); after the program the oven stays
// at the final temperature. cp nil is an unretained solute (the holdup time).
func (c *Conditions) RetentionTime(cp *Compound, p Program) (tr, te float64) {
	g := func(t float64) float64 {
		st := c.state(t)
		k := 0.0
		if cp != nil {
			k = math.Exp(cp.LnK(t)) / c.beta
		}
		return 1 / (st.tm * (1 + k))
	}
	zeta, now := 0.0, 0.0
	hold := func(t, h float64) (float64, bool) {
		gv := g(t)
		if !(gv > 0) {
			return math.Inf(1), true
		}
		if zeta+gv*h >= 1 {
			return now + (1-zeta)/gv, true
		}
		zeta += gv * h
		now += h
		return 0, false
	}
	cell := func(a, b float64) float64 {
		mid, half := (a+b)/2, (b-a)/2
		s := 0.0
		for i, x := range gl6x {
			s += gl6w[i] * g(mid+half*x)
		}
		return s * half
	}
	if r, ok := hold(p.Initial, p.InitialHold); ok {
		return r, p.Initial
	}
	prev := p.Initial
	for _, rp := range p.Ramps {
		n := int(math.Ceil(rp.Final - prev))
		if n < 1 {
			n = 1
		}
		step := (rp.Final - prev) / float64(n)
		for i := 0; i < n; i++ {
			a := prev + float64(i)*step
			b := a + step
			dz := cell(a, b) / rp.Rate
			if zeta+dz >= 1 {
				lo, hi := a, b
				for it := 0; it < 60 && hi-lo > 1e-10; it++ {
					m := (lo + hi) / 2
					if zeta+cell(a, m)/rp.Rate >= 1 {
						hi = m
					} else {
						lo = m
					}
				}
				t := (lo + hi) / 2
				return now + (t-prev)/rp.Rate, t
			}
			zeta += dz
		}
		now += (rp.Final - prev) / rp.Rate
		if r, ok := hold(rp.Final, rp.Hold); ok {
			return r, rp.Final
		}
		prev = rp.Final
	}
	r, _ := hold(prev, math.Inf(1))
	return r, prev
}
