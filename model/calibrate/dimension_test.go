package calibrate

import (
	"os"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// A fitted column value more than 15 % from the method's is warned, with
// the likely cause (runs under another carrier or column) and the remedy
// ([run.carrier]); one within 15 % is not.
func TestDimensionWarning(t *testing.T) {
	for _, c := range []struct {
		fitted, nominal float64
		warn            bool
	}{{0.25, 0.25, false}, {0.285, 0.25, false}, {0.331, 0.25, true}, {0.20, 0.25, true}, {1.2, 1.0, true}, {1.14, 1.0, false}} {
		w := dimensionWarning("column diameter", "mm", c.fitted, c.nominal)
		if (w != "") != c.warn || c.warn && (!strings.Contains(w, "[run.carrier]") || !strings.Contains(w, "another carrier")) {
			t.Errorf("%g against %g: %q", c.fitted, c.nominal, w)
		}
	}
}

// Helium scouting runs fitted against the method switched to hydrogen (at
// another flow): the fitted diameter is far from the column's 0.25 mm and
// the fit says why it may be; against the method they were made with, no
// such warning.
func TestFitWarnsRunsUnderAnotherCarrier(t *testing.T) {
	demo, err := os.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	fit := func(text string) *Report {
		t.Helper()
		m, err := methodfile.Parse("m.toml", []byte(text))
		if err != nil {
			t.Fatal(err)
		}
		runs, err := methodfile.ReadRuns("../../testdata/scouting.toml", m)
		if err != nil {
			t.Fatal(err)
		}
		rep, err := Fit(m, runs, Options{})
		if err != nil {
			t.Fatal(err)
		}
		return rep
	}
	has := func(rep *Report, what string) bool {
		for _, w := range rep.Warnings {
			if strings.HasPrefix(w, what) && strings.Contains(w, "[run.carrier]") {
				return true
			}
		}
		return false
	}
	if rep := fit(string(demo)); has(rep, "column diameter") {
		t.Errorf("diameter %.4f warned against the method the runs were made with: %q", rep.DiameterMM, rep.Warnings)
	}
	h2 := strings.Replace(string(demo), `gas = "helium"`, `gas = "hydrogen"`, 1)
	h2 = strings.Replace(h2, "flow_ml_min = 1.2", "flow_ml_min = 2.0", 1)
	if h2 == string(demo) {
		t.Fatal("demo text changed")
	}
	rep := fit(h2)
	if !rep.DiameterFitted || rep.DiameterMM < 0.25*1.15 || !has(rep, "column diameter") {
		t.Errorf("diameter %.4f (fitted %v): no warning: %q", rep.DiameterMM, rep.DiameterFitted, rep.Warnings)
	}
}
