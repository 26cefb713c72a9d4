package model_test

import (
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

func benchSystem(b *testing.B) (*model.System, model.Program) {
	m, err := methodfile.ReadFile("../testdata/bench20.toml")
	if err != nil {
		b.Fatal(err)
	}
	sys, err := m.System()
	if err != nil {
		b.Fatal(err)
	}
	return sys, m.ModelProgram()
}

// BenchmarkSimulate: one program evaluation of 20 compounds and 3 ramps.
// Goal: ≤ 5 µs and 0 allocations per operation on one core.
func BenchmarkSimulate(b *testing.B) {
	sys, prog := benchSystem(b)
	var res model.Result
	sys.Simulate(prog, &res)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := sys.Simulate(prog, &res); err != nil {
			b.Fatal(err)
		}
	}
}

// benchKindSystem is the 20 compounds and 3 ramps of bench20.toml on a
// packed column (3 m × 2 mm, 165 µm particles, β = 15, nitrogen 30 mL/min)
// or a porous-layer column (30 m × 0.32 mm, 10 µm layer, helium 2 mL/min,
// with a coolant and a start at −40 °C).
func benchKindSystem(b *testing.B, kind model.ColumnKind) (*model.System, model.Program) {
	sys, prog := benchSystem(b)
	col := model.Column{Kind: kind, MaxTemp: 330 + model.ZeroCelsius}
	car := model.Carrier{Gas: model.Helium, Mode: model.ConstantFlow, Flow: 2e-6 / 60}
	oven := sys.Oven
	switch kind {
	case model.Packed:
		col.Length, col.Diameter, col.Particle, col.GivenPhaseRatio = 3, 2e-3, 165e-6, 15
		car.Gas, car.Flow = model.Nitrogen, 30e-6/60
	case model.PorousLayer:
		col.Length, col.Diameter, col.Film = 30, 0.32e-3, 10e-6
		oven.Coolant = -70 + model.ZeroCelsius
		prog.Initial = -40 + model.ZeroCelsius
	}
	cond, err := model.NewConditions(col, car)
	if err != nil {
		b.Fatal(err)
	}
	ks, err := model.NewSystem(cond, sys.Compounds, oven)
	if err != nil {
		b.Fatal(err)
	}
	return ks, prog
}

func benchmarkSimulate(b *testing.B, sys *model.System, prog model.Program) {
	var res model.Result
	if err := sys.Simulate(prog, &res); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := sys.Simulate(prog, &res); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSimulatePacked: as BenchmarkSimulate on a packed column.
// Goal: ≤ 5 µs and 0 allocations per operation, like the open tube.
func BenchmarkSimulatePacked(b *testing.B) {
	sys, prog := benchKindSystem(b, model.Packed)
	benchmarkSimulate(b, sys, prog)
}

// BenchmarkSimulatePorousLayer: as BenchmarkSimulate on a porous-layer
// column started at −40 °C with a coolant.
// Goal: ≤ 5 µs and 0 allocations per operation.
func BenchmarkSimulatePorousLayer(b *testing.B) {
	sys, prog := benchKindSystem(b, model.PorousLayer)
	benchmarkSimulate(b, sys, prog)
}

// BenchmarkSimulateReference: the brute-force quadrature on the same file.
func BenchmarkSimulateReference(b *testing.B) {
	sys, prog := benchSystem(b)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		model.ReferenceRetention(sys.Cond, nil, prog)
		for j := range sys.Compounds {
			model.ReferenceRetention(sys.Cond, &sys.Compounds[j], prog)
		}
	}
}

// BenchmarkNewSystem: building the tables once per column/carrier setting.
func BenchmarkNewSystem(b *testing.B) {
	m, err := methodfile.ReadFile("../testdata/bench20.toml")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := m.System(); err != nil {
			b.Fatal(err)
		}
	}
}
