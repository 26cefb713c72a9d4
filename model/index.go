package model

import (
	"errors"
	"math"
)

// KovatsIndex is the isothermal retention index (Kováts 1958):
// I = 100 [n + (ln kx − ln kn)/(ln k(n+1) − ln kn)], for a compound with
// retention factor kx bracketed by n-alkanes of n and n+1 carbons with
// retention factors kn and kn1.
func KovatsIndex(kx, kn, kn1 float64, n int) float64 {
	return 100 * (float64(n) + (math.Log(kx)-math.Log(kn))/(math.Log(kn1)-math.Log(kn)))
}

// ProgrammedIndex is the temperature-programmed retention index (van den
// Dool & Kratz 1963): I = 100 [n + (tx − tn)/(t(n+1) − tn)].
func ProgrammedIndex(tx, tn, tn1 float64, n int) float64 {
	return 100 * (float64(n) + (tx-tn)/(tn1-tn))
}

// LadderPoint is one n-alkane of an index ladder: its carbon number and its
// retention (a retention factor for Kováts, a time for van den Dool–Kratz).
type LadderPoint struct {
	Carbons   int
	Retention float64
}

// IndexFromLadder computes the index of retention x against a ladder sorted
// by carbon number, with kovats selecting the isothermal (logarithmic) form.
// The alkanes used are the consecutive pair that brackets x; outside the
// ladder it is an error. An alkane of the ladder gets exactly 100·n.
func IndexFromLadder(x float64, ladder []LadderPoint, kovats bool) (float64, error) {
	if len(ladder) < 2 {
		return 0, errors.New("model: a retention index needs at least two ladder alkanes")
	}
	for _, p := range ladder {
		if p.Retention == x {
			return float64(100 * p.Carbons), nil
		}
	}
	for i := 0; i+1 < len(ladder); i++ {
		a, b := ladder[i], ladder[i+1]
		if x > a.Retention && x < b.Retention {
			if b.Carbons != a.Carbons+1 {
				// a gap in the ladder: interpolate over it, scaling by the gap
				f := (x - a.Retention) / (b.Retention - a.Retention)
				if kovats {
					f = (math.Log(x) - math.Log(a.Retention)) / (math.Log(b.Retention) - math.Log(a.Retention))
				}
				return 100 * (float64(a.Carbons) + f*float64(b.Carbons-a.Carbons)), nil
			}
			if kovats {
				return KovatsIndex(x, a.Retention, b.Retention, a.Carbons), nil
			}
			return ProgrammedIndex(x, a.Retention, b.Retention, a.Carbons), nil
		}
	}
	return 0, errors.New("model: not bracketed by the ladder alkanes")
}
