package calibrate

import (
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/andi"
	"github.com/rampwise/rampwise/model/methodfile"
)

// Generated lab data. Layout written (documented in DEVELOPERS.md):
//
//	comma      "Peak #,Ret. Time (s),Area,Height,Width 50% (s),Name", times
//	           in seconds, point decimals, a "Total" footer
//	semicolon  two lines of sample information, then
//	           "Nr.;RT [min];Fläche;Höhe;Breite [min];Name", decimal commas
//	tab        "RT\tArea\tFWHM\tName", minutes without a unit in the header
//	cdf        AIA/ANDI netCDF classic from andi.EncodeChromatogram: the
//	           detector trace (Gaussian peaks of the model's σ and area
//	           ∝ amount with 15 % scatter, on a drifting baseline, white
//	           noise), 10 Hz, no peak
//	           table, so the peaks are found in the trace
//
// Every table also holds an unnamed solvent peak just after the holdup time
// and an unnamed impurity; compound peaks are unnamed but for the few listed
// in named.

const hiddenHeader = "# Generated from hidden parameters with 0.002 min noise (see labdata_test.go).\n"

var writeLab = flag.Bool("write-lab", false, "rewrite the example lab files under testdata/lab")

type truePeak struct {
	name         string
	tMin, sigMin float64
	area         float64
}

// hiddenTruth perturbs the demo's parameters at random (seeded; the values
// exist only while the test runs) the way another column of the same
// phase differs: a shift common to all compounds (ΔS by up to ±1 J/(mol·K),
// a phase ratio about 13 % off, and ΔH by up to ±0.5 kJ/mol with the
// compensating ΔS) and an individual part (ΔH ±0.3 kJ/mol with its
// compensating ΔS, and ΔS ±indS more), the compensation taken at the
// compound's elution temperature under the demo's program.
func hiddenTruth(t *testing.T, seed uint64) *methodfile.Method { return hiddenTruthK(t, seed, 0.05) }

func hiddenTruthK(t *testing.T, seed uint64, indS float64) *methodfile.Method {
	m := demo(t)
	sys, res := simulateMethod(t, m)
	te := map[string]float64{}
	for _, pk := range res.Peaks {
		te[sys.Compounds[pk.Compound].Name] = pk.ElutionTemp
	}
	r := rand.New(rand.NewPCG(seed, 99))
	u := func() float64 { return r.Float64()*2 - 1 }
	commonS, commonH := u()*1.0, u()*0.5
	for i := range m.Compounds {
		c := &m.Compounds[i]
		dh := commonH + 0.3*u()
		c.DHkJ += dh
		c.DS += dh*1000/te[c.Name] + commonS + indS*u()
	}
	return m
}

func simulatePeaks(t *testing.T, truth *methodfile.Method, oven methodfile.Oven, sd float64, rng *rand.Rand) ([]truePeak, float64) {
	m := truth.Clone()
	m.Oven = oven
	sys, res := simulateMethod(t, m)
	var out []truePeak
	for _, pk := range res.Peaks {
		if !pk.Eluted {
			continue
		}
		c := sys.Compounds[pk.Compound]
		// areas: the method's amount with 15 % (log-normal) scatter
		out = append(out, truePeak{name: c.Name, tMin: pk.RetentionTime/60 + sd*rng.NormFloat64(), sigMin: pk.Sigma / 60, area: 1000 * c.Amount * math.Exp(0.15*rng.NormFloat64())})
	}
	return out, res.HoldupTime / 60
}

// withExtras adds the unnamed solvent and impurity peaks, sorted by time.
func withExtras(ps []truePeak, tm float64, rng *rand.Rand) []truePeak {
	out := append([]truePeak(nil), ps...)
	out = append(out, truePeak{tMin: tm, sigMin: 0.01, area: 30000})
	last := ps[len(ps)-1].tMin
	for tries := 0; tries < 100; tries++ {
		x := tm*2 + rng.Float64()*(last-tm*2)
		clear := true
		for _, p := range ps {
			if math.Abs(p.tMin-x) < 0.3 {
				clear = false
			}
		}
		if clear {
			out = append(out, truePeak{tMin: x, sigMin: 0.02, area: 200})
			break
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i].tMin < out[j].tMin })
	return out
}

func writePeakTable(t *testing.T, path, dialect string, ps []truePeak, named map[string]bool) {
	var b strings.Builder
	height := func(p truePeak) float64 { return p.area / (p.sigMin * 60 * math.Sqrt(2*math.Pi)) }
	nm := func(p truePeak) string {
		if named[p.name] {
			return p.name
		}
		return ""
	}
	const fw = 2.3548200450309493
	switch dialect {
	case "comma":
		b.WriteString("Peak #,Ret. Time (s),Area,Height,Width 50% (s),Name\r\n")
		tot := 0.0
		for i, p := range ps {
			fmt.Fprintf(&b, "%d,%.2f,%.1f,%.1f,%.3f,%s\r\n", i+1, p.tMin*60, p.area, height(p), fw*p.sigMin*60, nm(p))
			tot += p.area
		}
		fmt.Fprintf(&b, "Total,,%.1f,,,\r\n", tot)
	case "semicolon":
		b.WriteString("Sample;generated\nInstrument;model\n\nNr.;RT [min];Fläche;Höhe;Breite [min];Name\n")
		for i, p := range ps {
			row := fmt.Sprintf("%d;%.4f;%.1f;%.1f;%.5f;%s", i+1, p.tMin, p.area, height(p), fw*p.sigMin, nm(p))
			b.WriteString(strings.ReplaceAll(row, ".", ",") + "\n")
		}
	case "tab":
		b.WriteString("RT\tArea\tFWHM\tName\n")
		for _, p := range ps {
			fmt.Fprintf(&b, "%.4f\t%.1f\t%.5f\t%s\n", p.tMin, p.area, fw*p.sigMin, nm(p))
		}
	default:
		t.Fatal(dialect)
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

func writeTrace(t *testing.T, path string, ps []truePeak, tEnd float64, rng *rand.Rand) {
	const dt = 0.1
	n := int(tEnd * 60 / dt)
	c := &andi.Chromatogram{IntervalS: dt, Values: make([]float64, n), Title: "generated"}
	for i := range c.Values {
		tm := c.Time(i)
		y := 20 + 0.5*tm + 0.3*rng.NormFloat64()
		for _, p := range ps {
			z := (tm - p.tMin) / p.sigMin
			if math.Abs(z) < 10 {
				y += p.area / (p.sigMin * 60 * math.Sqrt(2*math.Pi)) * math.Exp(-z*z/2)
			}
		}
		c.Values[i] = y
	}
	b, err := andi.EncodeChromatogram(c)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
}

type labRun struct {
	name, dialect string // dialect: comma, semicolon, tab or cdf
	oven          methodfile.Oven
	named         []string // compounds named in this run's table besides the common ones
}

func ramp(t0, hold, rate, final float64) methodfile.Oven {
	return methodfile.Oven{InitialC: t0, InitialHoldMin: hold, Ramps: []methodfile.Ramp{{RateCMin: rate, FinalC: final, HoldMin: 2}}}
}

// writeLabRuns writes the runs' files and the runs file into dir and
// returns the runs file's path. tweak may change a run's true peaks.
func writeLabRuns(t *testing.T, header, dir string, truth *methodfile.Method, runs []labRun, named map[string]bool, seed uint64, tweak func(run int, ps []truePeak)) string {
	rng := rand.New(rand.NewPCG(seed, 5))
	var b strings.Builder
	b.WriteString(header)
	for i, lr := range runs {
		ps, tm := simulatePeaks(t, truth, lr.oven, 0.002, rng)
		if tweak != nil {
			tweak(i, ps)
		}
		all := withExtras(ps, tm, rng)
		nm := map[string]bool{}
		for k, v := range named {
			nm[k] = v
		}
		for _, k := range lr.named {
			nm[k] = true
		}
		var file, key string
		switch lr.dialect {
		case "cdf":
			file, key = lr.name+".cdf", "chromatogram"
			writeTrace(t, filepath.Join(dir, file), all, all[len(all)-1].tMin+1, rng)
		case "tab":
			file, key = lr.name+".txt", "peaks"
			writePeakTable(t, filepath.Join(dir, file), lr.dialect, all, nm)
		default:
			file, key = lr.name+".csv", "peaks"
			writePeakTable(t, filepath.Join(dir, file), lr.dialect, all, nm)
		}
		fmt.Fprintf(&b, "\n[[run]]\nname = %q\n%s = %q\n[run.oven]\ninitial_c = %v\ninitial_hold_min = %v\n", lr.name, key, file, lr.oven.InitialC, lr.oven.InitialHoldMin)
		for _, r := range lr.oven.Ramps {
			fmt.Fprintf(&b, "[[run.oven.ramp]]\nrate_c_min = %v\nfinal_c = %v\nhold_min = %v\n", r.RateCMin, r.FinalC, r.HoldMin)
		}
	}
	p := filepath.Join(dir, "runs.toml")
	if err := os.WriteFile(p, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// newProgramErrors: the fitted method's retention times under a program
// none of the runs used, against the truth's, in min, by compound.
func newProgramErrors(t *testing.T, fitted, truth *methodfile.Method) map[string]float64 {
	prog := methodfile.Oven{InitialC: 45, InitialHoldMin: 1.5, Ramps: []methodfile.Ramp{{RateCMin: 6, FinalC: 140, HoldMin: 0.5}, {RateCMin: 15, FinalC: 280, HoldMin: 2}}}
	a, b := fitted.Clone(), truth.Clone()
	a.Oven, b.Oven = prog, prog
	pa, pb := simulateByName(t, a), simulateByName(t, b)
	out := map[string]float64{}
	for name, tv := range pb {
		ta, ok := pa[name]
		if !ok {
			t.Fatalf("%s missing from the fitted method", name)
		}
		out[name] = (ta - tv) / 60
	}
	return out
}

func labFit(t *testing.T, start *methodfile.Method, runsPath string, opt Options) *Report {
	t.Helper()
	runs, err := methodfile.ReadRuns(runsPath, start)
	if err != nil {
		t.Fatal(err)
	}
	return mustFit(t, start, runs, opt)
}

func checkAssignments(t *testing.T, rep *Report, truth *methodfile.Method) {
	t.Helper()
	// every assignment must be the compound whose true peak is there: the
	// generated times are within 0.01 min of the truth's prediction
	for _, a := range rep.Assignments {
		for _, s := range rep.Runs.Runs {
			if s.Name != a.Run {
				continue
			}
			m := truth.RunMethod(&s)
			pred := simulateByName(t, m)
			if d := math.Abs(pred[a.Compound]/60 - a.MeasuredMin); d > 0.01 && !reportedAmbiguous(rep, a.Compound) {
				t.Errorf("run %s: peak %.4f assigned to %s whose true time is %.4f", a.Run, a.MeasuredMin, a.Compound, pred[a.Compound]/60)
			}
		}
	}
}

// Done-when: CSV peak tables in three dialects with unnamed peaks plus a
// chromatogram file, generated from hidden parameters; fit assigns the
// peaks and the fitted method predicts a new program within 0.02 min for
// every compound. The tables name limonene, and one of them myrcene: in
// the demo, myrcene and beta-pinene have ΔH, ΔS within 0.25 kJ/mol and
// 0.5 J/(mol·K) and coelute within 0.03 min, so no retention data can tell
// which peak is which (TestLabTwinPairIsReported: the fit says so).
func TestLabTablesAndTraceAssignAndPredict(t *testing.T) {
	for _, seed := range []uint64{1, 2, 3, 4, 5} {
		truth := hiddenTruth(t, seed)
		dir := t.TempDir()
		runs := []labRun{
			{"scout-5", "comma", ramp(40, 1, 5, 280), []string{"myrcene"}},
			{"scout-10", "semicolon", ramp(40, 1, 10, 280), nil},
			{"scout-20", "tab", ramp(40, 1, 20, 280), nil},
			{"scout-8", "cdf", ramp(60, 0.5, 8, 280), nil},
		}
		path := writeLabRuns(t, hiddenHeader, dir, truth, runs, map[string]bool{"limonene": true}, seed, nil)
		rep := labFit(t, demo(t), path, Options{})
		if len(rep.Assignments) < 50 {
			t.Errorf("seed %d: only %d assignments", seed, len(rep.Assignments))
		}
		// the tables' and the trace's half-height widths give back the
		// plate-height factor the runs were generated with
		if !rep.PlateFitted || math.Abs(rep.PlateHeightFactor/truth.Column.PlateHeight-1) > 0.05 {
			t.Errorf("seed %d: plate-height factor %.3f (fitted %v), true %.3f", seed, rep.PlateHeightFactor, rep.PlateFitted, truth.Column.PlateHeight)
		}
		checkAssignments(t, rep, truth)
		worst, wn := 0.0, ""
		for name, d := range newProgramErrors(t, rep.Method, truth) {
			if math.Abs(d) > math.Abs(worst) {
				worst, wn = d, name
			}
			if math.Abs(d) > 0.02 {
				t.Errorf("seed %d: %s predicted %.4f min off under a new program", seed, name, d)
			}
		}
		t.Logf("seed %d: %d assignments, worst new-program error %.4f min (%s), pooled SD %.4f min, %d dof", seed, len(rep.Assignments), worst, wn, rep.ResidualSDMin, rep.DOF)
		for _, w := range rep.Warnings {
			t.Log("  warning:", w)
		}
	}
}

func TestLabTracesOnly(t *testing.T) {
	truth := hiddenTruth(t, 11)
	dir := t.TempDir()
	runs := []labRun{
		{"a", "cdf", ramp(40, 1, 4, 280), nil},
		{"b", "cdf", ramp(40, 1, 10, 280), nil},
		{"c", "cdf", ramp(50, 1, 25, 280), nil},
	}
	path := writeLabRuns(t, hiddenHeader, dir, truth, runs, nil, 11, nil)
	rep := labFit(t, demo(t), path, Options{})
	// traces carry no names: the twin pair may swap, but only with a warning
	warned := anyWarning(rep, "beta-pinene and myrcene: their peaks are too close")
	for name, d := range newProgramErrors(t, rep.Method, truth) {
		if math.Abs(d) > 0.02 && !(warned && (name == "beta-pinene" || name == "myrcene")) {
			t.Errorf("%s predicted %.4f min off under a new program", name, d)
		}
	}
	for _, r := range rep.Runs.Runs {
		if !r.Found || r.Trace == nil {
			t.Errorf("run %s: peaks not found in the trace", r.Name)
		}
	}
}

// Done-when: a planted outlier is flagged by run and compound.
func TestLabPlantedOutlier(t *testing.T) {
	truth := hiddenTruth(t, 4)
	dir := t.TempDir()
	runs := []labRun{
		{"scout-5", "comma", ramp(40, 1, 5, 280), []string{"myrcene"}},
		{"scout-10", "semicolon", ramp(40, 1, 10, 280), nil},
		{"scout-20", "tab", ramp(40, 1, 20, 280), nil},
		{"scout-8", "comma", ramp(60, 0.5, 8, 280), nil},
	}
	// octanal is named in every table; in scout-10 it is typed 0.25 min late
	named := map[string]bool{"octanal": true}
	path := writeLabRuns(t, hiddenHeader, dir, truth, runs, named, 4, func(run int, ps []truePeak) {
		if run == 1 {
			for i := range ps {
				if ps[i].name == "octanal" {
					ps[i].tMin += 0.25
				}
			}
		}
	})
	rep := labFit(t, demo(t), path, Options{})
	found := false
	for _, o := range rep.Outliers {
		if o.Compound == "octanal" && o.Run == "scout-10" {
			found = true
			if !o.Excluded || math.Abs(o.MeasuredMin-o.PredictedMin-0.25) > 0.02 {
				t.Errorf("outlier %+v", o)
			}
		} else {
			t.Errorf("false outlier %+v", o)
		}
	}
	if !found || !anyWarning(rep, `octanal: run "scout-10" measured`) {
		t.Fatalf("planted outlier not flagged: %+v %v", rep.Outliers, rep.Warnings)
	}
	for name, d := range newProgramErrors(t, rep.Method, truth) {
		if math.Abs(d) > 0.02 {
			t.Errorf("%s predicted %.4f min off after leaving the outlier out", name, d)
		}
	}
}

// The case: p-xylene-like gross error (3.0 min for a peak near 15)
// in one of three TOML runs: flagged by run and compound.
func TestGrossOutlierThreeRuns(t *testing.T) {
	truth := hiddenTruth(t, 5)
	text := runsText(t, truth, threeScouts(), 0.002, 5, func(run int, times map[string]float64) {
		if run == 2 {
			times["limonene"] = 3.0 + times["hexanal"]*0 + 0.5
		}
	})
	rep := fitText(t, demo(t), text, Options{})
	ok := false
	for _, o := range rep.Outliers {
		if o.Compound == "limonene" && o.Run == "scout-20" {
			ok = true
		}
	}
	if !ok {
		t.Fatalf("not flagged: %+v\n%v", rep.Outliers, rep.Warnings)
	}
}

// Done-when: a misspelled name never becomes a target.
func TestMisspelledNameNeverTarget(t *testing.T) {
	truth := hiddenTruth(t, 6)
	text := runsText(t, truth, threeScouts(), 0.002, 6, nil)
	text = strings.ReplaceAll(text, `"limonene" =`, `"limonen" =`)
	for _, opt := range []Options{{}, {AddUnknown: true}} {
		rep := fitText(t, demo(t), text, opt)
		for _, c := range rep.Method.Compounds {
			if c.Name == "limonen" && (c.Target || !opt.AddUnknown) {
				t.Errorf("add-unknown %v: limonen in the method, target %v", opt.AddUnknown, c.Target)
			}
		}
		if !anyWarning(rep, `did you mean "limonene"`) && !opt.AddUnknown {
			t.Errorf("no suggestion: %v", rep.Warnings)
		}
		if opt.AddUnknown && !anyWarning(rep, `"limonen" is not in the method (nearest "limonene")`) {
			t.Errorf("add-unknown: %v", rep.Warnings)
		}
	}
	// names that all differ (17 new ones): none becomes a target
	text2 := runsText(t, truth, threeScouts(), 0.002, 6, nil)
	k := 0
	lines := strings.Split(text2, "\n")
	for i, l := range lines {
		if strings.HasPrefix(l, `"`) {
			k++
			lines[i] = fmt.Sprintf(`"unknown %d"%s`, k, l[strings.Index(l[1:], `"`)+2:])
		}
	}
	rep := fitText(t, demo(t), strings.Join(lines, "\n"), Options{})
	for _, c := range rep.Method.Compounds[len(demo(t).Compounds):] {
		t.Errorf("added %q (target %v) from names seen once", c.Name, c.Target)
	}
}

// A misspelled name in a peak table becomes an unnamed peak and is assigned.
func TestMisspelledInTableAssigned(t *testing.T) {
	truth := hiddenTruth(t, 7)
	dir := t.TempDir()
	runs := []labRun{{"a", "comma", ramp(40, 1, 5, 280), []string{"myrcene"}}, {"b", "tab", ramp(40, 1, 12, 280), nil}, {"c", "semicolon", ramp(40, 1, 25, 280), nil}}
	path := writeLabRuns(t, hiddenHeader, dir, truth, runs, map[string]bool{"camphene": true}, 7, nil)
	b, _ := os.ReadFile(filepath.Join(dir, "a.csv"))
	os.WriteFile(filepath.Join(dir, "a.csv"), []byte(strings.Replace(string(b), ",camphene", ",camphen", 1)), 0o644)
	rep := labFit(t, demo(t), path, Options{})
	if !anyWarning(rep, `"camphen" is not in the method; did you mean "camphene"? treated as an unnamed peak`) {
		t.Errorf("%v", rep.Warnings)
	}
	got := false
	for _, a := range rep.Assignments {
		if a.Run == "a" && a.Compound == "camphene" {
			got = true
		}
	}
	if !got {
		t.Error("the misspelled peak was not assigned to camphene")
	}
	for _, c := range rep.Method.Compounds {
		if c.Name == "camphen" {
			t.Error("misspelling added to the method")
		}
	}
}

// Example files for users (invented: the demo's own parameters with noise).
func TestWriteLabExamples(t *testing.T) {
	if !*writeLab {
		t.Skip("run with -write-lab to rewrite testdata/lab")
	}
	dir := filepath.Join("..", "..", "testdata", "lab")
	os.MkdirAll(dir, 0o755)
	runs := []labRun{
		{"scout-5", "comma", ramp(40, 1, 5, 280), []string{"myrcene"}},
		{"scout-10", "semicolon", ramp(40, 1, 10, 280), nil},
		{"scout-20", "tab", ramp(40, 1, 20, 280), nil},
		{"scout-8", "cdf", ramp(60, 0.5, 8, 280), nil},
	}
	m := demo(t)
	writeLabRuns(t, "# Example scouting runs (invented: generated from the demo method's own parameters\n# with 0.002 min noise by labdata_test.go -write-lab).\n", dir, m, runs, map[string]bool{"limonene": true}, 42, nil)
	// a verification run of the demo's own program, unnamed but limonene
	rng := rand.New(rand.NewPCG(43, 5))
	ps, tm := simulatePeaks(t, m, m.Oven, 0.002, rng)
	writePeakTable(t, filepath.Join(dir, "verify.csv"), "comma", withExtras(ps, tm, rng), map[string]bool{"limonene": true})
}

// Everything unnamed but limonene: beta-pinene and myrcene may come out
// swapped (their retention cannot tell them apart), but then the fit must
// say so; every other compound is predicted within 0.02 min.
func TestLabTwinPairIsReported(t *testing.T) {
	swapped := 0
	for _, seed := range []uint64{30, 35, 36, 37, 40} {
		truth := hiddenTruth(t, seed)
		dir := t.TempDir()
		runs := []labRun{
			{"scout-5", "comma", ramp(40, 1, 5, 280), nil},
			{"scout-10", "semicolon", ramp(40, 1, 10, 280), nil},
			{"scout-20", "tab", ramp(40, 1, 20, 280), nil},
			{"scout-8", "cdf", ramp(60, 0.5, 8, 280), nil},
		}
		path := writeLabRuns(t, hiddenHeader, dir, truth, runs, map[string]bool{"limonene": true}, seed, nil)
		rep := labFit(t, demo(t), path, Options{})
		warned := anyWarning(rep, "beta-pinene and myrcene: their peaks are too close and their values too alike")
		bad := false
		for name, d := range newProgramErrors(t, rep.Method, truth) {
			if math.Abs(d) <= 0.02 {
				continue
			}
			if name != "beta-pinene" && name != "myrcene" {
				t.Errorf("seed %d: %s predicted %.4f min off", seed, name, d)
			} else {
				bad = true
			}
		}
		if bad {
			swapped++
			if !warned {
				t.Errorf("seed %d: the twin pair came out swapped without a warning", seed)
			}
		}
	}
	t.Logf("twin pair swapped in %d of 5 seeds (each time reported)", swapped)
}

// reportedAmbiguous: the fit warned that this compound's identity against
// its near twin is a guess.
func reportedAmbiguous(rep *Report, name string) bool {
	for _, w := range rep.Warnings {
		if strings.Contains(w, "too alike to tell which is which") && strings.Contains(w, name+" ") || strings.Contains(w, " "+name+":") && strings.Contains(w, "too alike") {
			return true
		}
	}
	return false
}
