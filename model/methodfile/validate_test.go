package methodfile

import (
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"
)

// An edit made in code and the same edit written in the file get the same
// located message: Validate is the decoder's own rule set.
func TestValidateMatchesParse(t *testing.T) {
	base := readDemo(t)
	text := mustRead(t, demoPath)
	cases := []struct {
		name     string
		edit     func(m *Method)
		from, to string
		key      string
		want     string
	}{
		{"rate above the oven's limit", func(m *Method) { m.Oven.Ramps[0].RateCMin = 100 }, "rate_c_min = 12.0", "rate_c_min = 100.0",
			"oven.ramp[1].rate_c_min", "100 °C/min is faster than the oven's limit 60 °C/min (limits.max_rate_c_min)"},
		{"flow zero", func(m *Method) { m.Carrier.FlowMLMin = 0 }, "flow_ml_min = 1.2", "flow_ml_min = 0.0",
			"carrier.flow_ml_min", "0 mL/min is out of range (allowed: from 0.01 to 200 mL/min)"},
		{"absurdly small length", func(m *Method) { m.Column.LengthM = 5e-324 }, "length_m = 30.0", "length_m = 5e-324",
			"column.length_m", "5e-324 m is out of range (allowed: from 0.1 to 300 m)"},
		{"absurdly slow rate", func(m *Method) { m.Oven.Ramps[0].RateCMin = 5e-324 }, "rate_c_min = 12.0", "rate_c_min = 5e-324",
			"oven.ramp[1].rate_c_min", "from 0.01 to 60 °C/min"},
		{"final above the column", func(m *Method) { m.Oven.Ramps[0].FinalC = 400 }, "final_c = 240.0", "final_c = 400.0",
			"oven.ramp[1].final_c", "above the column maximum 325 °C"},
		{"nan hold", func(m *Method) { m.Oven.InitialHoldMin = math.NaN() }, "initial_hold_min = 1.0", "initial_hold_min = nan",
			"oven.initial_hold_min", "finite"},
		{"initial at ambient", func(m *Method) { m.Oven.InitialC = 20 }, "initial_c = 50.0", "initial_c = 20.0",
			"oven.initial_c", "not above the ambient 25 °C"},
		{"pressure limit", func(m *Method) { m.Limits.MaxInletKPa = 50 }, "max_inlet_kpa = 690.0", "max_inlet_kpa = 50.0",
			"carrier.flow_ml_min", "above the instrument's inlet limit 50 kPa"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := base.Clone()
			c.edit(m)
			verr := m.Validate()
			edited := strings.Replace(text, c.from, c.to, 1)
			if edited == text {
				t.Fatal("fixture did not change")
			}
			_, perr := Parse(demoPath, []byte(edited))
			var ve, pe *Error
			if !errors.As(verr, &ve) || !errors.As(perr, &pe) {
				t.Fatalf("Validate %v, Parse %v: not both file errors", verr, perr)
			}
			if ve.Key != c.key || !strings.Contains(ve.Msg, c.want) {
				t.Errorf("Validate: %v (want key %s, %q)", verr, c.key, c.want)
			}
			if ve.File != demoPath || ve.Line == 0 {
				t.Errorf("Validate error not located: %v", verr)
			}
			if *ve != *pe {
				t.Errorf("Validate and Parse differ:\n%v\n%v", verr, perr)
			}
			if kerr := m.ValidateKey(c.key); kerr == nil || kerr.Error() != verr.Error() {
				t.Errorf("ValidateKey(%s) = %v, Validate = %v", c.key, kerr, verr)
			}
		})
	}
	if err := base.Validate(); err != nil {
		t.Errorf("demo: %v", err)
	}
}

// Search bounds are advice: a program starting below oven_min_c or holding
// longer than max_hold_min is valid, with a note naming the key.
func TestSearchBoundsAreAdvice(t *testing.T) {
	m := readDemo(t)
	m.Oven.InitialC = 30
	m.Oven.Ramps[0].HoldMin = 30
	if err := m.Validate(); err != nil {
		t.Fatal(err)
	}
	keys := map[string]bool{}
	for _, n := range m.Advice() {
		keys[n.Key] = true
	}
	if !keys["oven.initial_c"] || !keys["oven.ramp[1].hold_min"] {
		t.Errorf("advice %v", m.Advice())
	}
	if len(readDemo(t).Advice()) != 0 {
		t.Errorf("the demo gets advice: %v", readDemo(t).Advice())
	}
}

// After any one edit of a valid method, ValidateKey on the edited key
// agrees with Validate.
func TestValidateKeyAgreesWithValidate(t *testing.T) {
	base := readDemo(t)
	base.Goal.BakeoutC, base.Goal.HasBakeout = 300, true // ties goal to the column maximum
	if err := base.Validate(); err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	type edit struct {
		key string
		set func(m *Method, x float64)
	}
	edits := []edit{
		{"oven.initial_c", func(m *Method, x float64) { m.Oven.InitialC = x }},
		{"oven.initial_hold_min", func(m *Method, x float64) { m.Oven.InitialHoldMin = x / 10 }},
		{"oven.ramp[1].rate_c_min", func(m *Method, x float64) { m.Oven.Ramps[0].RateCMin = x / 3 }},
		{"oven.ramp[1].final_c", func(m *Method, x float64) { m.Oven.Ramps[0].FinalC = x }},
		{"oven.ramp[1].hold_min", func(m *Method, x float64) { m.Oven.Ramps[0].HoldMin = x/10 - 2 }},
		{"column.max_temp_c", func(m *Method, x float64) { m.Column.MaxTempC = x }},
		{"column.length_m", func(m *Method, x float64) { m.Column.LengthM = x / 2 }},
		{"column.diameter_mm", func(m *Method, x float64) { m.Column.DiameterMM = x / 500 }},
		{"carrier.flow_ml_min", func(m *Method, x float64) { m.Carrier.FlowMLMin = x / 20 }},
		{"limits.max_rate_c_min", func(m *Method, x float64) { m.Limits.MaxRateCMin = x / 10 }},
		{"limits.max_inlet_kpa", func(m *Method, x float64) { m.Limits.MaxInletKPa = x }},
		{"limits.ambient_c", func(m *Method, x float64) { m.Limits.AmbientC = x / 4 }},
		{"goal.ramps", func(m *Method, x float64) { m.Goal.Ramps = int(x / 50) }},
		{"compound[3].dH_kJ_mol", func(m *Method, x float64) { m.Compounds[2].DHkJ = -x / 2 }},
		{"compound[4].name", func(m *Method, x float64) {
			if x > 200 {
				m.Compounds[3].Name = m.Compounds[0].Name
			}
		}},
	}
	refused := 0
	for i := 0; i < 3000; i++ {
		e := edits[rng.IntN(len(edits))]
		m := base.Clone()
		e.set(m, rng.Float64()*400-20)
		full, part := m.Validate(), m.ValidateKey(e.key)
		if (full == nil) != (part == nil) || (full != nil && full.Error() != part.Error()) {
			t.Fatalf("%s: Validate %v, ValidateKey %v", e.key, full, part)
		}
		if full != nil {
			refused++
		}
	}
	if refused == 0 || refused == 3000 {
		t.Errorf("%d of 3000 edits refused: the test does not discriminate", refused)
	}
}

func BenchmarkValidate(b *testing.B) {
	m, err := ReadFile("../../testdata/bench20.toml")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if err := m.Validate(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkValidateKeyProgram(b *testing.B) {
	m, err := ReadFile("../../testdata/bench20.toml")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if err := m.ValidateKey("oven.ramp[1].rate_c_min"); err != nil {
			b.Fatal(err)
		}
	}
}

func mustRead(t *testing.T, path string) string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

// The second-wave instrument limits refuse a program with the key that
// breaks them; the matching search bounds never do.
func TestInstrumentLimitsOfTheSecondWave(t *testing.T) {
	base := readDemo(t)
	cases := []struct {
		name string
		edit func(m *Method)
		key  string
		want string
	}{
		{"rate band", func(m *Method) {
			m.Limits.RateBands = []RateBand{{AboveC: 200, MaxRateCMin: 10}}
		}, "oven.ramp[1].rate_c_min", "12 °C/min is faster than the oven's limit 10 °C/min above 200 °C (limits.rate_band[1])"},
		{"isothermal limit", func(m *Method) {
			m.Column.MaxIsothermalC, m.Column.HasMaxIsothermal = 230, true
		}, "oven.ramp[1].hold_min", "a hold of 2 min at 240 °C is above the column's isothermal limit 230 °C"},
		{"below the coolant", func(m *Method) {
			m.Limits.CoolantC, m.Limits.HasCoolant, m.Limits.OvenMinC = -20, true, -10
			m.Oven.InitialC = -30
		}, "oven.initial_c", "not above the coolant_c -20 °C"},
		{"inlet below its lowest", func(m *Method) { m.Limits.MinInletKPa = 300 }, "carrier.flow_ml_min", "(limits.min_inlet_kpa)"},
		{"bake-out above the column", func(m *Method) { m.Goal.BakeoutC, m.Goal.HasBakeout = 330, true }, "goal.bakeout_c", "above the column maximum"},
	}
	for _, c := range cases {
		m := base.Clone()
		c.edit(m)
		err := m.Validate()
		var fe *Error
		if !errors.As(err, &fe) || fe.Key != c.key || !strings.Contains(fe.Msg, c.want) {
			t.Errorf("%s: %v (want %s: …%s…)", c.name, err, c.key, c.want)
		}
	}
	m := base.Clone()
	m.Limits.CoolantC, m.Limits.HasCoolant, m.Limits.OvenMinC = -20, true, -10
	m.Oven.InitialC = 0 // below ambient, allowed with a coolant
	if err := m.Validate(); err != nil {
		t.Errorf("a start between coolant and ambient: %v", err)
	}
	m.Oven.InitialC = 0.05
	found := false
	for _, n := range m.Advice() {
		found = found || (n.Key == "oven.initial_c" && strings.Contains(n.Msg, "temp_step_c"))
	}
	if !found {
		t.Errorf("0.05 °C off the 0.1 °C keypad step not noted: %v", m.Advice())
	}
}
