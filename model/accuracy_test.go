package model

import (
	"fmt"
	"math"
	"testing"
)

// Accuracy of the tabulated fast path against the brute-force reference, for
// every case MODEL.md §9 lists, at its tolerances.

type accuracyCase struct {
	name  string
	col   Column
	car   Carrier
	comps []Compound
	prog  Program
}

func accuracyCompounds() []Compound {
	var cs []Compound
	for n := 5; n <= 14; n += 3 {
		cs = append(cs, alkaneLike(fmt.Sprintf("C%d", n), float64(n)))
	}
	dcp := alkaneLike("with-dCp", 8.5)
	dcp.DCp = 60
	cs = append(cs, dcp)
	dcpNeg := alkaneLike("with-negative-dCp", 11.2)
	dcpNeg.DCp = -45
	dcpNeg.RefTemp = celsius(140)
	cs = append(cs, dcpNeg)
	polar := Compound{Name: "polar", DH: -52e3, DS: -95, MolarMass: 88.1, DiffusionVolume: 92.8, Target: true}
	cs = append(cs, polar)
	// not eluted before most programs end
	cs = append(cs, alkaneLike("heavy", 30))
	return cs
}

func accuracyCases() []accuracyCase {
	col := testColumn()
	comps := accuracyCompounds()
	he := heliumFlow(1.2)
	h2p := Carrier{Gas: Hydrogen, Mode: ConstantPressure, InletGauge: 60e3}
	n2vac := Carrier{Gas: Nitrogen, Mode: ConstantFlow, Flow: 0.8 * mlPerMin, Vacuum: true}
	hevacP := Carrier{Gas: Helium, Mode: ConstantPressure, InletGauge: 80e3, Vacuum: true, InitialBand: 0.3}
	h2alt := Carrier{Gas: Hydrogen, Mode: ConstantFlow, Flow: 2.0 * mlPerMin, Ambient: 84e3}
	twoRamp := Program{Initial: celsius(40), InitialHold: 60, Ramps: []Ramp{{perMin(10), celsius(150), 0}, {perMin(25), celsius(300), 120}}}
	packed := Column{Kind: Packed, Length: 2, Diameter: 2e-3, Particle: 165e-6, GivenPhaseRatio: 15, MaxTemp: celsius(320)}
	packedFine := Column{Kind: Packed, Length: 3, Diameter: 3e-3, Film: 0.4e-6, Particle: 120e-6, Porosity: 0.35, GivenPhaseRatio: 40,
		EddyFactor: 1.1, ObstructionFactor: 0.6, MobileFactor: 0.2, StationaryDiffusivity: 5e-10, MaxTemp: celsius(320)}
	plot := Column{Kind: PorousLayer, Length: 25, Diameter: 0.32e-3, Film: 8e-6, MaxTemp: celsius(320)}
	twoRampPacked := Program{Initial: celsius(80), InitialHold: 60, Ramps: []Ramp{{perMin(8), celsius(200), 0}, {perMin(20), celsius(310), 900}}}
	threeRamp := Program{Initial: celsius(35), InitialHold: 120, Ramps: []Ramp{{perMin(5), celsius(80), 90}, {perMin(12), celsius(180), 30}, {perMin(30), celsius(320), 300}}}
	return []accuracyCase{
		{"isothermal he flow", col, he, comps, Program{Initial: celsius(120), InitialHold: 1800}},
		{"hold then ramp he flow", col, he, comps, Program{Initial: celsius(50), InitialHold: 120, Ramps: []Ramp{{perMin(8), celsius(280), 0}}}},
		{"two ramps h2 pressure", col, h2p, comps, twoRamp},
		{"three ramps n2 vacuum", col, n2vac, comps, threeRamp},
		{"three ramps he vacuum pressure", col, hevacP, comps, threeRamp},
		{"no initial hold h2 altitude", col, h2alt, comps, Program{Initial: celsius(60), Ramps: []Ramp{{perMin(20), celsius(200), 240}}}},
		{"thick film wide bore", Column{Length: 15, Diameter: 0.53e-3, Film: 3e-6, MaxTemp: celsius(260)}, heliumFlow(5), comps,
			Program{Initial: celsius(45), InitialHold: 30, Ramps: []Ramp{{perMin(15), celsius(250), 60}}}},
		// packed columns (MODEL.md §10): Darcy flow, given β, van Deemter H
		{"packed n2 flow two ramps", packed, Carrier{Gas: Nitrogen, Mode: ConstantFlow, Flow: 30 * mlPerMin}, comps, twoRampPacked},
		{"packed he pressure isothermal", packed, Carrier{Gas: Helium, Mode: ConstantPressure, InletGauge: 150e3}, comps, Program{Initial: celsius(180), InitialHold: 2400}},
		{"packed h2 vacuum three ramps", packedFine, Carrier{Gas: Hydrogen, Mode: ConstantFlow, Flow: 20 * mlPerMin, Vacuum: true, InitialBand: 0.5}, comps,
			Program{Initial: celsius(60), InitialHold: 60, Ramps: []Ramp{{perMin(4), celsius(120), 60}, {perMin(10), celsius(200), 30}, {perMin(20), celsius(300), 600}}}},
		// porous-layer columns (MODEL.md §11): open tube, layer as the film
		{"porous layer he flow", plot, heliumFlow(2.5), comps, Program{Initial: celsius(60), InitialHold: 60, Ramps: []Ramp{{perMin(10), celsius(300), 600}}}},
		{"porous layer n2 pressure vacuum", plot, Carrier{Gas: Nitrogen, Mode: ConstantPressure, InletGauge: 50e3, Vacuum: true}, comps, twoRamp},
	}
}

func checkAgainstReference(t *testing.T, s *System, p Program) {
	t.Helper()
	var res Result
	if err := s.Simulate(p, &res); err != nil {
		t.Fatal(err)
	}
	hold := referenceElute(s.Cond, nil, p)
	if d := math.Abs(res.HoldupTime-hold.tr) / 60; d > 1e-5 {
		t.Errorf("holdup time %.7f min vs reference %.7f (diff %.2g min)", res.HoldupTime/60, hold.tr/60, d)
	}
	refs := make(map[int]refPeak)
	var maxTR, maxSigma, maxTe, maxRs float64
	compared := 0
	defer func() {
		t.Logf("%d peaks: max |ΔtR| %.2g min, max σ rel %.2g, max |ΔTe| %.2g K, max |ΔRs| %.2g", compared, maxTR, maxSigma, maxTe, maxRs)
		if compared == 0 {
			t.Error("no peak compared with the reference")
		}
	}()
	for _, pk := range res.Peaks {
		c := &s.Compounds[pk.Compound]
		ref := referenceElute(s.Cond, c, p)
		refs[pk.Compound] = ref
		if math.IsInf(ref.tr, 0) || ref.tr > 1e7 {
			continue
		}
		compared++
		maxTR = math.Max(maxTR, math.Abs(pk.RetentionTime-ref.tr)/60)
		maxSigma = math.Max(maxSigma, math.Abs(pk.Sigma-ref.sigma)/ref.sigma)
		maxTe = math.Max(maxTe, math.Abs(pk.ElutionTemp-ref.te))
		if d := math.Abs(pk.RetentionTime-ref.tr) / 60; d > 1e-4 {
			t.Errorf("%s: tR %.6f min vs reference %.6f (diff %.2g min)", c.Name, pk.RetentionTime/60, ref.tr/60, d)
		}
		if d := math.Abs(pk.Sigma-ref.sigma) / ref.sigma; d > 1e-3 {
			t.Errorf("%s: sigma %.6g s vs reference %.6g (rel %.2g)", c.Name, pk.Sigma, ref.sigma, d)
		}
		if d := math.Abs(pk.ElutionTemp - ref.te); d > 0.01 {
			t.Errorf("%s: elution temperature %.4f K vs reference %.4f", c.Name, pk.ElutionTemp, ref.te)
		}
	}
	for _, pr := range res.Pairs {
		a, b := refs[pr.First], refs[pr.Second]
		rs := (b.tr - a.tr) / (2 * (a.sigma + b.sigma))
		maxRs = math.Max(maxRs, math.Abs(pr.Resolution-rs))
		if d := math.Abs(pr.Resolution - rs); d > 0.005 {
			t.Errorf("pair %s/%s: Rs %.4f vs reference %.4f", s.Compounds[pr.First].Name, s.Compounds[pr.Second].Name, pr.Resolution, rs)
		}
	}
}

func TestAccuracyAgainstReference(t *testing.T) {
	for _, c := range accuracyCases() {
		t.Run(c.name, func(t *testing.T) {
			s := mustSystem(t, c.col, c.car, c.comps)
			checkAgainstReference(t, s, c.prog)
		})
	}
}

// A porous-layer and a packed column started below ambient with a coolant
// (MODEL.md §12): light compounds from −40 °C and −60 °C.
func TestAccuracySubAmbientKinds(t *testing.T) {
	var comps []Compound
	for n := 1.0; n <= 6; n++ {
		c := alkaneLike("light", n)
		c.Name = fmt.Sprintf("C%g", n)
		comps = append(comps, c)
	}
	comps[2].DCp = 40
	oven := DefaultOven()
	oven.Coolant = celsius(-78)
	for _, c := range []struct {
		col  Column
		car  Carrier
		prog Program
	}{
		{Column{Kind: PorousLayer, Length: 30, Diameter: 0.53e-3, Film: 20e-6, MaxTemp: celsius(250)}, heliumFlow(4),
			Program{Initial: celsius(-40), InitialHold: 120, Ramps: []Ramp{{perMin(10), celsius(80), 60}, {perMin(25), celsius(240), 300}}}},
		{Column{Kind: Packed, Length: 2, Diameter: 2e-3, Particle: 165e-6, GivenPhaseRatio: 10, MaxTemp: celsius(200)},
			Carrier{Gas: Nitrogen, Mode: ConstantFlow, Flow: 25 * mlPerMin},
			Program{Initial: celsius(-60), InitialHold: 30, Ramps: []Ramp{{perMin(15), celsius(150), 600}}}},
	} {
		t.Run(c.col.Kind.String(), func(t *testing.T) {
			cond, err := NewConditions(c.col, c.car)
			if err != nil {
				t.Fatal(err)
			}
			s, err := NewSystem(cond, comps, oven)
			if err != nil {
				t.Fatal(err)
			}
			checkAgainstReference(t, s, c.prog)
		})
	}
}

// A compound that elutes during a hold, and one that elutes exactly at the
// boundary between the initial hold and the first ramp.
func TestAccuracyHoldAndBoundary(t *testing.T) {
	comps := accuracyCompounds()
	s := mustSystem(t, testColumn(), heliumFlow(1.0), comps)
	// tR of C8 isothermally at 60 °C: with the initial hold set to exactly that,
	// C8 elutes at the end of the hold.
	k := s.Cond.RetentionFactor(&comps[1], celsius(60))
	tr := s.Cond.HoldupTimeAt(celsius(60)) * (1 + k)
	p := Program{Initial: celsius(60), InitialHold: tr, Ramps: []Ramp{{perMin(10), celsius(200), 600}, {perMin(20), celsius(300), 0}}}
	var res Result
	if err := s.Simulate(p, &res); err != nil {
		t.Fatal(err)
	}
	for _, pk := range res.Peaks {
		if pk.Compound == 1 && math.Abs(pk.RetentionTime-tr) > 1e-9*tr {
			t.Errorf("boundary eluter: tR %.9f s, want %.9f", pk.RetentionTime, tr)
		}
	}
	checkAgainstReference(t, s, p)

	// End of ramp 1 exactly: find the time C11 reaches ζ = 1 under the ramp,
	// and make that the ramp's final temperature.
	p2 := Program{Initial: celsius(40), InitialHold: 60, Ramps: []Ramp{{perMin(10), celsius(300), 0}}}
	s.Simulate(p2, &res)
	var te float64
	for _, pk := range res.Peaks {
		if pk.Compound == 2 {
			te = pk.ElutionTemp
		}
	}
	p3 := Program{Initial: celsius(40), InitialHold: 60, Ramps: []Ramp{{perMin(10), te, 300}, {perMin(10), celsius(300), 0}}}
	checkAgainstReference(t, s, p3)
}

// The direct integration used for calibration agrees with the tables.
func TestDirectRetentionMatchesTables(t *testing.T) {
	for _, c := range accuracyCases() {
		s := mustSystem(t, c.col, c.car, c.comps)
		var res Result
		s.Simulate(c.prog, &res)
		for _, pk := range res.Peaks {
			if pk.RetentionTime > 1e6 {
				continue
			}
			tr, te := s.Cond.RetentionTime(&s.Compounds[pk.Compound], c.prog)
			if math.Abs(tr-pk.RetentionTime)/60 > 1e-5 || math.Abs(te-pk.ElutionTemp) > 1e-3 {
				t.Errorf("%s %s: direct %v/%v vs table %v/%v", c.name, s.Compounds[pk.Compound].Name, tr, te, pk.RetentionTime, pk.ElutionTemp)
			}
		}
		if tm, _ := s.Cond.RetentionTime(nil, c.prog); math.Abs(tm-res.HoldupTime) > 1e-4 {
			t.Errorf("%s: holdup %v vs %v", c.name, tm, res.HoldupTime)
		}
	}
}
