// Package methodfile reads and writes rampwise method files (TOML, see the
// project's FORMAT.md). Decoding is strict: an unknown key, a wrong type, a
// missing required key or a value out of range is an error naming the file,
// line and key, and nothing is half-loaded. Saving is atomic.
//
// A Method keeps the file's own units (°C, min, mm, µm, kPa gauge, mL/min) so
// that reading, writing and reading again gives the same values exactly; the
// model's SI types are built from it on demand.
package methodfile

import (
	"fmt"
	"math"
	"reflect"

	"github.com/rampwise/rampwise/model"
)

// Column is the [column] table.
type Column struct {
	LengthM     float64
	DiameterMM  float64
	FilmUM      float64
	Phase       string
	MaxTempC    float64
	Diffusivity float64 // stationary_diffusivity_m2_s, default 1.0e-9
	PlateHeight float64 // plate_height_factor, default 1.0
	CapacityNG  float64 // capacity_ng; 0 = estimate
	HasCapacity bool
	// Kind is wall-coated (default), packed or porous-layer (MODEL.md §10-11).
	Kind model.ColumnKind
	// MaxIsothermalC bounds every hold (max_isothermal_c); MaxTempC bounds
	// the programmed maximum. HasMaxIsothermal is false when not given.
	MaxIsothermalC   float64
	HasMaxIsothermal bool
	// Packed columns (MODEL.md §10): particle diameter, interparticle
	// porosity (default 0.40), phase ratio, and the van Deemter constants
	// (defaults 0.8, 0.7, 0.1).
	ParticleUM       float64
	Porosity         float64
	PhaseRatio       float64
	EddyLambda       float64
	ObstructionGamma float64
	MobileOmega      float64
	HasParticle      bool
	HasPorosity      bool
	HasPhaseRatio    bool
}

// Carrier is the [carrier] table.
type Carrier struct {
	Gas         model.Gas
	Mode        model.PressureMode
	FlowMLMin   float64
	InletKPa    float64 // gauge
	Outlet      model.Outlet
	AmbientKPa  float64
	InitialBand float64 // s
}

// Ramp is one [[oven.ramp]] (°C/min, °C, min).
type Ramp = model.FileRamp

// Oven is the [oven] table: a program in the file's units
// (model.FileProgram, the one conversion to and from model.Program).
type Oven model.FileProgram

// Limits is the [limits] table, defaults applied.
type Limits struct {
	OvenMinC         float64 // default: ambient + 10 °C
	MaxRateCMin      float64 // default 100
	MaxHoldMin       float64 // default 10
	AmbientC         float64 // default 25
	CooldownTauMin   float64 // default 2.0
	EquilibrationMin float64 // default 0.5
	MaxInletKPa      float64 // default 690 (gauge)
	CoolantC         float64 // coolant_c: lowest oven temperature with a coolant
	HasCoolant       bool
	MinInletKPa      float64 // default 0 (gauge): inlets cannot regulate below ambient
	MinFlowMLMin     float64 // 0 = not given (the optimizer derives a range)
	MaxFlowMLMin     float64 // 0 = not given
	// Oven keypad steps: every value the optimizer saves lies on them.
	TempStepC       float64 // default 0.1
	RateStepCMin    float64 // default 0.1
	HoldStepMin     float64 // default 0.01
	FlowStepMLMin   float64 // default 0.01
	PressureStepKPa float64 // default 0.1
	// RateBands lower the ramp-rate limit above a temperature, in
	// increasing AboveC.
	RateBands []RateBand
}

// RateBand is one [[limits.rate_band]]: above AboveC the oven heats at most
// at MaxRateCMin.
type RateBand struct {
	AboveC      float64
	MaxRateCMin float64
}

// Robust is the [goal.robust] table, defaults applied: the tolerances the
// optimizer's target must survive. Zero means off.
type Robust struct {
	OvenOffsetC        float64 // oven hotter/colder by this throughout, °C
	FlowPct            float64 // flow (or inlet gauge pressure) ± this %
	EfficiencyPct      float64 // plate-height factor up by this %
	RetentionSigma     float64 // z: ln k shifted by ± z standard errors
	PriorDHkJ          float64 // default 2.0: uncertainty of entered dH without dH_se
	PriorDS            float64 // default 4.0: uncertainty of entered dS without dS_se
	RetentionTimeSDMin float64 // default 0.002: assumed when a fit has no residual freedom
}

// Goal is the [goal] table, defaults applied.
type Goal struct {
	MinResolution float64 // default 1.5
	Objective     model.Objective
	Ramps         int                  // default: the oven's ramp count, 1..5
	TailMin       float64              // default 0.5
	Lock          []model.ProgramValue // program values held fixed
	MinFirstK     float64              // default 0.5: first target's k at elution at least this
	BakeoutC      float64              // bake-out temperature for late non-targets
	BakeoutMin    float64              // bake-out hold, default 0
	HasBakeout    bool
	Robust        Robust
}

// Injection is the optional [injection] table.
type Injection struct {
	Present       bool
	VolumeUL      float64 // default 1.0
	SplitRatio    float64 // default 0 = splitless
	InletTempC    float64
	DetectorTempC float64
	HasInletTemp  bool
	HasDetector   bool
}

// Compound is one [[compound]].
type Compound struct {
	Name          string
	Formula       string
	AromaticRings int
	DHkJ          float64
	DS            float64
	DCp           float64
	RefTempC      float64 // default 100
	Amount        float64 // default 1
	Target        bool    // default true
	Concentration float64 // mg/mL
	HasConc       bool
	// Retention-index keys.
	AlkaneCarbons  int // 0 = not a ladder alkane
	RetentionIndex float64
	IndexTempC     float64
	HasIndexTemp   bool
	// FromIndex is true when dH and dS were not in the file and were derived
	// from the retention index and the ladder (ln K between the two
	// bracketing ladder alkanes, index.go).
	FromIndex bool
	// FromFormula is true when the file gave neither dH and dS nor a
	// retention index, only a formula: dH and dS are then a rough estimate
	// (FormulaEstimate) with a large uncertainty.
	FromFormula bool
	// Standard errors of dH (kJ/mol) and dS (J/(mol·K)) and their
	// correlation, written by fit; HasSE is false when the file has none.
	DHSE     float64
	DSSE     float64
	DHDSCorr float64
	HasSE    bool
}

// Method is a whole method file.
type Method struct {
	Title     string
	Notes     string
	Column    Column
	Carrier   Carrier
	Oven      Oven
	Limits    Limits
	Goal      Goal
	Injection Injection
	Compounds []Compound

	// where the method was read from, so that Validate names the file and
	// line of a key (empty for a method made in code)
	file string
	loc  Locations
}

// Source is the name of the file the method was read from ("" if none).
func (m *Method) Source() string { return m.file }

// Clone returns a deep copy.
func (m *Method) Clone() *Method {
	c := *m
	c.Oven.Ramps = append([]Ramp(nil), m.Oven.Ramps...)
	c.Goal.Lock = append([]model.ProgramValue(nil), m.Goal.Lock...)
	c.Limits.RateBands = append([]RateBand(nil), m.Limits.RateBands...)
	c.Compounds = append([]Compound(nil), m.Compounds...)
	return &c
}

const kPa = 1000.0

// ModelColumn is the column in SI units.
func (m *Method) ModelColumn() model.Column {
	c := model.Column{
		Kind:                  m.Column.Kind,
		Length:                m.Column.LengthM,
		Diameter:              m.Column.DiameterMM * 1e-3,
		Film:                  m.Column.FilmUM * 1e-6,
		MaxTemp:               m.Column.MaxTempC + model.ZeroCelsius,
		StationaryDiffusivity: m.Column.Diffusivity,
		PlateHeightFactor:     m.Column.PlateHeight,
	}
	if c.Kind == model.Packed {
		c.Particle = m.Column.ParticleUM * 1e-6
		c.Porosity = m.Column.Porosity
		c.GivenPhaseRatio = m.Column.PhaseRatio
		c.EddyFactor = m.Column.EddyLambda
		c.ObstructionFactor = m.Column.ObstructionGamma
		c.MobileFactor = m.Column.MobileOmega
	}
	return c
}

// ModelCarrier is the carrier in SI units.
func (m *Method) ModelCarrier() (model.Carrier, error) {
	c := model.Carrier{
		Gas:         m.Carrier.Gas,
		Mode:        m.Carrier.Mode,
		Flow:        m.Carrier.FlowMLMin * 1e-6 / 60,
		InletGauge:  m.Carrier.InletKPa * kPa,
		Vacuum:      m.Carrier.Outlet.Vacuum(),
		Ambient:     m.Carrier.AmbientKPa * kPa,
		InitialBand: m.Carrier.InitialBand,
	}
	return c, nil
}

// ModelProgram is the oven program in SI units.
func (m *Method) ModelProgram() model.Program {
	return ProgramToModel(m.Oven)
}

// ProgramToModel converts an oven program to SI units
// (model.FileProgram.Program, not rounded).
func ProgramToModel(o Oven) model.Program { return model.FileProgram(o).Program() }

// ProgramFromModel converts a model program to file units
// (model.FileProgramOf: each value to 12 significant digits, so that a
// value typed or on a keypad step comes back exactly as typed).
func ProgramFromModel(p model.Program) Oven { return Oven(model.FileProgramOf(p)) }

// ModelOven is the cool-down behaviour in SI units; with a coolant the oven
// cools toward it (MODEL.md §12).
func (m *Method) ModelOven() model.Oven {
	o := model.Oven{
		Ambient:       m.Limits.AmbientC + model.ZeroCelsius,
		CooldownTau:   m.Limits.CooldownTauMin * 60,
		Equilibration: m.Limits.EquilibrationMin * 60,
	}
	if m.Limits.HasCoolant {
		o.Coolant = m.Limits.CoolantC + model.ZeroCelsius
	}
	return o
}

// ModelCompounds converts the compounds to SI units. Every compound must
// have its dH and dS (given, or derived from its retention index on load).
func (m *Method) ModelCompounds() ([]model.Compound, error) {
	out := make([]model.Compound, len(m.Compounds))
	for i, c := range m.Compounds {
		mc := model.Compound{
			Name:    c.Name,
			DH:      c.DHkJ * 1000,
			DS:      c.DS,
			DCp:     c.DCp,
			RefTemp: c.RefTempC + model.ZeroCelsius,
			Amount:  c.Amount,
			Target:  c.Target,
		}
		if c.Formula != "" {
			f, err := model.ParseFormula(c.Formula, c.AromaticRings)
			if err != nil {
				return nil, fmt.Errorf("compound %s: %v", quoted(c.Name), err)
			}
			mc.MolarMass, mc.DiffusionVolume = f.MolarMass, f.Volume
		}
		out[i] = mc
	}
	return out, nil
}

// System builds the model's System (tables included) for the method.
func (m *Method) System() (*model.System, error) {
	car, err := m.ModelCarrier()
	if err != nil {
		return nil, err
	}
	cond, err := model.NewConditions(m.ModelColumn(), car)
	if err != nil {
		return nil, err
	}
	comps, err := m.ModelCompounds()
	if err != nil {
		return nil, err
	}
	return model.NewSystem(cond, comps, m.ModelOven())
}

// Locked reports whether the goal locks the program value.
func (g Goal) Locked(v model.ProgramValue) bool {
	for _, x := range g.Lock {
		if x == v {
			return true
		}
	}
	return false
}

// KeypadRound rounds a program to what an oven's keypad takes: 0.01 °C,
// 0.01 °C/min and 0.001 min. Final temperatures, rates and holds round
// down, so no rounded value passes a limit the exact one respected.
func KeypadRound(o Oven) Oven {
	r := Oven{InitialC: roundTo(o.InitialC, 100), InitialHoldMin: roundTo(o.InitialHoldMin, 1000)}
	for _, rp := range o.Ramps {
		r.Ramps = append(r.Ramps, Ramp{
			RateCMin: math.Floor(rp.RateCMin*100) / 100,
			FinalC:   math.Floor(rp.FinalC*100) / 100,
			HoldMin:  math.Floor(rp.HoldMin*1000) / 1000,
		})
	}
	return r
}

func roundTo(x, scale float64) float64 { return math.Round(x*scale) / scale }

// Value is the program or carrier value v of the method, in file units
// (°C, min, °C/min, mL/min, kPa); ok is false for a ramp the program does
// not have.
func (m *Method) Value(v model.ProgramValue) (x float64, ok bool) {
	p := m.valuePtr(v)
	if p == nil {
		return 0, false
	}
	return *p, true
}

// SetValue sets the program or carrier value v of the method (file units).
// It reports an error for a ramp the program does not have, or a carrier
// value of the other pressure mode; the value itself is checked by Validate.
func (m *Method) SetValue(v model.ProgramValue, x float64) error {
	switch {
	case v.Kind == model.CarrierFlow && m.Carrier.Mode != model.ConstantFlow:
		return fmt.Errorf("%s applies only in constant-flow mode", v)
	case v.Kind == model.InletPressure && m.Carrier.Mode != model.ConstantPressure:
		return fmt.Errorf("%s applies only in constant-pressure mode", v)
	}
	p := m.valuePtr(v)
	if p == nil {
		return fmt.Errorf("%s: the program has %d ramps (use %s)", v, len(m.Oven.Ramps), model.ValueNames(m.Values()))
	}
	*p = x
	return nil
}

// Values lists the values of the method a sweep may vary: the program's,
// then the carrier's flow or inlet pressure (whichever the mode uses).
func (m *Method) Values() []model.ProgramValue {
	vs := model.ProgramValues(len(m.Oven.Ramps))
	if m.Carrier.Mode == model.ConstantPressure {
		return append(vs, model.ProgramValue{Kind: model.InletPressure})
	}
	return append(vs, model.ProgramValue{Kind: model.CarrierFlow})
}

func (m *Method) valuePtr(v model.ProgramValue) *float64 {
	switch v.Kind {
	case model.InitialTemp:
		return &m.Oven.InitialC
	case model.InitialHold:
		return &m.Oven.InitialHoldMin
	case model.CarrierFlow:
		return &m.Carrier.FlowMLMin
	case model.InletPressure:
		return &m.Carrier.InletKPa
	}
	if !v.Kind.PerRamp() || v.Ramp < 1 || v.Ramp > len(m.Oven.Ramps) {
		return nil
	}
	r := &m.Oven.Ramps[v.Ramp-1]
	switch v.Kind {
	case model.RampRate:
		return &r.RateCMin
	case model.RampFinal:
		return &r.FinalC
	}
	return &r.HoldMin
}

// Equal reports whether two methods hold the same values (where each was
// read from does not count).
func (m *Method) Equal(o *Method) bool {
	if m == nil || o == nil {
		return m == o
	}
	a, b := *m, *o
	a.file, a.loc, b.file, b.loc = "", nil, "", nil
	return reflect.DeepEqual(&a, &b)
}
