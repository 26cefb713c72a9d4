package methodfile

import (
	"errors"
	"os"
	"reflect"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
)

// secondWave adds every second-wave key of FORMAT.md to the demo.
func secondWave(t *testing.T) string {
	t.Helper()
	base, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	s := withoutSecondWave(string(base))
	rep := func(from, to string) {
		t.Helper()
		if !strings.Contains(s, from) {
			t.Fatalf("demo lacks %q", from)
		}
		s = strings.Replace(s, from, to, 1)
	}
	rep("[column]\n", "[column]\nmax_isothermal_c = 300.0\n")
	rep("[limits]\n", "[limits]\nmin_inlet_kpa = 5.0\nmin_flow_ml_min = 0.4\nmax_flow_ml_min = 3.5\ntemp_step_c = 1.0\nrate_step_c_min = 0.5\nhold_step_min = 0.1\nflow_step_ml_min = 0.1\npressure_step_kpa = 1.0\n")
	rep("[goal]\n", "[goal]\nmin_first_k = 1.0\nbakeout_c = 310.0\nbakeout_min = 2.0\n")
	rep("[[compound]]\n", "[[compound]]\ndH_se_kJ_mol = 0.12\ndS_se_J_mol_K = 0.3\ndH_dS_corr = -0.9995\n")
	s += "\n[[limits.rate_band]]\nabove_c = 175.0\nmax_rate_c_min = 45.0\n\n[[limits.rate_band]]\nabove_c = 250.0\nmax_rate_c_min = 30.0\n"
	s += "\n[goal.robust]\noven_offset_c = 1.0\nflow_pct = 2.0\nefficiency_pct = 10.0\nretention_sigma = 2.0\nprior_dH_kJ_mol = 3.0\n"
	return s
}

// withoutSecondWave drops the second-wave keys the demo itself carries
// ([goal.robust] and the compounds' standard errors), so they can be added
// here without defining a key twice.
func withoutSecondWave(s string) string {
	var out []string
	skip := false
	for _, line := range strings.Split(s, "\n") {
		switch {
		case strings.HasPrefix(line, "[goal.robust]"):
			skip = true
			continue
		case strings.HasPrefix(line, "["):
			skip = false
		case strings.HasPrefix(line, "dH_se_kJ_mol") || strings.HasPrefix(line, "dS_se_J_mol_K") || strings.HasPrefix(line, "dH_dS_corr"):
			continue
		}
		if !skip {
			out = append(out, line)
		}
	}
	return strings.Join(out, "\n")
}

func TestSecondWaveKeysRoundTrip(t *testing.T) {
	text := secondWave(t)
	m, err := Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	if m.Column.MaxIsothermalC != 300 || !m.Column.HasMaxIsothermal || m.Column.Kind != model.WallCoated {
		t.Errorf("column: %+v", m.Column)
	}
	l := m.Limits
	if l.MinInletKPa != 5 || l.MinFlowMLMin != 0.4 || l.MaxFlowMLMin != 3.5 || l.TempStepC != 1 || l.RateStepCMin != 0.5 ||
		l.HoldStepMin != 0.1 || l.FlowStepMLMin != 0.1 || l.PressureStepKPa != 1 {
		t.Errorf("limits: %+v", l)
	}
	if want := []RateBand{{175, 45}, {250, 30}}; !reflect.DeepEqual(l.RateBands, want) {
		t.Errorf("rate bands %+v, want %+v", l.RateBands, want)
	}
	g := m.Goal
	if g.MinFirstK != 1 || !g.HasBakeout || g.BakeoutC != 310 || g.BakeoutMin != 2 {
		t.Errorf("goal: %+v", g)
	}
	want := Robust{OvenOffsetC: 1, FlowPct: 2, EfficiencyPct: 10, RetentionSigma: 2, PriorDHkJ: 3, PriorDS: DefaultPriorDS, RetentionTimeSDMin: DefaultRetentionTimeSDMin}
	if g.Robust != want {
		t.Errorf("robust %+v, want %+v", g.Robust, want)
	}
	c := m.Compounds[0]
	if !c.HasSE || c.DHSE != 0.12 || c.DSSE != 0.3 || c.DHDSCorr != -0.9995 {
		t.Errorf("compound SE: %+v", c)
	}
	data, err := Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	m2, err := Parse("again", data)
	if err != nil {
		t.Fatalf("re-read: %v\n%s", err, data)
	}
	if !m.Equal(m2) {
		t.Errorf("round trip differs:\n%+v\n%+v", m, m2)
	}
}

func TestSecondWaveDefaults(t *testing.T) {
	m := readDemo(t)
	l := m.Limits
	if l.TempStepC != 0.1 || l.RateStepCMin != 0.1 || l.HoldStepMin != 0.01 || l.FlowStepMLMin != 0.01 || l.PressureStepKPa != 0.1 || l.MinInletKPa != 0 {
		t.Errorf("limits defaults: %+v", l)
	}
	if m.Goal.MinFirstK != 0.5 || m.Goal.Robust.PriorDHkJ != 2 || m.Goal.Robust.PriorDS != 4 || m.Goal.Robust.RetentionTimeSDMin != 0.002 {
		t.Errorf("goal defaults: %+v", m.Goal)
	}
}

func TestSecondWaveErrors(t *testing.T) {
	base := secondWave(t)
	cases := []struct{ name, from, to, want string }{
		{"isothermal above max", "max_isothermal_c = 300.0", "max_isothermal_c = 400.0", "column.max_isothermal_c"},
		{"bands out of order", "above_c = 250.0", "above_c = 150.0", "limits.rate_band[2].above_c"},
		{"band rate zero", "max_rate_c_min = 45.0", "max_rate_c_min = 0.0", "limits.rate_band[1].max_rate_c_min"},
		{"flow range", "min_flow_ml_min = 0.4", "min_flow_ml_min = 4.0", "limits.min_flow_ml_min"},
		{"min inlet", "min_inlet_kpa = 5.0", "min_inlet_kpa = 1000.0", "limits.min_inlet_kpa"},
		{"step zero", "temp_step_c = 1.0", "temp_step_c = 0.0", "limits.temp_step_c"},
		{"corr", "dH_dS_corr = -0.9995", "dH_dS_corr = -1.5", "compound[1].dH_dS_corr"},
		{"se without pair", "dS_se_J_mol_K = 0.3\n", "", "compound[1].dS_se_J_mol_K"},
		{"bakeout above max", "bakeout_c = 310.0", "bakeout_c = 400.0", "goal.bakeout_c"},
		{"robust negative", "flow_pct = 2.0", "flow_pct = -2.0", "goal.robust.flow_pct"},
		{"kind", "[column]\n", "[column]\nkind = \"capillary\"\n", "column.kind"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := strings.Replace(base, c.from, c.to, 1)
			if text == base {
				t.Fatal("fixture did not change")
			}
			_, err := Parse("m.toml", []byte(text))
			var fe *Error
			if !errors.As(err, &fe) || fe.Line == 0 {
				t.Fatalf("error %v: want a located file error", err)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q lacks %q", err, c.want)
			}
		})
	}
}
