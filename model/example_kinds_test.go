package model_test

import (
	"fmt"

	"github.com/rampwise/rampwise/model"
)

// A 2 m × 2 mm packed column of 165 µm particles at the default porosity:
// the Kozeny–Carman permeability, the holdup time at 30 mL/min of nitrogen
// and 100 °C, and the inlet pressure it needs (B0 = dp² ε³/(180 (1−ε)²) =
// 2.69e-11 m² by hand).
func ExampleColumn_Flow() {
	col := model.Column{Kind: model.Packed, Length: 2, Diameter: 2e-3, Particle: 165e-6, GivenPhaseRatio: 15, MaxTemp: 523.15}
	cond, err := model.NewConditions(col, model.Carrier{Gas: model.Nitrogen, Mode: model.ConstantFlow, Flow: 30e-6 / 60})
	if err != nil {
		fmt.Println(err)
		return
	}
	t := 373.15
	fmt.Printf("B0 %.3g m², porosity %.2f\n", cond.Flow().Permeability, cond.Flow().Porosity)
	fmt.Printf("holdup %.1f s, inlet %.0f kPa gauge, phase ratio %g\n", cond.HoldupTimeAt(t), cond.InletGauge(t)/1000, cond.PhaseRatio())
	// Output:
	// B0 2.69e-11 m², porosity 0.40
	// holdup 7.9 s, inlet 170 kPa gauge, phase ratio 15
}
