package model

import "math"

// Signal is the detector signal of the result at time t (s): every eluted
// peak a Gaussian of area proportional to its compound's amount
// (AreaOrOne), summed; comps are the compounds the result refers to. Beyond
// 8 σ a peak adds nothing (e^−32 of its apex). The UI's chart and the
// exported figure both draw this.
func (r *Result) Signal(comps []Compound, t float64) float64 {
	y := 0.0
	for _, pk := range r.Peaks {
		if !pk.Eluted || pk.Sigma <= 0 {
			continue
		}
		z := (t - pk.RetentionTime) / pk.Sigma
		if z > -8 && z < 8 {
			y += comps[pk.Compound].AreaOrOne() / pk.Sigma * math.Exp(-0.5*z*z)
		}
	}
	return y
}
