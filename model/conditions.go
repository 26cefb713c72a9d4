package model

import "math"

// Conditions is a column with its carrier: everything that fixes the holdup
// time and the gas-phase terms of the plate height at each temperature.
type Conditions struct {
	Column  Column
	Carrier Carrier

	flow     Flow
	po, pamb float64
	beta     float64
	flowCoef float64 // constant flow: pi² − po² = flowCoef · η(T) · T
	pi2Fixed float64 // constant pressure: pi²
	tmCoef   float64 // tM = tmCoef · η (pi³ − po³) / (pi² − po²)²
	upCoef   float64 // up = upCoef · (pi² − po²) / η
	plate    plateTerms
}

// plateTerms are the constants of the one plate-height formula of every
// kind (see plateHeight).
type plateTerms struct {
	longitudinal float64 // 2γ (open tube: 2)
	m0, m1, m2   float64 // mobile-phase term (m0 + m1 k + m2 k²)/(1+k)², m²
	eddy         float64 // 2λ dp (open tube: 0), m
	stationary   float64 // 2 df² / (3 D_s), s
	phi          float64
}

// NewConditions checks the column and carrier and prepares the constants.
func NewConditions(col Column, car Carrier) (*Conditions, error) {
	if err := col.Validate(); err != nil {
		return nil, err
	}
	if err := car.Validate(); err != nil {
		return nil, err
	}
	c := &Conditions{Column: col, Carrier: car}
	c.flow = col.Flow()
	c.po = car.OutletPressure()
	c.pamb = car.AmbientPressure()
	c.beta = col.PhaseRatio()
	L, B0, eps := col.Length, c.flow.Permeability, c.flow.Porosity
	c.flowCoef = 2 * L * FlowRefPressure * car.Flow / (c.flow.Area * B0 * FlowRefTemp)
	c.tmCoef = 4 * eps * L * L / (3 * B0)
	c.upCoef = B0 / (2 * eps * L)
	pi := c.pamb + car.InletGauge
	c.pi2Fixed = pi * pi
	c.plate = col.plateTerms()
	return c, nil
}

// plateTerms writes each kind's plate height in the one form of plateHeight.
// Open tube (Golay, MODEL.md §5): γ = 1, mobile term r² (1 + 6k + 11k²) /
// (24 (1+k)²), no eddy term. Packed bed (van Deemter, §10): γ, ω dp² (the
// same for every k, so m0 = ω dp², m1 = 2 ω dp², m2 = ω dp²) and 2 λ dp.
func (c Column) plateTerms() plateTerms {
	df := c.film()
	t := plateTerms{stationary: 2 * df * df / (3 * c.ds()), phi: c.phi()}
	if c.Kind == Packed {
		dp2 := c.Particle * c.Particle
		om := orDefault(c.MobileFactor, DefaultMobileFactor)
		t.longitudinal = 2 * orDefault(c.ObstructionFactor, DefaultObstructionFactor)
		t.m0, t.m1, t.m2 = om*dp2, 2*om*dp2, om*dp2
		t.eddy = 2 * orDefault(c.EddyFactor, DefaultEddyFactor) * c.Particle
		return t
	}
	r := c.ChannelDiameter() / 2
	t.longitudinal = 2
	t.m0, t.m1, t.m2 = r*r/24, 6*r*r/24, 11*r*r/24
	return t
}

// Flow is the column's flow description used by every flow formula.
func (c *Conditions) Flow() Flow { return c.flow }

// PhaseRatio is β of the column.
func (c *Conditions) PhaseRatio() float64 { return c.beta }

// inletSquared is pi² at temperature t (K) given the viscosity eta. Constant
// flow: pi² = po² + 2 η L pn T Fn / (A B0 Tn) (Darcy flow of a compressible
// ideal gas, MODEL.md §10; for an open tube, A B0 = π dg⁴/128 and this is
// the Hagen–Poiseuille form of §2).
func (c *Conditions) inletSquared(t, eta float64) float64 {
	if c.Carrier.Mode == ConstantPressure {
		return c.pi2Fixed
	}
	return c.po*c.po + c.flowCoef*eta*t
}

// InletPressure is the absolute inlet pressure pi (Pa) at oven temperature t (K).
func (c *Conditions) InletPressure(t float64) float64 {
	return math.Sqrt(c.inletSquared(t, c.Carrier.Gas.Viscosity(t)))
}

// InletGauge is the inlet gauge pressure (Pa) at oven temperature t (K).
func (c *Conditions) InletGauge(t float64) float64 { return c.InletPressure(t) - c.pamb }

// gasState is what the flow does at one temperature.
type gasState struct {
	eta float64 // viscosity, Pa·s
	tm  float64 // holdup time, s
	up  float64 // invariant u·p, Pa·m/s
	f1  float64 // Giddings' compression correction
}

// state is the flow at temperature t (K), MODEL.md §10 (§2 for an open
// tube, where B0 = dg²/32 and ε = 1) and §5:
//
//	tM = 4 η ε L² (pi³ − po³) / (3 B0 (pi² − po²)²)
//	up = B0 (pi² − po²) / (2 η ε L)
//	f1 = 9 (pi⁴ − po⁴)(pi² − po²) / (8 (pi³ − po³)²)
func (c *Conditions) state(t float64) gasState {
	eta := c.Carrier.Gas.Viscosity(t)
	pi2 := c.inletSquared(t, eta)
	pi := math.Sqrt(pi2)
	po := c.po
	po2 := po * po
	d2 := pi2 - po2
	c3 := pi2*pi - po2*po
	return gasState{
		eta: eta,
		tm:  c.tmCoef * eta * c3 / (d2 * d2),
		up:  c.upCoef * d2 / eta,
		f1:  9 * (pi2 + po2) * d2 * d2 / (8 * c3 * c3),
	}
}

// HoldupTimeAt is the isothermal holdup (dead) time tM in seconds at oven
// temperature t (K).
func (c *Conditions) HoldupTimeAt(t float64) float64 { return c.state(t).tm }

// AverageVelocity is ū = L / tM in m/s at temperature t (K).
func (c *Conditions) AverageVelocity(t float64) float64 { return c.Column.Length / c.HoldupTimeAt(t) }

// plateHeight is the apparent plate height of every kind in one form
// (MODEL.md §5 for open tubes, §10 for packed beds):
//
//	H = φ [ f1 ( 2γ Dp/up + (m0 + m1 k + m2 k²) up / ((1+k)² Dp) + 2λ dp )
//	        + 2 k df² ū / (3 (1+k)² Ds) ]
//
// with Dp = D_m(T, 1 atm)·101325 Pa and ū = L / tM. For an open tube γ = 1,
// (m0, m1, m2) = r² (1, 6, 11)/24 with r = dg/2 and no eddy term: Golay's
// equation with Giddings' correction. For a packed bed the mobile term is
// ω dp² and the eddy term 2λ dp takes f1 like the other terms that are the
// same all along the column; only the stationary term goes with ū.
func (c *Conditions) plateHeight(s gasState, k, dm float64) float64 {
	dp := dm * StandardAtmosphere
	pt := &c.plate
	k1 := 1 + k
	inv := 1 / (k1 * k1)
	gas := s.f1 * (pt.longitudinal*dp/s.up + (pt.m0+k*(pt.m1+k*pt.m2))*inv*s.up/dp + pt.eddy)
	u := c.Column.Length / s.tm
	return pt.phi * (gas + pt.stationary*k*inv*u)
}

// MinPlateHeight is the smallest plate height the column's gas terms allow
// for a strongly retained solute (k → ∞), with f1 = 1 and no stationary
// term: E + 2 sqrt(2γ m2), i.e. 1.915 r for an open tube (Golay) and
// 2λ dp + 2 sqrt(2γω) dp for a packed bed (van Deemter). It bounds the plate
// number a column can give.
func (c *Conditions) MinPlateHeight() float64 {
	pt := &c.plate
	return pt.phi * (pt.eddy + 2*math.Sqrt(pt.longitudinal*pt.m2))
}

// PlateHeight is the apparent plate height H (m) of a solute with retention
// factor k and gas diffusion coefficient dm (m²/s at 1 atm) at temperature t.
func (c *Conditions) PlateHeight(t, k, dm float64) float64 {
	return c.plateHeight(c.state(t), k, dm)
}

// DiffusionCoefficient is the compound's D_m (m²/s, 1 atm) in this carrier at t.
func (c *Conditions) DiffusionCoefficient(cp *Compound, t float64) float64 {
	g := c.Carrier.Gas
	return DiffusionCoefficient(t, cp.molarMass(), cp.volume(), g.MolarMass(), g.DiffusionVolume())
}

// RetentionFactor is k = K(T)/β of the compound at temperature t (K).
func (c *Conditions) RetentionFactor(cp *Compound, t float64) float64 {
	return math.Exp(cp.LnK(t)) / c.beta
}

// JamesMartin is j = (3/2)(P² − 1)/(P³ − 1), P = pi/po, at temperature t; it
// is 0 for a vacuum outlet (the limit P → ∞).
func (c *Conditions) JamesMartin(t float64) float64 {
	if c.po == 0 {
		return 0
	}
	p := c.InletPressure(t) / c.po
	return 1.5 * (p*p - 1) / (p*p*p - 1)
}

// OverPressure is the lowest temperature in [lo, hi] (K) at which the inlet
// gauge pressure exceeds limit (Pa), and whether it does anywhere there. At
// constant flow the pressure rises with temperature (viscosity), so the
// answer is found by bisection; at constant pressure it is all or nothing.
func (c *Conditions) OverPressure(limit, lo, hi float64) (float64, bool) {
	if c.InletGauge(hi) <= limit && c.InletGauge(lo) <= limit {
		return 0, false
	}
	if c.InletGauge(lo) > limit {
		return lo, true
	}
	for i := 0; i < 60; i++ {
		mid := (lo + hi) / 2
		if c.InletGauge(mid) > limit {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi, true
}
