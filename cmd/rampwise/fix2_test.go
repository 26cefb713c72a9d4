package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
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
