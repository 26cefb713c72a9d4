package model

import (
	"math"
	"testing"
)

// packedColumn is a 2 m × 2 mm packed column of 80/100 mesh particles
// (165 µm) at the defaults of MODEL.md §10, phase ratio 15.
func packedColumn() Column {
	return Column{Kind: Packed, Length: 2, Diameter: 2e-3, Particle: 165e-6, GivenPhaseRatio: 15, MaxTemp: celsius(250)}
}

// plotColumn is a 30 m × 0.32 mm porous-layer column with a 10 µm layer.
func plotColumn() Column {
	return Column{Kind: PorousLayer, Length: 30, Diameter: 0.32e-3, Film: 10e-6, MaxTemp: celsius(250)}
}

// heptaneDm is n-heptane's D_m (m²/s, 1 atm) in gas g at t: the model's
// default solute (MODEL.md §5).
func heptaneDm(g Gas, t float64) float64 {
	return DiffusionCoefficient(t, 100.2, 148.3, g.MolarMass(), g.DiffusionVolume())
}

// minimumOverFlow finds the flow (mL/min, log golden section in [lo, hi])
// that minimises H of a solute with retention factor k at t, and returns H
// and the average velocity there.
func minimumOverFlow(t *testing.T, col Column, g Gas, temp, k, lo, hi float64) (h, u float64) {
	t.Helper()
	H := func(f float64) (float64, float64) {
		cond, err := NewConditions(col, Carrier{Gas: g, Mode: ConstantFlow, Flow: f * mlPerMin})
		if err != nil {
			t.Fatal(err)
		}
		return cond.PlateHeight(temp, k, heptaneDm(g, temp)), cond.AverageVelocity(temp)
	}
	a, b := math.Log(lo), math.Log(hi)
	gr := (math.Sqrt(5) - 1) / 2
	for i := 0; i < 100; i++ {
		c, d := b-gr*(b-a), a+gr*(b-a)
		hc, _ := H(math.Exp(c))
		hd, _ := H(math.Exp(d))
		if hc < hd {
			b = d
		} else {
			a = c
		}
	}
	return H(math.Exp((a + b) / 2))
}

// The open tube is the case B0 = dg²/32, ε = 1, A = π dg²/4 of the Darcy
// forms of MODEL.md §10: the holdup time, u·p and the constant-flow inlet
// pressure of a wall-coated column equal the Hagen–Poiseuille formulas of
// §2, written out here independently, to rounding.
func TestOpenTubeLimitOfDarcyForms(t *testing.T) {
	for _, col := range []Column{testColumn(), {Length: 15, Diameter: 0.53e-3, Film: 3e-6, MaxTemp: celsius(260)}, plotColumn()} {
		for _, car := range []Carrier{heliumFlow(1.2), {Gas: Nitrogen, Mode: ConstantFlow, Flow: 0.8 * mlPerMin, Vacuum: true}, {Gas: Hydrogen, Mode: ConstantPressure, InletGauge: 70e3}} {
			cond, err := NewConditions(col, car)
			if err != nil {
				t.Fatal(err)
			}
			dg := col.Diameter - 2*col.Film
			f := cond.Flow()
			if f.Permeability != dg*dg/32 || f.Porosity != 1 || math.Abs(f.Area-math.Pi*dg*dg/4) > 1e-15*f.Area {
				t.Errorf("%v: flow %+v, want B0 = dg²/32, ε = 1, A = π dg²/4", col.Kind, f)
			}
			for _, temp := range []float64{celsius(-40), celsius(50), celsius(250)} {
				eta := car.Gas.Viscosity(temp)
				po := car.OutletPressure()
				var pi2 float64
				if car.Mode == ConstantFlow {
					pi2 = po*po + 256*eta*col.Length*FlowRefPressure*temp*car.Flow/(math.Pi*math.Pow(dg, 4)*FlowRefTemp)
				} else {
					pi2 = math.Pow(car.AmbientPressure()+car.InletGauge, 2)
				}
				pi := math.Sqrt(pi2)
				tm := 128 * eta * col.Length * col.Length * (pi2*pi - po*po*po) / (3 * dg * dg * math.Pow(pi2-po*po, 2))
				up := dg * dg * (pi2 - po*po) / (64 * eta * col.Length)
				st := cond.state(temp)
				for _, c := range []struct {
					name      string
					got, want float64
				}{{"pi", cond.InletPressure(temp), pi}, {"tM", st.tm, tm}, {"u·p", st.up, up}} {
					if math.Abs(c.got-c.want) > 1e-13*math.Abs(c.want) {
						t.Errorf("%v %v at %.0f K: %s %.17g, §2 gives %.17g", col.Kind, car.Gas, temp, c.name, c.got, c.want)
					}
				}
			}
		}
	}
}

// A packed column follows the Darcy forms of MODEL.md §10 with the
// Kozeny–Carman permeability, written out here independently.
func TestPackedDarcyForms(t *testing.T) {
	col := packedColumn()
	car := Carrier{Gas: Nitrogen, Mode: ConstantFlow, Flow: 30 * mlPerMin}
	cond, err := NewConditions(col, car)
	if err != nil {
		t.Fatal(err)
	}
	eps := 0.40
	b0 := col.Particle * col.Particle * eps * eps * eps / (180 * (1 - eps) * (1 - eps))
	area := math.Pi * col.Diameter * col.Diameter / 4
	temp := celsius(80)
	eta := Nitrogen.Viscosity(temp)
	po := StandardAtmosphere
	pi2 := po*po + 2*eta*col.Length*FlowRefPressure*temp*car.Flow/(area*b0*FlowRefTemp)
	pi := math.Sqrt(pi2)
	tm := 4 * eta * eps * col.Length * col.Length * (pi2*pi - po*po*po) / (3 * b0 * (pi2 - po*po) * (pi2 - po*po))
	if got := cond.InletPressure(temp); math.Abs(got-pi) > 1e-12*pi {
		t.Errorf("pi %v, want %v", got, pi)
	}
	if got := cond.HoldupTimeAt(temp); math.Abs(got-tm) > 1e-12*tm {
		t.Errorf("tM %v, want %v", got, tm)
	}
	if b := cond.PhaseRatio(); b != 15 {
		t.Errorf("β %v, want the given 15", b)
	}
	// mass balance: the gas fills ε A L and leaves at Fo = Fn (T/Tn)(pn/po);
	// ū = j Fo / (ε A) with James and Martin's j, so tM = ε A L / (j Fo)
	fo := car.Flow * temp / FlowRefTemp * FlowRefPressure / po
	if want := eps * area * col.Length / (cond.JamesMartin(temp) * fo); math.Abs(tm-want) > 1e-12*want {
		t.Errorf("tM %v s, mass balance gives %v", tm, want)
	}
}

// Kozeny–Carman against a published worked value: a bed of porosity 0.30
// and grain size d10 = 0.1 mm passes 10 °C water with a hydraulic
// conductivity of 0.000023 m/s (groundwatersoftware.com, "Hydraulic
// conductivity: Kozeny-Carman", worked example; K = B0 ρ g / μ with the same
// constant 180). Water at 10 °C: ρ = 999.7 kg/m³, μ = 1.306e-3 Pa·s (CRC
// Handbook, from memory); g = 9.80665 m/s².
func TestKozenyCarmanWorkedValue(t *testing.T) {
	b0 := KozenyCarman(0.1e-3, 0.30)
	k := b0 * 999.7 * 9.80665 / 1.306e-3
	if math.Abs(k-2.3e-5) > 0.05e-5 { // the published value has two digits
		t.Errorf("hydraulic conductivity %.4g m/s (B0 %.4g m²), published 2.3e-5", k, b0)
	}
}

// At the defaults of MODEL.md §10 the smallest plate height of a packed
// column is 2–3 particle diameters (common practice), and for nitrogen on
// a 2 mm column it is reached at an average velocity of roughly 10–20 cm/s
// (common practice).
func TestPackedMinimumPlateHeight(t *testing.T) {
	dp := packedColumn().Particle
	for _, k := range []float64{0.5, 2, 5, 20} {
		for _, temp := range []float64{celsius(60), celsius(150)} {
			h, u := minimumOverFlow(t, packedColumn(), Nitrogen, temp, k, 0.5, 500)
			if h < 2*dp || h > 3*dp {
				t.Errorf("k=%v at %.0f K: H_min = %.2f dp, want 2–3", k, temp, h/dp)
			}
			if u < 0.10 || u > 0.20 {
				t.Errorf("k=%v at %.0f K: optimum average velocity %.1f cm/s, want roughly 10–20", k, temp, u*100)
			}
		}
	}
	// the large-k bound MinPlateHeight: 2λ dp + 2 sqrt(2γω) dp = 2.348 dp
	cond, _ := NewConditions(packedColumn(), Carrier{Gas: Nitrogen, Mode: ConstantFlow, Flow: 20 * mlPerMin})
	if got, want := cond.MinPlateHeight(), (1.6+2*math.Sqrt(0.14))*dp; math.Abs(got-want) > 1e-12*want {
		t.Errorf("MinPlateHeight %v, want %v", got, want)
	}
	open, _ := NewConditions(testColumn(), heliumFlow(1))
	if got, want := open.MinPlateHeight(), 2*math.Sqrt(11.0/12)*testColumn().ChannelDiameter()/2; math.Abs(got-want) > 1e-12*want {
		t.Errorf("open tube MinPlateHeight %v, want Golay 1.915 r = %v", got, want)
	}
}

// The eddy term 2λ dp takes the compression factor f1 like the other terms
// that are the same all along the column (MODEL.md §10): at a high pressure
// drop H(λ) − H(λ → 0) = φ f1 2 λ dp with f1 = 9 (pi⁴ − po⁴)(pi² − po²) /
// (8 (pi³ − po³)²) from the inlet pressure.
func TestPackedEddyTermTakesCompression(t *testing.T) {
	for _, vac := range []bool{false, true} {
		col := packedColumn()
		col.Length = 6
		col.PlateHeightFactor = 1.3
		car := Carrier{Gas: Helium, Mode: ConstantFlow, Flow: 60 * mlPerMin, Vacuum: vac}
		with, _ := NewConditions(col, car)
		col.EddyFactor = 1e-300 // λ → 0 (zero is the default)
		without, _ := NewConditions(col, car)
		temp := celsius(120)
		pi, po := with.InletPressure(temp), car.OutletPressure()
		f1 := 9 * (math.Pow(pi, 4) - math.Pow(po, 4)) * (pi*pi - po*po) / (8 * math.Pow(pi*pi*pi-po*po*po, 2))
		if f1 < 1.05 {
			t.Fatalf("pressure drop too small for the check: f1 = %v", f1)
		}
		for _, k := range []float64{0, 3} {
			dm := heptaneDm(Helium, temp)
			got := with.PlateHeight(temp, k, dm) - without.PlateHeight(temp, k, dm)
			want := 1.3 * f1 * 2 * DefaultEddyFactor * col.Particle
			if math.Abs(got-want) > 1e-9*want {
				t.Errorf("vacuum=%v k=%v: eddy contribution %.6g m, want φ f1 2λ dp = %.6g", vac, k, got, want)
			}
		}
	}
}

// The exact porous-layer phase ratio (annulus with the layer, MODEL.md §11)
// is d/(4 df) times (1 − 2x)²/(1 − x), x = df/d (algebra), and within 1 %
// of d/(4 df) for a thin layer (x < 0.003).
func TestPorousLayerPhaseRatio(t *testing.T) {
	for _, df := range []float64{0.5e-6, 0.9e-6, 5e-6, 20e-6, 50e-6} {
		col := plotColumn()
		col.Film = df
		d := col.Diameter
		x := df / d
		approx := d / (4 * df)
		if got, want := col.PhaseRatio(), approx*(1-2*x)*(1-2*x)/(1-x); math.Abs(got-want) > 1e-12*want {
			t.Errorf("df %v: β %v, want %v", df, got, want)
		}
		if x < 0.003 {
			if rel := math.Abs(col.PhaseRatio()-approx) / approx; rel > 0.01 {
				t.Errorf("thin layer df %v: β %v vs d/(4df) %v", df, col.PhaseRatio(), approx)
			}
		}
	}
	// and the layer's default diffusivity is 1e-7 m²/s: the stationary term
	// of a porous layer is 100× smaller than a liquid film's of the same
	// thickness
	wall := plotColumn()
	wall.Kind = WallCoated
	car := heliumFlow(2)
	cl, _ := NewConditions(plotColumn(), car)
	cw, _ := NewConditions(wall, car)
	temp, k := celsius(60), 4.0
	dm := heptaneDm(Helium, temp)
	stat := func(c *Conditions) float64 {
		return c.PlateHeight(temp, k, dm) - gasOnly(c, temp, k, dm)
	}
	if r := stat(cw) / stat(cl); math.Abs(r-100) > 1e-6 {
		t.Errorf("stationary-term ratio wall-coated/porous-layer %v, want 100", r)
	}
}

// gasOnly is the plate height without its stationary term (D_s → ∞).
func gasOnly(c *Conditions, temp, k, dm float64) float64 {
	col := c.Column
	col.StationaryDiffusivity = 1e300
	d, _ := NewConditions(col, c.Carrier)
	return d.PlateHeight(temp, k, dm)
}

// A column's kind-specific keys belong to it alone.
func TestColumnKindValidation(t *testing.T) {
	wall := testColumn()
	wall.Particle = 165e-6
	if err := wall.Validate(); err == nil {
		t.Error("a wall-coated column with a particle size was accepted")
	}
	p := packedColumn()
	p.GivenPhaseRatio = 0
	if err := p.Validate(); err == nil {
		t.Error("a packed column without a phase ratio was accepted")
	}
	p = packedColumn()
	p.Particle = 3e-3
	if err := p.Validate(); err == nil {
		t.Error("particles larger than the tube were accepted")
	}
	if err := packedColumn().Validate(); err != nil {
		t.Error(err)
	}
	for _, k := range []ColumnKind{WallCoated, Packed, PorousLayer} {
		if got, err := ParseColumnKind(k.String()); err != nil || got != k {
			t.Errorf("%v round trip: %v %v", k, got, err)
		}
	}
}

// With a coolant the oven cools toward it (MODEL.md §12): t_cool =
// τ ln((Tf − Tc)/(T0 − Tc)); a start at or below the coolant is refused.
func TestCoolantCooldown(t *testing.T) {
	o := DefaultOven()
	o.Coolant = celsius(-80)
	got, err := o.Cooldown(celsius(200), celsius(-40))
	if err != nil {
		t.Fatal(err)
	}
	if want := 120 * math.Log(280.0/40); math.Abs(got-want) > 1e-9 {
		t.Errorf("cool-down %v s, want %v", got, want)
	}
	// above ambient too, the coolant is the sink
	got, _ = o.Cooldown(celsius(200), celsius(50))
	if want := 120 * math.Log(280.0/130); math.Abs(got-want) > 1e-9 {
		t.Errorf("cool-down from 200 to 50 °C with a coolant %v s, want %v", got, want)
	}
	if _, err := o.Cooldown(celsius(200), celsius(-80)); err == nil {
		t.Error("a start at the coolant's temperature was accepted")
	}
	if _, err := DefaultOven().Cooldown(celsius(200), celsius(20)); err == nil {
		t.Error("a start below ambient without a coolant was accepted")
	}
	// liquid nitrogen: the tables reach down to it
	o.Coolant = celsius(-150)
	cond, _ := NewConditions(plotColumn(), heliumFlow(2))
	s, err := NewSystem(cond, []Compound{alkaneLike("C2", 2)}, o)
	if err != nil {
		t.Fatal(err)
	}
	if lo, _ := s.Range(); lo > celsius(-150) {
		t.Errorf("tables start at %.1f °C, above the coolant", lo-ZeroCelsius)
	}
	var res Result
	if err := s.Simulate(Program{Initial: celsius(-120), InitialHold: 60, Ramps: []Ramp{{perMin(10), celsius(100), 1}}}, &res); err != nil {
		t.Fatal(err)
	}
}
