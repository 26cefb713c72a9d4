package model

import (
	"math"
	"testing"
)

// FuzzParseFormula: the formula parser never panics; what it accepts has a
// positive molar mass and volume.
func FuzzParseFormula(f *testing.F) {
	for _, s := range []string{"C8H10", "CH2Cl2", "C6H5Br", "C10H16O", "c6h6", "C0", "Xx", "C999999999999", "", "H2O"} {
		f.Add(s, 1)
	}
	f.Fuzz(func(t *testing.T, s string, rings int) {
		fm, err := ParseFormula(s, rings)
		if err != nil {
			return
		}
		if !(fm.MolarMass > 0) || !(fm.Volume > 0) || math.IsInf(fm.MolarMass, 0) {
			t.Fatalf("%q: %+v", s, fm)
		}
	})
}

// unit maps any float to [0, 1] (NaN and infinities to 0.5).
func unit(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0.5
	}
	x = math.Abs(x)
	return x - math.Floor(x)
}

// FuzzSimulate: random valid methods simulate without panic, NaN or
// infinity, and every peak elutes no earlier than the holdup time or is
// reported as not eluted.
func FuzzSimulate(f *testing.F) {
	f.Add(0.3, 0.2, 0.1, 0.4, 0.2, 0.5, 0.6, 0.3, 0.5, 0.5, uint8(0), uint8(3))
	f.Add(0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, uint8(1), uint8(7))
	f.Add(0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, uint8(2), uint8(0))
	f.Add(0.3, 0.2, 0.1, 0.4, 0.2, 0.5, 0.6, 0.3, 0.5, 0.5, uint8(2), uint8(8+3))  // packed
	f.Add(0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, 0.9, uint8(0), uint8(16+5)) // porous layer
	f.Fuzz(func(t *testing.T, a, b, c, d, e, g, h, i, j, k float64, gas, mode uint8) {
		col := Column{
			Length:   1 + 99*unit(a),
			Diameter: (0.05 + 0.7*unit(b)) * 1e-3,
			MaxTemp:  ZeroCelsius + 150 + 250*unit(j),
		}
		col.Film = math.Min((0.05+9.95*unit(c))*1e-6, col.Diameter*0.4)
		car := Carrier{Gas: Gas(gas % 3), Mode: PressureMode(mode % 2), Vacuum: mode&4 != 0}
		car.Flow = (0.1 + 49.9*unit(d)) * 1e-6 / 60
		car.InletGauge = (5 + 600*unit(d)) * 1e3
		switch (mode >> 3) % 3 { // the column kinds of MODEL.md §10-11
		case 1:
			col.Kind = Packed
			col.Diameter = (1 + 5*unit(b)) * 1e-3
			col.Length = 0.3 + 9.7*unit(a)
			col.Particle = (50 + 350*unit(c*7)) * 1e-6
			col.Porosity = 0.3 + 0.2*unit(e*3)
			col.GivenPhaseRatio = 2 + 198*unit(k*5)
			car.Flow *= 20
		case 2:
			col.Kind = PorousLayer
			col.Film = math.Min((1+59*unit(c))*1e-6, col.Diameter*0.4)
		}
		cond, err := NewConditions(col, car)
		if err != nil {
			t.Fatal(err)
		}
		var comps []Compound
		for n := 0; n < 6; n++ {
			x := unit(e + 0.37*float64(n))
			nc := 1 + 40*x
			comps = append(comps, Compound{Name: string(rune('a' + n)), DH: -(9 + 4.9*nc) * 1000, DS: -(44 + 6*nc) + 10*(unit(k)-0.5), DCp: 200 * (unit(k*3) - 0.5), Target: n%2 == 0})
		}
		s, err := NewSystem(cond, comps, DefaultOven())
		if err != nil {
			t.Fatal(err)
		}
		t0 := ZeroCelsius + 30 + (col.MaxTemp-ZeroCelsius-40)*unit(g)
		p := Program{Initial: t0, InitialHold: 600 * unit(h)}
		prev := t0
		for r := 0; r < int(mode%6); r++ {
			fin := prev + (col.MaxTemp-prev)*unit(i+float64(r)*0.21)
			if fin <= prev+0.01 {
				break
			}
			p.Ramps = append(p.Ramps, Ramp{Rate: (0.1 + 60*unit(h+float64(r)*0.13)) / 60, Final: fin, Hold: 300 * unit(g*float64(r+1))})
			prev = fin
		}
		if p.RunTime() <= 0 {
			p.InitialHold = 60
		}
		var res Result
		if err := s.Simulate(p, &res); err != nil {
			t.Fatal(err)
		}
		bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
		if bad(res.HoldupTime) || bad(res.RunTime) || bad(res.CycleTime) {
			t.Fatalf("non-finite totals %+v", res)
		}
		for _, pk := range res.Peaks {
			if bad(pk.RetentionTime) || bad(pk.Sigma) || bad(pk.ElutionTemp) || bad(pk.RetentionFactor) {
				t.Fatalf("non-finite peak %+v", pk)
			}
			if pk.Eluted && pk.RetentionTime < res.HoldupTime*(1-1e-12) {
				t.Fatalf("peak before the holdup time: %v < %v", pk.RetentionTime, res.HoldupTime)
			}
		}
		for _, pr := range res.Pairs {
			if bad(pr.Resolution) || pr.Resolution < 0 {
				t.Fatalf("pair %+v", pr)
			}
		}
	})
}
