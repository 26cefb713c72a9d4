package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// optimize --out keeps the input file's comments: the new file is the
// input's text with only the program's values (and any new ramp) changed.
func TestOptimizeOutKeepsComments(t *testing.T) {
	src := "../../testdata/commented.toml"
	orig, _ := os.ReadFile(src)
	out := filepath.Join(t.TempDir(), "opt.toml")
	code, _, stderr := runCmd(t, "optimize", "--out", out, src)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	got, _ := os.ReadFile(out)
	for _, c := range []string{"# Citrus top-note screen", "# the pinenes come close: watch them", "# end of the list", "name = \"hexanal\"          # aldehyde"} {
		if !strings.Contains(string(got), c) {
			t.Errorf("lost %q", c)
		}
	}
	// Outside [oven] and its ramps, nothing changed.
	tail := func(s string) string { return s[strings.Index(s, "[goal]"):] }
	if tail(string(got)) != tail(string(orig)) {
		t.Errorf("changed outside the program:\n%s", tail(string(got)))
	}
}

// An output path that cannot be written is bad input (exit 2), and the
// message names the path the user gave, not a temporary file.
func TestOutputPathErrorsExit2(t *testing.T) {
	bad := filepath.Join(t.TempDir(), "no", "such", "folder", "x")
	for _, args := range [][]string{
		{"optimize", "--out", bad + ".toml"},
		{"export", "--csv", bad + ".csv", DemoArg},
		{"export", "--sheet", bad + ".md", DemoArg},
		{"export", "--png", bad + ".png", DemoArg},
		{"simulate", "--csv"}, // a control: writes to stdout, exit 0
	} {
		code, _, stderr := runCmd(t, args...)
		if args[0] == "simulate" {
			if code != 0 {
				t.Errorf("%v: exit %d", args, code)
			}
			continue
		}
		if code != 2 || !strings.Contains(stderr, bad) || strings.Contains(stderr, ".tmp-") {
			t.Errorf("%v: exit %d, stderr %q", args, code, stderr)
		}
	}
}

// optimize --out onto its own input keeps that file's comments.
func TestOptimizeOutInPlaceKeepsComments(t *testing.T) {
	orig, _ := os.ReadFile("../../testdata/commented.toml")
	p := filepath.Join(t.TempDir(), "m.toml")
	os.WriteFile(p, orig, 0o644)
	if code, _, stderr := runCmd(t, "optimize", "--out", p, p); code != 0 && code != 3 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	got, _ := os.ReadFile(p)
	if string(got) == string(orig) {
		t.Fatal("nothing written")
	}
	for _, c := range comments(string(orig)) {
		if !strings.Contains(string(got), c) && !strings.Contains(c, "ramp") && !strings.Contains(c, "bake") {
			t.Errorf("lost %q", c)
		}
	}
}

func comments(s string) []string {
	var out []string
	for _, l := range strings.Split(s, "\n") {
		if i := strings.Index(l, "#"); i >= 0 && !strings.Contains(l[:i], `"`) {
			out = append(out, strings.TrimSpace(l[i:]))
		}
	}
	return out
}
