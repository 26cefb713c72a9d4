package calibrate

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

func demo(t *testing.T) *methodfile.Method {
	m, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	// the demo's parameters as entered: without the (invented) standard
	// errors it carries for its robust margin
	for i := range m.Compounds {
		c := &m.Compounds[i]
		c.DHSE, c.DSSE, c.DHDSCorr, c.HasSE = 0, 0, 0, false
	}
	return m
}

type scout struct {
	name   string
	oven   string // TOML of [run.oven] and its ramps
	prog   methodfile.Oven
	holdup bool
}

func linear(name string, t0, hold, rate, final float64) scout {
	return scout{name: name, prog: methodfile.Oven{InitialC: t0, InitialHoldMin: hold, Ramps: []methodfile.Ramp{{RateCMin: rate, FinalC: final, HoldMin: 5}}}}
}

// runsText simulates the scouting runs on truth and writes them as a runs
// file, with Gaussian noise of sd minutes on every time.
func runsText(t *testing.T, truth *methodfile.Method, scouts []scout, sd float64, seed uint64, tweak func(run int, times map[string]float64)) string {
	rng := rand.New(rand.NewPCG(seed, 1))
	var b strings.Builder
	for i, s := range scouts {
		m := truth.Clone()
		m.Oven = s.prog
		sys, res := simulateMethod(t, m)
		fmt.Fprintf(&b, "[[run]]\nname = %q\n", s.name)
		if s.holdup {
			fmt.Fprintf(&b, "holdup_min = %.5f\n", res.HoldupTime/60)
		}
		fmt.Fprintf(&b, "[run.oven]\ninitial_c = %v\ninitial_hold_min = %v\n", s.prog.InitialC, s.prog.InitialHoldMin)
		for _, r := range s.prog.Ramps {
			fmt.Fprintf(&b, "[[run.oven.ramp]]\nrate_c_min = %v\nfinal_c = %v\nhold_min = %v\n", r.RateCMin, r.FinalC, r.HoldMin)
		}
		times := map[string]float64{}
		for _, pk := range res.Peaks {
			if pk.Eluted {
				times[sys.Compounds[pk.Compound].Name] = pk.RetentionTime/60 + sd*rng.NormFloat64()
			}
		}
		if tweak != nil {
			tweak(i, times)
		}
		b.WriteString("[run.retention_min]\n")
		for _, c := range truth.Compounds {
			if tv, ok := times[c.Name]; ok {
				fmt.Fprintf(&b, "%q = %.5f\n", c.Name, tv)
			}
		}
	}
	return b.String()
}

func threeScouts() []scout {
	return []scout{linear("scout-5", 40, 1, 5, 280), linear("scout-10", 40, 1, 10, 280), linear("scout-20", 40, 1, 20, 280)}
}

// Invented "true" parameters, away from the demo's, fitted from a start
// that knows nothing of them.
func truthMethod(t *testing.T) *methodfile.Method {
	m := demo(t)
	for i := range m.Compounds {
		c := &m.Compounds[i]
		c.DHkJ -= 1.5 + 0.2*float64(i%4)
		c.DS -= 2.5 - 0.3*float64(i%3)
	}
	return m
}

func startMethod(t *testing.T) *methodfile.Method {
	m := demo(t)
	for i := range m.Compounds {
		m.Compounds[i].DHkJ, m.Compounds[i].DS = -40, -80 // deliberately wrong
	}
	return m
}

func TestRoundTripRecoversParameters(t *testing.T) {
	truth := truthMethod(t)
	text := runsText(t, truth, threeScouts(), 0.002, 7, nil)
	start := startMethod(t)
	rep := fitText(t, start, text, Options{})
	want := map[string]methodfile.Compound{}
	for _, c := range truth.Compounds {
		want[c.Name] = c
	}
	// Parameters are checked for compounds retained well beyond the holdup
	// time (tR > 1.5 tM in the 10 °C/min run): near the holdup time ΔH and
	// ΔS are not separable from retention times at this noise, physically.
	retained := map[string]bool{}
	scout10 := truth.Clone()
	scout10.Oven = threeScouts()[1].prog
	sys, _ := scout10.System()
	var sr model.Result
	sys.Simulate(scout10.ModelProgram(), &sr)
	for _, pk := range sr.Peaks {
		retained[sys.Compounds[pk.Compound].Name] = pk.RetentionTime > 1.5*sr.HoldupTime
	}
	checked := 0
	for _, f := range rep.Compounds {
		w := want[f.Name]
		if !retained[f.Name] {
			continue
		}
		checked++
		if math.Abs(f.DHkJ-w.DHkJ) > 1 || math.Abs(f.DS-w.DS) > 2 {
			t.Errorf("%s: fitted ΔH %.2f ΔS %.2f, true %.2f %.2f (±%.2f ±%.2f)", f.Name, f.DHkJ, f.DS, w.DHkJ, w.DS, f.StdErrDH, f.StdErrDS)
		}
	}
	if checked < 10 {
		t.Errorf("only %d compounds checked", checked)
	}
	// predict a different program
	newProg := methodfile.Oven{InitialC: 60, InitialHoldMin: 2, Ramps: []methodfile.Ramp{{RateCMin: 7, FinalC: 150, HoldMin: 1}, {RateCMin: 25, FinalC: 280, HoldMin: 3}}}
	pred := rep.Method.Clone()
	pred.Oven = newProg
	tr := truth.Clone()
	tr.Oven = newProg
	a, b := simulateByName(t, pred), simulateByName(t, tr)
	for name, tv := range b {
		if d := math.Abs(a[name]-tv) / 60; d > 0.01 {
			t.Errorf("%s: predicted %.4f min, true %.4f min", name, a[name]/60, tv/60)
		}
	}
	for _, w := range rep.Warnings {
		t.Log("warning:", w)
	}
}

// simulateMethod runs m's own program on m's system.
func simulateMethod(t *testing.T, m *methodfile.Method) (*model.System, *model.Result) {
	t.Helper()
	sys, err := m.System()
	if err != nil {
		t.Fatal(err)
	}
	var res model.Result
	if err := sys.Simulate(m.ModelProgram(), &res); err != nil {
		t.Fatal(err)
	}
	return sys, &res
}

func simulateByName(t *testing.T, m *methodfile.Method) map[string]float64 {
	sys, res := simulateMethod(t, m)
	out := map[string]float64{}
	for _, pk := range res.Peaks {
		out[sys.Compounds[pk.Compound].Name] = pk.RetentionTime
	}
	return out
}

func TestWithDCp(t *testing.T) {
	truth := truthMethod(t)
	truth.Compounds = truth.Compounds[5:9]
	for i := range truth.Compounds {
		truth.Compounds[i].DCp = 80
	}
	scouts := []scout{linear("a", 40, 1, 3, 280), linear("b", 40, 1, 10, 280), linear("c", 40, 1, 30, 280), linear("d", 120, 0, 5, 280)}
	text := runsText(t, truth, scouts, 0.0005, 3, nil)
	start := startMethod(t)
	start.Compounds = start.Compounds[5:9]
	rep := fitText(t, start, text, Options{WithDCp: true})
	for _, f := range rep.Compounds {
		if !(f.DCp > 20) {
			t.Errorf("%s: ΔCp %.1f, want clearly nonzero (true 80)", f.Name, f.DCp)
		}
	}
	// two runs refuse ΔCp
	two := runsText(t, truth, scouts[:2], 0.0005, 3, nil)
	runs2, _ := methodfile.ParseRuns("runs.toml", []byte(two), start)
	if _, err := Fit(start, runs2, Options{WithDCp: true}); err == nil || !strings.Contains(err.Error(), "at least 3") {
		t.Errorf("two runs with ΔCp: %v", err)
	}
}

func TestIllConditionedWarning(t *testing.T) {
	truth := truthMethod(t)
	scouts := []scout{linear("a", 40, 1, 10, 280), linear("b", 40, 1.05, 10, 280)}
	text := runsText(t, truth, scouts, 0.0, 1, nil)
	start := startMethod(t)
	rep := fitText(t, start, text, Options{})
	if !anyWarning(rep, "ill-conditioned") {
		t.Errorf("no ill-conditioning warning: %v", rep.Warnings)
	}
}

func TestSwappedPeaksOutlier(t *testing.T) {
	truth := truthMethod(t)
	text := runsText(t, truth, threeScouts(), 0.001, 5, func(run int, times map[string]float64) {
		if run == 1 {
			times["linalool"], times["limonene"] = times["limonene"], times["linalool"]
		}
	})
	start := startMethod(t)
	rep := fitText(t, start, text, Options{})
	if !anyWarning(rep, "misassigned") {
		t.Errorf("no outlier warning: %v", rep.Warnings)
	}
}

func TestHoldupRecoversDiameter(t *testing.T) {
	truth := truthMethod(t)
	truth.Column.DiameterMM = 0.242
	scouts := threeScouts()
	for i := range scouts {
		scouts[i].holdup = true
	}
	text := runsText(t, truth, scouts, 0, 1, nil)
	start := startMethod(t) // nominal 0.25 mm
	rep := fitText(t, start, text, Options{})
	if math.Abs(rep.DiameterMM-0.242) > 0.0005 {
		t.Errorf("diameter %.5f mm, want 0.242", rep.DiameterMM)
	}
}

// fitText parses a runs file's text against start and fits it.
func fitText(t *testing.T, start *methodfile.Method, text string, opt Options) *Report {
	t.Helper()
	runs, err := methodfile.ParseRuns("runs.toml", []byte(text), start)
	if err != nil {
		t.Fatal(err)
	}
	return mustFit(t, start, runs, opt)
}

func anyWarning(rep *Report, s string) bool {
	for _, w := range rep.Warnings {
		if strings.Contains(w, s) {
			return true
		}
	}
	return false
}

// A compound in the runs but not in the method is added, fitted, with a
// warning; one seen in a single run is reported and not fitted.
func TestAddedAndSingleRunCompounds(t *testing.T) {
	truth := truthMethod(t)
	text := runsText(t, truth, threeScouts(), 0.001, 9, nil)
	start := startMethod(t)
	var kept []methodfile.Compound
	for _, c := range start.Compounds {
		if c.Name != "decanal" {
			kept = append(kept, c)
		}
	}
	start.Compounds = kept
	text = strings.Replace(text, "[run.retention_min]\n", "[run.retention_min]\n\"ghost\" = 5.5\n", 1)
	rep := fitText(t, start, text, Options{})
	if !anyWarning(rep, "decanal: in the runs but not in the method; added") || !anyWarning(rep, "ghost") {
		t.Errorf("warnings %v", rep.Warnings)
	}
	found := false
	for _, c := range rep.Method.Compounds {
		if c.Name == "decanal" {
			found = true
			if c.Target {
				t.Error("a compound the method lacked was added as a target")
			}
			for _, w := range truth.Compounds {
				if w.Name == "decanal" && (math.Abs(c.DHkJ-w.DHkJ) > 1 || math.Abs(c.DS-w.DS) > 2) {
					t.Errorf("added decanal: ΔH %.2f ΔS %.2f, true %.2f %.2f", c.DHkJ, c.DS, w.DHkJ, w.DS)
				}
			}
		}
		if c.Name == "ghost" {
			t.Error("a compound seen once was added")
		}
	}
	if !found {
		t.Error("decanal not added to the method")
	}
	if _, err := rep.Method.System(); err != nil {
		t.Errorf("fitted method does not build: %v", err)
	}
}

// On a packed column the holdup times calibrate the particle size (the
// bed's Kozeny–Carman permeability, MODEL.md §10), not the tube diameter:
// runs simulated with 150 µm particles give back 150 µm from a nominal
// 165 µm, and the compounds' parameters are recovered with it.
func TestPackedParticleFromHoldup(t *testing.T) {
	truth, err := methodfile.ReadFile("../../testdata/demo-packed.toml")
	if err != nil {
		t.Fatal(err)
	}
	truth.Column.ParticleUM = 150
	scouts := []scout{linear("p-5", 40, 1, 5, 190), linear("p-10", 40, 1, 10, 190), linear("p-20", 40, 1, 20, 190)}
	for i := range scouts {
		scouts[i].holdup = true
	}
	text := runsText(t, truth, scouts, 0, 1, nil)
	start, _ := methodfile.ReadFile("../../testdata/demo-packed.toml")
	rep := fitText(t, start, text, Options{})
	if !rep.ParticleFitted || rep.DiameterFitted {
		t.Fatalf("fitted particle %v, diameter %v: want the particle size only", rep.ParticleFitted, rep.DiameterFitted)
	}
	// the holdup times are written to 1e-5 min, so the size to about 0.1 %
	if math.Abs(rep.ParticleUM-150) > 0.3 {
		t.Errorf("particle size %.3f µm, want 150", rep.ParticleUM)
	}
	if rep.Method.Column.ParticleUM != rep.ParticleUM || rep.Method.Column.DiameterMM != 2 {
		t.Errorf("fitted method column %+v", rep.Method.Column)
	}
	if n := len(rep.Compounds); n < 8 {
		t.Errorf("%d compounds fitted", n)
	}
	if rep.PhaseRatio != 6 {
		t.Errorf("phase ratio %v, want the given 6", rep.PhaseRatio)
	}
	for _, c := range rep.Compounds {
		for _, tc := range truth.Compounds {
			if tc.Name == c.Name && c.ElutionSpreadC > 3 && math.Abs(c.DHkJ-tc.DHkJ) > 0.5 {
				t.Errorf("%s: ΔH %.2f, true %.2f", c.Name, c.DHkJ, tc.DHkJ)
			}
		}
	}
}
