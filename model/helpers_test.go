package model

import "testing"

const mlPerMin = 1e-6 / 60 // m³/s per mL/min

func celsius(c float64) float64   { return c + ZeroCelsius }
func perMin(rate float64) float64 { return rate / 60 }

func testColumn() Column {
	return Column{Length: 30, Diameter: 0.25e-3, Film: 0.25e-6, MaxTemp: celsius(325)}
}

func heliumFlow(mlmin float64) Carrier {
	return Carrier{Gas: Helium, Mode: ConstantFlow, Flow: mlmin * mlPerMin}
}

// alkaneLike is an invented compound following the demo's rule for a
// nonpolar phase: ΔH ≈ −(9 + 4.9 n) kJ/mol, ΔS ≈ −(44 + 6.0 n) J/(mol·K).
func alkaneLike(name string, n float64) Compound {
	return Compound{Name: name, DH: -(9 + 4.9*n) * 1000, DS: -(44 + 6.0*n), Target: true}
}

func mustSystem(t testing.TB, col Column, car Carrier, comps []Compound) *System {
	t.Helper()
	cond, err := NewConditions(col, car)
	if err != nil {
		t.Fatal(err)
	}
	s, err := NewSystem(cond, comps, DefaultOven())
	if err != nil {
		t.Fatal(err)
	}
	return s
}
