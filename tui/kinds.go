package tui

import (
	"bytes"
	"fmt"
	"os"

	"github.com/pelletier/go-toml/v2"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// The settings of the column kinds (MODEL.md §10–11) and the coolant
// (§12): the packed column's own keys, the kind switch, and the optional
// coolant temperature.

// packedField is a packed column's own value; setting it marks it given,
// so that it is saved.
func packedField(key, label, unit string, digits int, step, big float64, p func(c *methodfile.Column) *float64) field {
	return field{key: key, label: label, unit: unit, digits: digits, step: step, big: big,
		get: func(m *methodfile.Method) float64 { return *p(&m.Column) },
		set: func(m *methodfile.Method, v float64) {
			*p(&m.Column) = v
			switch key {
			case "column.particle_um":
				m.Column.HasParticle = true
			case "column.porosity":
				m.Column.HasPorosity = true
			case "column.phase_ratio":
				m.Column.HasPhaseRatio = true
			}
		}}
}

// defaultCoolantC is where a step from "none" puts limits.coolant_c: a
// liquid-CO2 oven option reaches about this low (from memory; the
// instrument maker's manual says what a given oven takes).
const defaultCoolantC = -50.0

// coolantField is limits.coolant_c, "none" when the oven has no coolant.
// Adding one lowers a default lowest start temperature (ambient + 10 °C)
// to the coolant + 10 °C, as the method file's default does.
func coolantField() field {
	return field{key: "limits.coolant_c", label: "oven coolant temperature", unit: "°C", digits: 0, step: 5, big: 10, fromNone: defaultCoolantC,
		get:    func(m *methodfile.Method) float64 { return m.Limits.CoolantC },
		set:    func(m *methodfile.Method, v float64) { m.Limits.CoolantC, m.Limits.HasCoolant = v, true },
		absent: func(m *methodfile.Method) bool { return !m.Limits.HasCoolant },
		clear:  func(m *methodfile.Method) { m.Limits.CoolantC, m.Limits.HasCoolant = 0, false },
		after: func(sh *shared, before, m *methodfile.Method) string {
			l := &m.Limits
			if sh.ovenMinGiven {
				// an explicit lowest start stays what the user set; a
				// program below it is only advice
				if m.Oven.InitialC < l.OvenMinC {
					return fmt.Sprintf("lowest start temperature stays %s °C (set in the file); the program starts below it at %s °C", fmtNum(l.OvenMinC, 1, 1), fmtNum(m.Oven.InitialC, 1, 2))
				}
				return ""
			}
			switch {
			case l.HasCoolant && l.OvenMinC == sinkOf(before)+10 && l.OvenMinC != l.CoolantC+10:
				l.OvenMinC = l.CoolantC + 10
				return fmt.Sprintf("lowest start temperature follows: %s °C", trimNum(l.OvenMinC))
			case !l.HasCoolant && before.Limits.HasCoolant && l.OvenMinC == before.Limits.CoolantC+10:
				l.OvenMinC = l.AmbientC + 10
				return fmt.Sprintf("lowest start temperature follows: %s °C", trimNum(l.OvenMinC))
			}
			return ""
		}}
}

// sinkOf is what the oven cools toward: the coolant, or the ambient.
func sinkOf(m *methodfile.Method) float64 {
	if m.Limits.HasCoolant {
		return m.Limits.CoolantC
	}
	return m.Limits.AmbientC
}

// typicalColumns are what a kind switch starts from, the demos' columns
// (testdata/demo*.toml): the user edits them from there.
var typicalColumns = map[model.ColumnKind]struct {
	lengthM, diameterMM, filmUM, flowMLMin float64
}{
	model.WallCoated:  {30, 0.25, 0.25, 1.2},
	model.PorousLayer: {30, 0.32, 10, 2},
	model.Packed:      {3, 2, 1, 25},
}

// Packed-only defaults of a kind switch (the packed demo's).
const (
	typicalParticleUM = 165.0
	typicalPhaseRatio = 6.0
)

// typicalColumn runs after a kind switch: the tube, film or layer, the
// packing and the flow become the kind's typical ones (a 0.25 mm tube is
// no packed column), the stationary-phase diffusivity its default unless
// it was set apart from the old kind's; in constant-pressure mode the
// inlet pressure that gives the typical flow's holdup time.
func typicalColumn(_ *shared, before, m *methodfile.Method) string {
	if before.Column.Kind == m.Column.Kind {
		return ""
	}
	t := typicalColumns[m.Column.Kind]
	c := &m.Column
	c.LengthM, c.DiameterMM, c.FilmUM = t.lengthM, t.diameterMM, t.filmUM
	if c.Diffusivity == kindDiffusivity(before.Column.Kind) {
		c.Diffusivity = kindDiffusivity(c.Kind)
	}
	c.HasParticle, c.HasPorosity, c.HasPhaseRatio = false, false, false
	c.ParticleUM, c.Porosity, c.PhaseRatio, c.EddyLambda, c.ObstructionGamma, c.MobileOmega = 0, 0, 0, 0, 0, 0
	if c.Kind == model.Packed {
		c.ParticleUM, c.PhaseRatio, c.Porosity = typicalParticleUM, typicalPhaseRatio, model.DefaultPorosity
		c.HasParticle, c.HasPhaseRatio = true, true
		c.EddyLambda, c.ObstructionGamma, c.MobileOmega = model.DefaultEddyFactor, model.DefaultObstructionFactor, model.DefaultMobileFactor
	}
	what := fmt.Sprintf("typical %s column: %s", c.Kind, c.Describe())
	if m.Carrier.Mode == model.ConstantPressure {
		probe := m.Clone()
		probe.Carrier.Mode, probe.Carrier.FlowMLMin = model.ConstantFlow, t.flowMLMin
		if tm, err := programHoldup(probe); err == nil {
			if desc, err := keepHoldup(m, tm); err == nil {
				what += fmt.Sprintf(" · for about %s mL/min %s", trimNum(t.flowMLMin), desc)
			}
		}
	} else {
		m.Carrier.FlowMLMin = t.flowMLMin
		what += fmt.Sprintf(" · flow %s mL/min", trimNum(t.flowMLMin))
	}
	return what + " · edit them below"
}

// kindDiffusivity is the default stationary-phase diffusivity of a kind.
func kindDiffusivity(k model.ColumnKind) float64 {
	if k == model.PorousLayer {
		return model.DefaultLayerDs
	}
	return model.DefaultDs
}

// givenInFile reports whether the method file at path sets table.key
// itself (a default is not given). An unreadable file gives nothing.
func givenInFile(path, table, key string) bool {
	if path == "" {
		return false
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return false
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	var raw map[string]any
	if toml.Unmarshal(data, &raw) != nil {
		return false
	}
	t, ok := raw[table].(map[string]any)
	if !ok {
		return false
	}
	_, ok = t[key]
	return ok
}
