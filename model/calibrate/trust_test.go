package calibrate

import (
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// demoRuns reads the demo's scouting runs, with edit applied to the text.
func demoRuns(t *testing.T, m *methodfile.Method, edit func(string) string) *methodfile.Runs {
	t.Helper()
	b, err := os.ReadFile("../../testdata/scouting.toml")
	if err != nil {
		t.Fatal(err)
	}
	text := string(b)
	if edit != nil {
		text = edit(text)
	}
	runs, err := methodfile.ParseRuns("scouting.toml", []byte(text), m)
	if err != nil {
		t.Fatal(err)
	}
	return runs
}

func mustFit(t *testing.T, m *methodfile.Method, runs *methodfile.Runs, opt Options) *Report {
	t.Helper()
	rep, err := Fit(m, runs, opt)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// The demo's three runs with --with-dcp: three parameters from three runs
// would leave no residual freedom (ΔCp −8873 J/(mol·K) was fitted and
// written); ΔCp is held at the method's value and the fit says so; the
// method written validates.
func TestWithDCpThreeRunsHoldsDCp(t *testing.T) {
	m := demo(t)
	rep := mustFit(t, m, demoRuns(t, m, nil), Options{WithDCp: true})
	if !anyWarning(rep, "ΔCp not fitted") {
		t.Errorf("no warning that ΔCp was not fitted: %v", rep.Warnings)
	}
	for _, f := range rep.Compounds {
		if f.DCp != 0 || finite(f.StdErrDCp) {
			t.Errorf("%s: ΔCp %.1f ± %v from three runs, want held at the method's 0", f.Name, f.DCp, f.StdErrDCp)
		}
	}
	if rep.DOF < len(rep.Compounds) || rep.SDAssumed {
		t.Errorf("%d degrees of freedom (assumed %v), want one per compound", rep.DOF, rep.SDAssumed)
	}
	if err := rep.Method.Validate(); err != nil {
		t.Errorf("fitted method does not validate: %v", err)
	}
}

// A fitted value outside the method file's ranges (here ΔCp 1500 J/(mol·K),
// allowed ±1000) is never written: the method keeps its values and a
// warning names the compound.
func TestOutOfRangeFitNotWritten(t *testing.T) {
	truth := truthMethod(t)
	truth.Compounds = truth.Compounds[5:9]
	truth.Compounds[1].DCp = 1500
	scouts := []scout{linear("a", 40, 1, 3, 280), linear("b", 40, 1, 10, 280), linear("c", 40, 1, 30, 280), linear("d", 120, 0, 5, 280)}
	text := runsText(t, truth, scouts, 0.0005, 3, nil)
	start := demo(t)
	start.Compounds = start.Compounds[5:9]
	rep := fitText(t, start, text, Options{WithDCp: true})
	name := truth.Compounds[1].Name
	var got *CompoundFit
	for i := range rep.Compounds {
		if rep.Compounds[i].Name == name {
			got = &rep.Compounds[i]
		}
	}
	if got == nil || !(got.DCp > 1000) {
		t.Fatalf("%s: fit %+v, want ΔCp beyond 1000", name, got)
	}
	if !got.NotWritten || !anyWarning(rep, name+": the fitted values are outside what a method file allows") {
		t.Errorf("%s: ΔCp %.0f not reported as out of range: %v", name, got.DCp, rep.Warnings)
	}
	c := rep.Method.Compounds[compoundIndex(rep.Method, name)]
	if c.DCp != start.Compounds[1].DCp || c.DHkJ != start.Compounds[1].DHkJ || c.DS != start.Compounds[1].DS {
		t.Errorf("%s written as %+v, want the method's values kept", name, c)
	}
	if err := rep.Method.Validate(); err != nil {
		t.Errorf("fitted method does not validate: %v", err)
	}
}

// A 0.09 min error in one of three runs: leaving any run out fits the
// other two exactly and every choice gives plausible parameters, so the
// fit cannot tell which run is wrong. It must say so and leave out none
// (it used to drop scout-8, a correct run).
func TestThreeRunErrorNotIdentifiable(t *testing.T) {
	m := demo(t)
	runs := demoRuns(t, m, func(s string) string {
		return strings.Replace(s, `"limonene" = 17.3597`, `"limonene" = 17.45`, 1)
	})
	rep := mustFit(t, m, runs, Options{})
	for _, o := range rep.Outliers {
		if o.Compound == "limonene" {
			t.Errorf("run %q left out although the runs cannot tell which is wrong", o.Run)
		}
	}
	ok := false
	for _, s := range rep.Suspects {
		if s.Compound == "limonene" && len(s.Runs) == 3 {
			ok = true
		}
	}
	if !ok || !anyWarning(rep, "cannot tell which run is wrong") || !anyWarning(rep, `"scout-4", "scout-8", "scout-16"`) {
		t.Errorf("not reported as unidentifiable: %+v %v", rep.Suspects, rep.Warnings)
	}
}

// The newcomer's case: scout-4's limonene typed as myrcene's 15.2534. The
// runs single out scout-4 (leaving out either other run gives parameters
// far off the ΔH–ΔS line); a correct run is never the one dropped.
func TestGrossErrorDropsTheWrongRunNever(t *testing.T) {
	m := demo(t)
	runs := demoRuns(t, m, func(s string) string {
		return strings.Replace(s, `"limonene" = 17.3597`, `"limonene" = 15.2534`, 1)
	})
	rep := mustFit(t, m, runs, Options{})
	for _, o := range rep.Outliers {
		if o.Compound == "limonene" && o.Run != "scout-4" {
			t.Errorf("correct run %q dropped", o.Run)
		}
	}
	for _, f := range rep.Compounds {
		if f.Name == "limonene" && (math.Abs(f.DHkJ+59.72) > 1 || math.Abs(f.DS+105.1) > 2) {
			t.Errorf("limonene fitted at ΔH %.2f, ΔS %.2f", f.DHkJ, f.DS)
		}
	}
}

// Implausible parameters are always warned: with two runs a gross error
// cannot be found by residuals (the fit passes exactly through both), but
// ΔS far off the ΔH–ΔS trend of the other compounds gives it away.
func TestImplausibleParametersWarned(t *testing.T) {
	m := demo(t)
	runs := demoRuns(t, m, func(s string) string {
		s = strings.Replace(s, `"limonene" = 17.3597`, `"limonene" = 15.2534`, 1)
		parts := strings.Split(s, "[[run]]")
		return parts[0] + "[[run]]" + parts[1] + "[[run]]" + parts[3] // scout-4 and scout-16
	})
	rep := mustFit(t, m, runs, Options{})
	if !anyWarning(rep, "limonene: fitted ΔH") || !anyWarning(rep, "implausible") {
		t.Errorf("no plausibility warning for limonene: %v", rep.Warnings)
	}
	// and none on the clean runs
	clean := mustFit(t, m, demoRuns(t, m, nil), Options{})
	if anyWarning(clean, "implausible") {
		t.Errorf("plausibility warning on clean runs: %v", clean.Warnings)
	}
}

// A large standard error (the UI's ⚠ thresholds, shared) is warned by fit
// (for a held ΔH by the warning that says it is held).
func TestLargeStandardErrorWarned(t *testing.T) {
	m := demo(t)
	rep := mustFit(t, m, demoRuns(t, m, nil), Options{})
	for _, f := range rep.Compounds {
		large := f.StdErrDH > LargeSEDHkJ || f.StdErrDS > LargeSEDS
		if large != f.LargeError() {
			t.Errorf("%s: LargeError %v for ±%.2f, ±%.2f", f.Name, f.LargeError(), f.StdErrDH, f.StdErrDS)
		}
		// a held ΔH (its ± the prior) is explained by the held-ΔH warning
		if w := anyWarning(rep, f.Name+": large standard errors"); w != (large && !f.HeldDH) {
			t.Errorf("%s: ±%.2f kJ/mol, ±%.2f J/(mol·K): warned %v", f.Name, f.StdErrDH, f.StdErrDS, w)
		}
		if f.Name == "ethyl acetate" && !large {
			t.Errorf("ethyl acetate ±%.2f kJ/mol not large", f.StdErrDH)
		}
	}
}

// The homologous-rule message says what was done: ΔH is −(9 + 4.9 n) for
// the n it names, to the printed precision.
func TestHomologousRuleMessageMatchesValue(t *testing.T) {
	m := demo(t)
	rep := mustFit(t, m, demoRuns(t, m, nil), Options{})
	var dh float64
	for _, f := range rep.Compounds {
		if f.Name == "ethanol" {
			dh = f.DHkJ
		}
	}
	found := false
	for _, w := range rep.Warnings {
		if !strings.HasPrefix(w, "ethanol: elutes too close") {
			continue
		}
		found = true
		i := strings.Index(w, "with n = ")
		var n, printed float64
		if i < 0 {
			t.Fatalf("no n in %q", w)
		}
		if _, err := fmt.Sscanf(w[i:], "with n = %f", &n); err != nil {
			t.Fatalf("%q: %v", w, err)
		}
		j := strings.Index(w, "kJ/mol = ")
		if j < 0 {
			t.Fatalf("no value in %q", w)
		}
		if _, err := fmt.Sscanf(w[j:], "kJ/mol = %f", &printed); err != nil {
			t.Fatalf("%q: %v", w, err)
		}
		if math.Abs(printed-dh) > 0.006 || math.Abs(-(9+4.9*n)-dh) > 4.9*0.006 {
			t.Errorf("message n = %.2f, ΔH %.2f; fitted ΔH %.3f", n, printed, dh)
		}
	}
	if !found {
		t.Errorf("no homologous-rule warning for ethanol: %v", rep.Warnings)
	}
}

// The new warnings must not cry wolf: clean runs (three scouts, 0.002 min
// noise, parameters not in the repository) give no suspect, no outlier and
// no plausibility warning; the same runs with a 0.3 min error planted in
// one run of one compound are always reported (suspect, outlier or
// implausible), and a run left out is always the planted one.
func TestTrustRulesNoFalseAlarms(t *testing.T) {
	seeds := 6
	if testing.Short() {
		seeds = 2
	}
	for seed := 0; seed < seeds; seed++ {
		truth := hiddenTruth(t, uint64(200+seed))
		text := runsText(t, truth, threeScouts(), 0.002, uint64(300+seed), nil)
		rep := fitText(t, demo(t), text, Options{})
		if len(rep.Suspects) > 0 || len(rep.Outliers) > 0 || anyWarning(rep, "implausible") {
			t.Errorf("seed %d: false alarm: %+v %+v %v", seed, rep.Suspects, rep.Outliers, rep.Warnings)
		}
		run := seed % 3
		text = runsText(t, truth, threeScouts(), 0.002, uint64(300+seed), func(i int, times map[string]float64) {
			if i == run {
				times["octanal"] += 0.3
			}
		})
		rep = fitText(t, demo(t), text, Options{})
		got := anyWarning(rep, "octanal: fitted ΔH")
		for _, s := range rep.Suspects {
			got = got || s.Compound == "octanal"
		}
		for _, o := range rep.Outliers {
			if o.Compound == "octanal" {
				got = true
				if o.Run != threeScouts()[run].name {
					t.Errorf("seed %d: good run %q dropped (planted in %q)", seed, o.Run, threeScouts()[run].name)
				}
			}
		}
		if !got {
			t.Errorf("seed %d: planted error in run %d not reported: %v", seed, run, rep.Warnings)
		}
	}
}
