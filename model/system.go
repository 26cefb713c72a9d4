package model

import (
	"errors"
	"fmt"
	"math"
)

// TableStep is the temperature spacing (K) of the program-independent
// tables of MODEL.md §4. Cubic Hermite interpolation with exact derivatives
// keeps the interpolation error of Φ below 1e-9 relative at this spacing for
// |ΔH| up to about 150 kJ/mol.
const TableStep = 0.5

// TableLow is the lowest temperature (K) the tables cover: −100 °C, below
// any cryogenic oven start.
const TableLow = 173.15

// Oven holds the cool-down and equilibration behaviour of the oven
// (MODEL.md §8, §12). Temperatures in K, times in s.
type Oven struct {
	Ambient       float64 // Ta
	CooldownTau   float64 // τ
	Equilibration float64
	// Coolant is Tc, the temperature of the coolant (liquid CO2 or
	// nitrogen cooling) the oven cools toward instead of Ta; zero means
	// the oven has none.
	Coolant float64
}

// DefaultOven is 25 °C ambient, τ = 2.0 min, 0.5 min equilibration: typical
// values from memory; every oven differs.
func DefaultOven() Oven {
	return Oven{Ambient: ZeroCelsius + 25, CooldownTau: 120, Equilibration: 30}
}

// Sink is the temperature the oven cools toward: the coolant's when it has
// one (MODEL.md §12), else ambient.
func (o Oven) Sink() float64 {
	if o.Coolant > 0 {
		return o.Coolant
	}
	return o.Ambient
}

// Cooldown is t_cool = τ ln((Tf − Ts)/(T0 − Ts)) in s, 0 if Tf ≤ T0
// (Newton cooling toward Ts, the ambient Ta or with a coolant its Tc;
// MODEL.md §8, §12). It is an error if T0 ≤ Ts.
func (o Oven) Cooldown(tf, t0 float64) (float64, error) {
	sink := o.Sink()
	if t0 <= sink {
		if o.Coolant > 0 {
			return 0, fmt.Errorf("model: initial temperature %.1f °C is not above the coolant's %.1f °C; the oven cannot cool to it",
				t0-ZeroCelsius, sink-ZeroCelsius)
		}
		return 0, fmt.Errorf("model: initial temperature %.1f °C is not above the oven's ambient %.1f °C; the oven cannot cool back to it without a coolant",
			t0-ZeroCelsius, sink-ZeroCelsius)
	}
	if tf <= t0 {
		return 0, nil
	}
	return o.CooldownTau * math.Log((tf-sink)/(t0-sink)), nil
}

// node is one tabulated temperature: Φ and its derivative g = 1/(tM(1+k)),
// Ψ = ∫ H g dT and its derivative q = H g.
type node struct{ phi, g, psi, q float64 }

// System is a column, carrier and compound list with the program-independent
// tables of MODEL.md §4 built once; Simulate then evaluates any program in
// O(compounds × segments) without allocating. A System is read-only after
// NewSystem and safe for concurrent use with one Result per goroutine.
type System struct {
	Cond      *Conditions
	Compounds []Compound
	Oven      Oven

	lo, hi float64
	n      int      // number of nodes
	tables [][]node // one per compound, then the unretained (k = 0) table last
	dm     []float64
}

// NewSystem checks its inputs and tabulates Φ and Ψ for every compound and
// for an unretained solute from TableLow (or the oven's coolant, if that is
// colder) up to the column maximum.
func NewSystem(cond *Conditions, comps []Compound, oven Oven) (*System, error) {
	if cond == nil {
		return nil, errors.New("model: no column conditions")
	}
	if len(comps) == 0 {
		return nil, errors.New("model: no compounds")
	}
	for i := range comps {
		if err := comps[i].Validate(); err != nil {
			return nil, err
		}
	}
	hi := cond.Column.MaxTemp
	if hi <= TableLow+TableStep {
		return nil, fmt.Errorf("model: column maximum temperature %.1f °C is below the model's range", hi-ZeroCelsius)
	}
	s := &System{Cond: cond, Compounds: comps, Oven: oven, lo: TableLow}
	if oven.Coolant > 0 && oven.Coolant < s.lo {
		s.lo = oven.Coolant // the tables reach down to the coolant (MODEL.md §12)
	}
	s.n = int(math.Ceil((hi-s.lo)/TableStep)) + 1
	s.hi = s.lo + float64(s.n-1)*TableStep
	nc := len(comps)
	s.tables = make([][]node, nc+1)
	flat := make([]node, (nc+1)*s.n)
	for i := range s.tables {
		s.tables[i] = flat[i*s.n : (i+1)*s.n]
	}
	gas := cond.Carrier.Gas
	s.dm = make([]float64, nc)
	for i := range comps {
		c := &comps[i]
		s.dm[i] = fullerCoefficient(c.molarMass(), c.volume(), gas.MolarMass(), gas.DiffusionVolume())
	}
	g := make([]float64, nc+1)
	q := make([]float64, nc+1)
	// nodes: exact integrands
	for j := 0; j < s.n; j++ {
		t := s.temp(j)
		s.integrands(t, g, q)
		for i := range s.tables {
			s.tables[i][j].g = g[i]
			s.tables[i][j].q = q[i]
		}
	}
	// cells: 6-point Gauss–Legendre (exact for degree 11)
	half := TableStep / 2
	for j := 0; j+1 < s.n; j++ {
		mid := s.temp(j) + half
		for i := range s.tables {
			s.tables[i][j+1].phi = s.tables[i][j].phi
			s.tables[i][j+1].psi = s.tables[i][j].psi
		}
		for k, x := range gl6x {
			s.integrands(mid+half*x, g, q)
			w := gl6w[k] * half
			for i := range s.tables {
				s.tables[i][j+1].phi += w * g[i]
				s.tables[i][j+1].psi += w * q[i]
			}
		}
	}
	for i := range s.tables {
		for j := range s.tables[i] {
			nd := s.tables[i][j]
			if math.IsNaN(nd.phi+nd.psi) || math.IsInf(nd.phi+nd.psi, 0) {
				return nil, fmt.Errorf("model: retention of %s cannot be computed at %.1f °C (check its parameters)", s.name(i), s.temp(j)-ZeroCelsius)
			}
		}
	}
	return s, nil
}

func (s *System) name(i int) string {
	if i == len(s.Compounds) {
		return "an unretained solute"
	}
	return s.Compounds[i].Name
}

// Range is the temperature range (K) the tables cover.
func (s *System) Range() (lo, hi float64) { return s.lo, s.hi }

func (s *System) temp(j int) float64 { return s.lo + float64(j)*TableStep }

var (
	gl6x = [6]float64{-0.9324695142031521, -0.6612093864662645, -0.2386191860831969, 0.2386191860831969, 0.6612093864662645, 0.9324695142031521}
	gl6w = [6]float64{0.1713244923791704, 0.3607615730481386, 0.4679139345726910, 0.4679139345726910, 0.3607615730481386, 0.1713244923791704}
)

// integrands fills g[i] = 1/(tM (1+k_i)) and q[i] = H_i g[i] at temperature t
// for every compound and, last, for k = 0.
func (s *System) integrands(t float64, g, q []float64) {
	st := s.Cond.state(t)
	t175 := math.Pow(t, 1.75)
	for i := range s.Compounds {
		k := math.Exp(s.Compounds[i].LnK(t)) / s.Cond.beta
		gi := 1 / (st.tm * (1 + k))
		g[i] = gi
		q[i] = s.Cond.plateHeight(st, k, s.dm[i]*t175) * gi
	}
	n := len(s.Compounds)
	g[n] = 1 / st.tm
	q[n] = 0
}

// exact is g, q and k of table i (a compound, or the unretained last) at t,
// from the closed form, given the shared gas state st and t^1.75.
func (s *System) exact(i int, t float64, st gasState, t175 float64) (g, q, k float64) {
	if i == len(s.Compounds) {
		return 1 / st.tm, 0, 0
	}
	k = math.Exp(s.Compounds[i].LnK(t)) / s.Cond.beta
	g = 1 / (st.tm * (1 + k))
	q = s.Cond.plateHeight(st, k, s.dm[i]*t175) * g
	return g, q, k
}

// basis is the cubic Hermite basis at a temperature on the uniform grid.
type basis struct {
	j                  int
	h00, h10, h01, h11 float64
}

func (s *System) basisAt(t float64) basis {
	x := (t - s.lo) / TableStep
	j := int(x)
	if j > s.n-2 {
		j = s.n - 2
	}
	if j < 0 {
		j = 0
	}
	u := x - float64(j)
	return hermite(j, u)
}

func hermite(j int, u float64) basis {
	v := 1 - u
	return basis{
		j:   j,
		h00: (1 + 2*u) * v * v,
		h10: u * v * v * TableStep,
		h01: u * u * (3 - 2*u),
		h11: u * u * (u - 1) * TableStep,
	}
}

func (b basis) phi(tb []node) float64 {
	a, c := &tb[b.j], &tb[b.j+1]
	return b.h00*a.phi + b.h10*a.g + b.h01*c.phi + b.h11*c.g
}

func (b basis) psi(tb []node) float64 {
	a, c := &tb[b.j], &tb[b.j+1]
	return b.h00*a.psi + b.h10*a.q + b.h01*c.psi + b.h11*c.q
}

// invert finds T in [ta, tbT] with Φ(T) = target on table tab, where Φ(ta) ≤
// target ≤ Φ(tbT) and ja, jb are the cells of ta and tbT; it returns T and
// the Hermite basis there.
func (s *System) invert(tab []node, target, ta, tbT float64, ja, jb int) (float64, basis) {
	// largest node j in [ja, jb] with phi_j <= target
	lo, hi := ja, jb
	for lo < hi {
		m := (lo + hi + 1) / 2
		if tab[m].phi <= target {
			lo = m
		} else {
			hi = m - 1
		}
	}
	j := lo
	a, c := &tab[j], &tab[j+1]
	// Newton on the cubic in u ∈ [0,1] from the linear guess; Φ is smooth and
	// increasing, so a few steps reach 1e-13 of the cell.
	u := 0.5
	if d := c.phi - a.phi; d > 0 {
		u = clamp01((target - a.phi) / d)
	}
	for it := 0; it < 12; it++ {
		v := 1 - u
		f := (1+2*u)*v*v*a.phi + u*v*v*TableStep*a.g + u*u*(3-2*u)*c.phi + u*u*(u-1)*TableStep*c.g - target
		// dΦ/du = 6uv (Φ1 − Φ0) + h [v(1 − 3u) g0 + u(3u − 2) g1]
		d := 6*u*v*(c.phi-a.phi) + TableStep*(v*(1-3*u)*a.g+u*(3*u-2)*c.g)
		if !(d > 0) {
			break
		}
		next := clamp01(u - f/d)
		if diff := next - u; diff < 1e-13 && diff > -1e-13 {
			u = next
			break
		}
		u = next
	}
	t := s.temp(j) + u*TableStep
	if t < ta || t > tbT {
		if t < ta {
			t = ta
		} else {
			t = tbT
		}
		return t, s.basisAt(t)
	}
	return t, hermite(j, u)
}

// clamp01 limits x to [0, 1] (plain comparisons: math.Min and math.Max
// handle NaN and signed zeros and are slow on this path).
func clamp01(x float64) float64 {
	if x < 0 {
		return 0
	}
	if x > 1 {
		return 1
	}
	return x
}

// holdupAt is tM at temperature t from the unretained table: Φ0' = 1/tM,
// by the derivative of its Hermite interpolant (tM is a smooth power law of
// T, so this is exact to about 1e-10 relative).
func (s *System) holdupAt(b basis, t float64) float64 {
	tab := s.tables[len(s.Compounds)]
	a, c := &tab[b.j], &tab[b.j+1]
	u := (t-s.lo)/TableStep - float64(b.j)
	v := 1 - u
	d := 6*u*v*(c.phi-a.phi) + TableStep*(v*(1-3*u)*a.g+u*(3*u-2)*c.g)
	return TableStep / d
}
