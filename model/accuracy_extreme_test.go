package model

import "testing"

// Strongly retained compounds (|ΔH| up to 200 kJ/mol), fast ramps and a
// cold start: the tables still meet MODEL.md §9.
func TestAccuracyExtremeRetention(t *testing.T) {
	var comps []Compound
	for _, n := range []float64{20, 28, 38} {
		comps = append(comps, alkaneLike("heavy", n))
		comps[len(comps)-1].Name = "n" + string(rune('A'+len(comps)))
	}
	cold := alkaneLike("cold", 3)
	cold.DCp = 150
	comps = append(comps, cold)
	col := testColumn()
	col.MaxTemp = celsius(400)
	cond, err := NewConditions(col, heliumFlow(1.5))
	if err != nil {
		t.Fatal(err)
	}
	oven := DefaultOven()
	oven.Ambient = celsius(-60) // a cryogenic oven
	s, err := NewSystem(cond, comps, oven)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []Program{
		{Initial: celsius(-40), InitialHold: 60, Ramps: []Ramp{{perMin(50), celsius(200), 0}, {perMin(100), celsius(400), 900}}},
		{Initial: celsius(100), Ramps: []Ramp{{perMin(0.5), celsius(400), 60}}},
	} {
		checkAgainstReference(t, s, p)
	}
}
