package model

import (
	"fmt"
	"math"
)

// Gas is a carrier gas.
type Gas int

// The carrier gases rampwise knows.
const (
	Helium Gas = iota
	Hydrogen
	Nitrogen
)

// gasData holds the viscosity power law of Blumberg's parameterisation of
// handbook data, η(T) = η_st (T/273.15 K)^ξ, the molar mass and the Fuller,
// Ensley & Giddings (1969) diffusion volume (MODEL.md §2 table).
type gasData struct {
	name         string
	viscosity    float64 // η_st at 273.15 K, Pa·s
	exponent     float64 // ξ
	molarMass    float64 // g/mol
	diffusionVol float64 // Fuller diffusion volume
	flammable    bool
}

var gases = [...]gasData{
	Helium:   {"helium", 18.63e-6, 0.6958, 4.0026, 2.67, false},
	Hydrogen: {"hydrogen", 8.382e-6, 0.6892, 2.016, 6.12, true},
	Nitrogen: {"nitrogen", 16.62e-6, 0.7665, 28.013, 18.5, false},
}

// Gases lists every carrier gas, in the order a choice cycles.
var Gases = []Gas{Helium, Hydrogen, Nitrogen}

// ParseGas reads a gas name as written in a method file (exactly, lower case).
func ParseGas(s string) (Gas, error) {
	for i, g := range gases {
		if s == g.name {
			return Gas(i), nil
		}
	}
	return 0, fmt.Errorf("%q is not one of helium, hydrogen, nitrogen", s)
}

func (g Gas) valid() bool { return g >= 0 && int(g) < len(gases) }

// String is the gas name as written in a method file.
func (g Gas) String() string {
	if !g.valid() {
		return fmt.Sprintf("Gas(%d)", int(g))
	}
	return gases[g].name
}

// Viscosity is the dynamic viscosity in Pa·s at temperature t (K):
// η(T) = η_st · (T / 273.15 K)^ξ (MODEL.md §2).
func (g Gas) Viscosity(t float64) float64 {
	d := gases[g]
	return d.viscosity * math.Pow(t/273.15, d.exponent)
}

// MolarMass is the gas's molar mass in g/mol.
func (g Gas) MolarMass() float64 { return gases[g].molarMass }

// DiffusionVolume is the gas's Fuller diffusion volume.
func (g Gas) DiffusionVolume() float64 { return gases[g].diffusionVol }

// Flammable reports whether the gas is flammable (hydrogen).
func (g Gas) Flammable() bool { return gases[g].flammable }

// HydrogenCaution is the safety note shown wherever hydrogen carrier is chosen.
const HydrogenCaution = "Hydrogen carrier gas is flammable: leak-check every fitting, fit a hydrogen sensor in the oven, " +
	"follow the instrument maker's guidance for hydrogen and your local codes; secure pressurised cylinders."

// CryogenCaution is the safety note shown wherever a method uses an oven
// coolant (MODEL.md §12).
const CryogenCaution = "Cryogenic coolant (liquid CO2 or liquid nitrogen): the liquid and cold lines cause cold burns, so wear insulated gloves and eye protection; " +
	"the boiled-off gas displaces oxygen and can asphyxiate in a closed or poorly ventilated room, so ventilate and fit an oxygen monitor; " +
	"secure the dewar or cylinder, and follow the instrument maker's guidance and your local codes."
