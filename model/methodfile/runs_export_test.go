package methodfile

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/andi"
)

const runHead = `[[run]]
name = "a"
%s
[run.oven]
initial_c = 40.0
initial_hold_min = 1.0
[[run.oven.ramp]]
rate_c_min = 10.0
final_c = 280.0
hold_min = 0.0
`

func demoMethod(t *testing.T) *Method {
	m, err := ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func TestRunsPeaksRelativeToRunsFile(t *testing.T) {
	dir := t.TempDir()
	os.MkdirAll(filepath.Join(dir, "exports"), 0o755)
	os.WriteFile(filepath.Join(dir, "exports", "a.csv"), []byte("RT;Area;Name\n3,30;100;hexanal\n3,50;50;\n7,10;20;\n"), 0o644)
	path := filepath.Join(dir, "runs.toml")
	os.WriteFile(path, []byte(strings.Replace(runHead, "%s", `peaks = "exports/a.csv"`, 1)), 0o644)
	runs, err := ReadRuns(path, demoMethod(t))
	if err != nil {
		t.Fatal(err)
	}
	r := runs.Runs[0]
	if r.Source != "peaks" || len(r.Peaks) != 3 || r.Retention["hexanal"] != 3.3 || len(r.Unnamed()) != 2 || len(r.Names()) != 1 {
		t.Fatalf("%+v", r)
	}
}

func TestRunsColumnsSettleTheTable(t *testing.T) {
	dir := t.TempDir()
	// no header, times in seconds below 100 would read as minutes
	os.WriteFile(filepath.Join(dir, "a.txt"), []byte("1\t95.5\t2000\n2\t99.0\t1000\n"), 0o644)
	text := strings.Replace(runHead, "%s", `peaks = "a.txt"`, 1) + "[run.columns]\ntime = 2\narea = 3\ntime_unit = \"s\"\n"
	path := filepath.Join(dir, "runs.toml")
	os.WriteFile(path, []byte(text), 0o644)
	runs, err := ReadRuns(path, demoMethod(t))
	if err != nil {
		t.Fatal(err)
	}
	p := runs.Runs[0].Peaks[0]
	if p.TimeMin != 95.5/60 || p.Area != 2000 {
		t.Fatalf("%+v", p)
	}
	// a column number that is not there
	os.WriteFile(path, []byte(strings.Replace(text, "area = 3", "area = 9", 1)), 0o644)
	if _, err := ReadRuns(path, demoMethod(t)); err == nil || !strings.Contains(err.Error(), "area") || !strings.Contains(err.Error(), "3 columns") {
		t.Errorf("bad column number: %v", err)
	}
	os.WriteFile(path, []byte(strings.Replace(text, "time = 2", "time = true", 1)), 0o644)
	if _, err := ReadRuns(path, demoMethod(t)); err == nil || !strings.Contains(err.Error(), "columns.time") {
		t.Errorf("bad column type: %v", err)
	}
}

func TestRunsChromatogramFindsPeaks(t *testing.T) {
	dir := t.TempDir()
	c := &andi.Chromatogram{IntervalS: 0.2, Values: make([]float64, 3000)}
	for i := range c.Values {
		tm := c.Time(i)
		for _, p := range []float64{3.3, 6.1} {
			z := (tm - p) / 0.01
			c.Values[i] += 1000 * exp(-z*z/2)
		}
	}
	b, err := andi.EncodeChromatogram(c)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, "a.cdf"), b, 0o644)
	path := filepath.Join(dir, "runs.toml")
	os.WriteFile(path, []byte(strings.Replace(runHead, "%s", `chromatogram = "a.cdf"`, 1)), 0o644)
	runs, err := ReadRuns(path, demoMethod(t))
	if err != nil {
		t.Fatal(err)
	}
	r := runs.Runs[0]
	if !r.Found || r.Trace == nil || len(r.Peaks) != 2 || abs(r.Peaks[1].TimeMin-6.1) > 0.002 {
		t.Fatalf("%+v", r.Peaks)
	}
	// the same file read as a verification run of the method's program
	v, err := ReadExportRun(filepath.Join(dir, "a.cdf"), demoMethod(t), nil)
	if err != nil || len(v.Peaks) != 2 || v.Oven.InitialC != demoMethod(t).Oven.InitialC {
		t.Fatalf("%v %+v", err, v)
	}
}

func TestRunsPeakTableDuplicateName(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "a.csv"), []byte("RT,Name\n3.3,hexanal\n3.5,hexanal\n"), 0o644)
	path := filepath.Join(dir, "runs.toml")
	os.WriteFile(path, []byte(strings.Replace(runHead, "%s", `peaks = "a.csv"`, 1)), 0o644)
	if _, err := ReadRuns(path, demoMethod(t)); err == nil || !strings.Contains(err.Error(), "a.csv:3") || !strings.Contains(err.Error(), "named twice") {
		t.Errorf("%v", err)
	}
}

func exp(x float64) float64 { return math.Exp(x) }
func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
