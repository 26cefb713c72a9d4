package calibrate

import (
	"math"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// Repeat-fit study: the same three runs measured again and again with new
// noise; (fitted − true)/SE must scatter with SD near 1 when the standard
// errors are right. (Per-compound errors with one degree of freedom each
// gave SDs of 2.6–25.)
func TestRepeatFitZScores(t *testing.T) {
	truth := hiddenTruth(t, 21)
	want := map[string]methodfile.Compound{}
	for _, c := range truth.Compounds {
		want[c.Name] = c
	}
	var zh, zs []float64
	reps := 8
	if testing.Short() {
		reps = 3
	}
	for rep := 0; rep < reps; rep++ {
		text := runsText(t, truth, threeScouts(), 0.002, uint64(100+rep), nil)
		r := fitText(t, demo(t), text, Options{})
		if anyWarning(r, "unfitted ΔCp") {
			t.Errorf("rep %d: ΔCp trend reported without ΔCp: %v", rep, r.Warnings)
		}
		for _, f := range r.Compounds {
			if !finite(f.StdErrDH) || f.Name == "ethanol" || f.Name == "ethyl acetate" {
				continue
			}
			w := want[f.Name]
			zh = append(zh, (f.DHkJ-w.DHkJ)/f.StdErrDH)
			zs = append(zs, (f.DS-w.DS)/f.StdErrDS)
		}
		if r.DOF < 10 || r.SDAssumed {
			t.Errorf("rep %d: %d degrees of freedom", rep, r.DOF)
		}
	}
	sd := func(x []float64) float64 {
		s := 0.0
		for _, v := range x {
			s += v * v
		}
		return math.Sqrt(s / float64(len(x)))
	}
	t.Logf("z-score SD over %d fits × compounds (n=%d): ΔH %.2f, ΔS %.2f", reps, len(zh), sd(zh), sd(zs))
	if s := sd(zh); s < 0.6 || s > 1.5 {
		t.Errorf("SD of ΔH z-scores %.2f, want near 1", s)
	}
	if s := sd(zs); s < 0.6 || s > 1.5 {
		t.Errorf("SD of ΔS z-scores %.2f, want near 1", s)
	}
}

func TestStandardErrorsWrittenToMethod(t *testing.T) {
	truth := hiddenTruth(t, 22)
	r := fitText(t, demo(t), runsText(t, truth, threeScouts(), 0.002, 1, nil), Options{})
	n := 0
	for _, c := range r.Method.Compounds {
		if c.HasSE {
			n++
			if !(c.DHSE > 0 && c.DSSE > 0 && c.DHDSCorr > 0.9 && c.DHDSCorr <= 1) {
				t.Errorf("%s: se %v %v corr %v", c.Name, c.DHSE, c.DSSE, c.DHDSCorr)
			}
		}
	}
	if n < 14 {
		t.Errorf("%d compounds with standard errors", n)
	}
	b, err := methodfile.Marshal(r.Method)
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"dH_se_kJ_mol", "dS_se_J_mol_K", "dH_dS_corr"} {
		if !strings.Contains(string(b), k) {
			t.Errorf("saved method lacks %s", k)
		}
	}
	back, err := methodfile.Parse("again.toml", b)
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range back.Compounds {
		if c.DHSE != r.Method.Compounds[i].DHSE || c.DHDSCorr != r.Method.Compounds[i].DHDSCorr {
			t.Errorf("%s: standard errors do not read back", c.Name)
		}
	}
}

// An unfitted ΔCp leaves a residual trend with temperature that is
// reported; fitting ΔCp gives it a standard error.
func TestDCpTrendAndItsError(t *testing.T) {
	truth := truthMethod(t)
	truth.Compounds = truth.Compounds[5:13]
	for i := range truth.Compounds {
		truth.Compounds[i].DCp = 100
	}
	scouts := []scout{linear("a", 40, 1, 3, 280), linear("b", 40, 1, 10, 280), linear("c", 40, 1, 30, 280), linear("d", 120, 0, 5, 280)}
	text := runsText(t, truth, scouts, 0.001, 3, nil)
	start := demo(t)
	start.Compounds = start.Compounds[5:13]
	r := fitText(t, start, text, Options{})
	if !anyWarning(r, "unfitted ΔCp") {
		t.Errorf("no ΔCp trend warning: %v", r.Warnings)
	}
	r = fitText(t, start, text, Options{WithDCp: true})
	if anyWarning(r, "unfitted ΔCp") {
		t.Error("trend warning although ΔCp was fitted")
	}
	for _, f := range r.Compounds {
		if !finite(f.StdErrDCp) || !(f.StdErrDCp > 0) {
			t.Errorf("%s: no ΔCp standard error", f.Name)
		} else if z := (f.DCp - 100) / f.StdErrDCp; math.Abs(z) > 4 {
			t.Errorf("%s: ΔCp %.1f ± %.1f, true 100", f.Name, f.DCp, f.StdErrDCp)
		}
	}
	// Three runs, three parameters would leave no freedom: ΔCp is not
	// fitted but held at the method's value (set to 40 here), said in a
	// warning, and ΔH and ΔS keep one degree of freedom each.
	held := demo(t)
	held.Compounds = held.Compounds[5:13]
	for i := range held.Compounds {
		held.Compounds[i].DCp = 40
	}
	r = fitText(t, held, runsText(t, truth, scouts[:3], 0.001, 3, nil), Options{WithDCp: true})
	if r.SDAssumed || r.DOF != len(r.Compounds) || !anyWarning(r, "ΔCp not fitted") {
		t.Errorf("dof %d assumed %v, warnings %v", r.DOF, r.SDAssumed, r.Warnings)
	}
	for _, f := range r.Compounds {
		if f.DCp != 40 || finite(f.StdErrDCp) {
			t.Errorf("%s: ΔCp %.1f ± %v with three runs, want held at 40", f.Name, f.DCp, f.StdErrDCp)
		}
	}
	for _, c := range r.Method.Compounds {
		if c.DCp != 40 {
			t.Errorf("%s: ΔCp %.1f written, want the method's 40", c.Name, c.DCp)
		}
	}
}

func TestHungarianAgainstBruteForce(t *testing.T) {
	costs := [][][]float64{
		{{4, 1, 3}, {2, 0, 5}, {3, 2, 2}},
		{{1, 9, 9, 9}, {9, 1, 9, 9}},
		{{7, 3, 5, 2}, {1, 8, 2, 9}, {4, 4, 4, 4}},
	}
	for _, c := range costs {
		got := hungarian(c)
		sum := 0.0
		used := map[int]bool{}
		for i, j := range got {
			if used[j] {
				t.Fatalf("column %d used twice", j)
			}
			used[j] = true
			sum += c[i][j]
		}
		best := math.Inf(1)
		var rec func(i int, used map[int]bool, s float64)
		rec = func(i int, used map[int]bool, s float64) {
			if i == len(c) {
				best = math.Min(best, s)
				return
			}
			for j := range c[i] {
				if !used[j] {
					used[j] = true
					rec(i+1, used, s+c[i][j])
					used[j] = false
				}
			}
		}
		rec(0, map[int]bool{}, 0)
		if sum != best {
			t.Errorf("%v: cost %v, best %v", c, sum, best)
		}
	}
}

func TestEditDistance(t *testing.T) {
	for _, c := range []struct {
		a, b string
		d    int
	}{{"tolune", "toluene", 1}, {"kitten", "sitting", 3}, {"", "abc", 3}, {"hexanal", "decanal", 2}, {"α-pinene", "a-pinene", 1}} {
		if got := editDistance(c.a, c.b); got != c.d {
			t.Errorf("%q %q: %d, want %d", c.a, c.b, got, c.d)
		}
	}
}
