package model

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// The brute-force reference of MODEL.md §9: adaptive Gauss–Legendre
// quadrature in time (gonum's integrate/quad at two orders, split until they
// agree to 1e-10 relative) and bisection for tR. It shares only the
// point formulas (holdup time, k, H at one temperature) with the fast path,
// and none of its tables.

type refSegment struct{ t0, t1, temp0, rate float64 }

func refSegments(p Program) []refSegment {
	var segs []refSegment
	t := 0.0
	if p.InitialHold > 0 {
		segs = append(segs, refSegment{0, p.InitialHold, p.Initial, 0})
		t = p.InitialHold
	}
	prev := p.Initial
	for _, r := range p.Ramps {
		d := (r.Final - prev) / r.Rate
		segs = append(segs, refSegment{t, t + d, prev, r.Rate})
		t += d
		if r.Hold > 0 {
			segs = append(segs, refSegment{t, t + r.Hold, r.Final, 0})
			t += r.Hold
		}
		prev = r.Final
	}
	// endless final hold
	segs = append(segs, refSegment{t, math.Inf(1), prev, 0})
	return segs
}

func adaptive(f func(float64) float64, a, b float64, depth int) float64 {
	lo := quad.Fixed(f, a, b, 24, nil, 0)
	hi := quad.Fixed(f, a, b, 48, nil, 0)
	if depth > 30 || math.IsNaN(hi) || math.IsInf(hi, 0) || math.Abs(hi-lo) <= 1e-10*math.Abs(hi) {
		return hi
	}
	m := (a + b) / 2
	return adaptive(f, a, m, depth+1) + adaptive(f, m, b, depth+1)
}

// refIntegral integrates f over [a, b] in chunks of at most 30 s; over a
// hold (constant integrand) it is the product.
func refIntegral(f func(float64) float64, a, b float64, hold bool) float64 {
	if hold {
		return f(a) * (b - a)
	}
	sum := 0.0
	for a < b {
		e := math.Min(b, a+30)
		sum += adaptive(f, a, e, 0)
		a = e
	}
	return sum
}

type refPeak struct{ tr, sigma, te, k float64 }

// referenceElute solves ζ(tR) = 1 for compound c (nil: unretained) by
// bisection on the quadrature, then integrates the variance.
func referenceElute(cond *Conditions, c *Compound, p Program) refPeak {
	dm := func(t float64) float64 { return 0 }
	kf := func(t float64) float64 { return 0 }
	if c != nil {
		dm = func(t float64) float64 { return cond.DiffusionCoefficient(c, t) }
		kf = func(t float64) float64 { return cond.RetentionFactor(c, t) }
	}
	g := func(temp float64) float64 { return 1 / (cond.HoldupTimeAt(temp) * (1 + kf(temp))) }
	segs := refSegments(p)
	zeta := 0.0
	var end float64
	for _, sg := range segs {
		sg := sg
		f := func(t float64) float64 { return g(sg.temp0 + sg.rate*(t-sg.t0)) }
		if math.IsInf(sg.t1, 1) {
			end = sg.t0 + (1-zeta)/g(sg.temp0)
			break
		}
		dz := refIntegral(f, sg.t0, sg.t1, sg.rate == 0)
		if zeta+dz >= 1 {
			lo, hi := sg.t0, sg.t1
			for it := 0; it < 200 && hi-lo > 1e-9; it++ {
				m := (lo + hi) / 2
				if zeta+refIntegral(f, sg.t0, m, sg.rate == 0) >= 1 {
					hi = m
				} else {
					lo = m
				}
			}
			end = (lo + hi) / 2
			break
		}
		zeta += dz
	}
	tempAt := p.TempAt
	hg := func(t float64) float64 {
		temp := tempAt(t)
		k := kf(temp)
		return cond.PlateHeight(temp, k, dm(temp)) * g(temp)
	}
	vz := 0.0
	for _, sg := range segs {
		if c == nil {
			break
		}
		a, b := sg.t0, math.Min(sg.t1, end)
		if b > a {
			vz += refIntegral(hg, a, b, sg.rate == 0)
		}
		if sg.t1 >= end {
			break
		}
	}
	te := tempAt(end)
	k := kf(te)
	speed := cond.HoldupTimeAt(te) * (1 + k)
	s0 := cond.Carrier.InitialBand
	return refPeak{tr: end, sigma: math.Sqrt(speed*speed*vz/cond.Column.Length + s0*s0), te: te, k: k}
}
