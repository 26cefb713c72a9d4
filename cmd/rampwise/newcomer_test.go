package main

import (
	"os"
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
		{"compare", ""}, {"plan", ""}, {"fit", "", "../../testdata/scouting.toml"},
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
	withStdin(t, "", func() {
		if code, _, errs := runCmd(t, "simulate", "-"); code != 2 || !strings.Contains(errs, "standard input is empty") {
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
