package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// fit --with-dcp on three runs: ΔCp held (said so), the table printed, the
// method saved and valid, exit 0.
func TestFitWithDCpThreeRunsOut(t *testing.T) {
	out := filepath.Join(t.TempDir(), "fitted.toml")
	code, stdout, errs := runCmd(t, "fit", "--with-dcp", "--out", out, "../../testdata/demo.toml", "../../testdata/scouting.toml")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(stdout, "compound") || !strings.Contains(stdout, "ΔCp not fitted") {
		t.Errorf("no table or no ΔCp warning:\n%s", stdout)
	}
	m, err := methodfile.ReadFile(out)
	if err != nil {
		t.Fatalf("saved method: %v", err)
	}
	for _, c := range m.Compounds {
		if c.DCp != 0 {
			t.Errorf("%s: ΔCp %.1f written from three runs", c.Name, c.DCp)
		}
	}
}

// A save that cannot be made is bad input (exit 2) naming the user's path.
func TestFitOutFailureNamesPath(t *testing.T) {
	out := filepath.Join(t.TempDir(), "no-such-dir", "fitted.toml")
	code, _, errs := runCmd(t, "fit", "--out", out, "../../testdata/demo.toml", "../../testdata/scouting.toml")
	if code != 2 || !strings.Contains(errs, out) {
		t.Errorf("exit %d, message %q", code, errs)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("file written")
	}
}

// The large-± flag of the UI is fit's too: ethyl acetate's ± 7.9 kJ/mol.
func TestFitFlagsLargeError(t *testing.T) {
	code, stdout, errs := runCmd(t, "fit", "../../testdata/demo.toml", "../../testdata/scouting.toml")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, line := range strings.Split(stdout, "\n") {
		if strings.Contains(line, "ethyl acetate ") && strings.Contains(line, "-") && !strings.Contains(line, "warning") && !strings.Contains(line, "⚠ large ±") {
			t.Errorf("row not marked: %q", line)
		}
	}
	if !strings.Contains(stdout, "warning: ethyl acetate: large standard errors") {
		t.Errorf("no warning:\n%s", stdout)
	}
}
