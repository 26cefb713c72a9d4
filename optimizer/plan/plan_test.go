package plan

import (
	"context"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// A name with terminal escapes and a bidi override stays inert in the
// [[run]] block and the block still parses as TOML with the same name.
func TestRunBlockInertAndParses(t *testing.T) {
	name := "evil\x1b[31m\u202Ename\"q\\"
	o := methodfile.Oven{InitialC: 40, InitialHoldMin: 1, Ramps: []methodfile.Ramp{{RateCMin: 10, FinalC: 250, HoldMin: 2}}}
	block := RunBlock(name, o, nil, methodfile.Limits{}, []string{name})
	if strings.ContainsAny(block, "\x1b\u202E") {
		t.Fatalf("raw escape in the block: %q", block)
	}
	m, err := methodfile.Parse("m.toml", []byte(sampleText(1, []sampleCompound{{name: "a", dH: -40, dS: -80}})))
	if err != nil {
		t.Fatal(err)
	}
	runs, err := methodfile.ParseRuns("r.toml", []byte(strings.Replace(block, "[run.width_min]", "a = 5.0\n[run.width_min]", 1)), m)
	if err != nil {
		t.Fatalf("%v\n%s", err, block)
	}
	if runs.Runs[0].Name != name {
		t.Errorf("name %q, want %q", runs.Runs[0].Name, name)
	}
	if got := runs.Runs[0].Oven; got.InitialC != 40 || got.Ramps[0].FinalC != 250 || got.Ramps[0].HoldMin != 2 {
		t.Errorf("program %+v", got)
	}
}

// BenchmarkPlanDemo is one plan of the built-in demo without runs (the
// optimizer with its command defaults, one or more searches).
func BenchmarkPlanDemo(b *testing.B) {
	m, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Next(context.Background(), m, nil, Settings{Optimizer: optimizer.Settings{Workers: 1}}); err != nil {
			b.Fatal(err)
		}
	}
}

// Every scouting candidate keeps every instrument limit: the detector
// − 20 °C, max_isothermal_c, the rate bands, the longest hold and the
// lowest start, on the keypad steps.
func TestCandidatesWithinLimits(t *testing.T) {
	text := sampleText(1, []sampleCompound{{"a", -40, -80}, {"b", -55, -100}, {"c", -70, -120}})
	text = strings.Replace(text, "detector_temp_c = 320.0", "detector_temp_c = 270.0", 1)
	text = strings.Replace(text, "final_c = 300.0\nhold_min = 5.0", "final_c = 250.0\nhold_min = 5.0", 1)
	text = strings.Replace(text, "max_temp_c = 325.0", "max_temp_c = 325.0\nmax_isothermal_c = 260.0", 1)
	text = strings.Replace(text, "max_hold_min = 10.0", "max_hold_min = 10.0\ntemp_step_c = 0.5\nrate_step_c_min = 0.5\nhold_step_min = 0.1\n[[limits.rate_band]]\nabove_c = 150.0\nmax_rate_c_min = 25.0", 1)
	m, err := methodfile.Parse("lim.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	st, err := newState(m, nil)
	if err != nil {
		t.Fatal(err)
	}
	opt := methodfile.Oven{InitialC: 60.2, InitialHoldMin: 2.37, Ramps: []methodfile.Ramp{{RateCMin: 33.3, FinalC: 140.1}}}
	cands := append(st.candidates([]float64{opt.InitialC}), st.continued(opt, st.scoutLimits())...)
	if len(cands) < 10 {
		t.Fatalf("%d candidates", len(cands))
	}
	step := func(x, s float64) bool {
		q := x / s
		return q-float64(int64(q+0.5)) < 1e-6 && float64(int64(q+0.5))-q < 1e-6
	}
	for _, o := range cands {
		if o.InitialC < 35 || !step(o.InitialC, 0.5) || !step(o.InitialHoldMin, 0.1) {
			t.Errorf("%+v: start off the limits or steps", o)
		}
		for _, r := range o.Ramps {
			if r.FinalC > 250 || r.HoldMin > 10 || !step(r.FinalC, 0.5) || !step(r.RateCMin, 0.5) || !step(r.HoldMin, 0.1) {
				t.Errorf("%+v: ramp %+v off the limits or steps", o, r)
			}
			if r.FinalC > 150 && r.RateCMin > 25 {
				t.Errorf("%+v: ramp %+v ignores the rate band", o, r)
			}
		}
	}
}

// The block records the run's carrier: parsed against the method switched
// to hydrogen afterwards, the run still has the helium it was made with.
func TestRunBlockKeepsTheCarrier(t *testing.T) {
	m, err := methodfile.Parse("m.toml", []byte(sampleText(1, []sampleCompound{{"a", -40, -80}, {"b", -55, -100}})))
	if err != nil {
		t.Fatal(err)
	}
	o := methodfile.Oven{InitialC: 40, InitialHoldMin: 1, Ramps: []methodfile.Ramp{{RateCMin: 10, FinalC: 250}}}
	block := RunBlock("scout-1", o, &m.Carrier, m.Limits, []string{"b", "a"})
	if !strings.Contains(block, "[run.carrier]") || !strings.Contains(block, `gas = "helium"`) || !strings.Contains(block, "flow_ml_min = 1.2") {
		t.Fatalf("no carrier in the block:\n%s", block)
	}
	if strings.Index(block, `# "b"`) > strings.Index(block, `# "a"`) {
		t.Errorf("compounds not in the order given:\n%s", block)
	}
	h := m.Clone()
	h.Carrier.Gas = model.Hydrogen
	text := strings.Replace(block, "[run.width_min]", `"a" = 5.0`+"\n"+`"b" = 7.0`+"\n[run.width_min]", 1)
	runs, err := methodfile.ParseRuns("r.toml", []byte(text), h)
	if err != nil {
		t.Fatalf("%v\n%s", err, text)
	}
	if g := h.RunMethod(&runs.Runs[0]).Carrier.Gas; g != model.Helium {
		t.Errorf("run carrier %v, want helium", g)
	}
}

// The planned run's name is not one the runs file has.
func TestNextRunNameUnused(t *testing.T) {
	runs := &methodfile.Runs{Runs: []methodfile.Run{{Name: "scout-4"}, {Name: "b"}, {Name: "scout-3"}}}
	if got := NextRunName(Inject, runs); got != "scout-5" {
		t.Errorf("got %q, want scout-5", got)
	}
	if got := NextRunName(Verify, runs); got != "verify-4" {
		t.Errorf("got %q, want verify-4", got)
	}
	if got := NextRunName(Inject, nil); got != "scout-1" {
		t.Errorf("got %q, want scout-1", got)
	}
}
