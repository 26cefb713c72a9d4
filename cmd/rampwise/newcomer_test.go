package main

import (
	"encoding/json"
	"os"
	"regexp"
	"runtime/debug"
	"strings"
	"testing"
)

// withStdin runs f with text as standard input.
func withStdin(t *testing.T, text string, f func()) {
	t.Helper()
	old, oldText := stdin, stdinText
	stdin, stdinText = strings.NewReader(text), nil
	defer func() { stdin, stdinText = old, oldText }()
	f()
}

// An empty file name is bad input on every command (an unset shell
// variable must not simulate the demo); - reads the method from standard
// input; @demo is the demo.
func TestEmptyNameAndStdin(t *testing.T) {
	for _, args := range [][]string{
		{"simulate", ""}, {"optimize", ""}, {"tui", ""}, {"export", "", "--csv", "x.csv"},
		{"sweep", "", "--vary", "rate_1", "--from", "5", "--to", "10"}, {"index", ""},
		{"compare", ""}, {"plan", ""}, {"fit", "", "../../testdata/scouting.toml"}, {"check", "", "../../testdata/lab/verify.csv"},
	} {
		code, out, errs := runCmd(t, args...)
		if code != 2 || !strings.Contains(errs, "empty file name") || out != "" {
			t.Errorf("%q: exit %d, stderr %q", args, code, errs)
		}
	}
	demo, err := os.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	// a changed copy on stdin must be what is simulated, not the demo
	changed := strings.Replace(string(demo), "final_c = 240.0", "final_c = 250.0", 1)
	var fromStdin, fromDemo string
	withStdin(t, changed, func() {
		code, out, errs := runCmd(t, "simulate", "-")
		if code != 0 {
			t.Fatalf("simulate -: exit %d: %s", code, errs)
		}
		fromStdin = out
	})
	_, fromDemo, _ = runCmd(t, "simulate", DemoArg)
	if fromStdin == fromDemo || !strings.Contains(fromStdin, "250") {
		t.Error("simulate - did not read the method from standard input")
	}
	if code, out, _ := runCmd(t, "simulate"); code != 0 || out != fromDemo {
		t.Error("no FILE and @demo differ")
	}
	// nothing piped in: - is the demo, as it always was, and says so
	withStdin(t, "", func() {
		if code, out, errs := runCmd(t, "simulate", "-"); code != 0 || out != fromDemo || !strings.Contains(errs, "built-in demo") {
			t.Errorf("empty stdin: exit %d %q", code, errs)
		}
	})
	withStdin(t, "[column\n", func() {
		if code, _, errs := runCmd(t, "simulate", "-"); code != 2 || !strings.Contains(errs, "<stdin>:1") {
			t.Errorf("bad stdin: exit %d %q", code, errs)
		}
	})
	withStdin(t, changed, func() {
		if code, _, errs := runCmd(t, "tui", "-"); code != 2 || !strings.Contains(errs, "standard input") {
			t.Errorf("tui -: exit %d %q", code, errs)
		}
	})
}

// notElutingDemo is the demo with a program that resolves every eluted
// pair (min Rs 1.71) but ends before nootkatone elutes.
func notElutingDemo(t *testing.T) string {
	t.Helper()
	demo, err := os.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(demo), "rate_c_min = 12.0\nfinal_c = 240.0\nhold_min = 2.0", "rate_c_min = 3.0\nfinal_c = 180.0\nhold_min = 0.0", 1)
	if text == string(demo) {
		t.Fatal("fixture did not change")
	}
	path := t.TempDir() + "/late.toml"
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// A target that does not elute within the program makes the result not
// met in simulate's summary and JSON, which names it.
func TestSimulateNotElutedTargetNotMet(t *testing.T) {
	path := notElutingDemo(t)
	code, out, errs := runCmd(t, "simulate", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "min Rs 1.71 not met (target 1.50; nootkatone does not elute)") {
		t.Errorf("summary does not say not met:\n%s", out)
	}
	code, out, errs = runCmd(t, "simulate", "--json", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var j struct {
		MinResolution    *float64 `json:"min_resolution"`
		GoalMet          *bool    `json:"goal_met"`
		TargetsNotEluted []string `json:"targets_not_eluted"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	if j.MinResolution == nil || *j.MinResolution < 1.5 || j.GoalMet == nil || *j.GoalMet || len(j.TargetsNotEluted) != 1 || j.TargetsNotEluted[0] != "nootkatone" {
		t.Errorf("JSON: min_resolution %v, goal_met %v, targets_not_eluted %v", j.MinResolution, j.GoalMet, j.TargetsNotEluted)
	}
	code, out, _ = runCmd(t, "simulate", "--json", DemoArg)
	if code != 0 || !strings.Contains(out, `"goal_met": false`) || !strings.Contains(out, `"targets_not_eluted": []`) {
		t.Errorf("demo JSON lacks goal_met/targets_not_eluted")
	}
	code, out, _ = runCmd(t, "sweep", path, "--vary", "final_1", "--from", "170", "--to", "180", "--steps", "2")
	if code != 0 || !strings.Contains(out, "not met") || !strings.Contains(out, "nootkatone does not elute") {
		t.Errorf("sweep does not say not met:\n%s", out)
	}
}

// Printed numbers carry no binary noise: the keypad-step note says what
// the oven takes at the step's precision, and sweep steps are on the
// keypad step (what the oven takes). Half-way values round in decimal,
// away from zero: 308.95 is 309.0 (a float rounding gave 308.9).
func TestNoRawFloatsInMessages(t *testing.T) {
	noise := regexp.MustCompile(`\d\.\d*(0000000|9999999)\d`)
	demo, err := os.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(demo), "initial_c = 50.0", "initial_c = 82.25", 1)
	text = strings.Replace(text, "final_c = 240.0", "final_c = 308.95", 1)
	path := t.TempDir() + "/h.toml"
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "simulate", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "the oven takes 82.3 °C") || !strings.Contains(out, "the oven takes 309.0 °C") || noise.MatchString(out) {
		t.Errorf("step notes:\n%s", out)
	}
	code, out, errs = runCmd(t, "sweep", DemoArg, "--vary", "final_1", "--from", "200", "--to", "310", "--steps", "4")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "\n236.7 ") || !strings.Contains(out, "(now 240.0)") || noise.MatchString(out) || strings.Contains(out, "236.66") {
		t.Errorf("sweep steps:\n%s", out)
	}
}

// Every command's usage lines name all its flags, and no flag shows a
// "(default NaN)".
func TestUsageComplete(t *testing.T) {
	flagLine := regexp.MustCompile(`(?m)^  -([a-z0-9-]+)`)
	for _, c := range commands {
		if c.name == "version" || c.name == "help" {
			continue
		}
		code, out, errs := runCmd(t, "help", c.name)
		if code != 0 {
			t.Fatalf("help %s: exit %d %s", c.name, code, errs)
		}
		if strings.Contains(out, "NaN") {
			t.Errorf("help %s shows NaN:\n%s", c.name, out)
		}
		usage, _, _ := strings.Cut(out, "\n\n")
		for _, m := range flagLine.FindAllStringSubmatch(out, -1) {
			if !strings.Contains(usage, "--"+m[1]) {
				t.Errorf("help %s: usage lines lack --%s:\n%s", c.name, m[1], usage)
			}
		}
	}
}

// The message on stderr shows a name with controls once escaped, as the
// method file's error writes it.
func TestDuplicateNameEscapedOnce(t *testing.T) {
	demo, err := os.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	evil := `ethanol\u001b]0;owned\u0007x`
	text := strings.Replace(string(demo), `name = "ethanol"`, `name = "`+evil+`"`, 1)
	text = strings.Replace(text, `name = "hexanal"`, `name = "`+evil+`"`, 1)
	path := t.TempDir() + "/dup.toml"
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs := runCmd(t, "simulate", path)
	if code != 2 || !strings.Contains(errs, `duplicate compound name "ethanol\x1b]0;owned\x07x"`) || strings.Contains(errs, `\\x1b`) || strings.ContainsAny(errs, "\x1b\x07") {
		t.Errorf("exit %d: %q", code, errs)
	}
}

// fit --out writes fitted values at the decimals the file keeps (the UI's
// fit rule, methodfile.RoundFitted), not 16 digits.
func TestFitOutRounded(t *testing.T) {
	out := t.TempDir() + "/o.toml"
	code, _, errs := runCmd(t, "fit", "../../testdata/demo.toml", "../../testdata/scouting.toml", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	long := regexp.MustCompile(`(?m)^(diameter_mm|plate_height_factor|dH_kJ_mol|dS_J_mol_K|dCp_J_mol_K) = -?\d+\.\d{5,}`)
	if m := long.FindAll(data, -1); len(m) > 0 {
		t.Errorf("long fitted values: %q", m)
	}
	if !regexp.MustCompile(`(?m)^dH_kJ_mol = -20\.063$`).Match(data) {
		t.Errorf("the first fitted ΔH is not at 3 decimals:\n%s", data)
	}
}

// version names the recorded revision, else the link-time commit, else
// says plainly that the build has no version control information.
func TestVersionWithoutVCS(t *testing.T) {
	info := &debug.BuildInfo{GoVersion: "go1.26", Main: debug.Module{Version: "(devel)"}}
	if got := versionFrom(info, true, ""); got != "rampwise (devel) (built without version control information, go1.26)" || strings.Contains(got, "unknown") {
		t.Errorf("no VCS: %q", got)
	}
	if got := versionFrom(info, true, "abc123"); got != "rampwise (devel) (commit abc123, go1.26)" {
		t.Errorf("link-time commit: %q", got)
	}
	info.Settings = []debug.BuildSetting{{Key: "vcs.revision", Value: "f00d"}, {Key: "vcs.modified", Value: "true"}, {Key: "vcs.time", Value: "2026-01-02T03:04:05Z"}}
	if got := versionFrom(info, true, "abc123"); got != "rampwise (devel) (commit f00d (modified), 2026-01-02T03:04:05Z, go1.26)" {
		t.Errorf("VCS: %q", got)
	}
	if got := versionFrom(nil, false, ""); got != "rampwise (no build information)" {
		t.Errorf("no build info: %q", got)
	}
}

// - as the RUNS of fit reads the runs file from standard input; - for both
// METHOD and RUNS is refused (standard input is read once).
func TestRunsFromStdin(t *testing.T) {
	runs, err := os.ReadFile("../../testdata/scouting.toml")
	if err != nil {
		t.Fatal(err)
	}
	var fromFile string
	_, fromFile, _ = runCmd(t, "fit", "../../testdata/demo.toml", "../../testdata/scouting.toml")
	withStdin(t, string(runs), func() {
		code, out, errs := runCmd(t, "fit", "../../testdata/demo.toml", "-")
		if code != 0 || out != fromFile {
			t.Errorf("fit METHOD -: exit %d %s", code, errs)
		}
	})
	withStdin(t, string(runs), func() {
		if code, _, errs := runCmd(t, "fit", "-", "-"); code != 2 || !strings.Contains(errs, "<stdin>") {
			t.Errorf("fit - -: exit %d %q", code, errs)
		}
	})
}
