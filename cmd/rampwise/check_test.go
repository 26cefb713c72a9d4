package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/andi"
)

func TestCheckNotMetJSON(t *testing.T) {
	code, out, stderr := runCmd(t, "check", "../../testdata/demo.toml", "../../testdata/lab/verify.csv", "--json")
	if code != 3 {
		t.Fatalf("exit %d (want 3: the demo's program leaves beta-pinene/myrcene below 1.5): %s", code, stderr)
	}
	var j map[string]any
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"compounds", "pairs", "min_resolution_measured", "critical_pair", "met"} {
		if _, ok := j[k]; !ok {
			t.Errorf("JSON lacks %s", k)
		}
	}
	if j["met"] != false {
		t.Error("met should be false")
	}
	for _, c := range j["compounds"].([]any) {
		cm := c.(map[string]any)
		for _, k := range []string{"name", "predicted_min", "measured_min", "delta_min"} {
			if _, ok := cm[k]; !ok {
				t.Errorf("compound lacks %s", k)
			}
		}
		if d, ok := cm["delta_min"].(float64); !ok || d > 0.02 || d < -0.02 {
			t.Errorf("%v: Δt %v", cm["name"], cm["delta_min"])
		}
	}
	p := j["pairs"].([]any)[0].(map[string]any)
	for _, k := range []string{"first", "second", "predicted_resolution", "measured_resolution"} {
		if _, ok := p[k]; !ok {
			t.Errorf("pair lacks %s", k)
		}
	}
	cp := j["critical_pair"].([]any)
	if len(cp) != 2 || cp[0] != "beta-pinene" || cp[1] != "myrcene" {
		t.Errorf("critical pair %v", cp)
	}
}

// optimize → inject (simulated, unnamed peak table) → check: met, exit 0.
func TestCheckMetAfterOptimize(t *testing.T) {
	dir := t.TempDir()
	opt := filepath.Join(dir, "opt.toml")
	if code, _, stderr := runCmd(t, "optimize", "../../testdata/demo.toml", "--out", opt); code != 0 {
		t.Fatalf("optimize exit %d: %s", code, stderr)
	}
	code, out, stderr := runCmd(t, "simulate", opt, "--json")
	if code != 0 {
		t.Fatalf("simulate: %s", stderr)
	}
	var sim struct {
		Peaks []struct {
			Name  string  `json:"name"`
			T     float64 `json:"retention_time_min"`
			Sigma float64 `json:"sigma_min"`
		} `json:"peaks"`
	}
	if err := json.Unmarshal([]byte(out), &sim); err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString("RT (min);Width (min);Area\n")
	for _, p := range sim.Peaks {
		fmt.Fprintf(&b, "%s;%s;100\n", strings.ReplaceAll(fmt.Sprintf("%.4f", p.T), ".", ","), strings.ReplaceAll(fmt.Sprintf("%.5f", 2.3548*p.Sigma), ".", ","))
	}
	run := filepath.Join(dir, "run.csv")
	os.WriteFile(run, []byte(b.String()), 0o644)
	code, out, stderr = runCmd(t, "check", opt, run)
	if code != 0 {
		t.Fatalf("check exit %d: %s%s", code, out, stderr)
	}
	if !strings.Contains(out, "MET: the target holds") {
		t.Errorf("%s", out)
	}
	// the same run as an AIA/ANDI chromatogram (peaks found in the trace)
	tr := &andi.Chromatogram{IntervalS: 0.05, Values: make([]float64, int((sim.Peaks[len(sim.Peaks)-1].T+1)*60/0.05))}
	for i := range tr.Values {
		tm := tr.Time(i)
		y := 5.0
		for _, p := range sim.Peaks {
			z := (tm - p.T) / p.Sigma
			if z > -10 && z < 10 {
				y += 1000 * math.Exp(-z*z/2)
			}
		}
		tr.Values[i] = y
	}
	cdf, err := andi.EncodeChromatogram(tr)
	if err != nil {
		t.Fatal(err)
	}
	cdfPath := filepath.Join(dir, "run.cdf")
	os.WriteFile(cdfPath, cdf, 0o644)
	if code, out, stderr = runCmd(t, "check", opt, cdfPath, "--json"); code != 0 {
		t.Errorf("check of the chromatogram: exit %d: %s%s", code, out, stderr)
	}
	// the same run with the critical pair's second peak gone: a target is missing, not met
	lines := strings.Split(b.String(), "\n")
	os.WriteFile(run, []byte(strings.Join(append(lines[:5:5], lines[6:]...), "\n")), 0o644)
	if code, out, _ = runCmd(t, "check", opt, run); code != 3 {
		t.Errorf("a missing peak still met (exit %d): %s", code, out)
	}
}

func TestCheckBadInput(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("RT (min),Area\n1.0,5\nxyz,6\n2.0,7\n"), 0o644)
	code, _, stderr := runCmd(t, "check", "../../testdata/demo.toml", bad)
	if code != 2 || !strings.Contains(stderr, "bad.csv:3") || !strings.Contains(stderr, `"xyz" is not a number`) {
		t.Errorf("exit %d: %s", code, stderr)
	}
	code, _, stderr = runCmd(t, "check", "../../testdata/demo.toml", filepath.Join(dir, "none.cdf"))
	if code != 2 {
		t.Errorf("missing file: exit %d: %s", code, stderr)
	}
	if code, _, _ := runCmd(t, "check", "../../testdata/demo.toml", "../../testdata/lab/verify.csv", "--out", "x.toml"); code != 2 {
		t.Errorf("--out without --refit: exit %d", code)
	}
}

func TestCheckRefitWithRuns(t *testing.T) {
	out := filepath.Join(t.TempDir(), "refit.toml")
	code, stdout, stderr := runCmd(t, "check", "../../testdata/demo.toml", "../../testdata/lab/verify.csv", "--refit", "--runs", "../../testdata/lab/runs.toml", "--out", out)
	if code != 3 || !strings.Contains(stdout, "refitted") {
		t.Fatalf("exit %d: %s %s", code, stdout, stderr)
	}
	b, err := os.ReadFile(out)
	if err != nil || !strings.Contains(string(b), "dH_se_kJ_mol") || !strings.Contains(string(b), "dH_dS_corr") {
		t.Errorf("refitted method lacks the standard errors: %v", err)
	}
}

func TestFitLabFilesMisspelled(t *testing.T) {
	dir := t.TempDir()
	for _, f := range []string{"runs.toml", "scout-5.csv", "scout-10.csv", "scout-20.txt", "scout-8.cdf"} {
		b, err := os.ReadFile(filepath.Join("../../testdata/lab", f))
		if err != nil {
			t.Fatal(err)
		}
		if f == "scout-5.csv" {
			b = []byte(strings.Replace(string(b), ",limonene", ",limonen", 1))
		}
		os.WriteFile(filepath.Join(dir, f), b, 0o644)
	}
	code, out, stderr := runCmd(t, "fit", "../../testdata/demo.toml", filepath.Join(dir, "runs.toml"), "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var j struct {
		Compounds   []map[string]any `json:"compounds"`
		Warnings    []string         `json:"warnings"`
		Assignments []map[string]any `json:"assignments"`
		DOF         int              `json:"residual_dof"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(j.Warnings, "\n"), `did you mean "limonene"`) {
		t.Errorf("warnings %v", j.Warnings)
	}
	for _, c := range j.Compounds {
		if c["name"] == "limonen" {
			t.Error("misspelling fitted as a compound")
		}
	}
	if len(j.Assignments) < 50 || j.DOF < 20 {
		t.Errorf("%d assignments, %d dof", len(j.Assignments), j.DOF)
	}
}
