package sweep

import (
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

func TestStepsEndsExact(t *testing.T) {
	s := Steps(0.1, 0.7, 7)
	if s[0] != 0.1 || s[6] != 0.7 || len(s) != 7 {
		t.Errorf("%v", s)
	}
}

func TestUnknownAndModeChecks(t *testing.T) {
	m, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	for _, bad := range []string{"rate_3", "inlet_kpa"} {
		v, err := model.ParseProgramValue(bad)
		if err != nil {
			t.Fatal(err)
		}
		if Check(m, v) == nil {
			t.Errorf("%s accepted", bad)
		}
	}
	for _, bad := range []string{"speed", "final_0"} {
		if _, err := model.ParseProgramValue(bad); err == nil {
			t.Errorf("%s parsed", bad)
		}
	}
	for _, ok := range m.Values() {
		if err := Check(m, ok); err != nil {
			t.Errorf("%s: %v", ok, err)
		}
	}
	pts, err := One(m, model.ProgramValue{Kind: model.CarrierFlow}, Steps(0.8, 2.0, 4), nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range pts {
		if !p.Valid {
			t.Errorf("flow %v: %s", p.Value, p.Reason)
		}
	}
}
