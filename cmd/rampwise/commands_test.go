package main

import (
	"strings"
	"testing"
)

// Every command's `help NAME` and `NAME --help` print the same text on
// stdout, nothing on stderr, and exit 0; the overview lists every command.
func TestHelpAgreesForEveryCommand(t *testing.T) {
	code, overview, errs := runCmd(t, "help")
	if code != 0 || errs != "" {
		t.Fatalf("help: exit %d, stderr %q", code, errs)
	}
	for _, c := range commands {
		if !strings.Contains(overview, "rampwise "+c.name) {
			t.Errorf("overview lacks %s", c.name)
		}
		code1, out1, err1 := runCmd(t, "help", c.name)
		code2, out2, err2 := runCmd(t, c.name, "--help")
		if code1 != 0 || code2 != 0 || err1 != "" || err2 != "" {
			t.Errorf("%s: exits %d/%d, stderr %q / %q", c.name, code1, code2, err1, err2)
		}
		if out1 != out2 || !strings.Contains(out1, "Usage: rampwise "+c.name) {
			t.Errorf("%s: help NAME and NAME --help differ or lack the usage line:\n%s\n---\n%s", c.name, out1, out2)
		}
	}
	if code, out, _ := runCmd(t, "help", "help"); code != 0 || !strings.Contains(out, "Usage: rampwise help") {
		t.Errorf("help help: exit %d\n%s", code, out)
	}
	if code, _, errs := runCmd(t, "help", "frobnicate"); code != 2 || !strings.Contains(errs, "unknown command") {
		t.Errorf("help of an unknown command: exit %d %q", code, errs)
	}
}

// A bad flag gives one error line on stderr (not the flag package's own
// message and usage as well) and exit 2.
func TestBadFlagErrorOnce(t *testing.T) {
	code, out, errs := runCmd(t, "simulate", "--bogus")
	if code != 2 || out != "" {
		t.Errorf("exit %d, stdout %q", code, out)
	}
	if n := strings.Count(errs, "bogus"); n != 1 || strings.Count(errs, "\n") != 1 {
		t.Errorf("stderr %q: want the error once, on one line", errs)
	}
}

// Flag values outside their range are refused with the allowed range.
func TestAbsurdFlagValues(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"optimize", "--ramps", "0"}, "--ramps: 0 is out of range (allowed: whole numbers from 1 to 5)"},
		{[]string{"optimize", "--min-resolution", "5e-324"}, "--min-resolution: 5e-324 is out of range (allowed: from 0.01 to 100)"},
		{[]string{"optimize", "--objective", "speed"}, "not one of run-time, cycle-time"},
	}
	for _, c := range cases {
		code, _, errs := runCmd(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d %q (want …%s…)", c.args, code, errs, c.want)
		}
	}
}

// `-` stands for the built-in demo wherever a METHOD is taken.
func TestDashIsTheDemo(t *testing.T) {
	for _, args := range [][]string{{"simulate", DemoArg}, {"index", DemoArg}, {"sweep", DemoArg, "--vary", "rate_1", "--from", "5", "--to", "10", "--steps", "2"}} {
		_, _, errs := runCmd(t, args...)
		if strings.Contains(errs, "cannot read") {
			t.Errorf("%v: %s", args, errs)
		}
	}
	if code, out, _ := runCmd(t, "simulate", DemoArg); code != 0 || !strings.Contains(out, "critical pair") {
		t.Errorf("simulate -: exit %d", code)
	}
}

func TestVersion(t *testing.T) {
	for _, args := range [][]string{{"version"}, {"--version"}} {
		code, out, errs := runCmd(t, args...)
		if code != 0 || errs != "" || !strings.HasPrefix(out, "rampwise ") || !(strings.Contains(out, "commit ") || strings.Contains(out, "built without version control information")) {
			t.Errorf("%v: exit %d %q %q", args, code, out, errs)
		}
	}
	if code, _, _ := runCmd(t, "version", "extra"); code != 2 {
		t.Errorf("version with an argument: exit %d", code)
	}
}
