package model

import (
	"fmt"
	"math"
	"strconv"
)

// Atomic diffusion volumes of Fuller, Ensley & Giddings (J. Phys. Chem. 73,
// 3679, 1969; Poling, Prausnitz & O'Connell, Table 11-1) and standard atomic
// weights (IUPAC, abridged) of the elements a formula may contain.
var elements = map[string]struct{ volume, mass float64 }{
	"C":  {15.9, 12.011},
	"H":  {2.31, 1.008},
	"O":  {6.11, 15.999},
	"N":  {4.54, 14.007},
	"F":  {14.7, 18.998},
	"Cl": {21.0, 35.45},
	"Br": {21.9, 79.904},
	"I":  {29.8, 126.904},
	"S":  {22.9, 32.06},
}

// ringVolume is the Fuller increment per aromatic or heterocyclic ring.
const ringVolume = -18.3

// Default solute properties when a compound has no formula: n-heptane
// (MODEL.md §5).
const (
	DefaultSoluteMolarMass = 100.2
	DefaultSoluteVolume    = 148.3
)

// Formula is a parsed molecular formula: its molar mass (g/mol) and Fuller
// diffusion volume.
type Formula struct {
	MolarMass float64
	Volume    float64
}

// ParseFormula reads a molecular formula such as "C8H10" or "CH2Cl2" and sums
// the Fuller atomic diffusion volumes, adding −18.3 for each of rings aromatic
// or heterocyclic rings. Only C, H, O, N, F, Cl, Br, I and S are known.
func ParseFormula(s string, rings int) (Formula, error) {
	if s == "" {
		return Formula{}, fmt.Errorf("empty formula")
	}
	if rings < 0 {
		return Formula{}, fmt.Errorf("negative ring count %d", rings)
	}
	var f Formula
	i := 0
	for i < len(s) {
		c := s[i]
		if c < 'A' || c > 'Z' {
			return Formula{}, fmt.Errorf("formula %q: unexpected %q at position %d (want an element symbol such as C, H, Cl)", s, c, i+1)
		}
		j := i + 1
		for j < len(s) && s[j] >= 'a' && s[j] <= 'z' {
			j++
		}
		sym := s[i:j]
		e, ok := elements[sym]
		if !ok {
			return Formula{}, fmt.Errorf("formula %q: unknown element %q (known: C H O N F Cl Br I S)", s, sym)
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		n := 1
		if k > j {
			v, err := strconv.Atoi(s[j:k])
			if err != nil || v <= 0 || v > 1000 {
				return Formula{}, fmt.Errorf("formula %q: bad atom count %q", s, s[j:k])
			}
			n = v
		}
		f.MolarMass += float64(n) * e.mass
		f.Volume += float64(n) * e.volume
		i = k
	}
	f.Volume += float64(rings) * ringVolume
	if !(f.Volume > 0) || math.IsInf(f.Volume, 0) {
		return Formula{}, fmt.Errorf("formula %q with %d rings has no positive diffusion volume", s, rings)
	}
	return f, nil
}

// DiffusionCoefficient is the binary gas-phase diffusion coefficient (m²/s)
// at 1 atm and temperature t (K) of a solute of molar mass ms (g/mol) and
// diffusion volume vs in a gas of molar mass mg and volume vg, by the Fuller
// equation (Fuller, Ensley & Giddings 1969):
// D = 1.00e-7 · T^1.75 · sqrt(1/Ms + 1/Mg) / (Vs^(1/3) + Vg^(1/3))².
func DiffusionCoefficient(t, ms, vs, mg, vg float64) float64 {
	return fullerCoefficient(ms, vs, mg, vg) * math.Pow(t, 1.75)
}

// fullerCoefficient is D / T^1.75 of the Fuller equation.
func fullerCoefficient(ms, vs, mg, vg float64) float64 {
	s := math.Cbrt(vs) + math.Cbrt(vg)
	return 1.00e-7 * math.Sqrt(1/ms+1/mg) / (s * s)
}
