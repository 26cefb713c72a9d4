package methodfile

import (
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
)

const (
	packedDemoPath = "../../testdata/demo-packed.toml"
	layerDemoPath  = "../../testdata/demo-porous-layer.toml"
)

func TestKindDemosLoad(t *testing.T) {
	p, err := ReadFile(packedDemoPath)
	if err != nil {
		t.Fatal(err)
	}
	col := p.ModelColumn()
	if col.Kind != model.Packed || col.Particle != 165e-6 || col.GivenPhaseRatio != 6 || col.Porosity != 0.40 ||
		col.EddyFactor != 0.8 || col.ObstructionFactor != 0.7 || col.MobileFactor != 0.1 {
		t.Errorf("packed demo column %+v", col)
	}
	l, err := ReadFile(layerDemoPath)
	if err != nil {
		t.Fatal(err)
	}
	lc := l.ModelColumn()
	if lc.Kind != model.PorousLayer || l.Column.Diffusivity != model.DefaultLayerDs || lc.Particle != 0 {
		t.Errorf("porous-layer demo column %+v (diffusivity %v)", lc, l.Column.Diffusivity)
	}
	if o := l.ModelOven(); math.Abs(o.Coolant-(model.ZeroCelsius-70)) > 1e-9 || l.Limits.OvenMinC != -60 {
		t.Errorf("porous-layer demo oven %+v, oven_min_c %v", o, l.Limits.OvenMinC)
	}
	for _, m := range []*Method{p, l} {
		data, err := Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		again, err := Parse("again", data)
		if err != nil {
			t.Fatalf("re-read: %v\n%s", err, data)
		}
		if again.ModelColumn() != m.ModelColumn() || again.ModelOven() != m.ModelOven() {
			t.Errorf("%s: round trip changed the column or oven", m.Title)
		}
	}
}

func TestKindRules(t *testing.T) {
	wall := readDemoText(t, demoPath)
	packed := readDemoText(t, packedDemoPath)
	layer := readDemoText(t, layerDemoPath)
	cases := []struct {
		name, base, from, to, key, msg string
	}{
		{"particle on wall-coated", wall, "[column]\n", "[column]\nparticle_um = 165.0\n", "column.particle_um", "does not belong to a wall-coated column"},
		{"phase ratio on wall-coated", wall, "[column]\n", "[column]\nphase_ratio = 20.0\n", "column.phase_ratio", "does not belong"},
		{"porosity on porous layer", layer, "[column]\n", "[column]\nporosity = 0.4\n", "column.porosity", "does not belong to a porous-layer column"},
		{"eddy on porous layer", layer, "[column]\n", "[column]\neddy_lambda = 0.8\n", "column.eddy_lambda", "does not belong"},
		{"packed tube too narrow", packed, "diameter_mm = 2.0", "diameter_mm = 0.53", "column.diameter_mm", "allowed: from 1 to 6"},
		{"packed tube too wide", packed, "diameter_mm = 2.0", "diameter_mm = 6.5", "column.diameter_mm", "allowed: from 1 to 6"},
		{"packed too long", packed, "length_m = 3.0", "length_m = 12.0", "column.length_m", "allowed: from 0.3 to 10"},
		{"packed too short", packed, "length_m = 3.0", "length_m = 0.2", "column.length_m", "out of range"},
		{"particles too fine", packed, "particle_um = 165.0", "particle_um = 40.0", "column.particle_um", "allowed: from 50 to 400"},
		{"particles too coarse", packed, "particle_um = 165.0", "particle_um = 450.0", "column.particle_um", "out of range"},
		{"particle missing", packed, "particle_um = 165.0\n", "", "column.particle_um", "missing (required)"},
		{"porosity low", packed, "porosity = 0.40", "porosity = 0.25", "column.porosity", "allowed: from 0.3 to 0.5"},
		{"porosity high", packed, "porosity = 0.40", "porosity = 0.55", "column.porosity", "out of range"},
		{"phase ratio low", packed, "phase_ratio = 6.0", "phase_ratio = 1.5", "column.phase_ratio", "allowed: from 2 to 200"},
		{"phase ratio high", packed, "phase_ratio = 6.0", "phase_ratio = 250.0", "column.phase_ratio", "out of range"},
		{"phase ratio missing", packed, "phase_ratio = 6.0\n", "", "column.phase_ratio", "missing (required)"},
		{"eddy zero", packed, "[column]\n", "[column]\neddy_lambda = 0.0\n", "column.eddy_lambda", "out of range"},
		{"layer too thin", layer, "film_um = 10.0", "film_um = 0.5", "column.film_um", "allowed: from 1 to 60"},
		{"layer too thick", layer, "film_um = 10.0", "film_um = 65.0", "column.film_um", "out of range"},
		{"layer fills the tube", layer, "diameter_mm = 0.32\nfilm_um = 10.0", "diameter_mm = 0.1\nfilm_um = 60.0", "column.film_um", "thicker than the column radius"},
		{"wall-coated over 1 mm", wall, "diameter_mm = 0.25", "diameter_mm = 2.0", "column.diameter_mm", "out of range"},
		{"start at the coolant", layer, "initial_c = -40.0", "initial_c = -70.0", "oven.initial_c", "not above the coolant_c"},
		{"sub-ambient without coolant", layer, "coolant_c = -70.0\noven_min_c = -60.0\n", "", "oven.initial_c", "set limits.coolant_c"},
		{"oven minimum at the coolant", layer, "oven_min_c = -60.0", "oven_min_c = -75.0", "limits.oven_min_c", "not above the coolant_c"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := strings.Replace(c.base, c.from, c.to, 1)
			if text == c.base {
				t.Fatal("fixture did not change")
			}
			_, err := Parse("m.toml", []byte(text))
			var fe *Error
			if !errors.As(err, &fe) || fe.Line == 0 || fe.Key != c.key {
				t.Fatalf("error %v: want a located error on %s", err, c.key)
			}
			if !strings.Contains(fe.Msg, c.msg) {
				t.Errorf("error %q lacks %q", err, c.msg)
			}
		})
	}
	// a packed column's film is optional (1 µm), oven_min_c follows the coolant
	m, err := Parse("m.toml", []byte(strings.Replace(strings.Replace(packed, "film_um = 1.0\n", "", 1), "[column]\n", "[column]\n", 1)))
	if err != nil || m.Column.FilmUM != 1.0 {
		t.Errorf("packed without film_um: %v, film %v", err, m.Column.FilmUM)
	}
	m, err = Parse("m.toml", []byte(strings.Replace(layer, "oven_min_c = -60.0\n", "", 1)))
	if err != nil || m.Limits.OvenMinC != -60 {
		t.Errorf("oven_min_c default with a coolant: %v, %v (want coolant + 10)", err, m.Limits.OvenMinC)
	}
	// a packed column carries no packed keys into a wall-coated method
	w, err := Parse("m.toml", []byte(wall))
	if err != nil {
		t.Fatal(err)
	}
	if w.Column.Porosity != 0 || w.Column.EddyLambda != 0 {
		t.Errorf("wall-coated method has packed values %+v", w.Column)
	}
}

func readDemoText(t *testing.T, path string) string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

// A save of a packed or porous-layer method keeps the file: only the
// changed kind key is rewritten where it stands.
func TestKindUpdateInPlace(t *testing.T) {
	orig := readDemoText(t, packedDemoPath)
	m, err := Parse("p.toml", []byte(orig))
	if err != nil {
		t.Fatal(err)
	}
	m.Column.ParticleUM = 150
	out, inPlace, err := Update("p.toml", []byte(orig), m)
	if err != nil || !inPlace {
		t.Fatalf("update: %v, in place %v", err, inPlace)
	}
	if want := strings.Replace(orig, "particle_um = 165.0", "particle_um = 150.0", 1); string(out) != want {
		t.Errorf("update changed more than the particle size:\n%s", out)
	}
	lorig := readDemoText(t, layerDemoPath)
	l, err := Parse("l.toml", []byte(lorig))
	if err != nil {
		t.Fatal(err)
	}
	l.Limits.CoolantC = -65
	out, inPlace, err = Update("l.toml", []byte(lorig), l)
	if want := strings.Replace(lorig, "coolant_c = -70.0", "coolant_c = -65.0", 1); err != nil || !inPlace || string(out) != want {
		t.Errorf("coolant update: %v, in place %v\n%s", err, inPlace, out)
	}
}
