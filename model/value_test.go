package model

import "testing"

// Every name round-trips through ParseProgramValue and String; malformed
// names are refused.
func TestProgramValueNames(t *testing.T) {
	all := append(ProgramValues(5), ProgramValue{Kind: CarrierFlow}, ProgramValue{Kind: InletPressure})
	seen := map[string]bool{}
	for _, v := range all {
		s := v.String()
		if seen[s] {
			t.Errorf("%s twice", s)
		}
		seen[s] = true
		back, err := ParseProgramValue(s)
		if err != nil || back != v {
			t.Errorf("%s → %v, %v", s, back, err)
		}
	}
	for _, want := range []string{"initial_c", "initial_hold_min", "rate_1", "final_1", "hold_1", "rate_5", "hold_5", "flow_ml_min", "inlet_kpa"} {
		if !seen[want] {
			t.Errorf("%s missing", want)
		}
	}
	for _, bad := range []string{"", "rate", "rate_0", "rate_01", "rate_-1", "rate_x", "speed", "initial_c_1", "final_1.5"} {
		if v, err := ParseProgramValue(bad); err == nil {
			t.Errorf("%q parsed as %v", bad, v)
		}
	}
	if (ProgramValue{Kind: RampRate, Ramp: 3}).Valid(2) || !(ProgramValue{Kind: RampRate, Ramp: 2}).Valid(2) {
		t.Error("Valid ignores the ramp count")
	}
	if (ProgramValue{Kind: CarrierFlow}).Valid(5) {
		t.Error("a carrier value is not a program value")
	}
	p := Program{Initial: 313, InitialHold: 60, Ramps: []Ramp{{Rate: 0.2, Final: 473, Hold: 30}}}
	if x, ok := (ProgramValue{Kind: RampFinal, Ramp: 1}).Get(p); !ok || x != 473 {
		t.Errorf("final_1 = %v %v", x, ok)
	}
	if _, ok := (ProgramValue{Kind: RampHold, Ramp: 2}).Get(p); ok {
		t.Error("hold_2 of a one-ramp program")
	}
}

func TestModeNames(t *testing.T) {
	for _, g := range Gases {
		if back, err := ParseGas(g.String()); err != nil || back != g {
			t.Errorf("%v: %v %v", g, back, err)
		}
	}
	for _, m := range PressureModes {
		if back, err := ParsePressureMode(m.String()); err != nil || back != m {
			t.Errorf("%v: %v %v", m, back, err)
		}
	}
	for _, o := range Objectives {
		if back, err := ParseObjective(o.String()); err != nil || back != o {
			t.Errorf("%v: %v %v", o, back, err)
		}
	}
	for _, o := range Outlets {
		if back, err := ParseOutlet(o.String()); err != nil || back != o {
			t.Errorf("%v: %v %v", o, back, err)
		}
	}
	if AtmosphericOutlet.String() != "atmospheric" || VacuumOutlet.String() != "vacuum" || !VacuumOutlet.Vacuum() || AtmosphericOutlet.Vacuum() {
		t.Errorf("outlet words %q, %q", AtmosphericOutlet, VacuumOutlet)
	}
	if _, err := ParseOutlet("Vacuum"); err == nil {
		t.Error("Vacuum accepted")
	}
	if _, err := ParseGas("argon"); err == nil {
		t.Error("argon accepted")
	}
	if _, err := ParseObjective("speed"); err == nil {
		t.Error("speed accepted")
	}
}
