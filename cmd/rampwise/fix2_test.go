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
