package calibrate

import (
	"fmt"
	"sort"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

func order(t *testing.T, text string) map[string][]string {
	runs := map[string][]string{}
	cur := ""
	type nt struct {
		n string
		t float64
	}
	var xs []nt
	flush := func() {
		sort.Slice(xs, func(i, j int) bool { return xs[i].t < xs[j].t })
		for _, x := range xs {
			runs[cur] = append(runs[cur], x.n)
		}
		xs = nil
	}
	for _, l := range strings.Split(text, "\n") {
		if strings.HasPrefix(l, "name = ") {
			flush()
			cur = strings.Trim(strings.TrimPrefix(l, "name = "), `"`)
		}
		if strings.HasPrefix(l, `"`) {
			var n string
			var v float64
			i := strings.Index(l[1:], `"`) + 1
			n = l[1:i]
			if _, err := fmtSscan(l[i+4:], &v); err == nil {
				xs = append(xs, nt{n, v})
			}
		}
	}
	flush()
	return runs
}

// Two compounds measured in the order the fitted model contradicts (their
// names swapped in one run): a warning naming the run and the pair.
func TestOrderContradictionWarned(t *testing.T) {
	truth := hiddenTruth(t, 8)
	scouts := append(threeScouts(), linear("scout-7", 60, 0.5, 7, 280))
	text := runsText(t, truth, scouts, 0.001, 8, func(run int, times map[string]float64) {
		if run == 3 {
			times["neral"], times["decanal"] = times["decanal"], times["neral"]
		}
	})
	rep := fitText(t, demo(t), text, Options{})
	got := false
	for _, w := range rep.Warnings {
		if strings.Contains(w, `run "scout-7"`) && strings.Contains(w, "decanal") && strings.Contains(w, "neral") {
			got = true
		}
	}
	if !got {
		t.Errorf("no warning names run scout-7 and the swapped pair: %v", rep.Warnings)
	}
}

// A pair whose order truly changes between the runs is reported as a note:
// a made-up compound with 8 kJ/mol more negative ΔH than octanal and the
// same k at some temperature crosses octanal between the slow and the fast
// run.
func TestOrderChangeNoted(t *testing.T) {
	truth := hiddenTruth(t, 9)
	m := truth.Clone()
	m.Oven = threeScouts()[1].prog
	sys, err := m.System()
	if err != nil {
		t.Fatal(err)
	}
	var res model.Result
	sys.Simulate(m.ModelProgram(), &res)
	te := 0.0
	for _, pk := range res.Peaks {
		if sys.Compounds[pk.Compound].Name == "octanal" {
			te = pk.ElutionTemp
		}
	}
	oc := truth.Compounds[compoundIndex(truth, "octanal")]
	base := truth.Clone()
	var x methodfile.Compound
	var text string
	crossed := false
	// the temperature where both have the same k lies below the elution
	// temperature (programmed retention is set on the way up): search it
	for dT := 0.0; dT <= 80 && !crossed; dT += 5 {
		x = oc
		x.Name = "x-cross"
		x.DHkJ -= 8
		x.DS -= 8000 / (te - dT)
		truth = base.Clone()
		truth.Compounds = append(truth.Compounds, x)
		text = runsText(t, truth, threeScouts(), 0.0005, 9, nil)
		o := order(t, text)
		crossed = (index(o["scout-5"], "octanal") < index(o["scout-5"], "x-cross")) != (index(o["scout-20"], "octanal") < index(o["scout-20"], "x-cross"))
	}
	if !crossed {
		t.Fatal("the made-up pair does not cross")
	}
	start := demo(t)
	start.Compounds = append(start.Compounds, x)
	rep := fitText(t, start, text, Options{})
	found := false
	for _, n := range rep.Notes {
		if strings.Contains(n, "elution order of octanal and x-cross changes") {
			found = true
		}
	}
	if !found {
		t.Errorf("no note for the crossing pair: %v", rep.Notes)
	}
	if anyWarning(rep, "swapped assignment") {
		t.Errorf("a true crossing called a swap: %v", rep.Warnings)
	}
}

func index(xs []string, x string) int {
	for i, y := range xs {
		if y == x {
			return i
		}
	}
	return -1
}

func fmtSscan(s string, v *float64) (int, error) { return fmt.Sscan(s, v) }
