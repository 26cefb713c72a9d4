package tui

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
)

// field is one editable value of the method.
type field struct {
	key     string // the method file's key, for messages
	label   string
	unit    string
	digits  int // decimals always shown
	save    int // decimals kept (what the file and the oven take); 0 = digits
	step    float64
	big     float64
	choices []string                            // a choice field cycles through these
	num     func(m *methodfile.Method) *float64 // the value, or nil with get/set
	get     func(m *methodfile.Method) float64
	set     func(m *methodfile.Method, v float64)
	str     func(m *methodfile.Method) string // a choice field's current choice
	setStr  func(m *methodfile.Method, s string)
	integer bool
	// an optional value (limits.coolant_c): absent reports it is not
	// set, clear removes it; shown and typed as "none"; a step from none
	// starts at fromNone
	absent   func(m *methodfile.Method) bool
	clear    func(m *methodfile.Method)
	fromNone float64
	// after runs once the value is set (a kind switch sets the kind's
	// typical column); its text goes in the status line
	after func(sh *shared, before, m *methodfile.Method) string
	// program fields: which ramp (0 = initial) and value
	ramp int
	pv   model.ProgramValue
}

// name is how the field is called on screen: what it is in the trade's
// words, not its file key.
func (f field) name() string {
	if !strings.HasPrefix(f.key, "oven.") {
		return f.label
	}
	switch f.pv.Kind {
	case model.InitialTemp:
		return "start temperature"
	case model.InitialHold:
		return "start hold"
	case model.RampRate:
		return fmt.Sprintf("ramp %d rate", f.ramp)
	case model.RampFinal:
		return fmt.Sprintf("ramp %d final temperature", f.ramp)
	}
	return fmt.Sprintf("ramp %d hold", f.ramp)
}

// choiceField is a field that cycles through every value in all.
func choiceField[T fmt.Stringer](key, label string, all []T, p func(m *methodfile.Method) *T) field {
	names := make([]string, len(all))
	for i, x := range all {
		names[i] = x.String()
	}
	return field{key: key, label: label, choices: names,
		str: func(m *methodfile.Method) string { return (*p(m)).String() },
		setStr: func(m *methodfile.Method, s string) {
			for i, n := range names {
				if n == s {
					*p(m) = all[i]
				}
			}
		}}
}

func (f field) text(m *methodfile.Method) string {
	if f.str != nil {
		return f.str(m)
	}
	if f.absent != nil && f.absent(m) {
		return noneWord
	}
	v := f.value(m)
	if f.integer {
		return strconv.Itoa(int(v))
	}
	return fmtNum(v, f.digits, f.saved())
}

// shown is the value with its unit as the panes show it: "none" alone
// for an optional value not set (no unit on nothing).
func (f field) shown(m *methodfile.Method) string {
	t := f.text(m)
	if f.unit == "" || f.absent != nil && f.absent(m) {
		return t
	}
	return t + " " + f.unit
}

// saved is how many decimals the field keeps.
func (f field) saved() int {
	if f.save > f.digits {
		return f.save
	}
	return f.digits
}

// fmtNum shows v with at least lo and at most hi decimals: what is kept is
// what is shown, without trailing zeros beyond lo.
func fmtNum(v float64, lo, hi int) string {
	s := strconv.FormatFloat(v, 'f', hi, 64)
	if hi > lo {
		cut := len(s) - (hi - lo)
		for len(s) > cut && s[len(s)-1] == '0' {
			s = s[:len(s)-1]
		}
		s = strings.TrimSuffix(s, ".")
	}
	return s
}

func (f field) value(m *methodfile.Method) float64 {
	if f.num == nil {
		return f.get(m)
	}
	return *f.num(m)
}

func (f field) setValue(m *methodfile.Method, v float64) {
	if f.num == nil {
		f.set(m, v)
		return
	}
	*f.num(m) = v
}

// stepped returns a copy of m with the field moved by n steps (big steps
// when big), or a choice cycled.
func (f field) stepped(m *methodfile.Method, n float64, big bool) *methodfile.Method {
	c := m.Clone()
	if f.str != nil {
		s := f.str(c)
		i := 0
		for j, ch := range f.choices {
			if ch == s {
				i = j
			}
		}
		k := len(f.choices)
		i = ((i+int(n))%k + k) % k
		f.setStr(c, f.choices[i])
		return c
	}
	if f.absent != nil && f.absent(c) {
		f.setValue(c, f.fromNone)
		return c
	}
	st := f.step
	if big {
		st = f.big
	}
	v := f.value(c) + n*st
	// snap to the small-step grid so repeated steps stay tidy
	v = float64(int64(v/f.step+0.5*sign(v))) * f.step
	if f.integer {
		v = float64(int(v))
	}
	if ks := f.keypad(c); ks > 0 {
		v = methodfile.OnStep(v, ks) // what the oven takes
	}
	f.setValue(c, round(v, f.saved()))
	return c
}

// keypad is the oven's keypad step of a program value ([limits]
// temp_step_c, rate_step_c_min, hold_step_min, with their defaults), 0 for
// any other field.
func (f field) keypad(m *methodfile.Method) float64 {
	if !strings.HasPrefix(f.key, "oven.") {
		return 0
	}
	return m.Limits.Step(f.pv.Kind)
}

func sign(x float64) float64 {
	if x < 0 {
		return -1
	}
	return 1
}

// typed returns a copy of m with the field set from text. A program value
// is put on the oven's keypad step (methodfile.OnStep: decimal rounding,
// half-way values away from zero), so that what is shown and saved is
// what the oven takes; note then says so for the status line ("12.345 →
// 12.3 °C/min (the oven's step is 0.1)").
func (f field) typed(m *methodfile.Method, text string) (c *methodfile.Method, note string, err error) {
	c, v, err := f.typedValue(m, text)
	if err != nil || c == nil || f.str != nil {
		return c, "", err
	}
	if ks := f.keypad(c); ks > 0 && !(f.absent != nil && f.absent(c)) {
		on := methodfile.OnStep(v, ks)
		if on != v {
			note = fmt.Sprintf("%s → %s %s (the oven's step is %s)", format.Clean(v), format.OnStep(on, ks), f.unit, trimNum(ks))
		}
		f.setValue(c, round(on, f.saved()))
	}
	return c, note, nil
}

// typedValue sets the field from text as typed, at the decimals it keeps,
// and returns the number read.
func (f field) typedValue(m *methodfile.Method, text string) (*methodfile.Method, float64, error) {
	c := m.Clone()
	text = strings.TrimSpace(text)
	if f.str != nil {
		for _, ch := range f.choices {
			if strings.EqualFold(ch, text) {
				f.setStr(c, ch)
				return c, 0, nil
			}
		}
		return nil, 0, fmt.Errorf("%s: %q is not one of %s", f.key, text, strings.Join(f.choices, ", "))
	}
	if f.clear != nil && (text == "" || strings.EqualFold(text, noneWord)) {
		f.clear(c)
		return c, 0, nil
	}
	v, err := strconv.ParseFloat(text, 64)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %q is not a number", f.key, text)
	}
	if f.integer && v != float64(int(v)) {
		return nil, 0, fmt.Errorf("%s: %q is not a whole number", f.key, text)
	}
	// keep (and so show) only the decimals the file and the oven take
	f.setValue(c, round(v, f.saved()))
	return c, v, nil
}

// programFields lists the program's values: initial temperature and hold,
// then rate, final temperature and hold of each ramp.
func programFields(m *methodfile.Method) []field {
	fs := []field{
		{key: "oven.initial_c", label: "start", unit: "°C", digits: 1, save: 2, step: 1, big: 10, ramp: 0, pv: model.ProgramValue{Kind: model.InitialTemp},
			num: func(m *methodfile.Method) *float64 { return &m.Oven.InitialC }},
		{key: "oven.initial_hold_min", label: "hold", unit: "min", digits: 2, save: 3, step: 0.1, big: 1, ramp: 0, pv: model.ProgramValue{Kind: model.InitialHold},
			num: func(m *methodfile.Method) *float64 { return &m.Oven.InitialHoldMin }},
	}
	for i := range m.Oven.Ramps {
		i := i
		base := fmt.Sprintf("oven.ramp[%d]", i+1)
		fs = append(fs,
			field{key: base + ".rate_c_min", label: "rate", unit: "°C/min", digits: 1, save: 2, step: 0.5, big: 5, ramp: i + 1, pv: model.ProgramValue{Kind: model.RampRate, Ramp: i + 1},
				num: func(m *methodfile.Method) *float64 { return &m.Oven.Ramps[i].RateCMin }},
			field{key: base + ".final_c", label: "to", unit: "°C", digits: 1, save: 2, step: 1, big: 10, ramp: i + 1, pv: model.ProgramValue{Kind: model.RampFinal, Ramp: i + 1},
				num: func(m *methodfile.Method) *float64 { return &m.Oven.Ramps[i].FinalC }},
			field{key: base + ".hold_min", label: "hold", unit: "min", digits: 2, save: 3, step: 0.1, big: 1, ramp: i + 1, pv: model.ProgramValue{Kind: model.RampHold, Ramp: i + 1},
				num: func(m *methodfile.Method) *float64 { return &m.Oven.Ramps[i].HoldMin }},
		)
	}
	// a keypad step finer than the decimals shown widens them: what is
	// shown is what is saved
	for i := range fs {
		fs[i].save = max(fs[i].save, format.StepDecimals(m.Limits.Step(fs[i].pv.Kind)))
	}
	return fs
}

// noneWord shows (and, typed, sets) an optional value that is not given.
const noneWord = "none"

// settingsFields lists the column, carrier, goal and limits values.
func settingsFields(m *methodfile.Method) []field {
	n := func(key, label, unit string, digits int, step, big float64, p func(m *methodfile.Method) *float64) field {
		return field{key: key, label: label, unit: unit, digits: digits, step: step, big: big, num: p}
	}
	kind := choiceField("column.kind", "column kind", model.ColumnKinds, func(m *methodfile.Method) *model.ColumnKind { return &m.Column.Kind })
	kind.after = typicalColumn
	fs := []field{
		kind,
		n("column.length_m", "column length", "m", 1, 1, 10, func(m *methodfile.Method) *float64 { return &m.Column.LengthM }),
	}
	switch m.Column.Kind {
	case model.Packed:
		fs = append(fs,
			n("column.diameter_mm", "tube inner diameter", "mm", 2, 0.1, 0.5, func(m *methodfile.Method) *float64 { return &m.Column.DiameterMM }),
			n("column.film_um", "liquid film (effective)", "µm", 2, 0.1, 0.5, func(m *methodfile.Method) *float64 { return &m.Column.FilmUM }),
			packedField("column.particle_um", "particle diameter", "µm", 0, 5, 25, func(c *methodfile.Column) *float64 { return &c.ParticleUM }),
			packedField("column.porosity", "porosity (between particles)", "", 2, 0.01, 0.05, func(c *methodfile.Column) *float64 { return &c.Porosity }),
			packedField("column.phase_ratio", "phase ratio", "", 1, 1, 10, func(c *methodfile.Column) *float64 { return &c.PhaseRatio }),
			packedField("column.eddy_lambda", "eddy factor λ", "", 2, 0.05, 0.2, func(c *methodfile.Column) *float64 { return &c.EddyLambda }),
			packedField("column.obstruction_gamma", "obstruction factor γ", "", 2, 0.05, 0.2, func(c *methodfile.Column) *float64 { return &c.ObstructionGamma }),
			packedField("column.mobile_omega", "mobile-phase factor ω", "", 2, 0.01, 0.05, func(c *methodfile.Column) *float64 { return &c.MobileOmega }),
		)
	case model.PorousLayer:
		fs = append(fs,
			n("column.diameter_mm", "column diameter", "mm", 3, 0.01, 0.05, func(m *methodfile.Method) *float64 { return &m.Column.DiameterMM }),
			n("column.film_um", "layer thickness", "µm", 1, 0.5, 5, func(m *methodfile.Method) *float64 { return &m.Column.FilmUM }),
		)
	default:
		fs = append(fs,
			n("column.diameter_mm", "column diameter", "mm", 3, 0.01, 0.05, func(m *methodfile.Method) *float64 { return &m.Column.DiameterMM }),
			n("column.film_um", "film thickness", "µm", 2, 0.05, 0.25, func(m *methodfile.Method) *float64 { return &m.Column.FilmUM }),
		)
	}
	fs = append(fs,
		n("column.max_temp_c", "column max temperature", "°C", 0, 1, 10, func(m *methodfile.Method) *float64 { return &m.Column.MaxTempC }),
		choiceField("carrier.gas", "carrier gas", model.Gases, func(m *methodfile.Method) *model.Gas { return &m.Carrier.Gas }),
		choiceField("carrier.mode", "pressure mode", model.PressureModes, func(m *methodfile.Method) *model.PressureMode { return &m.Carrier.Mode }),
	)
	if m.Carrier.Mode == model.ConstantPressure {
		fs = append(fs, n("carrier.inlet_kpa", "inlet pressure (gauge)", "kPa", 1, 1, 10, func(m *methodfile.Method) *float64 { return &m.Carrier.InletKPa }))
	} else {
		fs = append(fs, n("carrier.flow_ml_min", "column flow", "mL/min", 2, 0.05, 0.5, func(m *methodfile.Method) *float64 { return &m.Carrier.FlowMLMin }))
	}
	fs = append(fs,
		choiceField("carrier.outlet", "outlet", model.Outlets, func(m *methodfile.Method) *model.Outlet { return &m.Carrier.Outlet }),
		n("goal.min_resolution", "target resolution", "", 2, 0.05, 0.5, func(m *methodfile.Method) *float64 { return &m.Goal.MinResolution }),
		choiceField("goal.objective", "objective", model.Objectives, func(m *methodfile.Method) *model.Objective { return &m.Goal.Objective }),
		field{key: "goal.ramps", label: "ramps the optimizer may use", digits: 0, step: 1, big: 1, integer: true,
			get: func(m *methodfile.Method) float64 { return float64(m.Goal.Ramps) },
			set: func(m *methodfile.Method, v float64) { m.Goal.Ramps = int(v) }},
		n("goal.tail_min", "tail after last peak", "min", 2, 0.1, 1, func(m *methodfile.Method) *float64 { return &m.Goal.TailMin }),
		coolantField(),
		n("limits.oven_min_c", "lowest start temperature", "°C", 1, 1, 10, func(m *methodfile.Method) *float64 { return &m.Limits.OvenMinC }),
		n("limits.max_rate_c_min", "fastest ramp", "°C/min", 1, 1, 10, func(m *methodfile.Method) *float64 { return &m.Limits.MaxRateCMin }),
		n("limits.max_hold_min", "longest hold", "min", 1, 0.5, 5, func(m *methodfile.Method) *float64 { return &m.Limits.MaxHoldMin }),
		n("limits.max_inlet_kpa", "highest inlet pressure", "kPa", 0, 10, 100, func(m *methodfile.Method) *float64 { return &m.Limits.MaxInletKPa }),
	)
	for i := range fs {
		fs[i].save = settingsSaved[fs[i].key]
	}
	return fs
}

// settingsSaved is how many decimals each setting keeps: what a typed or
// derived value is rounded to, so what is shown is what is saved.
var settingsSaved = map[string]int{
	"column.length_m": 2, "column.diameter_mm": 4, "column.film_um": 3, "column.max_temp_c": 1,
	"carrier.inlet_kpa": 1, "carrier.flow_ml_min": 2, "goal.min_resolution": 2, "goal.tail_min": 3,
	"limits.oven_min_c": 1, "limits.max_rate_c_min": 2, "limits.max_hold_min": 3, "limits.max_inlet_kpa": 1,
	"limits.coolant_c": 1, "column.particle_um": 1, "column.porosity": 3, "column.phase_ratio": 2,
	"column.eddy_lambda": 3, "column.obstruction_gamma": 3, "column.mobile_omega": 3,
}

// validate checks an edited method with the method file's own rules, the
// instrument limits included (so the messages are the ones a file gets).
func validate(m *methodfile.Method) error { return m.Validate() }

func trimNum(x float64) string { return format.Num(x) }

func round(x float64, digits int) float64 {
	s := strconv.FormatFloat(x, 'f', digits, 64)
	v, _ := strconv.ParseFloat(s, 64)
	return v
}
