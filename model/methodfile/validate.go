package methodfile

import (
	"fmt"
	"math"
	"strings"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
)

// The rules of a method apart from TOML decoding. Parse applies them after
// decoding; the UI applies ValidateKey after every edit and the commands
// Validate after changing a method, so a value is refused with the same
// located message wherever it comes from.
//
// Two kinds of limit are kept apart (see the README):
//   - instrument limits refuse a method: the oven's fastest ramp
//     (limits.max_rate_c_min and limits.rate_band), the inlet pressure
//     limits (limits.max_inlet_kpa, limits.min_inlet_kpa), the column's
//     temperature limits (column.max_temp_c, column.max_isothermal_c for
//     holds) and the lowest temperature the oven reaches (limits.ambient_c,
//     or limits.coolant_c with a coolant);
//   - search bounds and advice (limits.oven_min_c, limits.max_hold_min, the
//     keypad steps, the detector margin, goal.min_first_k) bind what the
//     optimizer proposes and are only noted for the current program
//     (Advice, and checks.Warnings for min_first_k, which needs a run).

// rng is an accepted range of a value in the file's units; an open end
// excludes its limit.
type rng struct {
	lo, hi         float64
	loOpen, hiOpen bool
	unit           string
}

func closed(lo, hi float64, unit string) rng { return rng{lo: lo, hi: hi, unit: unit} }

func (r rng) has(x float64) bool {
	return x >= r.lo && x <= r.hi && !(r.loOpen && x == r.lo) && !(r.hiOpen && x == r.hi)
}

// words is the range as a reader says it: "from 0.01 to 200 mL/min".
func (r rng) words() string {
	u := ""
	if r.unit != "" {
		u = " " + r.unit
	}
	switch {
	case r.loOpen:
		return fmt.Sprintf("above %s and up to %s%s", fmtNum(r.lo), fmtNum(r.hi), u)
	case r.hiOpen:
		return fmt.Sprintf("from %s to below %s%s", fmtNum(r.lo), fmtNum(r.hi), u)
	}
	return fmt.Sprintf("from %s to %s%s", fmtNum(r.lo), fmtNum(r.hi), u)
}

// in checks that x is a finite number within r; why, when not empty, says
// where an end of the range comes from.
func (v *validator) in(path string, x float64, r rng, why string) bool {
	if v.err != nil {
		return false
	}
	if !finite(x) {
		v.fail(path, "must be a finite number, got %v", x)
		return false
	}
	if !r.has(x) {
		u := ""
		if r.unit != "" {
			u = " " + r.unit
		}
		if why != "" {
			why = "; " + why
		}
		v.fail(path, "%s%s is out of range (allowed: %s%s)", fmtNum(x), u, r.words(), why)
		return false
	}
	return true
}

func (v *validator) intIn(path string, x, lo, hi int) {
	if v.err == nil && (x < lo || x > hi) {
		v.fail(path, "%d is out of range (allowed: whole numbers from %d to %d)", x, lo, hi)
	}
}

// Temperatures the model covers: −100 °C (its tables) to 500 °C.
var tempRange = closed(model.TableLow-model.ZeroCelsius, 500, "°C")

// Validate checks every rule of the method apart from TOML decoding: the
// range of each value, how values relate (film and bore, a program's
// temperatures), and the instrument limits. The error is a *Error naming
// the key, and the file and line when the method was read from a file.
func (m *Method) Validate() error {
	v := &validator{file: m.file, loc: m.loc}
	v.checkColumn(m)
	v.checkCarrier(m)
	v.checkLimits(m)
	v.checkProgram(m)
	v.checkGoal(m)
	v.checkInjection(m)
	v.checkCompounds(m)
	v.checkPressure(m)
	return v.err
}

// ValidateKey checks the rules that the value at key (a dotted key path as
// in messages, e.g. oven.ramp[2].rate_c_min) takes part in: after one edit
// this gives the same answer as Validate on a method that was valid
// before, at the cost of the section the key is in (a compound's key does
// not re-check the program, a program value not the compounds).
func (m *Method) ValidateKey(key string) error {
	v := &validator{file: m.file, loc: m.loc}
	section, _, _ := strings.Cut(key, ".")
	if i := strings.IndexByte(section, '['); i >= 0 {
		section = section[:i]
	}
	switch section {
	case "column":
		v.checkColumn(m)
		v.checkProgram(m)
		v.checkGoal(m) // goal.bakeout_c is bounded by the column maximum
		v.checkPressure(m)
	case "carrier":
		v.checkCarrier(m)
		v.checkPressure(m)
	case "limits":
		v.checkLimits(m)
		v.checkProgram(m)
		v.checkPressure(m)
	case "oven":
		v.checkProgram(m)
		v.checkGoal(m) // goal.lock names ramps of the program
		v.checkPressure(m)
	case "goal":
		v.checkGoal(m)
	case "injection":
		v.checkInjection(m)
	case "compound":
		var n int
		if _, err := fmt.Sscanf(key, "compound[%d]", &n); err == nil && n >= 1 && n <= len(m.Compounds) {
			v.checkCompound(m, n-1, nil)
			v.checkNames(m)
		} else {
			v.checkCompounds(m)
		}
	default:
		return m.Validate()
	}
	return v.err
}

func (v *validator) checkColumn(m *Method) {
	c := &m.Column
	v.checkKind(m)
	v.in("column.max_temp_c", c.MaxTempC, closed(-50, 500, "°C"), "")
	v.in("column.stationary_diffusivity_m2_s", c.Diffusivity, closed(1e-14, 1e-3, "m²/s"), "")
	v.in("column.plate_height_factor", c.PlateHeight, closed(0.1, 100, ""), "")
	if c.HasCapacity {
		v.in("column.capacity_ng", c.CapacityNG, closed(0.001, 1e9, "ng"), "")
	}
	if c.HasMaxIsothermal && v.in("column.max_isothermal_c", c.MaxIsothermalC, tempRange, "") && c.MaxIsothermalC > c.MaxTempC {
		v.fail("column.max_isothermal_c", "%s °C is above the column maximum %s °C", fmtNum(c.MaxIsothermalC), fmtNum(c.MaxTempC))
	}
}

func (v *validator) checkCarrier(m *Method) {
	c := &m.Carrier
	if v.err == nil && !validChoice(c.Gas, model.Gases) {
		v.fail("carrier.gas", "%s is not one of helium, hydrogen, nitrogen", quoted(c.Gas.String()))
	}
	if v.err == nil && !validChoice(c.Mode, model.PressureModes) {
		v.fail("carrier.mode", "%s is not one of constant-flow, constant-pressure", quoted(c.Mode.String()))
	}
	flow := closed(0.01, 200, "mL/min")
	inlet := closed(0.1, 10000, "kPa")
	if c.Mode == model.ConstantFlow || c.FlowMLMin != 0 {
		v.in("carrier.flow_ml_min", c.FlowMLMin, flow, "")
	}
	if c.Mode == model.ConstantPressure || c.InletKPa != 0 {
		v.in("carrier.inlet_kpa", c.InletKPa, inlet, "gauge")
	}
	if v.err == nil && !validChoice(c.Outlet, model.Outlets) {
		v.fail("carrier.outlet", "%s %s", quoted(c.Outlet.String()), outletChoices)
	}
	v.in("carrier.ambient_kpa", c.AmbientKPa, closed(20, 200, "kPa"), "")
	v.in("carrier.initial_band_s", c.InitialBand, closed(0, 600, "s"), "")
}

func validChoice[T comparable](x T, all []T) bool {
	for _, a := range all {
		if a == x {
			return true
		}
	}
	return false
}

func (v *validator) checkLimits(m *Method) {
	l := &m.Limits
	v.in("limits.ambient_c", l.AmbientC, closed(-60, 60, "°C"), "")
	if l.HasCoolant && v.in("limits.coolant_c", l.CoolantC, tempRange, "") && l.CoolantC >= l.AmbientC {
		v.fail("limits.coolant_c", "%s °C is not below the ambient %s °C (a coolant only helps below ambient)", fmtNum(l.CoolantC), fmtNum(l.AmbientC))
	}
	v.in("limits.oven_min_c", l.OvenMinC, tempRange, "")
	sink, sinkWords := l.AmbientC, "the ambient"
	if l.HasCoolant {
		sink, sinkWords = l.CoolantC, "the coolant_c"
	}
	if v.err == nil && l.OvenMinC <= sink {
		v.fail("limits.oven_min_c", "%s °C is not above %s %s °C (the oven cannot cool to it)", fmtNum(l.OvenMinC), sinkWords, fmtNum(sink))
	}
	v.in("limits.max_rate_c_min", l.MaxRateCMin, closed(0.1, 2000, "°C/min"), "")
	v.in("limits.max_hold_min", l.MaxHoldMin, closed(0, 10000, "min"), "")
	v.in("limits.cooldown_tau_min", l.CooldownTauMin, closed(0.01, 600, "min"), "")
	v.in("limits.equilibration_min", l.EquilibrationMin, closed(0, 600, "min"), "")
	v.in("limits.max_inlet_kpa", l.MaxInletKPa, closed(1, 100000, "kPa"), "gauge")
	if v.in("limits.min_inlet_kpa", l.MinInletKPa, closed(0, 100000, "kPa"), "gauge") && l.MinInletKPa >= l.MaxInletKPa {
		v.fail("limits.min_inlet_kpa", "%s kPa is not below max_inlet_kpa %s kPa", fmtNum(l.MinInletKPa), fmtNum(l.MaxInletKPa))
	}
	flow := closed(0.01, 1000, "mL/min")
	if l.MinFlowMLMin != 0 {
		v.in("limits.min_flow_ml_min", l.MinFlowMLMin, flow, "")
	}
	if l.MaxFlowMLMin != 0 {
		v.in("limits.max_flow_ml_min", l.MaxFlowMLMin, flow, "")
	}
	if v.err == nil && l.MinFlowMLMin != 0 && l.MaxFlowMLMin != 0 && l.MinFlowMLMin >= l.MaxFlowMLMin {
		v.fail("limits.min_flow_ml_min", "%s mL/min is not below max_flow_ml_min %s mL/min", fmtNum(l.MinFlowMLMin), fmtNum(l.MaxFlowMLMin))
	}
	v.in("limits.temp_step_c", l.TempStepC, closed(0.001, 10, "°C"), "")
	v.in("limits.rate_step_c_min", l.RateStepCMin, closed(0.001, 10, "°C/min"), "")
	v.in("limits.hold_step_min", l.HoldStepMin, closed(0.0001, 10, "min"), "")
	v.in("limits.flow_step_ml_min", l.FlowStepMLMin, closed(0.0001, 10, "mL/min"), "")
	v.in("limits.pressure_step_kpa", l.PressureStepKPa, closed(0.001, 100, "kPa"), "")
	prev := -1e300
	for i, b := range l.RateBands {
		base := fmt.Sprintf("limits.rate_band[%d]", i+1)
		if v.in(base+".above_c", b.AboveC, tempRange, "") && b.AboveC <= prev {
			v.fail(base+".above_c", "%s °C is not above the previous band's %s °C (list bands from cool to hot)", fmtNum(b.AboveC), fmtNum(prev))
		}
		v.in(base+".max_rate_c_min", b.MaxRateCMin, closed(0.1, 2000, "°C/min"), "")
		prev = b.AboveC
	}
}

// MinRateCMin is the slowest ramp a method may hold, °C/min.
const MinRateCMin = 0.01

// checkProgram checks the oven program against the column and the oven:
// its shape, the column's temperature limit, the lowest temperature the
// oven reaches and its fastest ramp (instrument limits).
func (v *validator) checkProgram(m *Method) {
	o := &m.Oven
	l := &m.Limits
	if v.err == nil && finite(o.InitialC) {
		if l.HasCoolant && o.InitialC <= l.CoolantC {
			v.fail("oven.initial_c", "%s °C is not above the coolant_c %s °C in [limits] (the oven cannot cool to it)", fmtNum(o.InitialC), fmtNum(l.CoolantC))
		} else if !l.HasCoolant && o.InitialC <= l.AmbientC {
			v.fail("oven.initial_c", "%s °C is not above the ambient %s °C in [limits] (the oven cannot cool back to it without a coolant: set limits.coolant_c for a sub-ambient start)", fmtNum(o.InitialC), fmtNum(l.AmbientC))
		}
	}
	v.shape(m, closed(MinRateCMin, l.MaxRateCMin, "°C/min"), true)
	for i, r := range o.Ramps {
		for j, b := range l.RateBands {
			if v.err == nil && r.FinalC > b.AboveC && r.RateCMin > b.MaxRateCMin {
				v.fail(fmt.Sprintf("oven.ramp[%d].rate_c_min", i+1), "%s °C/min is faster than the oven's limit %s °C/min above %s °C (limits.rate_band[%d])",
					fmtNum(r.RateCMin), fmtNum(b.MaxRateCMin), fmtNum(b.AboveC), j+1)
			}
		}
	}
	if c := &m.Column; c.HasMaxIsothermal {
		iso := func(key string, t, hold float64) {
			if v.err == nil && hold > 0 && t > c.MaxIsothermalC {
				v.fail(key, "a hold of %s min at %s °C is above the column's isothermal limit %s °C (column.max_isothermal_c)", fmtNum(hold), fmtNum(t), fmtNum(c.MaxIsothermalC))
			}
		}
		iso("oven.initial_hold_min", o.InitialC, o.InitialHoldMin)
		for i, r := range o.Ramps {
			iso(fmt.Sprintf("oven.ramp[%d].hold_min", i+1), r.FinalC, r.HoldMin)
		}
	}
}

// programShape checks a program on its own (a scouting run's): finite
// values, finals rising, within the column's temperature range.
func (v *validator) programShape(m *Method) {
	v.shape(m, closed(MinRateCMin, 2000, "°C/min"), false)
}

// shape checks the program's values; oven says the rate range is the
// oven's (an instrument limit, so a rate above it gets the limit's name).
func (v *validator) shape(m *Method, rate rng, oven bool) {
	o := &m.Oven
	tmax := m.Column.MaxTempC
	if v.err == nil && len(o.Ramps) > MaxRamps {
		v.fail(fmt.Sprintf("oven.ramp[%d]", MaxRamps+1), "more than %d ramps; no oven takes that many", MaxRamps)
	}
	if v.in("oven.initial_c", o.InitialC, tempRange, "") && o.InitialC > tmax {
		v.fail("oven.initial_c", "%s °C is above the column maximum %s °C", fmtNum(o.InitialC), fmtNum(tmax))
	}
	v.in("oven.initial_hold_min", o.InitialHoldMin, closed(0, 10000, "min"), "")
	prev := o.InitialC
	for i, r := range o.Ramps {
		if v.err != nil {
			return
		}
		base := fmt.Sprintf("oven.ramp[%d]", i+1)
		if oven && finite(r.RateCMin) && r.RateCMin > rate.hi {
			v.fail(base+".rate_c_min", "%s °C/min is faster than the oven's limit %s °C/min (limits.max_rate_c_min)", fmtNum(r.RateCMin), fmtNum(rate.hi))
			return
		}
		v.in(base+".rate_c_min", r.RateCMin, rate, "")
		if v.in(base+".final_c", r.FinalC, tempRange, "") {
			if r.FinalC <= prev {
				v.fail(base+".final_c", "%s °C is not above the previous temperature %s °C", fmtNum(r.FinalC), fmtNum(prev))
			} else if r.FinalC > tmax {
				v.fail(base+".final_c", "%s °C is above the column maximum %s °C", fmtNum(r.FinalC), fmtNum(tmax))
			}
		}
		v.in(base+".hold_min", r.HoldMin, closed(0, 10000, "min"), "")
		prev = r.FinalC
	}
	if v.err == nil && len(o.Ramps) == 0 && o.InitialHoldMin == 0 {
		v.fail("oven.initial_hold_min", "an isothermal program needs a hold longer than 0 min")
	}
}

func (v *validator) checkGoal(m *Method) {
	g := &m.Goal
	v.in("goal.min_resolution", g.MinResolution, closed(0.01, 100, ""), "")
	v.intIn("goal.ramps", g.Ramps, 1, 5)
	v.in("goal.tail_min", g.TailMin, closed(0, 1000, "min"), "")
	v.in("goal.min_first_k", g.MinFirstK, closed(0, 1000, ""), "")
	if g.HasBakeout && v.in("goal.bakeout_c", g.BakeoutC, tempRange, "") && g.BakeoutC > m.Column.MaxTempC {
		v.fail("goal.bakeout_c", "%s °C is above the column maximum %s °C", fmtNum(g.BakeoutC), fmtNum(m.Column.MaxTempC))
	}
	v.in("goal.bakeout_min", g.BakeoutMin, closed(0, 1000, "min"), "")
	rb := &g.Robust
	v.in("goal.robust.oven_offset_c", rb.OvenOffsetC, closed(0, 20, "°C"), "")
	v.in("goal.robust.flow_pct", rb.FlowPct, closed(0, 50, "%"), "")
	v.in("goal.robust.efficiency_pct", rb.EfficiencyPct, closed(0, 200, "%"), "")
	v.in("goal.robust.retention_sigma", rb.RetentionSigma, closed(0, 10, ""), "")
	v.in("goal.robust.prior_dH_kJ_mol", rb.PriorDHkJ, closed(0, 100, "kJ/mol"), "")
	v.in("goal.robust.prior_dS_J_mol_K", rb.PriorDS, closed(0, 500, "J/(mol·K)"), "")
	v.in("goal.robust.retention_time_sd_min", rb.RetentionTimeSDMin, closed(0.00001, 10, "min"), "")
	seen := map[model.ProgramValue]bool{}
	for _, pv := range g.Lock {
		if v.err != nil {
			return
		}
		if !pv.Valid(g.Ramps) {
			v.fail("goal.lock", "%s is not a program value for %d ramps (use %s)", quoted(pv.String()), g.Ramps, model.ValueNames(model.ProgramValues(g.Ramps)))
			return
		}
		if seen[pv] {
			v.fail("goal.lock", "%s is listed twice", quoted(pv.String()))
			return
		}
		seen[pv] = true
	}
}

func (v *validator) checkInjection(m *Method) {
	in := &m.Injection
	if !in.Present {
		return
	}
	v.in("injection.volume_ul", in.VolumeUL, closed(0.001, 1000, "µL"), "")
	v.in("injection.split_ratio", in.SplitRatio, closed(0, 10000, ""), "0 is splitless")
	if in.HasInletTemp {
		v.in("injection.inlet_temp_c", in.InletTempC, closed(-100, 500, "°C"), "")
	}
	if in.HasDetector {
		v.in("injection.detector_temp_c", in.DetectorTempC, closed(-100, 500, "°C"), "")
	}
}

func (v *validator) checkCompounds(m *Method) {
	if v.err == nil && len(m.Compounds) == 0 {
		v.fail("compound", "no [[compound]] entries (at least one is needed)")
	}
	if v.err == nil && len(m.Compounds) > MaxCompounds {
		v.fail(fmt.Sprintf("compound[%d]", MaxCompounds+1), "more than %d compounds; split the method", MaxCompounds)
	}
	seen := map[string]int{}
	for i := range m.Compounds {
		v.checkCompound(m, i, seen)
	}
}

// checkNames checks that the compounds' names are distinct and not empty.
func (v *validator) checkNames(m *Method) {
	seen := make(map[string]int, len(m.Compounds))
	for i := range m.Compounds {
		v.distinct(fmt.Sprintf("compound[%d].name", i+1), m.Compounds[i].Name, seen, i+1, "compound")
	}
}

// checkCompound checks compound i; seen, when not nil, collects the names
// so far to refuse a repeat.
func (v *validator) checkCompound(m *Method, i int, seen map[string]int) {
	if v.err != nil {
		return
	}
	c := &m.Compounds[i]
	base := fmt.Sprintf("compound[%d]", i+1)
	if seen != nil {
		v.distinct(base+".name", c.Name, seen, i+1, "compound")
	}
	v.intIn(base+".aromatic_rings", c.AromaticRings, 0, 20)
	if c.Formula != "" && v.err == nil {
		if _, err := model.ParseFormula(c.Formula, c.AromaticRings); err != nil {
			v.fail(base+".formula", "%v", err)
		}
	}
	v.in(base+".dCp_J_mol_K", c.DCp, closed(-1000, 1000, "J/(mol·K)"), "")
	v.in(base+".ref_temp_c", c.RefTempC, tempRange, "")
	v.in(base+".amount", c.Amount, closed(0, 1e12, ""), "")
	if c.HasConc {
		v.in(base+".concentration_mg_ml", c.Concentration, closed(0, 1e6, "mg/mL"), "")
	}
	if c.AlkaneCarbons != 0 {
		v.intIn(base+".alkane_carbons", c.AlkaneCarbons, 1, 100)
	}
	if c.FromIndex || c.RetentionIndex != 0 {
		v.in(base+".retention_index", c.RetentionIndex, closed(1, 10000, ""), "")
	}
	if c.HasIndexTemp {
		v.in(base+".index_temp_c", c.IndexTempC, tempRange, "")
	}
	if c.HasSE {
		v.in(base+".dH_se_kJ_mol", c.DHSE, closed(0, 500, "kJ/mol"), "")
		v.in(base+".dS_se_J_mol_K", c.DSSE, closed(0, 1000, "J/(mol·K)"), "")
		v.in(base+".dH_dS_corr", c.DHDSCorr, closed(-1, 1, ""), "")
	}
	if !c.FromIndex {
		v.in(base+".dH_kJ_mol", c.DHkJ, rng{lo: -500, hi: 0, hiOpen: true, unit: "kJ/mol"}, "")
		v.in(base+".dS_J_mol_K", c.DS, closed(-1000, 200, "J/(mol·K)"), "")
	}
}

// checkPressure checks the inlet pressure the method needs against the
// instrument's limit: the set pressure at constant pressure, or at
// constant flow the pressure at the program's highest temperature (it
// rises with the gas viscosity).
func (v *validator) checkPressure(m *Method) {
	if v.err != nil {
		return
	}
	limit, low := m.Limits.MaxInletKPa, m.Limits.MinInletKPa
	if m.Carrier.Mode == model.ConstantPressure {
		if m.Carrier.InletKPa > limit {
			v.fail("carrier.inlet_kpa", "%s kPa is above the instrument's inlet limit %s kPa (limits.max_inlet_kpa)", fmtNum(m.Carrier.InletKPa), fmtNum(limit))
		} else if m.Carrier.InletKPa < low {
			v.fail("carrier.inlet_kpa", "%s kPa is below the lowest inlet pressure the instrument holds, %s kPa (limits.min_inlet_kpa)", fmtNum(m.Carrier.InletKPa), fmtNum(low))
		}
		return
	}
	car, err := m.ModelCarrier()
	if err != nil {
		v.fail("carrier", "%v", err)
		return
	}
	cond, err := model.NewConditions(m.ModelColumn(), car)
	if err != nil {
		v.fail("carrier.flow_ml_min", "%v", strings.TrimPrefix(err.Error(), "model: "))
		return
	}
	prog := m.ModelProgram()
	top, start := prog.MaxTemp(), prog.Initial
	if need := cond.InletGauge(top) / kPa; need > limit {
		v.fail("carrier.flow_ml_min", "constant flow of %s mL/min needs %.0f kPa at %s °C, above the instrument's inlet limit %s kPa (limits.max_inlet_kpa)",
			fmtNum(m.Carrier.FlowMLMin), need, fmtNum(top-model.ZeroCelsius), fmtNum(limit))
	} else if need := cond.InletGauge(start) / kPa; need < low {
		v.fail("carrier.flow_ml_min", "constant flow of %s mL/min needs only %.1f kPa at %s °C, below the lowest inlet pressure the instrument holds, %s kPa (limits.min_inlet_kpa)",
			fmtNum(m.Carrier.FlowMLMin), need, fmtNum(start-model.ZeroCelsius), fmtNum(low))
	}
}

// Note is advice about a method that does not stop it: a search bound or a
// rule of thumb the current program breaks.
type Note struct {
	Key string // the key the note is about
	Msg string
}

func (n Note) String() string { return n.Key + ": " + n.Msg }

// Advice lists the search bounds and rules of thumb the method's current
// program breaks (limits.oven_min_c, limits.max_hold_min, the detector
// margin). The optimizer never proposes such a program; one set by hand is
// simulated as it is, with these notes.
func (m *Method) Advice() []Note {
	var out []Note
	o := &m.Oven
	if o.InitialC < m.Limits.OvenMinC {
		out = append(out, Note{"oven.initial_c", fmt.Sprintf("%s °C is below the lowest start the optimizer uses, %s °C (limits.oven_min_c): the oven may take long to cool to it", fmtNum(o.InitialC), fmtNum(m.Limits.OvenMinC))})
	}
	hold := func(key string, h float64) {
		if h > m.Limits.MaxHoldMin {
			out = append(out, Note{key, fmt.Sprintf("the hold of %s min is longer than the optimizer's longest, %s min (limits.max_hold_min)", fmtNum(h), fmtNum(m.Limits.MaxHoldMin))})
		}
	}
	hold("oven.initial_hold_min", o.InitialHoldMin)
	for i, r := range o.Ramps {
		hold(fmt.Sprintf("oven.ramp[%d].hold_min", i+1), r.HoldMin)
	}
	step := func(key string, x, st float64, stepKey, unit string) {
		if st > 0 && math.Abs(x/st-math.Round(x/st)) > 1e-6 {
			out = append(out, Note{key, fmt.Sprintf("%s %s is not on the oven's %s %s step (limits.%s): the oven takes %s %s", fmtNum(x), unit, fmtNum(st), unit, stepKey, format.OnStep(x, st), unit)})
		}
	}
	l := &m.Limits
	step("oven.initial_c", o.InitialC, l.TempStepC, "temp_step_c", "°C")
	step("oven.initial_hold_min", o.InitialHoldMin, l.HoldStepMin, "hold_step_min", "min")
	for i, r := range o.Ramps {
		base := fmt.Sprintf("oven.ramp[%d]", i+1)
		step(base+".rate_c_min", r.RateCMin, l.RateStepCMin, "rate_step_c_min", "°C/min")
		step(base+".final_c", r.FinalC, l.TempStepC, "temp_step_c", "°C")
		step(base+".hold_min", r.HoldMin, l.HoldStepMin, "hold_step_min", "min")
	}
	if m.Injection.HasDetector {
		top := m.ModelProgram().MaxTemp() - model.ZeroCelsius
		if m.Injection.DetectorTempC < top+DetectorMargin {
			out = append(out, Note{"injection.detector_temp_c", fmt.Sprintf("the detector at %s °C is not at least %s °C above the highest oven temperature %.1f °C: the effluent may condense in it",
				fmtNum(m.Injection.DetectorTempC), fmtNum(DetectorMargin), top)})
		}
	}
	return out
}

// DetectorMargin is how far (°C) the detector should be above the highest
// oven temperature so that the effluent does not condense (common practice).
const DetectorMargin = 20.0
