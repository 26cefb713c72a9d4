package model

import "math"

// Conditions is a column with its carrier: everything that fixes the holdup
// time and the gas-phase terms of the plate height at each temperature.
type Conditions struct {
	Column  Column
	Carrier Carrier

	dg, po, pamb float64
	beta         float64
	flowCoef     float64 // constant flow: pi² − po² = flowCoef · η(T) · T
	pi2Fixed     float64 // constant pressure: pi²
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
	c.dg = col.ChannelDiameter()
	c.po = car.OutletPressure()
	c.pamb = car.AmbientPressure()
	c.beta = col.PhaseRatio()
	d4 := c.dg * c.dg * c.dg * c.dg
	c.flowCoef = 256 * col.Length * FlowRefPressure * car.Flow / (math.Pi * d4 * FlowRefTemp)
	pi := c.pamb + car.InletGauge
	c.pi2Fixed = pi * pi
	return c, nil
}

// PhaseRatio is β of the column.
func (c *Conditions) PhaseRatio() float64 { return c.beta }

// inletSquared is pi² at temperature t (K) given the viscosity eta. Constant
// flow: pi² = po² + 256 η L pn T Fn / (π dg⁴ Tn) (Hagen–Poiseuille for a
// compressible ideal gas, MODEL.md §2, with the channel diameter dg).
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

// state is the flow at temperature t (K), MODEL.md §2 and §5:
//
//	tM = 128 η L² (pi³ − po³) / (3 dg² (pi² − po²)²)
//	up = dg² (pi² − po²) / (64 η L)
//	f1 = 9 (pi⁴ − po⁴)(pi² − po²) / (8 (pi³ − po³)²)
func (c *Conditions) state(t float64) gasState {
	eta := c.Carrier.Gas.Viscosity(t)
	pi2 := c.inletSquared(t, eta)
	pi := math.Sqrt(pi2)
	po := c.po
	po2 := po * po
	d2 := pi2 - po2
	c3 := pi2*pi - po2*po
	L := c.Column.Length
	dg2 := c.dg * c.dg
	return gasState{
		eta: eta,
		tm:  128 * eta * L * L * c3 / (3 * dg2 * d2 * d2),
		up:  dg2 * d2 / (64 * eta * L),
		f1:  9 * (pi2 + po2) * d2 * d2 / (8 * c3 * c3),
	}
}

// HoldupTimeAt is the isothermal holdup (dead) time tM in seconds at oven
// temperature t (K).
func (c *Conditions) HoldupTimeAt(t float64) float64 { return c.state(t).tm }

// AverageVelocity is ū = L / tM in m/s at temperature t (K).
func (c *Conditions) AverageVelocity(t float64) float64 { return c.Column.Length / c.HoldupTimeAt(t) }

// plateHeight is Golay's equation with Giddings' correction (MODEL.md §5):
//
//	H = φ [ f1 (2 Dp/up + r² (1+6k+11k²) up / (24 (1+k)² Dp)) + 2 k df² ū / (3 (1+k)² Ds) ]
//
// with Dp = D_m(T, 1 atm)·101325 Pa, r = dg/2 and ū = L / tM.
func (c *Conditions) plateHeight(s gasState, k, dm float64) float64 {
	dp := dm * StandardAtmosphere
	r := c.dg / 2
	k1 := 1 + k
	gas := s.f1 * (2*dp/s.up + r*r*(1+6*k+11*k*k)*s.up/(24*k1*k1*dp))
	df := c.Column.Film
	u := c.Column.Length / s.tm
	liquid := 2 * k * df * df * u / (3 * k1 * k1 * c.Column.ds())
	return c.Column.phi() * (gas + liquid)
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
