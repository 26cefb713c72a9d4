package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// misspelled writes the scouting runs with the last run's "myrcene"
// misspelled "myrcne" and returns the path and the line of that key.
func misspelled(t *testing.T) (string, int) {
	t.Helper()
	data, err := os.ReadFile("../../testdata/scouting.toml")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(data), "\n")
	at := -1
	for i, l := range lines {
		if strings.HasPrefix(l, `"myrcene" =`) {
			at = i
		}
	}
	if at < 0 {
		t.Fatal("no myrcene line")
	}
	lines[at] = strings.Replace(lines[at], `"myrcene"`, `"myrcne"`, 1)
	p := filepath.Join(t.TempDir(), "m.toml")
	if err := os.WriteFile(p, []byte(strings.Join(lines, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	return p, at + 1
}

func TestMisspelledNameWarnedByFitCheckPlan(t *testing.T) {
	runs, line := misspelled(t)
	where := runs + ":" + strconv.Itoa(line)
	code, out, errs := runCmd(t, "fit", "../../testdata/demo.toml", runs)
	if code != 0 || !strings.Contains(out, "myrcne") || !strings.Contains(out, where) || !strings.Contains(out, "left out of the fit") {
		t.Fatalf("fit: exit %d, want the misspelling warned at %s:\n%s%s", code, where, out, errs)
	}
	code, out, errs = runCmd(t, "check", "../../testdata/demo.toml", runs)
	if !strings.Contains(out, "did you mean \"myrcene\"") || !strings.Contains(out, where) || !strings.Contains(out, "left out of the comparison") {
		t.Fatalf("check: exit %d, want the misspelling warned at %s as left out of the comparison:\n%s%s", code, where, out, errs)
	}
	code, out, errs = runCmd(t, "plan", "../../testdata/demo.toml", runs)
	if code != 0 || !strings.Contains(out, "warning: ") || !strings.Contains(out, "did you mean \"myrcene\"") || !strings.Contains(out, where) {
		t.Fatalf("plan: exit %d, want the fit's misspelling warning:\n%s%s", code, out, errs)
	}
	code, out, errs = runCmd(t, "plan", "--json", "../../testdata/demo.toml", runs)
	var j struct {
		Warnings []string `json:"warnings"`
	}
	if code != 0 || json.Unmarshal([]byte(out), &j) != nil {
		t.Fatalf("plan --json: exit %d\n%s%s", code, out, errs)
	}
	found := false
	for _, w := range j.Warnings {
		found = found || strings.Contains(w, "myrcne") && strings.Contains(w, "myrcene")
	}
	if !found {
		t.Fatalf("plan --json warnings lack the misspelling: %q", j.Warnings)
	}
}

// Every command that prints a program prints its safety cautions: plan and
// compare as simulate does (checks.Safety), here for the porous-layer demo
// that starts below ambient on a cryogenic coolant.
func TestCoolantCautionInPlanAndCompare(t *testing.T) {
	cryo := "Cryogenic coolant"
	code, out, errs := runCmd(t, "simulate", "../../testdata/demo-porous-layer.toml")
	if code != 0 || !strings.Contains(out, cryo) {
		t.Fatalf("simulate: exit %d, no cryogen caution:\n%s%s", code, out, errs)
	}
	code, out, errs = runCmd(t, "plan", "../../testdata/demo-porous-layer.toml")
	if code != 0 || !strings.Contains(out, "caution: a coolant is needed") || !strings.Contains(out, cryo) {
		t.Fatalf("plan: exit %d, no coolant caution:\n%s%s", code, out, errs)
	}
	code, out, errs = runCmd(t, "plan", "--json", "../../testdata/demo-porous-layer.toml")
	var pj struct {
		Cautions []string `json:"cautions"`
	}
	if code != 0 || json.Unmarshal([]byte(out), &pj) != nil || len(pj.Cautions) != 2 || !strings.Contains(pj.Cautions[1], cryo) {
		t.Fatalf("plan --json: exit %d, cautions %q\n%s", code, pj.Cautions, errs)
	}
	code, out, errs = runCmd(t, "compare", "../../testdata/demo-porous-layer.toml", "../../testdata/demo.toml")
	if code != 0 || !strings.Contains(out, "caution (row 1): a coolant is needed") || !strings.Contains(out, cryo) || strings.Contains(out, "row 2") {
		t.Fatalf("compare: exit %d, want the coolant caution for the porous-layer row only:\n%s%s", code, out, errs)
	}
	code, out, errs = runCmd(t, "compare", "--json", "--gas", "helium,hydrogen", "../../testdata/demo.toml")
	var cj struct {
		Cautions   []string `json:"cautions"`
		Candidates []struct {
			Gas      string   `json:"gas"`
			Cautions []string `json:"cautions"`
		} `json:"candidates"`
	}
	if code != 0 || json.Unmarshal([]byte(out), &cj) != nil || len(cj.Cautions) != 1 || !strings.Contains(cj.Cautions[0], "Hydrogen") {
		t.Fatalf("compare --json: exit %d, cautions %q\n%s", code, cj.Cautions, errs)
	}
	for _, c := range cj.Candidates {
		if (c.Gas == "hydrogen") != (len(c.Cautions) == 1) {
			t.Errorf("compare --json: %s row has cautions %q", c.Gas, c.Cautions)
		}
	}
}

// A compound whose ΔH the fit holds (ethanol, near the holdup time in the
// lab runs) keeps standard errors in the saved method: ΔH's is the
// method's prior (goal.robust.prior_dH_kJ_mol, 2 by default), ΔS's is
// widened along the ridge, and the table shows what is written.
func TestFitHeldDHWritesErrors(t *testing.T) {
	out := filepath.Join(t.TempDir(), "f.toml")
	code, text, errs := runCmd(t, "fit", "../../testdata/demo.toml", "../../testdata/lab/runs.toml", "--out", out)
	if code != 0 || !strings.Contains(text, "ΔH held") || !strings.Contains(text, "written with --out") {
		t.Fatalf("fit: exit %d\n%s%s", code, text, errs)
	}
	m, err := methodfile.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	code, text, _ = runCmd(t, "fit", "--json", "../../testdata/demo.toml", "../../testdata/lab/runs.toml")
	var j struct {
		Compounds []struct {
			Name   string   `json:"name"`
			SEDH   *float64 `json:"stderr_dH_kJ_mol"`
			SEDS   *float64 `json:"stderr_dS_J_mol_K"`
			Corr   *float64 `json:"corr_dH_dS"`
			HeldDH bool     `json:"dH_held"`
		} `json:"compounds"`
	}
	if code != 0 || json.Unmarshal([]byte(text), &j) != nil {
		t.Fatalf("fit --json: exit %d", code)
	}
	for _, c := range m.Compounds {
		if c.Name != "ethanol" {
			continue
		}
		if !c.HasSE || c.DHSE != methodfile.DefaultPriorDHkJ || c.DSSE < 1 || c.DHDSCorr < 0.9 || c.DHDSCorr > 1 {
			t.Fatalf("ethanol saved with se %v: dH_se %g dS_se %g corr %g", c.HasSE, c.DHSE, c.DSSE, c.DHDSCorr)
		}
		for _, x := range j.Compounds {
			if x.Name == "ethanol" && (!x.HeldDH || x.SEDH == nil || *x.SEDH != c.DHSE || x.SEDS == nil || math.Abs(*x.SEDS-c.DSSE) > 0.01*c.DSSE) {
				t.Fatalf("fit --json shows ethanol %+v, the file has dH_se %g dS_se %g", x, c.DHSE, c.DSSE)
			}
		}
		return
	}
	t.Fatal("no ethanol in the saved method")
}

// optimize's table never says "met" in the after column when the verdict
// is not met: on bench20 the first target stays below goal.min_first_k.
func TestOptimizeTableAgreesWithVerdict(t *testing.T) {
	code, out, errs := runCmd(t, "optimize", "../../testdata/bench20.toml")
	if code != 3 || !strings.Contains(out, "target NOT met") {
		t.Fatalf("exit %d, want 3 and the verdict not met:\n%s%s", code, out, errs)
	}
	for _, l := range strings.Split(out, "\n") {
		if !strings.HasPrefix(l, "min resolution") {
			continue
		}
		l = strings.TrimSpace(l)
		if strings.HasSuffix(l, " met") && !strings.HasSuffix(l, "not met") {
			t.Fatalf("the table says met while the verdict is not: %q", l)
		}
		if !strings.Contains(l, "first k(Te) 0.") || !strings.Contains(l, "< 0.5 not met") {
			t.Fatalf("the table does not give the reason (first k): %q", l)
		}
		return
	}
	t.Fatalf("no min resolution row:\n%s", out)
}

// plan's reasons: pairs counted once (at most n(n−1)/2), singular for one,
// z raised only for several pairs, corners named as optimize names them
// (robust.CornerName, "plate height +10 %", the minus sign −), and the
// margin's price as durations, never "-53 % longer".
func TestPlanWording(t *testing.T) {
	re := regexp.MustCompile(`\((\d+) pairs? of compounds weighed that (is|are) or could become critical`)
	for _, f := range []string{"../../testdata/demo-porous-layer.toml", "../../testdata/demo-packed.toml"} {
		m, err := methodfile.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		code, out, errs := runCmd(t, "plan", f)
		if code != 0 {
			t.Fatalf("%s: exit %d %s", f, code, errs)
		}
		g := re.FindStringSubmatch(out)
		if g == nil {
			t.Fatalf("%s: no pair count in:\n%s", f, out)
		}
		n, _ := strconv.Atoi(g[1])
		if most := len(m.Compounds) * (len(m.Compounds) - 1) / 2; n < 1 || n > most || (n == 1) != (g[2] == "is") {
			t.Errorf("%s: %q: %d pairs counted, at most %d exist", f, g[0], n, most)
		}
	}
	code, out, errs := runCmd(t, "plan", "../../testdata/demo.toml")
	if code != 0 {
		t.Fatalf("exit %d %s", code, errs)
	}
	why := strings.SplitN(strings.SplitN(out, "why: ", 2)[1], "\n", 2)[0]
	for _, bad := range []string{"raised for 0", "raised for 1 ", "1 pairs", "efficiency", "% longer", "-2 %", "-1 °C", "+-"} {
		if strings.Contains(why, bad) {
			t.Errorf("plan says %q: %s", bad, why)
		}
	}
	if !strings.Contains(why, "plate height +") || !strings.Contains(why, " min against ") {
		t.Errorf("plan's reason lacks the corner's plate height or the durations: %s", why)
	}
}

// Flows are printed at the flow keypad step (0.01 mL/min by default) in
// simulate, optimize and compare alike, and JSON times carry no binary
// noise (optimize: 1e-4 min).
func TestFlowAtKeypadStepAndRoundedJSON(t *testing.T) {
	_, out, _ := runCmd(t, "simulate", "../../testdata/demo.toml")
	if !strings.Contains(out, "helium 1.20 mL/min") {
		t.Errorf("simulate: flow not at the keypad step:\n%s", out)
	}
	_, out, _ = runCmd(t, "compare", "../../testdata/demo.toml")
	if !regexp.MustCompile(`helium \d+\.\d\d mL/min`).MatchString(out) {
		t.Errorf("compare: flow not at the keypad step:\n%s", out)
	}
	_, out, _ = runCmd(t, "optimize", "--json", "../../testdata/demo.toml")
	var j map[string]any
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"run_time_min", "cycle_time_min"} {
		x, _ := j[k].(float64)
		if x <= 0 || math.Abs(x*1e4-math.Round(x*1e4)) > 1e-6 {
			t.Errorf("optimize --json %s = %v, want at most 4 decimals", k, j[k])
		}
	}
}

// sweep suggests the value meant; compare names each row's objective and
// says when the ranking mixes run time and cycle time; the README's
// first-session sweep gives no invalid point on the optimized demo.
func TestSweepSuggestsAndCompareObjectives(t *testing.T) {
	code, _, errs := runCmd(t, "sweep", "../../testdata/demo.toml", "--vary", "initil_c", "--from", "40", "--to", "60")
	if code != 2 || !strings.Contains(errs, "did you mean initial_c?") {
		t.Errorf("sweep --vary initil_c: exit %d, %s", code, errs)
	}
	code, out, errs := runCmd(t, "compare", "../../testdata/demo.toml", "../../testdata/demo-porous-layer.toml")
	if code != 0 || !strings.Contains(out, "run time 11.90 min") || !strings.Contains(out, "cycle time ") || !strings.Contains(out, "the ranking mixes the two") {
		t.Errorf("compare: exit %d, rows do not name their objective:\n%s%s", code, out, errs)
	}
	fast := filepath.Join(t.TempDir(), "fast.toml")
	if code, _, errs := runCmd(t, "optimize", "--out", fast); code != 0 {
		t.Fatalf("optimize: exit %d %s", code, errs)
	}
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	g := regexp.MustCompile(`sweep /tmp/fast.toml --vary initial_c --from (\S+) --to (\S+)`).FindSubmatch(readme)
	if g == nil {
		t.Fatal("README has no first-session sweep")
	}
	code, out, errs = runCmd(t, "sweep", fast, "--vary", "initial_c", "--from", string(g[1]), "--to", string(g[2]))
	if code != 0 || strings.Contains(out, "not valid") || strings.Contains(out, "invalid") {
		t.Errorf("README's sweep: exit %d, invalid points:\n%s%s", code, out, errs)
	}
}

// fit warns of the scouting file's wide peaks (plate-height factor 1.438)
// and not of the lab runs' (about 1).
func TestFitWarnsFarPlateHeight(t *testing.T) {
	_, out, _ := runCmd(t, "fit", "../../testdata/demo.toml", "../../testdata/scouting.toml")
	if !strings.Contains(out, "warning: plate-height factor 1.438") || !strings.Contains(out, "common practice") {
		t.Errorf("no plate-height warning:\n%s", out)
	}
	_, out, _ = runCmd(t, "fit", "../../testdata/demo.toml", "../../testdata/lab/runs.toml")
	if strings.Contains(out, "warning: plate-height factor") {
		t.Errorf("plate-height warning on the lab runs:\n%s", out)
	}
}
