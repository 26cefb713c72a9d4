package optimizer

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/rampwise/rampwise/model"
)

// Valid extremes must work: every one simulates, and the optimizer returns
// (met, or not met with a reason).
func TestExtremes(t *testing.T) {
	type ext struct {
		name  string
		col   model.Column
		car   model.Carrier
		ncomp int
		ramps int
		heavy bool
	}
	mm := 1e-3
	um := 1e-6
	mlmin := 1e-6 / 60
	tmax := 325 + model.ZeroCelsius
	base := model.Column{Length: 30, Diameter: 0.25 * mm, Film: 0.25 * um, MaxTemp: tmax}
	he := model.Carrier{Gas: model.Helium, Mode: model.ConstantFlow, Flow: 1.2 * mlmin}
	with := func(f func(c *model.Column)) model.Column { c := base; f(&c); return c }
	cases := []ext{
		{"1 m column", with(func(c *model.Column) { c.Length = 1 }), he, 6, 1, false},
		{"100 m column", with(func(c *model.Column) { c.Length = 100 }), he, 6, 1, false},
		{"0.05 mm bore", with(func(c *model.Column) { c.Diameter = 0.05 * mm; c.Film = 0.05 * um }), model.Carrier{Gas: model.Hydrogen, Mode: model.ConstantFlow, Flow: 0.1 * mlmin}, 6, 1, false},
		{"0.75 mm bore 10 µm film", with(func(c *model.Column) { c.Diameter = 0.75 * mm; c.Film = 10 * um }), model.Carrier{Gas: model.Nitrogen, Mode: model.ConstantFlow, Flow: 50 * mlmin}, 6, 1, false},
		{"0.05 µm film", with(func(c *model.Column) { c.Film = 0.05 * um }), he, 6, 1, false},
		{"vacuum outlet constant pressure", base, model.Carrier{Gas: model.Helium, Mode: model.ConstantPressure, InletGauge: 30e3, Vacuum: true}, 6, 2, false},
		{"hydrogen constant pressure", base, model.Carrier{Gas: model.Hydrogen, Mode: model.ConstantPressure, InletGauge: 60e3}, 6, 2, false},
		{"nitrogen flow 0.1", base, model.Carrier{Gas: model.Nitrogen, Mode: model.ConstantFlow, Flow: 0.1 * mlmin}, 6, 1, false},
		{"200 compounds", base, he, 200, 2, false},
		{"5 ramps", base, he, 10, 5, false},
		{"never elutes", base, he, 4, 2, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var comps []model.Compound
			for i := 0; i < c.ncomp; i++ {
				n := 5 + 12*float64(i)/float64(c.ncomp)
				comps = append(comps, model.Compound{Name: fmt.Sprintf("c%03d", i), DH: -(9 + 4.9*n) * 1000, DS: -(44 + 6*n) + 0.2*float64(i%5), Target: true})
			}
			if c.heavy {
				comps = append(comps, model.Compound{Name: "heavy", DH: -(9 + 4.9*80) * 1000, DS: -(44 + 6*80), Target: true})
			}
			cond, err := model.NewConditions(c.col, c.car)
			if err != nil {
				t.Fatal(err)
			}
			sys, err := model.NewSystem(cond, comps, model.DefaultOven())
			if err != nil {
				t.Fatal(err)
			}
			prog := model.Program{Initial: 313.15, InitialHold: 60, Ramps: []model.Ramp{{Rate: 10.0 / 60, Final: 573.15, Hold: 120}}}
			var res model.Result
			if err := sys.Simulate(prog, &res); err != nil {
				t.Fatal(err)
			}
			for _, pk := range res.Peaks {
				if math.IsNaN(pk.RetentionTime) || math.IsNaN(pk.Sigma) {
					t.Fatalf("NaN peak %+v", pk)
				}
			}
			p := Problem{System: sys, Start: prog, Ramps: c.ramps, MinResolution: 1.5, Tail: 30,
				Limits: Limits{OvenMin: 308.15, MaxTemp: tmax, MaxRate: 60.0 / 60, MaxHold: 600}}
			r, err := Optimize(context.Background(), p, Settings{Starts: 4, Evaluations: 600, Restarts: 1})
			if err != nil {
				t.Fatal(err)
			}
			if !r.Feasible() && r.Explanation == "" {
				t.Error("not met without a reason")
			}
			if c.heavy && r.Feasible() {
				t.Error("a compound that cannot elute below the column maximum was called met")
			}
			t.Logf("%v: run %.2f min, Rs %.2f, %d evaluations, %s", r.Status, r.Sim.RunTime/60, r.Sim.MinResolution, r.Evaluations, r.Explanation)
		})
	}
}
