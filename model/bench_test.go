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
