package model

import (
	"fmt"
	"math"
	"testing"
)

// Viscosity against CRC Handbook of Chemistry and Physics, "Viscosity of
// gases" (values as quoted in MODEL.md §2): the power law within 1 % for He
// and H2, 1.5 % for N2 up to 500 K and 3 % at 600 K.
func TestViscosityAgainstCRC(t *testing.T) {
	temps := []float64{300, 400, 500, 600}
	table := []struct {
		gas  Gas
		crc  []float64 // µPa·s
		tols []float64
	}{
		{Helium, []float64{19.9, 24.3, 28.3, 32.2}, []float64{0.01, 0.01, 0.01, 0.01}},
		{Hydrogen, []float64{8.9, 10.9, 12.8, 14.5}, []float64{0.01, 0.01, 0.01, 0.01}},
		{Nitrogen, []float64{17.9, 22.2, 26.1, 29.6}, []float64{0.015, 0.015, 0.015, 0.03}},
	}
	for _, row := range table {
		for i, temp := range temps {
			got := row.gas.Viscosity(temp) * 1e6
			if rel := math.Abs(got-row.crc[i]) / row.crc[i]; rel > row.tols[i] {
				t.Errorf("%s at %v K: %.3f µPa·s vs CRC %.1f (%.2f %%)", row.gas, temp, got, row.crc[i], 100*rel)
			}
		}
	}
}

// Fuller estimates against measured binary diffusion coefficients at 1 atm,
// within 10 %: benzene–air 0.077 cm²/s at 273 K (Perry's Chemical Engineers'
// Handbook), benzene–H2 0.317 at 273 K (Welty, Wicks & Wilson), n-butane–N2
// 0.0960 at 298.2 K (Bird, Stewart & Lightfoot), argon–He 0.726 at 293 K (CRC
// Handbook). Air: M 28.96, volume 19.7 (Fuller et al. 1969); argon 39.948 and
// 16.2 (Fuller et al. 1969, volume from memory).
func TestFullerAgainstMeasured(t *testing.T) {
	benzene, err := ParseFormula("C6H6", 1)
	if err != nil {
		t.Fatal(err)
	}
	butane, _ := ParseFormula("C4H10", 0)
	cases := []struct {
		name           string
		ms, vs, mg, vg float64
		temp, measured float64 // K, cm²/s
	}{
		{"benzene-air", benzene.MolarMass, benzene.Volume, 28.96, 19.7, 273, 0.077},
		{"benzene-H2", benzene.MolarMass, benzene.Volume, Hydrogen.MolarMass(), Hydrogen.DiffusionVolume(), 273, 0.317},
		{"n-butane-N2", butane.MolarMass, butane.Volume, Nitrogen.MolarMass(), Nitrogen.DiffusionVolume(), 298.2, 0.0960},
		{"argon-He", 39.948, 16.2, Helium.MolarMass(), Helium.DiffusionVolume(), 293, 0.726},
	}
	for _, c := range cases {
		got := DiffusionCoefficient(c.temp, c.ms, c.vs, c.mg, c.vg) * 1e4
		if rel := math.Abs(got-c.measured) / c.measured; rel > 0.10 {
			t.Errorf("%s: %.4f cm²/s vs measured %.4f (%.1f %%)", c.name, got, c.measured, 100*rel)
		}
	}
}

func TestParseFormula(t *testing.T) {
	f, err := ParseFormula("CH2Cl2", 0)
	if err != nil {
		t.Fatal(err)
	}
	// 12.011 + 2·1.008 + 2·35.45 = 84.927 g/mol; 15.9 + 2·2.31 + 2·21.0 = 62.52
	if math.Abs(f.MolarMass-84.927) > 1e-9 || math.Abs(f.Volume-62.52) > 1e-9 {
		t.Errorf("CH2Cl2: %+v", f)
	}
	for _, bad := range []string{"", "c6h6", "C6Xe2", "C0H4", "6C", "C6H6!", "Si2"} {
		if _, err := ParseFormula(bad, 0); err == nil {
			t.Errorf("%q: no error", bad)
		}
	}
}

// Golay's minimum plate height at the optimum velocity of the gas terms:
// H_min = 2 r sqrt((1 + 6k + 11k²) / (12 (1+k)²)) (Golay 1958; MODEL.md §5),
// 0.577 r at k = 0 and 1.915 r as k → ∞. Checked by minimising H over u·p
// with f1 = 1 and a negligible stationary-phase term.
func TestGolayMinimumPlateHeight(t *testing.T) {
	col := testColumn()
	col.StationaryDiffusivity = 1e3 // stationary term negligible
	cond, err := NewConditions(col, heliumFlow(1))
	if err != nil {
		t.Fatal(err)
	}
	r := cond.Column.ChannelDiameter() / 2
	dm := 3e-5
	for _, k := range []float64{0, 0.5, 2, 10, 1e4} {
		h := func(up float64) float64 {
			return cond.plateHeight(gasState{up: up, f1: 1, tm: 100}, k, dm)
		}
		// golden-section search in log(up)
		a, b := math.Log(1e1), math.Log(1e7)
		gr := (math.Sqrt(5) - 1) / 2
		for i := 0; i < 200; i++ {
			c, d := b-gr*(b-a), a+gr*(b-a)
			if h(math.Exp(c)) < h(math.Exp(d)) {
				b = d
			} else {
				a = c
			}
		}
		got := h(math.Exp((a + b) / 2))
		want := 2 * r * math.Sqrt((1+6*k+11*k*k)/(12*(1+k)*(1+k)))
		if rel := math.Abs(got-want) / want; rel > 1e-6 {
			t.Errorf("k=%v: Hmin %.6g vs Golay %.6g", k, got, want)
		}
	}
	if v := 2 * math.Sqrt(1.0/12); math.Abs(v-0.577) > 5e-4 {
		t.Errorf("k=0 constant %.4f", v)
	}
	if v := 2 * math.Sqrt(11.0/12); math.Abs(v-1.915) > 5e-4 {
		t.Errorf("k→∞ constant %.4f", v)
	}
}

// The exact annulus phase ratio agrees with the textbook β ≈ d/(4 df)
// within 1 % for df/d < 0.005 (MODEL.md §1) when d is the open-channel
// diameter dg: exact/approx = (1 − 2x)/(1 − x) with x = df/d. Against the
// tubing diameter the ratio is (1 − 2x)²/(1 − x) ≈ 1 − 3x, so there the 1 %
// holds only to df/d ≈ 0.0033 (both by direct algebra).
func TestPhaseRatioApproximation(t *testing.T) {
	for _, ratio := range []float64{0.0002, 0.001, 0.003, 0.0049} {
		d := 0.25e-3
		col := Column{Length: 30, Diameter: d, Film: ratio * d, MaxTemp: 600}
		exact := col.PhaseRatio()
		approx := col.ChannelDiameter() / (4 * col.Film)
		if rel := math.Abs(exact-approx) / exact; rel > 0.01 {
			t.Errorf("df/d=%v: β %.3f vs dg/4df %.3f", ratio, exact, approx)
		}
		if ratio <= 0.003 {
			if rel := math.Abs(exact-d/(4*col.Film)) / exact; rel > 0.01 {
				t.Errorf("df/d=%v: β %.3f vs d/4df %.3f", ratio, exact, d/(4*col.Film))
			}
		}
	}
	// 0.25 mm × 0.25 µm: (124.75²)/(125² − 124.75²) = 249.0 (direct arithmetic)
	col := testColumn()
	if b := col.PhaseRatio(); math.Abs(b-15562.5625/62.4375) > 1e-9 {
		t.Errorf("β = %v", b)
	}
}

// Isothermally tR = tM (1 + k) exactly and σ = tR/√N with N = L/H.
func TestIsothermalExact(t *testing.T) {
	comps := accuracyCompounds()[:4]
	s := mustSystem(t, testColumn(), heliumFlow(1.5), comps)
	temp := celsius(90)
	var res Result
	if err := s.Simulate(Program{Initial: temp, InitialHold: 3600}, &res); err != nil {
		t.Fatal(err)
	}
	tm := s.Cond.HoldupTimeAt(temp)
	if math.Abs(res.HoldupTime-tm) > 1e-12*tm {
		t.Errorf("holdup %v vs %v", res.HoldupTime, tm)
	}
	for _, pk := range res.Peaks {
		c := &s.Compounds[pk.Compound]
		k := s.Cond.RetentionFactor(c, temp)
		want := tm * (1 + k)
		if math.Abs(pk.RetentionTime-want) > 1e-12*want {
			t.Errorf("%s: tR %v, want tM(1+k) = %v", c.Name, pk.RetentionTime, want)
		}
		n := s.Cond.Column.Length / s.Cond.PlateHeight(temp, k, s.Cond.DiffusionCoefficient(c, temp))
		if sig := want / math.Sqrt(n); math.Abs(pk.Sigma-sig) > 1e-9*sig {
			t.Errorf("%s: sigma %v, want tR/√N = %v", c.Name, pk.Sigma, sig)
		}
	}
}

// Purnell's equation Rs = (√N/4)((α − 1)/α)(k/(1 + k)) (Purnell 1960) agrees
// with the simulated isothermal resolution to first order in α − 1.
func TestPurnellEquation(t *testing.T) {
	base := alkaneLike("a", 9)
	for _, alpha := range []float64{1.01, 1.03, 1.06} {
		second := base
		second.Name = "b"
		// ln α = ΔlnK: shift the entropy
		second.DS = base.DS + GasConstant*math.Log(alpha)
		s := mustSystem(t, testColumn(), heliumFlow(1.2), []Compound{base, second})
		temp := celsius(110)
		var res Result
		if err := s.Simulate(Program{Initial: temp, InitialHold: 7200}, &res); err != nil {
			t.Fatal(err)
		}
		p1, p2 := res.Peaks[0], res.Peaks[1]
		n := (math.Pow(p1.RetentionTime/p1.Sigma, 2) + math.Pow(p2.RetentionTime/p2.Sigma, 2)) / 2
		k := p2.RetentionFactor
		purnell := math.Sqrt(n) / 4 * (alpha - 1) / alpha * k / (1 + k)
		rs := res.Pairs[0].Resolution
		if rel := math.Abs(rs-purnell) / purnell; rel > 2*(alpha-1) {
			t.Errorf("α=%v: Rs %.4f vs Purnell %.4f (%.2f %%)", alpha, rs, purnell, 100*rel)
		}
	}
}

// An n-alkane's Kováts index is 100·n exactly, by definition (Kováts 1958).
func TestKovatsAlkaneExact(t *testing.T) {
	cond, _ := NewConditions(testColumn(), heliumFlow(1))
	var ladder []LadderPoint
	for n := 6; n <= 12; n++ {
		c := alkaneLike("", float64(n))
		ladder = append(ladder, LadderPoint{n, cond.RetentionFactor(&c, celsius(120))})
	}
	for _, p := range ladder {
		got, err := IndexFromLadder(p.Retention, ladder, true)
		if err != nil || got != float64(100*p.Carbons) {
			t.Errorf("C%d: index %v (%v)", p.Carbons, got, err)
		}
		if p.Carbons < 12 {
			if got := KovatsIndex(p.Retention, p.Retention, ladder[p.Carbons-5].Retention, p.Carbons); got != float64(100*p.Carbons) {
				t.Errorf("KovatsIndex C%d = %v", p.Carbons, got)
			}
		}
	}
	// A compound halfway in ln k between C8 and C9 has index 850.
	mid := math.Sqrt(ladder[2].Retention * ladder[3].Retention)
	if got, _ := IndexFromLadder(mid, ladder, true); math.Abs(got-850) > 1e-9 {
		t.Errorf("midpoint index %v", got)
	}
}

// Newton cooling: τ = 2 min, 300 → 50 °C toward 25 °C takes 2 ln(275/25) min.
func TestCooldown(t *testing.T) {
	o := DefaultOven()
	got, err := o.Cooldown(celsius(300), celsius(50))
	if err != nil {
		t.Fatal(err)
	}
	if want := 120 * math.Log(275.0/25); math.Abs(got-want) > 1e-9 {
		t.Errorf("cooldown %v s, want %v", got, want)
	}
	if got, _ := o.Cooldown(celsius(40), celsius(50)); got != 0 {
		t.Errorf("no cooldown when Tf ≤ T0: %v", got)
	}
	if _, err := o.Cooldown(celsius(200), celsius(20)); err == nil {
		t.Error("T0 below ambient accepted")
	}
}

func TestTrimTo(t *testing.T) {
	p := Program{Initial: celsius(40), InitialHold: 60, Ramps: []Ramp{{perMin(10), celsius(140), 120}, {perMin(20), celsius(300), 60}}}
	for _, end := range []float64{30, 60, 300, 660, 700, 780, 1000, 1260, 2000} {
		q := p.TrimTo(end)
		if math.Abs(q.RunTime()-end) > 1e-9 {
			t.Errorf("trim to %v: run time %v (%+v)", end, q.RunTime(), q)
		}
		for _, at := range []float64{0, end / 3, end / 2, end * 0.99} {
			if math.Abs(q.TempAt(at)-p.TempAt(at)) > 1e-9 {
				t.Errorf("trim to %v: T(%v) %v vs %v", end, at, q.TempAt(at), p.TempAt(at))
			}
		}
		if err := q.Validate(celsius(325)); err != nil {
			t.Errorf("trim to %v: %v", end, err)
		}
	}
}

func Example() {
	col := Column{Length: 30, Diameter: 0.25e-3, Film: 0.25e-6, MaxTemp: 325 + ZeroCelsius}
	car := Carrier{Gas: Helium, Mode: ConstantFlow, Flow: 1.0e-6 / 60}
	cond, _ := NewConditions(col, car)
	comps := []Compound{
		{Name: "octane-like", DH: -48.2e3, DS: -92, Target: true},
		{Name: "nonane-like", DH: -53.1e3, DS: -98, Target: true},
	}
	sys, _ := NewSystem(cond, comps, DefaultOven())
	prog := Program{Initial: 40 + ZeroCelsius, InitialHold: 60, Ramps: []Ramp{{Rate: 10.0 / 60, Final: 200 + ZeroCelsius}}}
	var res Result
	sys.Simulate(prog, &res)
	for _, p := range res.Peaks {
		fmt.Printf("%s %.2f min at %.0f °C\n", comps[p.Compound].Name, p.RetentionTime/60, p.ElutionTemp-ZeroCelsius)
	}
	fmt.Printf("Rs %.1f\n", res.MinResolution)
	// Output:
	// octane-like 5.88 min at 89 °C
	// nonane-like 7.63 min at 106 °C
	// Rs 55.6
}
