package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// --min-resolution outside (0, 100] is bad input.
func TestOptimizeMinResolutionRange(t *testing.T) {
	for _, v := range []string{"0", "-1", "100.5", "NaN", "Inf"} {
		if code, _, errs := runCmd(t, "optimize", "--min-resolution", v, DemoArg); code != 2 {
			t.Errorf("--min-resolution %s: exit %d, want 2 (%s)", v, code, errs)
		}
	}
}

// After exit 3, --out writes nothing unless --write-best is given.
func TestOptimizeOutAfterMiss(t *testing.T) {
	demo, _ := os.ReadFile("../../testdata/demo.toml")
	text := strings.Replace(string(demo), "min_resolution = 1.5", "min_resolution = 40", 1)
	dir := t.TempDir()
	path := filepath.Join(dir, "hard.toml")
	os.WriteFile(path, []byte(text), 0o644)
	out := filepath.Join(dir, "out.toml")
	code, stdout, _ := runCmd(t, "optimize", path, "--out", out)
	if code != 3 {
		t.Fatalf("exit %d, want 3", code)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("--out wrote %s after exit 3", out)
	}
	if !strings.Contains(stdout, "nothing was written") {
		t.Errorf("output does not say nothing was written:\n%s", stdout)
	}
	code, _, _ = runCmd(t, "optimize", path, "--out", out, "--write-best")
	if code != 3 {
		t.Fatalf("--write-best: exit %d, want 3", code)
	}
	if _, err := os.Stat(out); err != nil {
		t.Errorf("--write-best did not write: %v", err)
	}
}

// optimize --json reports the carrier it chose and the robust margin; the
// saved method carries both, every value on the keypad steps.
func TestOptimizeJSONCarrierAndRobust(t *testing.T) {
	out := filepath.Join(t.TempDir(), "opt.toml")
	code, stdout, errs := runCmd(t, "optimize", "--json", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var oj optimizeJSON
	if err := json.Unmarshal([]byte(stdout), &oj); err != nil {
		t.Fatal(err)
	}
	if oj.Carrier.Mode != "constant-flow" || oj.Carrier.FlowMLMin == nil {
		t.Fatalf("no carrier flow in %s", stdout)
	}
	if oj.Robust == nil || oj.Robust.WorstCorner == nil || oj.Robust.Corner == "" || oj.Robust.LowZ == nil {
		t.Fatalf("no robust margin in %s", stdout)
	}
	if oj.Robust.Margin < oj.TargetRs || *oj.Robust.WorstCorner < oj.TargetRs || *oj.Robust.LowZ < oj.TargetRs {
		t.Errorf("robust margin below the target: %+v", *oj.Robust)
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	// no value with more decimals than the steps (0.1 °C, 0.1 °C/min, 0.01 min, 0.01 mL/min)
	for _, line := range strings.Split(string(data), "\n") {
		for _, key := range []string{"initial_c", "final_c", "rate_c_min", "hold_min", "initial_hold_min", "flow_ml_min"} {
			if !strings.HasPrefix(line, key+" = ") {
				continue
			}
			v := strings.TrimPrefix(line, key+" = ")
			if i := strings.Index(v, "."); i >= 0 {
				dec := len(strings.TrimSpace(v)) - i - 1
				max := 1
				if strings.Contains(key, "hold") || key == "flow_ml_min" {
					max = 2
				}
				if dec > max {
					t.Errorf("saved %s has %d decimals", line, dec)
				}
			}
		}
	}
	if !strings.Contains(string(data), "flow_ml_min = ") {
		t.Error("saved method has no flow")
	}
}

// compare --gas tries each carrier gas with its own optimized flow and
// cautions about hydrogen whenever it appears.
func TestCompareGasAxis(t *testing.T) {
	var j struct {
		Candidates []candidateJSON `json:"candidates"`
		Cautions   []string        `json:"cautions"`
	}
	runJSON(t, &j, "compare", "--json", "--gas", "helium,hydrogen", DemoArg)
	gases := map[string]bool{}
	for _, c := range j.Candidates {
		gases[c.Gas] = true
		if c.Carrier.FlowMLMin == nil {
			t.Errorf("%s: no optimized flow", c.Gas)
		}
	}
	if !gases["helium"] || !gases["hydrogen"] || len(j.Candidates) != 2 {
		t.Errorf("candidates %+v", j.Candidates)
	}
	if len(j.Cautions) == 0 || !strings.Contains(j.Cautions[0], "flammable") {
		t.Errorf("no hydrogen caution: %v", j.Cautions)
	}
	if code, _, _ := runCmd(t, "compare", "--gas", "argon", DemoArg); code != 2 {
		t.Errorf("unknown gas: exit %d, want 2", code)
	}
}
