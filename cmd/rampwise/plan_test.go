package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

type planOut struct {
	Action  string `json:"action"`
	Program struct {
		Initial     float64 `json:"initial_c"`
		InitialHold float64 `json:"initial_hold_min"`
		Ramps       []struct {
			Rate  float64 `json:"rate_c_min"`
			Final float64 `json:"final_c"`
			Hold  float64 `json:"hold_min"`
		} `json:"ramps"`
	} `json:"program"`
	Carrier struct {
		Mode string   `json:"mode"`
		Flow *float64 `json:"flow_ml_min"`
	} `json:"carrier"`
	Reason   string   `json:"reason"`
	Expected *float64 `json:"expected_min_resolution"`
	SD       *float64 `json:"expected_sd"`
}

// onStep reports whether x is a whole multiple of step (to 1e-9).
func onStep(x, step float64) bool {
	q := x / step
	return math.Abs(q-math.Round(q)) < 1e-6
}

func TestPlanDemoJSONWithinLimits(t *testing.T) {
	// no runs yet: the demo's parameters as entered, without the standard
	// errors a fit would have written
	demo, _ := os.ReadFile("../../testdata/demo.toml")
	var lines []string
	for _, l := range strings.Split(string(demo), "\n") {
		if !strings.HasPrefix(l, "dH_se_kJ_mol") && !strings.HasPrefix(l, "dS_se_J_mol_K") && !strings.HasPrefix(l, "dH_dS_corr") {
			lines = append(lines, l)
		}
	}
	entered := filepath.Join(t.TempDir(), "entered.toml")
	os.WriteFile(entered, []byte(strings.Join(lines, "\n")), 0o644)
	code, out, errs := runCmd(t, "plan", "--json", entered)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var p planOut
	if err := json.Unmarshal([]byte(out), &p); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if p.Action != "inject" {
		t.Fatalf("no runs yet: action %q, want inject (%s)", p.Action, p.Reason)
	}
	m, _, err := loadMethod(DemoArg)
	if err != nil {
		t.Fatal(err)
	}
	high := math.Min(m.Column.MaxTempC, m.Injection.DetectorTempC-20)
	if p.Program.Initial < m.Limits.OvenMinC || !onStep(p.Program.Initial, m.Limits.TempStepC) || !onStep(p.Program.InitialHold, m.Limits.HoldStepMin) {
		t.Errorf("initial %g / %g min off the limits or the keypad", p.Program.Initial, p.Program.InitialHold)
	}
	for i, r := range p.Program.Ramps {
		if r.Final > high || r.Rate > m.Limits.MaxRateCMin || r.Hold > m.Limits.MaxHoldMin {
			t.Errorf("ramp %d %+v outside the limits (high %g)", i+1, r, high)
		}
		if !onStep(r.Final, m.Limits.TempStepC) || !onStep(r.Rate, m.Limits.RateStepCMin) || !onStep(r.Hold, m.Limits.HoldStepMin) {
			t.Errorf("ramp %d %+v off the keypad steps", i+1, r)
		}
	}
	if p.Carrier.Mode != "constant-flow" || p.Carrier.Flow == nil || *p.Carrier.Flow != m.Carrier.FlowMLMin {
		t.Errorf("carrier %+v", p.Carrier)
	}
	if p.Expected == nil || p.SD == nil || p.Reason == "" {
		t.Errorf("expected_min_resolution, expected_sd or reason missing: %s", out)
	}
}

// The [[run]] block plan prints parses as a runs file once the measured
// times are filled in, and plan then reads it back (exit 0).
func TestPlanRunBlockRoundTrip(t *testing.T) {
	code, out, errs := runCmd(t, "plan", DemoArg)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	i := strings.Index(out, "[[run]]")
	if i < 0 {
		t.Fatalf("no [[run]] block:\n%s", out)
	}
	block := out[i:]
	block = block[:strings.Index(block, "[run.width_min]")]
	// fill in the demo's own prediction for the planned program
	demo, _, _ := loadMethod(DemoArg)
	var head strings.Builder
	var oven methodfile.Oven
	sc := bufio.NewScanner(strings.NewReader(block))
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "# ") {
			continue
		}
		head.WriteString(line + "\n")
	}
	runs, err := methodfile.ParseRuns("probe.toml", []byte(head.String()+"x = 1.0\n"), demo)
	if err == nil {
		oven = runs.Runs[0].Oven
	} else {
		t.Fatalf("block does not parse: %v\n%s", err, head.String())
	}
	mm := demo.Clone()
	mm.Oven = oven
	sys, err := mm.System()
	if err != nil {
		t.Fatal(err)
	}
	var res model.Result
	if err := sys.Simulate(mm.ModelProgram(), &res); err != nil {
		t.Fatal(err)
	}
	var filled strings.Builder
	filled.WriteString(head.String())
	for _, pk := range res.Peaks {
		if pk.Eluted {
			fmt.Fprintf(&filled, "%q = %.4f\n", sys.Compounds[pk.Compound].Name, pk.RetentionTime/60)
		}
	}
	path := filepath.Join(t.TempDir(), "runs.toml")
	if err := os.WriteFile(path, []byte(filled.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runCmd(t, "plan", "--json", "../../testdata/demo.toml", path)
	if code != 0 {
		t.Fatalf("plan with the filled block: exit %d: %s", code, errs)
	}
	var p planOut
	if err := json.Unmarshal([]byte(out), &p); err != nil {
		t.Fatal(err)
	}
	if p.Action == "" || p.Reason == "" {
		t.Errorf("no advice: %s", out)
	}
}

func TestPlanBadInput(t *testing.T) {
	f, err := os.ReadFile("../../testdata/bad/expect.tsv")
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(strings.TrimSpace(string(f)), "\n") {
		if strings.HasPrefix(line, "#") || line == "" {
			continue
		}
		name, frag, _ := strings.Cut(line, "\t")
		path := filepath.Join("../../testdata/bad", name)
		code, _, errs := runCmd(t, "plan", path)
		if code != 2 || !strings.Contains(errs, path) || (frag != "" && !strings.Contains(errs, frag)) {
			t.Errorf("plan %s: exit %d, message %q (want 2, the file and %q)", name, code, errs, frag)
		}
	}
	checkBadRunsCorpus(t, "plan")
	for _, args := range [][]string{{"plan"}, {"plan", "a", "b", "c"}, {"plan", "--bogus", DemoArg}} {
		if code, _, _ := runCmd(t, args...); code != 2 {
			t.Errorf("%v: exit %d, want 2", args, code)
		}
	}
}
