package model

import (
	"errors"
	"fmt"
	"math"
)

// Compound is one analyte on one stationary phase, with its thermodynamic
// retention parameters (MODEL.md §3). Energies are in J/mol, entropies and
// heat capacities in J/(mol·K), temperatures in K.
type Compound struct {
	Name    string
	DH      float64 // ΔH_ref, J/mol (negative for sorption)
	DS      float64 // ΔS_ref, J/(mol·K)
	DCp     float64 // ΔCp, J/(mol·K)
	RefTemp float64 // T_ref, K; zero means 373.15 K
	// MolarMass (g/mol) and DiffusionVolume of the solute for the Fuller
	// estimate; zero means n-heptane's values.
	MolarMass       float64
	DiffusionVolume float64
	Amount          float64 // relative peak area; zero means 1
	Target          bool
}

func (c *Compound) refTemp() float64 {
	if c.RefTemp == 0 {
		return DefaultRefTemp
	}
	return c.RefTemp
}

func (c *Compound) molarMass() float64 {
	if c.MolarMass == 0 {
		return DefaultSoluteMolarMass
	}
	return c.MolarMass
}

func (c *Compound) volume() float64 {
	if c.DiffusionVolume == 0 {
		return DefaultSoluteVolume
	}
	return c.DiffusionVolume
}

// AreaOrOne is the relative peak area, 1 when unset.
func (c *Compound) AreaOrOne() float64 {
	if c.Amount == 0 {
		return 1
	}
	return c.Amount
}

// LnK is the natural log of the distribution constant at temperature t (K):
//
//	ΔH(T) = ΔH_ref + ΔCp (T − T_ref)
//	ΔS(T) = ΔS_ref + ΔCp ln(T / T_ref)
//	ln K  = ΔS(T)/R − ΔH(T)/(R T)
func (c *Compound) LnK(t float64) float64 {
	tr := c.refTemp()
	dh := c.DH
	ds := c.DS
	if c.DCp != 0 {
		dh += c.DCp * (t - tr)
		ds += c.DCp * math.Log(t/tr)
	}
	return ds/GasConstant - dh/(GasConstant*t)
}

// Validate reports the first impossible retention parameter.
func (c *Compound) Validate() error {
	finite := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	switch {
	case c.Name == "":
		return errors.New("model: compound without a name")
	case !finite(c.DH) || !finite(c.DS) || !finite(c.DCp):
		return fmt.Errorf("model: %s: retention parameters must be finite", c.Name)
	case c.RefTemp < 0 || !finite(c.RefTemp):
		return fmt.Errorf("model: %s: reference temperature must be above absolute zero", c.Name)
	case c.MolarMass < 0 || c.DiffusionVolume < 0 || !finite(c.MolarMass) || !finite(c.DiffusionVolume):
		return fmt.Errorf("model: %s: molar mass and diffusion volume must be positive", c.Name)
	case c.Amount < 0 || !finite(c.Amount):
		return fmt.Errorf("model: %s: amount must not be negative", c.Name)
	}
	return nil
}
