package report

import (
	"bytes"
	"encoding/csv"
	"image/png"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/sweep"
)

func demoSim(t *testing.T) *Sim {
	t.Helper()
	return simOf(t, "../../testdata/demo.toml")
}

func TestPNGSize(t *testing.T) {
	s := demoSim(t)
	data, err := s.Figure("png", 900, 600)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != 900 || b.Dy() != 600 {
		t.Errorf("PNG is %v, want 900×600", b)
	}
}

func TestSVGParsesWithLabels(t *testing.T) {
	s := demoSim(t)
	data, err := s.Figure("svg", 800, 500)
	if err != nil {
		t.Fatal(err)
	}
	mustParseSVG(t, data)
	for _, name := range []string{"limonene", "myrcene", "nootkatone"} {
		if !bytes.Contains(data, []byte(name)) {
			t.Errorf("SVG lacks the label %s", name)
		}
	}
	if _, err := s.Figure("pdf", 800, 500); err != nil {
		t.Error(err)
	}
}

func TestCSVMatchesResult(t *testing.T) {
	s := demoSim(t)
	data, err := s.CSV()
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != len(s.Result.Peaks)+1 {
		t.Fatalf("%d rows", len(rows))
	}
	for i, pk := range s.Result.Peaks {
		tr, _ := strconv.ParseFloat(rows[i+1][1], 64)
		if tr != pk.RetentionTime/60 {
			t.Errorf("row %d: %v vs %v", i, tr, pk.RetentionTime/60)
		}
	}
}

func TestSheetHasStepsAndCautions(t *testing.T) {
	s := demoSim(t)
	sheet := string(s.Sheet())
	for _, want := range []string{"| initial |", "| ramp 1 |", "standard injection", "maximum temperature", "instrument maker"} {
		if !strings.Contains(sheet, want) {
			t.Errorf("sheet lacks %q", want)
		}
	}
	if strings.Contains(sheet, "flammable") {
		t.Error("hydrogen caution without hydrogen")
	}
	m := s.Method.Clone()
	m.Carrier.Gas = model.Hydrogen
	h, err := Simulate(m)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(h.Sheet()), "flammable") {
		t.Error("no hydrogen caution with hydrogen")
	}
}

// A sweep point at the method's current value equals simulate; a sweep is
// reproducible exactly.
func TestSweepPointEqualsSimulate(t *testing.T) {
	s := demoSim(t)
	pts, err := sweep.One(s.Method, pv("rate_1"), sweep.Steps(2, 22, 11), nil)
	if err != nil {
		t.Fatal(err)
	}
	var at *sweep.Point
	for i := range pts {
		if pts[i].Value == 12 {
			at = &pts[i]
		}
	}
	if at == nil {
		t.Fatal("no step at 12")
	}
	if at.MinRs != s.Result.MinResolution || at.RunTime != s.Result.RunTime/60 {
		t.Errorf("sweep %v/%v vs simulate %v/%v", at.MinRs, at.RunTime, s.Result.MinResolution, s.Result.RunTime/60)
	}
	again, _ := sweep.One(s.Method, pv("rate_1"), sweep.Steps(2, 22, 11), nil)
	if !reflect.DeepEqual(stripNaN(pts), stripNaN(again)) {
		t.Error("sweep not reproducible")
	}
	grid, err := sweep.Two(s.Method, pv("rate_1"), sweep.Steps(5, 20, 4), pv("initial_c"), sweep.Steps(40, 100, 3), nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := MapPNG(grid, "rate_1", "initial_c", 1.5, 400, 300); err != nil {
		t.Error(err)
	}
	if _, err := WindowPNG(pts, "rate_1", 12, 1.5, 400, 300); err != nil {
		t.Error(err)
	}
	bad, _ := sweep.One(s.Method, pv("final_1"), []float64{30, 400}, nil)
	for _, p := range bad {
		if p.Valid {
			t.Errorf("final %v accepted", p.Value)
		}
	}
}

func stripNaN(p []sweep.Point) []sweep.Point {
	out := append([]sweep.Point(nil), p...)
	for i := range out {
		if math.IsNaN(out[i].MinRs) {
			out[i].MinRs = -1
		}
	}
	return out
}

func pv(s string) model.ProgramValue {
	v, err := model.ParseProgramValue(s)
	if err != nil {
		panic(err)
	}
	return v
}

// The sheets of the packed and porous-layer demos name the kind and its
// phase ratio; the porous-layer demo starts below ambient, so its sheet says
// that a coolant is needed and gives the cryogen cautions (MODEL.md §12).
func TestSheetKindsAndCoolant(t *testing.T) {
	for _, c := range []struct {
		file    string
		want    []string
		coolant bool
	}{
		{"../../testdata/demo-packed.toml", []string{"packed 3 m × 2 mm (165 µm particles, porosity 0.4, phase ratio 6)"}, false},
		{"../../testdata/demo-porous-layer.toml", []string{"porous-layer 30 m × 0.32 mm × 10 µm layer", "| phase ratio | 7.3 |", "A coolant is needed", "cold burns", "asphyxiate"}, true},
	} {
		s := simOf(t, c.file)
		sheet := string(s.Sheet())
		for _, w := range c.want {
			if !strings.Contains(sheet, w) {
				t.Errorf("%s: sheet lacks %q", c.file, w)
			}
		}
		if got := strings.Contains(sheet, "cold burns"); got != c.coolant {
			t.Errorf("%s: cryogen caution %v, want %v", c.file, got, c.coolant)
		}
	}
}

// The sheet reports the robust margin of the demo: nominal, worst corner
// and Rs ± σ.
func TestSheetRobustSection(t *testing.T) {
	s := simOf(t, "../../testdata/demo.toml")
	sheet := string(s.Sheet())
	for _, want := range []string{"## Robust margin", "| nominal |", "worst corner (oven", "Rs ± σ", "NOT met"} {
		if !strings.Contains(sheet, want) {
			t.Errorf("sheet lacks %q", want)
		}
	}
}
