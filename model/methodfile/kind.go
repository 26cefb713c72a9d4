package methodfile

import (
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
)

// kindRules are the [column] ranges of one column kind (MODEL.md §10-11).
type kindRules struct {
	length, diameter, film bound
	filmRequired           bool
	filmDefault            float64 // µm, when not required
	filmWord               string  // what film_um is for this kind
	diffusivity            float64 // default stationary_diffusivity_m2_s
}

// rulesFor gives the ranges of a kind: a wall-coated tube up to 1 mm with a
// film up to 50 µm; a porous-layer tube with a 1-60 µm layer and a layer
// diffusivity of 1e-7 m²/s (MODEL.md §11); a packed tube of 1-6 mm and
// 0.3-10 m with an effective liquid film of 1 µm by default (§10).
func rulesFor(kind model.ColumnKind) kindRules {
	switch kind {
	case model.Packed:
		return kindRules{
			length:      bound{lo: 0.3, hi: 10},
			diameter:    bound{lo: 1, hi: 6},
			film:        bound{lo: 0.01, hi: 20},
			filmDefault: model.DefaultPackedFilm * 1e6,
			filmWord:    "liquid film",
			diffusivity: model.DefaultDs,
		}
	case model.PorousLayer:
		return kindRules{
			length:       bound{lo: 0.1, hi: 300},
			diameter:     bound{lo: 0.01, hi: 1.0},
			film:         bound{lo: 1, hi: 60},
			filmRequired: true,
			filmWord:     "layer",
			diffusivity:  model.DefaultLayerDs,
		}
	}
	return kindRules{
		length:       bound{lo: 0.1, hi: 300},
		diameter:     bound{lo: 0.01, hi: 1.0},
		film:         bound{lo: 0.01, hi: 50},
		filmRequired: true,
		filmWord:     "film",
		diffusivity:  model.DefaultDs,
	}
}

// packedKeys reads the packed-column keys of [column] (MODEL.md §10): on a
// packed column particle_um (50-400 µm) and phase_ratio (2-200) are
// required, porosity (0.30-0.50, default 0.40) and the van Deemter factors
// eddy_lambda (default 0.8), obstruction_gamma (0.7) and mobile_omega (0.1)
// optional; on an open tube each of them is an error naming the key.
func (v *validator) packedKeys(c *rawColumn, m *Method) {
	if m.Column.Kind != model.Packed {
		for _, k := range []struct {
			key   string
			given bool
		}{
			{"particle_um", c.ParticleUM != nil}, {"porosity", c.Porosity != nil}, {"phase_ratio", c.PhaseRatio != nil},
			{"eddy_lambda", c.EddyLambda != nil}, {"obstruction_gamma", c.ObstrGamma != nil}, {"mobile_omega", c.MobileOmega != nil},
		} {
			if k.given {
				v.fail("column."+k.key, "does not belong to a %s column (it is a packed column's key: set kind = \"packed\" or remove it)", m.Column.Kind)
			}
		}
		return
	}
	col := &m.Column
	col.ParticleUM = v.opt("column.particle_um", c.ParticleUM, true, 165)
	col.HasParticle = c.ParticleUM != nil
	col.PhaseRatio = v.opt("column.phase_ratio", c.PhaseRatio, true, 15)
	col.HasPhaseRatio = c.PhaseRatio != nil
	col.Porosity = v.opt("column.porosity", c.Porosity, false, model.DefaultPorosity)
	col.HasPorosity = c.Porosity != nil
	col.EddyLambda = v.opt("column.eddy_lambda", c.EddyLambda, false, model.DefaultEddyFactor)
	col.ObstructionGamma = v.opt("column.obstruction_gamma", c.ObstrGamma, false, model.DefaultObstructionFactor)
	col.MobileOmega = v.opt("column.mobile_omega", c.MobileOmega, false, model.DefaultMobileFactor)
}

// checkKind checks the [column] values against the ranges of its kind
// (Validate's part of the kind rules; packedKeys refuses a key that does
// not belong to the kind when the file is read).
func (v *validator) checkKind(m *Method) {
	c := &m.Column
	if v.err == nil && !validChoice(c.Kind, model.ColumnKinds) {
		v.fail("column.kind", "%s is not one of wall-coated, packed, porous-layer", quoted(c.Kind.String()))
		return
	}
	kr := rulesFor(c.Kind)
	v.in("column.length_m", c.LengthM, kr.length.rng("m"), "")
	v.in("column.diameter_mm", c.DiameterMM, kr.diameter.rng("mm"), "")
	v.in("column.film_um", c.FilmUM, kr.film.rng("µm"), "")
	if v.err == nil && c.Kind != model.Packed && c.FilmUM*1e-3 >= c.DiameterMM/2 {
		v.fail("column.film_um", "%s %s µm is thicker than the column radius (%s mm diameter)", kr.filmWord, fmtNum(c.FilmUM), fmtNum(c.DiameterMM))
	}
	if c.Kind != model.Packed {
		for _, k := range []struct {
			key   string
			given bool
		}{{"particle_um", c.HasParticle}, {"porosity", c.HasPorosity}, {"phase_ratio", c.HasPhaseRatio}} {
			if v.err == nil && k.given {
				v.fail("column."+k.key, "does not belong to a %s column (it is a packed column's key: set kind = \"packed\" or remove it)", c.Kind)
			}
		}
		return
	}
	v.in("column.particle_um", c.ParticleUM, closed(50, 400, "µm"), "")
	v.in("column.phase_ratio", c.PhaseRatio, closed(2, 200, ""), "")
	v.in("column.porosity", c.Porosity, closed(0.30, 0.50, ""), "")
	// zero would mean "default" in the model, so the factors are positive
	v.in("column.eddy_lambda", c.EddyLambda, rng{lo: 0, hi: 10, loOpen: true}, "")
	v.in("column.obstruction_gamma", c.ObstructionGamma, rng{lo: 0, hi: 2, loOpen: true}, "")
	v.in("column.mobile_omega", c.MobileOmega, rng{lo: 0, hi: 10, loOpen: true}, "")
}

// rng is the bound with its unit, for Validate's messages.
func (b bound) rng(unit string) rng {
	return rng{lo: b.lo, hi: b.hi, loOpen: b.loOpen, hiOpen: b.hiOpen, unit: unit}
}

// Describe is a short description of the column for screens and sheets,
// e.g. "packed 2 m × 2 mm (165 µm particles, porosity 0.4, phase ratio 15)";
// a wall-coated column is "30 m × 0.25 mm × 0.25 µm".
func (c Column) Describe() string {
	switch c.Kind {
	case model.Packed:
		return fmt.Sprintf("packed %s m × %s mm (%s µm particles, porosity %s, phase ratio %s)",
			fmtNum(c.LengthM), fmtNum(c.DiameterMM), fmtNum(c.ParticleUM), fmtNum(c.Porosity), fmtNum(c.PhaseRatio))
	case model.PorousLayer:
		return fmt.Sprintf("porous-layer %s m × %s mm × %s µm layer", fmtNum(c.LengthM), fmtNum(c.DiameterMM), fmtNum(c.FilmUM))
	}
	return fmt.Sprintf("%s m × %s mm × %s µm", fmtNum(c.LengthM), fmtNum(c.DiameterMM), fmtNum(c.FilmUM))
}

// Describe is the carrier in a few words: "helium 1.2 mL/min constant
// flow" or "hydrogen 80 kPa constant pressure", with ", vacuum outlet" for a
// vacuum outlet.
func (g Carrier) Describe() string { return g.describe(fmtNum(g.FlowMLMin), fmtNum(g.InletKPa)) }

// DescribeAt is Describe with the flow and pressure written at the keypad
// step of limits l (flow_step_ml_min, pressure_step_kpa): "helium 1.20
// mL/min constant flow" beside an optimized "2.15", as the instrument
// takes them.
func (g Carrier) DescribeAt(l Limits) string {
	return g.describe(format.OnStep(g.FlowMLMin, l.Step(model.CarrierFlow)), format.OnStep(g.InletKPa, l.Step(model.InletPressure)))
}

func (g Carrier) describe(flow, kpa string) string {
	s := fmt.Sprintf("%s %s mL/min constant flow", g.Gas, flow)
	if g.Mode == model.ConstantPressure {
		s = fmt.Sprintf("%s %s kPa constant pressure", g.Gas, kpa)
	}
	if g.Outlet == model.VacuumOutlet {
		s += ", vacuum outlet"
	}
	return s
}

// Describe is the oven program in one line, at the precision the oven
// takes: "50 °C (1 min) → 12 °C/min → 240 °C (2 min)".
func (o Oven) Describe() string {
	r2 := func(x float64, d int) string {
		p := math.Pow(10, float64(d))
		return fmtNum(math.Round(x*p) / p)
	}
	s := fmt.Sprintf("%s °C (%s min)", r2(o.InitialC, 2), r2(o.InitialHoldMin, 3))
	for _, r := range o.Ramps {
		s += fmt.Sprintf(" → %s °C/min → %s °C (%s min)", r2(r.RateCMin, 2), r2(r.FinalC, 2), r2(r.HoldMin, 3))
	}
	return s
}

// Describe is the column, its phase and limit, and the carrier in one line:
// what the command outputs, the figure and the sheet head with.
func (m *Method) Describe() string {
	phase := m.Column.Phase
	if phase == "" {
		phase = "phase not named"
	}
	return fmt.Sprintf("%s %s (max %s °C) · %s", m.Column.Describe(), phase, fmtNum(m.Column.MaxTempC), m.Carrier.DescribeAt(m.Limits))
}
