package checks

import (
	"math"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// Hand-computed: 1 µL of 0.5 mg/mL is 500 ng; split 20:1 sends 500/21 ng.
func TestMassOnColumn(t *testing.T) {
	cases := []struct{ vol, conc, split, want float64 }{
		{1, 0.5, 20, 500.0 / 21},
		{1, 0.5, 0, 500},
		{2, 0.1, 100, 200.0 / 101},
	}
	for _, c := range cases {
		if got := MassOnColumn(c.vol, c.conc, c.split); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%v: %v, want %v", c, got, c.want)
		}
	}
	// capacity ∝ diameter × film: 0.53 mm × 1.0 µm holds 100·(0.53/0.25)·4 = 848 ng
	if got := Capacity(0.53, 1.0, 0); math.Abs(got-848) > 1e-9 {
		t.Errorf("capacity %v", got)
	}
	if got := Capacity(0.25, 0.25, 0); got != 100 {
		t.Errorf("reference capacity %v", got)
	}
	if got := Capacity(0.25, 0.25, 40); got != 40 {
		t.Errorf("override %v", got)
	}
}

func demo(t *testing.T) *methodfile.Method {
	m, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func warnings(t *testing.T, m *methodfile.Method) []string {
	sys, err := m.System()
	if err != nil {
		t.Fatal(err)
	}
	var res model.Result
	if err := sys.Simulate(m.ModelProgram(), &res); err != nil {
		t.Fatal(err)
	}
	return Warnings(m, sys, &res)
}

func has(ws []string, s string) bool {
	for _, w := range ws {
		if strings.Contains(w, s) {
			return true
		}
	}
	return false
}

// A warning at 2× capacity, none at 0.5×; on two columns.
func TestOverloadWarning(t *testing.T) {
	for _, col := range []struct{ d, f float64 }{{0.25, 0.25}, {0.32, 1.0}} {
		m := demo(t)
		m.Column.DiameterMM, m.Column.FilmUM = col.d, col.f
		capNG := Capacity(col.d, col.f, 0)
		m.Injection.SplitRatio = 9 // 1 µL → mass = conc·1000/10
		c := &m.Compounds[3]
		c.HasConc = true
		c.Concentration = 2 * capNG * 10 / 1000
		if ws := warnings(t, m); !has(ws, c.Name+": about") || !has(ws, "2.0×") {
			t.Errorf("%v: no warning at 2×: %v", col, ws)
		}
		c.Concentration = 0.5 * capNG * 10 / 1000
		if ws := warnings(t, m); has(ws, "capacity") {
			t.Errorf("%v: warning at 0.5×: %v", col, ws)
		}
	}
}

// The detector must be at least 20 °C above the highest oven temperature.
func TestDetectorMargin(t *testing.T) {
	m := demo(t) // program tops at 240 °C
	for _, c := range []struct {
		det  float64
		warn bool
	}{{259, true}, {259.9, true}, {260, false}, {261, false}, {300, false}} {
		m.Injection.DetectorTempC = c.det
		if got := has(warnings(t, m), "detector"); got != c.warn {
			t.Errorf("detector %v °C: warning %v, want %v", c.det, got, c.warn)
		}
	}
}

// The capacity per compound follows the kind: 10 µg on a packed column
// (MODEL.md §10, from memory) unless capacity_ng is given; a method with a
// coolant says so, and one starting below ambient says a coolant is needed.
func TestKindCapacityAndCoolant(t *testing.T) {
	p, err := methodfile.ReadFile("../../testdata/demo-packed.toml")
	if err != nil {
		t.Fatal(err)
	}
	if got := ColumnCapacity(p.Column); got != 10000 {
		t.Errorf("packed capacity %v ng, want 10000", got)
	}
	p.Column.CapacityNG, p.Column.HasCapacity = 2500, true
	if got := ColumnCapacity(p.Column); got != 2500 {
		t.Errorf("packed capacity with capacity_ng %v, want 2500", got)
	}
	if CoolantNote(p) != "" {
		t.Error("coolant note without a coolant")
	}
	l, err := methodfile.ReadFile("../../testdata/demo-porous-layer.toml")
	if err != nil {
		t.Fatal(err)
	}
	if got, want := ColumnCapacity(l.Column), Capacity(0.32, 10, 0); got != want {
		t.Errorf("porous-layer capacity %v, want the layer estimate %v", got, want)
	}
	if n := CoolantNote(l); !strings.Contains(n, "a coolant is needed") || !strings.Contains(n, "-70") {
		t.Errorf("coolant note %q", n)
	}
	l.Oven.InitialC = 40
	if n := CoolantNote(l); strings.Contains(n, "needed") || !strings.Contains(n, "cools toward its coolant") {
		t.Errorf("coolant note above ambient %q", n)
	}
}
