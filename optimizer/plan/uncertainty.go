package plan

import (
	"math"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// This file is the small piece of uncertainty propagation the planner needs:
// each compound's 2×2 covariance of (ΔH, ΔS), retention-time sensitivities
// by finite differences and the first-order standard deviation of a pair's
// resolution. It stands in until the optimizer's robust margin offers the
// same propagation; then the planner should use that one.

// cov2 is a symmetric 2×2 covariance of (ΔH J/mol, ΔS J/(mol·K)).
type cov2 struct{ hh, hs, ss float64 }

func (c cov2) quad(g [2]float64) float64 {
	return g[0]*g[0]*c.hh + 2*g[0]*g[1]*c.hs + g[1]*g[1]*c.ss
}

func (c cov2) mul(g [2]float64) [2]float64 {
	return [2]float64{c.hh*g[0] + c.hs*g[1], c.hs*g[0] + c.ss*g[1]}
}

// update is the covariance after one measurement with sensitivity j and
// variance s2 (Sherman–Morrison: Σ' = Σ − Σj jᵀΣ / (s2 + jᵀΣj)).
func (c cov2) update(j [2]float64, s2 float64) cov2 {
	sj := c.mul(j)
	den := s2 + j[0]*sj[0] + j[1]*sj[1]
	if !(den > 0) {
		return c
	}
	return cov2{c.hh - sj[0]*sj[0]/den, c.hs - sj[0]*sj[1]/den, c.ss - sj[1]*sj[1]/den}
}

func (c cov2) inverse() (cov2, bool) {
	det := c.hh*c.ss - c.hs*c.hs
	if !(det > 0) || math.IsInf(det, 0) {
		return cov2{}, false
	}
	return cov2{c.ss / det, -c.hs / det, c.hh / det}, true
}

func (c cov2) add(d cov2) cov2 { return cov2{c.hh + d.hh, c.hs + d.hs, c.ss + d.ss} }

func (c cov2) scale(f float64) cov2 { return cov2{c.hh * f, c.hs * f, c.ss * f} }

func outer(j [2]float64) cov2 { return cov2{j[0] * j[0], j[0] * j[1], j[1] * j[1]} }

// Finite-difference steps of ΔH (J/mol) and ΔS (J/(mol·K)), forward
// differences: small against the scale on which a retention time bends (RT,
// about 3 kJ/mol, and R, about 8 J/(mol·K)), so that the second-order error
// stays near 0.02 %, and still large against the tables' interpolation
// error (MODEL.md §4); the robust margin (model/robust) uses the same. The
// runs leave ΔH and ΔS correlated to 0.999 and more, and the variance along
// that direction is large: a gradient 0.3 % off (the error of steps of
// 20 J/mol and 0.05 J/(mol·K)) leaked it into the Rs SD and doubled it.
const (
	stepDH = 1.0
	stepDS = 0.001
)

// sensSystem is a System with three copies of every compound (nominal, ΔH
// stepped, ΔS stepped): one Simulate gives every retention time and width
// and their derivatives with respect to each compound's ΔH and ΔS.
type sensSystem struct {
	sys *model.System
	n   int
	res model.Result
	// by compound: time, sigma, their derivatives, eluted
	t, sigma []float64
	dt, ds   [][2]float64
	eluted   []bool
	end      float64
}

func newSensSystem(cond *model.Conditions, comps []model.Compound, oven model.Oven) (*sensSystem, error) {
	n := len(comps)
	all := make([]model.Compound, 0, 3*n)
	for _, c := range comps {
		c.Target = false
		all = append(all, c)
	}
	for _, c := range comps {
		c.Target = false
		c.DH += stepDH
		all = append(all, c)
	}
	for _, c := range comps {
		c.Target = false
		c.DS += stepDS
		all = append(all, c)
	}
	sys, err := model.NewSystem(cond, all, oven)
	if err != nil {
		return nil, err
	}
	return &sensSystem{sys: sys, n: n,
		t: make([]float64, n), sigma: make([]float64, n),
		dt: make([][2]float64, n), ds: make([][2]float64, n), eluted: make([]bool, n)}, nil
}

// eval simulates p (untrimmed: a compound counts as eluted when it leaves
// the column before the program ends) and fills the sensitivities.
func (s *sensSystem) eval(p model.Program) error {
	if err := s.sys.Simulate(p, &s.res); err != nil {
		return err
	}
	s.end = p.RunTime()
	tt := make([]float64, 3*s.n)
	sg := make([]float64, 3*s.n)
	for _, pk := range s.res.Peaks {
		tt[pk.Compound], sg[pk.Compound] = pk.RetentionTime, pk.Sigma
	}
	for i := 0; i < s.n; i++ {
		s.t[i], s.sigma[i] = tt[i], sg[i]
		s.dt[i] = [2]float64{(tt[s.n+i] - tt[i]) / stepDH, (tt[2*s.n+i] - tt[i]) / stepDS}
		s.ds[i] = [2]float64{(sg[s.n+i] - sg[i]) / stepDH, (sg[2*s.n+i] - sg[i]) / stepDS}
		s.eluted[i] = tt[i] <= s.end && !math.IsInf(tt[i], 0)
		if !s.eluted[i] {
			s.dt[i], s.ds[i] = [2]float64{}, [2]float64{}
		}
	}
	return nil
}

// resolution of compounds a and b (any two, in either order) and its
// gradients with respect to (ΔH, ΔS) of a and of b:
// Rs = |tb − ta| / (2 (σa + σb)) (MODEL.md §6).
func (s *sensSystem) resolution(a, b int) (rs float64, ga, gb [2]float64) {
	if s.t[b] < s.t[a] {
		rs, gb, ga = s.resolution(b, a)
		return rs, ga, gb
	}
	sum := s.sigma[a] + s.sigma[b]
	rs = (s.t[b] - s.t[a]) / (2 * sum)
	for k := 0; k < 2; k++ {
		ga[k] = -s.dt[a][k]/(2*sum) - rs*s.ds[a][k]/sum
		gb[k] = s.dt[b][k]/(2*sum) - rs*s.ds[b][k]/sum
	}
	return rs, ga, gb
}

// rsSD is the first-order standard deviation of the resolution of a and b
// for covariances ca and cb (the two compounds' parameters independent).
func rsSD(ga, gb [2]float64, ca, cb cov2) float64 {
	return math.Sqrt(math.Max(0, ca.quad(ga)+cb.quad(gb)))
}

// formulaSDkJ is the SD of ΔH of a formula estimate (kJ/mol), rounded for
// messages.
var formulaSDkJ = math.Round(math.Sqrt(formulaCov().hh) / 1000)

// formulaCov is the covariance of a formula estimate
// (methodfile.FormulaEstimate): FormulaCarbonSD carbon numbers along the
// homologous line (4.9 kJ/mol and 6.0 J/(mol·K) per carbon, fully
// correlated) plus the usual prior (2 kJ/mol, 4 J/(mol·K)).
func formulaCov() cov2 {
	v := [2]float64{-4900 * methodfile.FormulaCarbonSD, -6.0 * methodfile.FormulaCarbonSD}
	return outer(v).add(cov2{2000 * 2000, 0, 16})
}
