package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// A method that is not in the repository, with a rate band, an isothermal
// limit, a detector, a lock and robust tolerances (invented compounds).
const independentMethod = `title = "independent check"
[column]
length_m = 25.0
diameter_mm = 0.32
film_um = 0.5
max_temp_c = 300.0
max_isothermal_c = 280.0
[carrier]
gas = "helium"
mode = "constant-flow"
flow_ml_min = 1.5
[oven]
initial_c = 45.0
initial_hold_min = 1.0
[[oven.ramp]]
rate_c_min = 8.0
final_c = 260.0
hold_min = 1.0
[limits]
oven_min_c = 40.0
max_rate_c_min = 50.0
max_hold_min = 8.0
temp_step_c = 0.5
rate_step_c_min = 0.5
hold_step_min = 0.05
flow_step_ml_min = 0.05
[[limits.rate_band]]
above_c = 150.0
max_rate_c_min = 20.0
[goal]
min_resolution = 1.6
ramps = 2
lock = ["initial_c"]
[goal.robust]
oven_offset_c = 1.0
flow_pct = 2.0
efficiency_pct = 10.0
[injection]
detector_temp_c = 290.0
[[compound]]
name = "a"
dH_kJ_mol = -38.0
dS_J_mol_K = -78.0
[[compound]]
name = "b"
dH_kJ_mol = -45.0
dS_J_mol_K = -85.0
[[compound]]
name = "c"
dH_kJ_mol = -45.6
dS_J_mol_K = -86.2
[[compound]]
name = "d"
dH_kJ_mol = -55.0
dS_J_mol_K = -97.0
[[compound]]
name = "e"
dH_kJ_mol = -62.0
dS_J_mol_K = -106.0
[[compound]]
name = "heavy matrix"
dH_kJ_mol = -80.0
dS_J_mol_K = -128.0
target = false
`

// The program optimize --json returns, exactly as saved, simulated
// independently (a System built here from the saved file, the corners made
// here by shifting the oven, scaling the flow and the plate-height factor),
// meets the target at the nominal point and at every corner; no temperature
// passes the detector − 20 °C, a band's rate or the isothermal limit; every
// compound elutes; the lock holds; every value is on the keypad steps.
func TestOptimizedProgramIndependently(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "m.toml")
	out := filepath.Join(dir, "opt.toml")
	os.WriteFile(in, []byte(independentMethod), 0o644)
	code, stdout, errs := runCmd(t, "optimize", "--json", "--out", out, in)
	if code != 0 {
		t.Fatalf("exit %d: %s\n%s", code, errs, stdout)
	}
	var oj optimizeJSON
	if err := json.Unmarshal([]byte(stdout), &oj); err != nil {
		t.Fatal(err)
	}
	m, err := methodfile.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	o := m.Oven
	if o.InitialC != 45 {
		t.Errorf("locked initial_c changed to %v", o.InitialC)
	}
	onStep := func(what string, x, step float64) {
		if n := math.Round(x / step); math.Abs(n*step-x) > 1e-9 {
			t.Errorf("%s = %v is not on the step %v", what, x, step)
		}
	}
	onStep("initial_hold_min", o.InitialHoldMin, 0.05)
	onStep("flow_ml_min", m.Carrier.FlowMLMin, 0.05)
	prev := o.InitialC
	for _, r := range o.Ramps {
		onStep("rate_c_min", r.RateCMin, 0.5)
		onStep("final_c", r.FinalC, 0.5)
		onStep("hold_min", r.HoldMin, 0.05)
		if r.FinalC > 270+1e-9 {
			t.Errorf("final %v °C above the detector − 20 °C", r.FinalC)
		}
		if r.FinalC > 150 && r.RateCMin > 20 {
			t.Errorf("ramp to %v °C at %v °C/min, faster than the band above 150 °C", r.FinalC, r.RateCMin)
		}
		if r.HoldMin > 0 && r.FinalC > 280 {
			t.Errorf("hold at %v °C above max_isothermal_c", r.FinalC)
		}
		prev = r.FinalC
	}
	_ = prev
	if *oj.MinResolution < 1.6 || !oj.Feasible {
		t.Errorf("optimize says feasible %v, Rs %v", oj.Feasible, *oj.MinResolution)
	}
	comps, err := m.ModelCompounds()
	if err != nil {
		t.Fatal(err)
	}
	simulate := func(offset, flow, plate float64) model.Result {
		col := m.ModelColumn()
		col.MaxTemp += 5 // room for the hot corner
		col.PlateHeightFactor = plate
		car, err := m.ModelCarrier()
		if err != nil {
			t.Fatal(err)
		}
		car.Flow *= flow
		cond, err := model.NewConditions(col, car)
		if err != nil {
			t.Fatal(err)
		}
		sys, err := model.NewSystem(cond, comps, m.ModelOven())
		if err != nil {
			t.Fatal(err)
		}
		prog := m.ModelProgram()
		prog.Initial += offset
		for i := range prog.Ramps {
			prog.Ramps[i].Final += offset
		}
		var res model.Result
		if err := sys.Simulate(prog, &res); err != nil {
			t.Fatal(err)
		}
		return res
	}
	nom := simulate(0, 1, 1)
	for _, pk := range nom.Peaks {
		if !pk.Eluted {
			t.Errorf("%s does not elute within the saved program", comps[pk.Compound].Name)
		}
	}
	if nom.MinResolution < 1.6 || math.Abs(nom.MinResolution-*oj.MinResolution) > 1e-9 {
		t.Errorf("nominal Rs %v (optimize said %v)", nom.MinResolution, *oj.MinResolution)
	}
	worst := math.Inf(1)
	for _, off := range []float64{-1, 1} {
		for _, fl := range []float64{0.98, 1.02} {
			for _, pl := range []float64{1, 1.1} {
				res := simulate(off, fl, pl)
				if res.TargetsNotEluted > 0 || res.MinResolution < 1.6 {
					t.Errorf("corner oven %+g °C, flow ×%g, plate height ×%g: Rs %.4f (targets not eluted %d)", off, fl, pl, res.MinResolution, res.TargetsNotEluted)
				}
				worst = math.Min(worst, res.MinResolution)
			}
		}
	}
	if oj.Robust == nil || oj.Robust.WorstCorner == nil || math.Abs(*oj.Robust.WorstCorner-worst) > 1e-6 {
		t.Errorf("optimize's worst corner %v, independent %v", oj.Robust, worst)
	}
	t.Logf("saved %s, flow %v mL/min: nominal Rs %.4f, worst corner %.4f (%s)", strings.TrimSpace(describeProgram(m.Oven)), m.Carrier.FlowMLMin, nom.MinResolution, worst, oj.Robust.Corner)
}
