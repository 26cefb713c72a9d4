package main

import (
	"encoding/json"
	"strings"
	"testing"
)

const (
	packedDemo = "../../testdata/demo-packed.toml"
	layerDemo  = "../../testdata/demo-porous-layer.toml"
)

// The packed and porous-layer demos simulate and optimize from the README's
// commands; the optimized programs meet the target, and the porous-layer
// one starts below ambient.
func TestKindDemosOptimize(t *testing.T) {
	for _, file := range []string{packedDemo, layerDemo} {
		code, out, errs := runCmd(t, "simulate", "--json", file)
		if code != 0 {
			t.Fatalf("simulate %s: exit %d: %s", file, code, errs)
		}
		var sim struct {
			Peaks []struct {
				Eluted bool `json:"eluted"`
			} `json:"peaks"`
			Warnings []string `json:"warnings"`
		}
		if err := json.Unmarshal([]byte(out), &sim); err != nil || len(sim.Peaks) < 10 {
			t.Fatalf("simulate %s: %v, %d peaks", file, err, len(sim.Peaks))
		}
		cryogen := strings.Contains(strings.Join(sim.Warnings, " "), "cold burns")
		if cryogen != (file == layerDemo) {
			t.Errorf("%s: cryogen caution %v", file, cryogen)
		}
		code, out, errs = runCmd(t, "optimize", "--json", file)
		if code != 0 {
			t.Fatalf("optimize %s: exit %d: %s", file, code, errs)
		}
		var opt struct {
			Feasible bool `json:"feasible"`
			Program  struct {
				InitialC float64 `json:"initial_c"`
			} `json:"program"`
		}
		if err := json.Unmarshal([]byte(out), &opt); err != nil {
			t.Fatalf("optimize %s: %v\n%s", file, err, out)
		}
		if !opt.Feasible {
			t.Errorf("optimize %s: target not met\n%s", file, out)
		}
		if file == packedDemo && opt.Program.InitialC < 35 {
			t.Errorf("packed demo optimized to start at %v °C, below its oven_min_c", opt.Program.InitialC)
		}
		if file == layerDemo && (opt.Program.InitialC >= 25 || opt.Program.InitialC < -60) {
			t.Errorf("porous-layer demo optimized to start at %v °C: the sub-ambient start is not used", opt.Program.InitialC)
		}
	}
}

// compare ranks the kinds together and names each candidate's kind;
// list values outside a packed column's ranges are skipped for it.
func TestCompareKinds(t *testing.T) {
	code, out, errs := runCmd(t, "compare", "--json", "--length", "3,15", "../../testdata/demo.toml", packedDemo, layerDemo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var j struct {
		Candidates []struct {
			Kind   string  `json:"kind"`
			Length float64 `json:"length_m"`
			Error  string  `json:"error"`
		} `json:"candidates"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	kinds := map[string]int{}
	for _, c := range j.Candidates {
		kinds[c.Kind]++
		if c.Kind == "packed" && c.Length != 3 {
			t.Errorf("packed candidate at %v m", c.Length)
		}
	}
	if kinds["wall-coated"] != 2 || kinds["packed"] != 1 || kinds["porous-layer"] != 2 {
		t.Errorf("candidates by kind %v", kinds)
	}
	if !strings.Contains(errs, "skipped ../../testdata/demo-packed.toml at 15 m") {
		t.Errorf("no note of the skipped packed candidate: %s", errs)
	}
}
