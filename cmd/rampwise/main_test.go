package main

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

func runCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestSimulateDemoJSON(t *testing.T) {
	code, out, stderr := runCmd(t, "simulate", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var j map[string]any
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"holdup_time_min", "run_time_min", "cycle_time_min", "peaks", "pairs", "min_resolution", "critical_pair"} {
		if _, ok := j[k]; !ok {
			t.Errorf("JSON lacks %s", k)
		}
	}
	peaks := j["peaks"].([]any)
	prev := 0.0
	for _, p := range peaks {
		pk := p.(map[string]any)
		for _, k := range []string{"name", "retention_time_min", "sigma_min", "elution_temp_c", "retention_factor_at_elution", "eluted"} {
			if _, ok := pk[k]; !ok {
				t.Errorf("peak lacks %s", k)
			}
		}
		tr := pk["retention_time_min"].(float64)
		if tr < prev {
			t.Error("peaks not sorted by retention time")
		}
		prev = tr
	}
	if cp := j["critical_pair"].([]any); len(cp) != 2 {
		t.Errorf("critical pair %v", cp)
	}
}

func TestSimulateFlagAfterFile(t *testing.T) {
	code, out, _ := runCmd(t, "simulate", "../../testdata/demo.toml", "--csv")
	if code != 0 || !strings.HasPrefix(out, "name,retention_time_min") {
		t.Errorf("exit %d, output %.80q", code, out)
	}
}

func TestHelpAndBadFlags(t *testing.T) {
	if code, out, _ := runCmd(t, "--help"); code != 0 || !strings.Contains(out, "simulate") {
		t.Errorf("--help: %d", code)
	}
	if code, out, _ := runCmd(t, "simulate", "--help"); code != 0 || !strings.Contains(out, "holdup") {
		t.Errorf("simulate --help: %d %q", code, out)
	}
	if code, _, _ := runCmd(t, "simulate", "--bogus"); code != 2 {
		t.Errorf("bad flag: exit %d", code)
	}
	if code, _, _ := runCmd(t, "frobnicate"); code != 2 {
		t.Errorf("unknown command: exit %d", code)
	}
	if code, _, _ := runCmd(t, "simulate", "a.toml", "b.toml"); code != 2 {
		t.Errorf("two files: exit %d", code)
	}
	if code, _, errs := runCmd(t, "simulate", "/nonexistent/m.toml"); code != 2 || !strings.Contains(errs, "/nonexistent/m.toml") {
		t.Errorf("missing file: exit %d %q", code, errs)
	}
}

// Every file of the bad-input corpus gets exit 2 from every command, a
// message naming the file (and the expected fragment), and no stack trace.
func TestBadInputCorpus(t *testing.T) {
	f, err := os.Open("../../testdata/bad/expect.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	n := 0
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || line == "" {
			continue
		}
		name, frag, _ := strings.Cut(line, "\t")
		path := filepath.Join("../../testdata/bad", name)
		n++
		for _, cmd := range [][]string{{"simulate"}, {"simulate", "--json"}, {"simulate", "--csv"}, {"optimize", "--json"},
			{"tui"}, {"index"}, {"export", "--csv", filepath.Join(t.TempDir(), "x.csv")}, {"sweep", "--vary", "initial_c", "--from", "40", "--to", "60"},
			{"compare"}, {"fit", "@", "../../testdata/scouting.toml"}} {
			args := append([]string{}, cmd...)
			if len(args) >= 2 && args[len(args)-2] == "@" {
				args[len(args)-2] = path
			} else {
				args = append(args, path)
			}
			code, _, errs := runCmd(t, args...)
			if code != 2 {
				t.Errorf("%s %s: exit %d, want 2 (%s)", strings.Join(cmd, " "), name, code, errs)
			}
			if !strings.Contains(errs, path) {
				t.Errorf("%s: message does not name the file: %q", name, errs)
			}
			if frag != "" && !strings.Contains(errs, frag) {
				t.Errorf("%s: message %q lacks %q", name, errs, frag)
			}
			if strings.Contains(errs, "goroutine ") || strings.Contains(errs, "panic") {
				t.Errorf("%s: stack trace: %s", name, errs)
			}
		}
	}
	if n < 40 {
		t.Errorf("corpus has %d files, want at least 40", n)
	}
}

func TestTenMegabyteFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "big.toml")
	if err := os.WriteFile(path, bytes.Repeat([]byte("# padding line\n"), 700000), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs := runCmd(t, "simulate", path)
	if code != 2 || !strings.Contains(errs, "larger than") {
		t.Errorf("exit %d: %q", code, errs)
	}
}

// optimize --out writes a method that simulate reads back with the
// resolution optimize reported.
func TestOptimizeOutRoundTrip(t *testing.T) {
	out := filepath.Join(t.TempDir(), "opt.toml")
	code, stdout, errs := runCmd(t, "optimize", "--json", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var oj optimizeJSON
	if err := json.Unmarshal([]byte(stdout), &oj); err != nil {
		t.Fatal(err)
	}
	if !oj.Feasible || *oj.MinResolution < oj.TargetRs {
		t.Errorf("feasible %v Rs %v", oj.Feasible, *oj.MinResolution)
	}
	code, stdout, errs = runCmd(t, "simulate", "--json", out)
	if code != 0 {
		t.Fatalf("simulate of saved: exit %d %s", code, errs)
	}
	var sj simulateJSON
	json.Unmarshal([]byte(stdout), &sj)
	if sj.MinResolution == nil || *sj.MinResolution != *oj.MinResolution || sj.RunTime != oj.RunTime {
		t.Errorf("saved method simulates to Rs %v run %v; optimize said %v %v", sj.MinResolution, sj.RunTime, *oj.MinResolution, oj.RunTime)
	}
}

func TestOptimizeUnreachableExit3(t *testing.T) {
	demo, _ := os.ReadFile("../../testdata/demo.toml")
	text := string(demo) + "\n[[compound]]\nname = \"limonene twin\"\nformula = \"C10H16\"\ndH_kJ_mol = -59.715\ndS_J_mol_K = -105.10\n"
	// the twin copies limonene's parameters exactly
	text = strings.Replace(text, "dH_kJ_mol = -59.715\ndS_J_mol_K = -105.10", limonene(t, string(demo)), 1)
	path := filepath.Join(t.TempDir(), "twin.toml")
	os.WriteFile(path, []byte(text), 0o644)
	code, stdout, errs := runCmd(t, "optimize", "--json", path)
	if code != 3 {
		t.Fatalf("exit %d, want 3: %s", code, errs)
	}
	if !strings.Contains(stdout, "limonene twin") || !strings.Contains(stdout, "another stationary phase") {
		t.Errorf("output does not name the pair and the reason:\n%s", stdout)
	}
}

func limonene(t *testing.T, demo string) string {
	i := strings.Index(demo, `name = "limonene"`)
	if i < 0 {
		t.Fatal("demo has no limonene")
	}
	rest := demo[i:]
	a := strings.Index(rest, "dH_kJ_mol")
	b := strings.Index(rest, "\namount")
	return rest[a:b]
}

func TestBadRunsCorpus(t *testing.T) { checkBadRunsCorpus(t, "fit") }

func TestFitOutAndIndex(t *testing.T) {
	out := filepath.Join(t.TempDir(), "fitted.toml")
	code, stdout, errs := runCmd(t, "fit", "--json", "--out", out, "../../testdata/demo.toml", "../../testdata/scouting.toml")
	if code != 0 {
		t.Fatalf("fit: exit %d %s", code, errs)
	}
	var j map[string]any
	if err := json.Unmarshal([]byte(stdout), &j); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"compounds", "column", "warnings"} {
		if _, ok := j[k]; !ok {
			t.Errorf("fit JSON lacks %s", k)
		}
	}
	if code, _, errs := runCmd(t, "simulate", out); code != 0 {
		t.Errorf("fitted method does not simulate: %s", errs)
	}
	if code, _, _ := runCmd(t, "fit", "--with-dcp", "../../testdata/demo.toml", "../../testdata/scouting.toml"); code != 0 {
		t.Errorf("--with-dcp with three runs: exit %d", code)
	}
	code, stdout, _ = runCmd(t, "index", "--json", "../../testdata/index.toml")
	if code != 0 || !strings.Contains(stdout, `"index": 1000`) {
		t.Errorf("index: exit %d\n%s", code, stdout)
	}
	if code, _, _ := runCmd(t, "index", "../../testdata/demo.toml"); code != 2 {
		t.Errorf("index without a ladder: exit %d", code)
	}
}

// A method breaking an instrument limit (the inlet pressure a constant flow
// needs, a ramp faster than the oven) is refused by every command: exit 2
// with file, line and key.
func TestInstrumentLimitsRefusedEverywhere(t *testing.T) {
	demo, _ := os.ReadFile("../../testdata/demo.toml")
	pressure := strings.Replace(string(demo), "max_inlet_kpa = 690.0", "max_inlet_kpa = 120.0", 1)
	pressure = strings.Replace(pressure, "flow_ml_min = 1.2", "flow_ml_min = 2.0", 1)
	rate := strings.Replace(string(demo), "rate_c_min = 12.0", "rate_c_min = 100.0", 1)
	for _, c := range []struct {
		text string
		want []string
	}{
		{pressure, []string{"p.toml:16: carrier.flow_ml_min: constant flow of 2 mL/min needs", "above the instrument's inlet limit 120 kPa"}},
		{rate, []string{"p.toml:24: oven.ramp[1].rate_c_min: 100 °C/min is faster than the oven's limit 60 °C/min (limits.max_rate_c_min)"}},
	} {
		path := filepath.Join(t.TempDir(), "p.toml")
		os.WriteFile(path, []byte(c.text), 0o644)
		for _, args := range [][]string{{"simulate", path}, {"export", "--csv", filepath.Join(t.TempDir(), "x.csv"), path}, {"optimize", path},
			{"sweep", "--vary", "rate_1", "--from", "5", "--to", "20", path}, {"compare", path},
			{"fit", path, "../../testdata/scouting.toml"}, {"index", path}, {"tui", path}} {
			code, _, errs := runCmd(t, args...)
			ok := code == 2 && strings.Count(errs, "\n") == 1
			for _, w := range c.want {
				ok = ok && strings.Contains(errs, w)
			}
			if !ok {
				t.Errorf("%s: exit %d:\n%s", args[0], code, errs)
			}
		}
	}
}

// export --csv numbers equal simulate --json.
func TestExportCSVEqualsSimulateJSON(t *testing.T) {
	dir := t.TempDir()
	csvPath := filepath.Join(dir, "peaks.csv")
	if code, _, errs := runCmd(t, "export", DemoArg, "--csv", csvPath, "--sheet", filepath.Join(dir, "s.md")); code != 0 {
		t.Fatalf("export: %s", errs)
	}
	_, out, _ := runCmd(t, "simulate", "--json")
	var sj simulateJSON
	json.Unmarshal([]byte(out), &sj)
	f, _ := os.Open(csvPath)
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for i, pk := range sj.Peaks {
		tr, _ := strconv.ParseFloat(rows[i+1][1], 64)
		sig, _ := strconv.ParseFloat(rows[i+1][3], 64)
		if rows[i+1][0] != pk.Name || tr != *pk.RetentionTime || sig != *pk.Sigma {
			t.Errorf("row %d: %v vs %s %v %v", i, rows[i+1], pk.Name, *pk.RetentionTime, *pk.Sigma)
		}
	}
	if code, _, _ := runCmd(t, "export", DemoArg); code != 2 {
		t.Error("export with nothing to write should be bad input")
	}
	if code, _, _ := runCmd(t, "sweep", DemoArg, "--vary", "rate_7", "--from", "1", "--to", "2"); code != 2 {
		t.Error("sweep of a missing ramp should be bad input")
	}
}

// compare's rows equal optimize run on each candidate alone.
func TestCompareRowsEqualOptimize(t *testing.T) {
	var j struct {
		Candidates []candidateJSON `json:"candidates"`
	}
	runJSON(t, &j, "compare", "--json", "--length", "20,40", DemoArg)
	if len(j.Candidates) != 2 {
		t.Fatalf("%d candidates", len(j.Candidates))
	}
	for _, c := range j.Candidates {
		demo, _ := os.ReadFile("../../testdata/demo.toml")
		text := strings.Replace(string(demo), "length_m = 30.0", "length_m = "+strconv.FormatFloat(c.Length, 'f', 1, 64), 1)
		path := filepath.Join(t.TempDir(), "c.toml")
		os.WriteFile(path, []byte(text), 0o644)
		code, out, _ := runCmd(t, "optimize", "--json", path)
		var oj optimizeJSON
		json.Unmarshal([]byte(out), &oj)
		if code != 0 || math.Abs(oj.RunTime-c.RunTime) > 1e-6 {
			t.Errorf("%g m: compare %.4f min, optimize alone %.4f (exit %d)", c.Length, c.RunTime, oj.RunTime, code)
		}
	}
	if j.Candidates[0].Time > j.Candidates[1].Time {
		t.Error("not ranked fastest first")
	}
}
