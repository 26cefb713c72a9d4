package methodfile

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"

	toml "github.com/pelletier/go-toml/v2"
	"github.com/pelletier/go-toml/v2/unstable"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/fsafe"
)

// MaxFileSize is the largest method or runs file read (4 MiB): a method is
// a few kilobytes, and a larger file is a mistake.
const MaxFileSize = 4 << 20

// Limits on the size of a method: far above any real one, low enough that a
// pasted or corrupted file cannot make the model's tables huge.
const (
	MaxCompounds = 2000
	MaxRamps     = 30
	MaxRuns      = 1000
)

// Error is a problem with a file: where it is and what is wrong.
type Error struct {
	File string
	Line int    // 0 when the problem has no line (a missing table)
	Key  string // dotted key path, e.g. oven.ramp[2].final_c
	Msg  string
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Key != "" {
		fmt.Fprintf(&b, ": %s", e.Key)
	}
	fmt.Fprintf(&b, ": %s", e.Msg)
	return b.String()
}

// ReadFile reads and validates a method file.
func ReadFile(path string) (*Method, error) {
	data, err := readLimited(path)
	if err != nil {
		return nil, err
	}
	return Parse(path, data)
}

func readLimited(path string) ([]byte, error) {
	// A FIFO, device or folder is refused at once rather than read (a FIFO
	// with no writer would block for good).
	data, err := fsafe.ReadRegular(path, MaxFileSize)
	if err != nil {
		var pe *fs.PathError
		switch {
		case errors.As(err, &pe) && pe.Op == "read" && !errors.Is(err, fsafe.ErrNotRegular):
			return nil, &Error{File: path, Msg: fmt.Sprintf("file is larger than %d MiB; not a method file", MaxFileSize>>20)}
		case errors.As(err, &pe):
			return nil, &Error{File: path, Msg: "cannot read: " + pe.Err.Error()}
		}
		return nil, &Error{File: path, Msg: "cannot read: " + err.Error()}
	}
	return data, nil
}

// Locations maps dotted key paths (tables of an array numbered from 1, as in
// compound[3].name) to the line they are written on.
type Locations map[string]int

// Line is the line of path, or of the nearest enclosing table written in the
// file, or 0.
func (l Locations) Line(path string) int {
	for path != "" {
		if n, ok := l[path]; ok {
			return n
		}
		i := strings.LastIndexAny(path, ".[")
		if i < 0 {
			break
		}
		path = path[:i]
	}
	return 0
}

// locate records the line of every table header and key in a TOML document.
// It stops quietly at a syntax error (the decoder reports that one).
func locate(data []byte) Locations {
	loc := Locations{}
	var p unstable.Parser
	p.Reset(data)
	table := ""
	counts := map[string]int{} // element count of each array of tables, by canonical path
	keyParts := func(n *unstable.Node) ([]string, int) {
		var parts []string
		line := 0
		it := n.Key()
		for it.Next() {
			k := it.Node()
			parts = append(parts, string(k.Data))
			if line == 0 {
				line = p.Shape(k.Raw).Start.Line
			}
		}
		return parts, line
	}
	// canon numbers every array of tables on the path by its current
	// element: [run.oven] after the second [[run]] is run[2].oven.
	canon := func(parts []string, arrayHeader bool) string {
		cur := ""
		for i, part := range parts {
			if cur != "" {
				cur += "."
			}
			cur += part
			if i == len(parts)-1 && arrayHeader {
				break
			}
			if n := counts[cur]; n > 0 {
				cur = fmt.Sprintf("%s[%d]", cur, n)
			}
		}
		return cur
	}
	for p.NextExpression() {
		e := p.Expression()
		switch e.Kind {
		case unstable.Table:
			parts, line := keyParts(e)
			table = canon(parts, false)
			loc[table] = line
		case unstable.ArrayTable:
			parts, line := keyParts(e)
			base := canon(parts, true)
			counts[base]++
			table = fmt.Sprintf("%s[%d]", base, counts[base])
			loc[table] = line
			if _, ok := loc[base]; !ok {
				loc[base] = line
			}
		case unstable.KeyValue:
			parts, line := keyParts(e)
			k := strings.Join(parts, ".")
			if table != "" {
				k = table + "." + k
			}
			loc[k] = line
		}
	}
	return loc
}

// Parse decodes and validates a method file's contents; name is used in
// messages.
func Parse(name string, data []byte) (*Method, error) {
	var raw rawMethod
	loc, err := decodeStrict(name, data, &raw)
	if err != nil {
		return nil, err
	}
	v := &validator{file: name, loc: loc}
	m := v.method(&raw)
	if v.err != nil {
		return nil, v.err
	}
	return m, nil
}

// decodeStrict decodes TOML into target, refusing unknown keys, and turns
// the decoder's errors into *Error with file, line and key.
func decodeStrict(name string, data []byte, target any) (Locations, error) {
	// A UTF-8 byte order mark (older Windows editors write one) is not
	// part of the text; UTF-16 is a text file in the wrong encoding.
	data = bytes.TrimPrefix(data, utf8BOM)
	if isUTF16(data) {
		return nil, &Error{File: name, Msg: "the file is UTF-16 text; save it as UTF-8 (in Notepad: Save As, Encoding UTF-8)"}
	}
	if bytes.IndexByte(data, 0) >= 0 {
		return nil, &Error{File: name, Msg: "binary data (a NUL byte); not a TOML file"}
	}
	dec := toml.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	err := dec.Decode(target)
	if err == nil {
		return locate(data), nil
	}
	var strict *toml.StrictMissingError
	if errors.As(err, &strict) && len(strict.Errors) > 0 {
		de := strict.Errors[0]
		line, _ := de.Position()
		return nil, &Error{File: name, Line: line, Key: strings.Join(de.Key(), "."), Msg: "unknown key"}
	}
	var de *toml.DecodeError
	if errors.As(err, &de) {
		line, _ := de.Position()
		msg := strings.TrimPrefix(de.Error(), "toml: ")
		if m := typeMismatch.FindStringSubmatch(msg); m != nil {
			msg = fmt.Sprintf("wrong type: expected %s, got %s", goTypeWords(m[2]), strings.ToLower(m[1]))
		} else if len(de.Key()) == 0 {
			msg = "TOML syntax error: " + msg
		}
		return nil, &Error{File: name, Line: line, Key: strings.Join(de.Key(), "."), Msg: msg}
	}
	return nil, &Error{File: name, Msg: strings.TrimPrefix(err.Error(), "toml: ")}
}

// isUTF16 spots UTF-16 text: a UTF-16 byte order mark, or (without one)
// mostly-ASCII text where every other byte is NUL.
func isUTF16(data []byte) bool {
	if bytes.HasPrefix(data, []byte{0xFF, 0xFE}) || bytes.HasPrefix(data, []byte{0xFE, 0xFF}) {
		return true
	}
	n := min(len(data), 512) &^ 1
	if n < 8 {
		return false
	}
	even, odd := 0, 0
	for i := 0; i < n; i += 2 {
		if data[i] == 0 {
			even++
		}
		if data[i+1] == 0 {
			odd++
		}
	}
	half := n / 2
	return (odd > half*3/4 && even == 0) || (even > half*3/4 && odd == 0)
}

var typeMismatch = regexp.MustCompile(`cannot decode TOML (\w+) into .* of type (\S+)`)

// goTypeWords names a decoding target type in the file's terms.
func goTypeWords(t string) string {
	switch strings.TrimLeft(t, "*") {
	case "float64":
		return "a number"
	case "int64":
		return "a whole number"
	case "string":
		return "text in quotes"
	case "bool":
		return "true or false"
	case "[]string":
		return "a list of names in quotes"
	}
	if strings.HasPrefix(t, "[]") {
		return "one or more tables"
	}
	return "a table"
}

type validator struct {
	file string
	loc  Locations
	err  error
}

func (v *validator) fail(path, format string, args ...any) {
	if v.err == nil {
		v.err = &Error{File: v.file, Line: v.loc.Line(path), Key: path, Msg: fmt.Sprintf(format, args...)}
	}
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// bound describes an accepted range; open ends exclude the limit.
type bound struct {
	lo, hi         float64
	loOpen, hiOpen bool
}

func (b bound) String() string {
	l, r := "[", "]"
	if b.loOpen {
		l = "("
	}
	if b.hiOpen {
		r = ")"
	}
	return fmt.Sprintf("%s%s, %s%s", l, fmtNum(b.lo), fmtNum(b.hi), r)
}

func fmtNum(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// num checks an optional or required number against its range and returns
// it (or def when absent).
func (v *validator) num(path string, p *float64, required bool, def float64, b bound, unit string) float64 {
	if p == nil {
		if required {
			v.fail(path, "missing (required)")
		}
		return def
	}
	x := *p
	if !finite(x) {
		v.fail(path, "must be a finite number, got %v", x)
		return def
	}
	if x < b.lo || x > b.hi || (b.loOpen && x == b.lo) || (b.hiOpen && x == b.hi) {
		v.fail(path, "%s %s is out of range %s %s", fmtNum(x), unit, b, unit)
		return def
	}
	return x
}

func (v *validator) str(path string, p *string, required bool, def string, choices ...string) string {
	if p == nil {
		if required {
			v.fail(path, "missing (required)")
		}
		return def
	}
	if len(choices) == 0 {
		return *p
	}
	for _, c := range choices {
		if *p == c {
			return c
		}
	}
	v.fail(path, "%q is not one of %s", *p, strings.Join(choices, ", "))
	return def
}

// uniqueName reads the required name of element n of an array of tables
// (a compound, a run) and checks it is neither empty nor a repeat.
func (v *validator) uniqueName(base string, p *string, seen map[string]int, n int, what string) string {
	name := strings.TrimSpace(v.str(base+".name", p, true, ""))
	if v.err == nil && name == "" {
		v.fail(base+".name", "empty name")
	}
	if j, dup := seen[name]; dup && v.err == nil {
		v.fail(base+".name", "duplicate %s name %q (also %s %d)", what, name, what, j)
	}
	seen[name] = n
	return name
}

func positive(hi float64) bound    { return bound{lo: 0, hi: hi, loOpen: true} }
func nonNegative(hi float64) bound { return bound{lo: 0, hi: hi} }

// Temperatures the model covers: −100 °C (its tables) to 500 °C.
var tempRange = bound{lo: model.TableLow - model.ZeroCelsius, hi: 500}

func (v *validator) method(r *rawMethod) *Method {
	m := &Method{}
	if r.Title != nil {
		m.Title = *r.Title
	}
	if r.Notes != nil {
		m.Notes = *r.Notes
	}
	v.column(r, m)
	v.carrier(r, m)
	v.limits(r, m)
	v.oven(r, m)
	v.goal(r, m)
	v.injection(r, m)
	v.compounds(r, m)
	return m
}

func (v *validator) column(r *rawMethod, m *Method) {
	if r.Column == nil {
		v.fail("column", "missing [column] table")
		return
	}
	c := r.Column
	m.Column.Kind = v.str("column.kind", c.Kind, false, "wall-coated", "wall-coated", "packed", "porous-layer")
	kr := rulesFor(m.Column.Kind)
	m.Column.LengthM = v.num("column.length_m", c.LengthM, true, 30, kr.length, "m")
	m.Column.DiameterMM = v.num("column.diameter_mm", c.DiameterMM, true, 0.25, kr.diameter, "mm")
	m.Column.FilmUM = v.num("column.film_um", c.FilmUM, kr.filmRequired, kr.filmDefault, kr.film, "µm")
	if v.err == nil && m.Column.Kind != "packed" && m.Column.FilmUM*1e-3 >= m.Column.DiameterMM/2 {
		v.fail("column.film_um", "%s %s µm is thicker than the column radius (%s mm diameter)", kr.filmWord, fmtNum(m.Column.FilmUM), fmtNum(m.Column.DiameterMM))
	}
	m.Column.Phase = v.str("column.phase", c.Phase, false, "")
	m.Column.MaxTempC = v.num("column.max_temp_c", c.MaxTempC, true, 300, bound{lo: -50, hi: 500}, "°C")
	m.Column.Diffusivity = v.num("column.stationary_diffusivity_m2_s", c.Diffusivity, false, kr.diffusivity, bound{lo: 0, hi: 1e-3, loOpen: true}, "m²/s")
	m.Column.PlateHeight = v.num("column.plate_height_factor", c.PlateHeight, false, 1, bound{lo: 0, hi: 100, loOpen: true}, "")
	if c.CapacityNG != nil {
		m.Column.CapacityNG = v.num("column.capacity_ng", c.CapacityNG, false, 0, positive(1e9), "ng")
		m.Column.HasCapacity = true
	}
	if c.MaxIsoC != nil {
		m.Column.MaxIsothermalC = v.num("column.max_isothermal_c", c.MaxIsoC, false, m.Column.MaxTempC, tempRange, "°C")
		m.Column.HasMaxIsothermal = true
		if v.err == nil && m.Column.MaxIsothermalC > m.Column.MaxTempC {
			v.fail("column.max_isothermal_c", "%s °C is above the column maximum %s °C", fmtNum(m.Column.MaxIsothermalC), fmtNum(m.Column.MaxTempC))
		}
	}
	v.packedKeys(c, m)
}

func (v *validator) carrier(r *rawMethod, m *Method) {
	if r.Carrier == nil {
		v.fail("carrier", "missing [carrier] table")
		return
	}
	c := r.Carrier
	m.Carrier.Gas = v.str("carrier.gas", c.Gas, true, "helium", "helium", "hydrogen", "nitrogen")
	m.Carrier.Mode = v.str("carrier.mode", c.Mode, true, "constant-flow", "constant-flow", "constant-pressure")
	m.Carrier.FlowMLMin = v.num("carrier.flow_ml_min", c.FlowMLMin, m.Carrier.Mode == "constant-flow", 0, positive(200), "mL/min")
	m.Carrier.InletKPa = v.num("carrier.inlet_kpa", c.InletKPa, m.Carrier.Mode == "constant-pressure", 0, positive(10000), "kPa")
	m.Carrier.Outlet = v.str("carrier.outlet", c.Outlet, false, "atmospheric", "atmospheric", "vacuum")
	m.Carrier.AmbientKPa = v.num("carrier.ambient_kpa", c.AmbientKPa, false, 101.325, bound{lo: 20, hi: 200}, "kPa")
	m.Carrier.InitialBand = v.num("carrier.initial_band_s", c.InitialBand, false, 0, nonNegative(600), "s")
}

func (v *validator) limits(r *rawMethod, m *Method) {
	l := r.Limits
	if l == nil {
		l = &rawLimits{}
	}
	m.Limits.AmbientC = v.num("limits.ambient_c", l.AmbientC, false, 25, bound{lo: -60, hi: 60}, "°C")
	if l.CoolantC != nil {
		m.Limits.CoolantC = v.num("limits.coolant_c", l.CoolantC, false, 0, tempRange, "°C")
		m.Limits.HasCoolant = true
		if v.err == nil && m.Limits.CoolantC >= m.Limits.AmbientC {
			v.fail("limits.coolant_c", "%s °C is not below the ambient %s °C (a coolant only helps below ambient)", fmtNum(m.Limits.CoolantC), fmtNum(m.Limits.AmbientC))
		}
	}
	// with a coolant the oven cools toward it and may start below ambient
	// (MODEL.md §12); oven_min_c then defaults to coolant_c + 10
	sink, sinkWords := m.Limits.AmbientC, "the ambient"
	if m.Limits.HasCoolant {
		sink, sinkWords = m.Limits.CoolantC, "the coolant_c"
	}
	m.Limits.OvenMinC = v.num("limits.oven_min_c", l.OvenMinC, false, sink+10, tempRange, "°C")
	if v.err == nil && m.Limits.OvenMinC <= sink {
		v.fail("limits.oven_min_c", "%s °C is not above %s %s °C (the oven cannot cool to it)", fmtNum(m.Limits.OvenMinC), sinkWords, fmtNum(sink))
	}
	m.Limits.MaxRateCMin = v.num("limits.max_rate_c_min", l.MaxRateCMin, false, 100, positive(2000), "°C/min")
	m.Limits.MaxHoldMin = v.num("limits.max_hold_min", l.MaxHoldMin, false, 10, nonNegative(10000), "min")
	m.Limits.CooldownTauMin = v.num("limits.cooldown_tau_min", l.CooldownTauMin, false, 2.0, positive(600), "min")
	m.Limits.EquilibrationMin = v.num("limits.equilibration_min", l.EquilibrationMin, false, 0.5, nonNegative(600), "min")
	m.Limits.MaxInletKPa = v.num("limits.max_inlet_kpa", l.MaxInletKPa, false, 690, positive(100000), "kPa")
	m.Limits.MinInletKPa = v.num("limits.min_inlet_kpa", l.MinInletKPa, false, 0, nonNegative(100000), "kPa")
	if v.err == nil && m.Limits.MinInletKPa >= m.Limits.MaxInletKPa {
		v.fail("limits.min_inlet_kpa", "%s kPa is not below max_inlet_kpa %s kPa", fmtNum(m.Limits.MinInletKPa), fmtNum(m.Limits.MaxInletKPa))
	}
	m.Limits.MinFlowMLMin = v.num("limits.min_flow_ml_min", l.MinFlowMLMin, false, 0, positive(1000), "mL/min")
	m.Limits.MaxFlowMLMin = v.num("limits.max_flow_ml_min", l.MaxFlowMLMin, false, 0, positive(1000), "mL/min")
	if v.err == nil && l.MinFlowMLMin != nil && l.MaxFlowMLMin != nil && m.Limits.MinFlowMLMin >= m.Limits.MaxFlowMLMin {
		v.fail("limits.min_flow_ml_min", "%s mL/min is not below max_flow_ml_min %s mL/min", fmtNum(m.Limits.MinFlowMLMin), fmtNum(m.Limits.MaxFlowMLMin))
	}
	m.Limits.TempStepC = v.num("limits.temp_step_c", l.TempStepC, false, DefaultTempStepC, bound{lo: 0.001, hi: 10}, "°C")
	m.Limits.RateStepCMin = v.num("limits.rate_step_c_min", l.RateStepCMin, false, DefaultRateStepCMin, bound{lo: 0.001, hi: 10}, "°C/min")
	m.Limits.HoldStepMin = v.num("limits.hold_step_min", l.HoldStepMin, false, DefaultHoldStepMin, bound{lo: 0.0001, hi: 10}, "min")
	m.Limits.FlowStepMLMin = v.num("limits.flow_step_ml_min", l.FlowStepMLMin, false, DefaultFlowStepMLMin, bound{lo: 0.0001, hi: 10}, "mL/min")
	m.Limits.PressureStepKPa = v.num("limits.pressure_step_kpa", l.PressureStepKPa, false, DefaultPressureStepKPa, bound{lo: 0.001, hi: 100}, "kPa")
	prevAbove := math.Inf(-1)
	for i, rb := range l.RateBand {
		base := fmt.Sprintf("limits.rate_band[%d]", i+1)
		b := RateBand{
			AboveC:      v.num(base+".above_c", rb.AboveC, true, 0, tempRange, "°C"),
			MaxRateCMin: v.num(base+".max_rate_c_min", rb.MaxRateCMin, true, 0, positive(2000), "°C/min"),
		}
		if v.err == nil && b.AboveC <= prevAbove {
			v.fail(base+".above_c", "%s °C is not above the previous band's %s °C (list bands from cool to hot)", fmtNum(b.AboveC), fmtNum(prevAbove))
		}
		prevAbove = b.AboveC
		m.Limits.RateBands = append(m.Limits.RateBands, b)
	}
}

// Default oven keypad steps ([limits] temp_step_c and the rest).
const (
	DefaultTempStepC       = 0.1
	DefaultRateStepCMin    = 0.1
	DefaultHoldStepMin     = 0.01
	DefaultFlowStepMLMin   = 0.01
	DefaultPressureStepKPa = 0.1
)

// Defaults of [goal.robust] and [goal] keys of the second wave.
const (
	DefaultMinFirstK          = 0.5
	DefaultPriorDHkJ          = 2.0
	DefaultPriorDS            = 4.0
	DefaultRetentionTimeSDMin = 0.002
)

func (v *validator) oven(r *rawMethod, m *Method) {
	if r.Oven == nil {
		v.fail("oven", "missing [oven] table")
		return
	}
	o := r.Oven
	tmax := m.Column.MaxTempC
	m.Oven.InitialC = v.num("oven.initial_c", o.InitialC, true, 40, tempRange, "°C")
	if v.err == nil && m.Oven.InitialC > tmax {
		v.fail("oven.initial_c", "%s °C is above the column maximum %s °C", fmtNum(m.Oven.InitialC), fmtNum(tmax))
	}
	if v.err == nil && m.Limits.HasCoolant && m.Oven.InitialC <= m.Limits.CoolantC {
		v.fail("oven.initial_c", "%s °C is not above the coolant_c %s °C in [limits] (the oven cannot cool to it)", fmtNum(m.Oven.InitialC), fmtNum(m.Limits.CoolantC))
	}
	if v.err == nil && !m.Limits.HasCoolant && m.Oven.InitialC <= m.Limits.AmbientC {
		v.fail("oven.initial_c", "%s °C is not above the ambient %s °C in [limits] (the oven cannot cool back to it without a coolant: set limits.coolant_c for a sub-ambient start)", fmtNum(m.Oven.InitialC), fmtNum(m.Limits.AmbientC))
	}
	m.Oven.InitialHoldMin = v.num("oven.initial_hold_min", o.InitialHoldMin, false, 0, nonNegative(10000), "min")
	if len(o.Ramp) > MaxRamps {
		v.fail(fmt.Sprintf("oven.ramp[%d]", MaxRamps+1), "more than %d ramps; no oven takes that many", MaxRamps)
		return
	}
	prev := m.Oven.InitialC
	for i, rr := range o.Ramp {
		base := fmt.Sprintf("oven.ramp[%d]", i+1)
		var rp Ramp
		rp.RateCMin = v.num(base+".rate_c_min", rr.RateCMin, true, 10, positive(2000), "°C/min")
		rp.FinalC = v.num(base+".final_c", rr.FinalC, true, prev+10, tempRange, "°C")
		if v.err == nil && rp.FinalC <= prev {
			v.fail(base+".final_c", "%s °C is not above the previous temperature %s °C", fmtNum(rp.FinalC), fmtNum(prev))
		}
		if v.err == nil && rp.FinalC > tmax {
			v.fail(base+".final_c", "%s °C is above the column maximum %s °C", fmtNum(rp.FinalC), fmtNum(tmax))
		}
		rp.HoldMin = v.num(base+".hold_min", rr.HoldMin, false, 0, nonNegative(10000), "min")
		prev = rp.FinalC
		m.Oven.Ramps = append(m.Oven.Ramps, rp)
	}
	if v.err == nil && len(m.Oven.Ramps) == 0 && m.Oven.InitialHoldMin == 0 {
		v.fail("oven.initial_hold_min", "an isothermal program needs a hold longer than 0 min")
	}
}

func (v *validator) goal(r *rawMethod, m *Method) {
	g := r.Goal
	if g == nil {
		g = &rawGoal{}
	}
	m.Goal.MinResolution = v.num("goal.min_resolution", g.MinResolution, false, 1.5, positive(100), "")
	m.Goal.Objective = v.str("goal.objective", g.Objective, false, "run-time", "run-time", "cycle-time")
	def := len(m.Oven.Ramps)
	if def < 1 {
		def = 1
	}
	if def > 5 {
		def = 5
	}
	m.Goal.Ramps = def
	if g.Ramps != nil {
		if *g.Ramps < 1 || *g.Ramps > 5 {
			v.fail("goal.ramps", "%d is out of range 1..5", *g.Ramps)
		} else {
			m.Goal.Ramps = int(*g.Ramps)
		}
	}
	m.Goal.TailMin = v.num("goal.tail_min", g.TailMin, false, 0.5, nonNegative(1000), "min")
	m.Goal.MinFirstK = v.num("goal.min_first_k", g.MinFirstK, false, DefaultMinFirstK, nonNegative(1000), "")
	if g.BakeoutC != nil {
		m.Goal.BakeoutC = v.num("goal.bakeout_c", g.BakeoutC, false, 0, tempRange, "°C")
		m.Goal.HasBakeout = true
		if v.err == nil && m.Goal.BakeoutC > m.Column.MaxTempC {
			v.fail("goal.bakeout_c", "%s °C is above the column maximum %s °C", fmtNum(m.Goal.BakeoutC), fmtNum(m.Column.MaxTempC))
		}
	}
	if g.BakeoutMin != nil && g.BakeoutC == nil {
		v.fail("goal.bakeout_min", "given without goal.bakeout_c (the bake-out temperature)")
	}
	m.Goal.BakeoutMin = v.num("goal.bakeout_min", g.BakeoutMin, false, 0, nonNegative(1000), "min")
	rb := g.Robust
	if rb == nil {
		rb = &rawRobust{}
	}
	m.Goal.Robust = Robust{
		OvenOffsetC:        v.num("goal.robust.oven_offset_c", rb.OvenOffsetC, false, 0, nonNegative(20), "°C"),
		FlowPct:            v.num("goal.robust.flow_pct", rb.FlowPct, false, 0, bound{lo: 0, hi: 50}, "%"),
		EfficiencyPct:      v.num("goal.robust.efficiency_pct", rb.EfficiencyPct, false, 0, nonNegative(200), "%"),
		RetentionSigma:     v.num("goal.robust.retention_sigma", rb.RetentionSigma, false, 0, nonNegative(10), ""),
		PriorDHkJ:          v.num("goal.robust.prior_dH_kJ_mol", rb.PriorDHkJ, false, DefaultPriorDHkJ, nonNegative(100), "kJ/mol"),
		PriorDS:            v.num("goal.robust.prior_dS_J_mol_K", rb.PriorDS, false, DefaultPriorDS, nonNegative(500), "J/(mol·K)"),
		RetentionTimeSDMin: v.num("goal.robust.retention_time_sd_min", rb.RetentionTimeSD, false, DefaultRetentionTimeSDMin, positive(10), "min"),
	}
	seen := map[string]bool{}
	for _, name := range g.Lock {
		if !ValidLockName(name, m.Goal.Ramps) {
			v.fail("goal.lock", "%q is not a program value for %d ramps (use %s)", name, m.Goal.Ramps, strings.Join(LockNames(m.Goal.Ramps), ", "))
			break
		}
		if seen[name] {
			v.fail("goal.lock", "%q is listed twice", name)
			break
		}
		seen[name] = true
		m.Goal.Lock = append(m.Goal.Lock, name)
	}
}

func (v *validator) injection(r *rawMethod, m *Method) {
	in := r.Injection
	if in == nil {
		return
	}
	m.Injection.Present = true
	m.Injection.VolumeUL = v.num("injection.volume_ul", in.VolumeUL, false, 1.0, positive(1000), "µL")
	m.Injection.SplitRatio = v.num("injection.split_ratio", in.SplitRatio, false, 0, nonNegative(10000), "")
	if in.InletTempC != nil {
		m.Injection.InletTempC = v.num("injection.inlet_temp_c", in.InletTempC, false, 0, bound{lo: -100, hi: 500}, "°C")
		m.Injection.HasInletTemp = true
	}
	if in.DetectorTempC != nil {
		m.Injection.DetectorTempC = v.num("injection.detector_temp_c", in.DetectorTempC, false, 0, bound{lo: -100, hi: 500}, "°C")
		m.Injection.HasDetector = true
	}
}

func (v *validator) compounds(r *rawMethod, m *Method) {
	if len(r.Compound) == 0 {
		v.fail("compound", "no [[compound]] entries (at least one is needed)")
		return
	}
	if len(r.Compound) > MaxCompounds {
		v.fail(fmt.Sprintf("compound[%d]", MaxCompounds+1), "more than %d compounds; split the method", MaxCompounds)
		return
	}
	names := map[string]int{}
	for i, rc := range r.Compound {
		base := fmt.Sprintf("compound[%d]", i+1)
		var c Compound
		c.Name = v.uniqueName(base, rc.Name, names, i+1, "compound")
		if rc.AromaticRings != nil {
			if *rc.AromaticRings < 0 || *rc.AromaticRings > 20 {
				v.fail(base+".aromatic_rings", "%d is out of range 0..20", *rc.AromaticRings)
			}
			c.AromaticRings = int(*rc.AromaticRings)
		}
		if rc.Formula != nil {
			c.Formula = *rc.Formula
			if _, err := model.ParseFormula(c.Formula, c.AromaticRings); err != nil && v.err == nil {
				v.fail(base+".formula", "%v", err)
			}
		}
		c.DCp = v.num(base+".dCp_J_mol_K", rc.DCp, false, 0, bound{lo: -1000, hi: 1000}, "J/(mol·K)")
		c.RefTempC = v.num(base+".ref_temp_c", rc.RefTempC, false, 100, tempRange, "°C")
		c.Amount = v.num(base+".amount", rc.Amount, false, 1, nonNegative(1e12), "")
		c.Target = true
		if rc.Target != nil {
			c.Target = *rc.Target
		}
		if rc.Concentration != nil {
			c.Concentration = v.num(base+".concentration_mg_ml", rc.Concentration, false, 0, nonNegative(1e6), "mg/mL")
			c.HasConc = true
		}
		if rc.AlkaneCarbons != nil {
			if *rc.AlkaneCarbons < 1 || *rc.AlkaneCarbons > 100 {
				v.fail(base+".alkane_carbons", "%d is out of range 1..100", *rc.AlkaneCarbons)
			}
			c.AlkaneCarbons = int(*rc.AlkaneCarbons)
		}
		if rc.RetentionIndex != nil {
			c.RetentionIndex = v.num(base+".retention_index", rc.RetentionIndex, false, 0, positive(10000), "")
		}
		if rc.IndexTempC != nil {
			c.IndexTempC = v.num(base+".index_temp_c", rc.IndexTempC, false, 0, tempRange, "°C")
			c.HasIndexTemp = true
		}
		if rc.DHSE != nil || rc.DSSE != nil || rc.DHDSCorr != nil {
			c.HasSE = true
			c.DHSE = v.num(base+".dH_se_kJ_mol", rc.DHSE, true, 0, nonNegative(500), "kJ/mol")
			c.DSSE = v.num(base+".dS_se_J_mol_K", rc.DSSE, true, 0, nonNegative(1000), "J/(mol·K)")
			c.DHDSCorr = v.num(base+".dH_dS_corr", rc.DHDSCorr, false, 0, bound{lo: -1, hi: 1}, "")
		}
		hasThermo := rc.DHkJ != nil || rc.DS != nil
		switch {
		case hasThermo || (rc.RetentionIndex == nil && rc.Formula == nil):
			c.DHkJ = v.num(base+".dH_kJ_mol", rc.DHkJ, true, -40, bound{lo: -500, hi: 0, hiOpen: true}, "kJ/mol")
			c.DS = v.num(base+".dS_J_mol_K", rc.DS, true, -80, bound{lo: -1000, hi: 200}, "J/(mol·K)")
		case rc.RetentionIndex != nil:
			c.FromIndex = true
		default:
			fromFormula(&c) // only a formula: a rough estimate (formulaestimate.go)
		}
		m.Compounds = append(m.Compounds, c)
	}
	if v.err != nil {
		return
	}
	for i := range m.Compounds {
		if m.Compounds[i].FromIndex {
			if err := fromIndex(m, i); err != nil {
				v.fail(fmt.Sprintf("compound[%d].retention_index", i+1), "%v", err)
				return
			}
		}
	}
}

// ladderAlkanes are the compounds that are ladder alkanes with their own
// dH and dS, sorted by carbon number.
func ladderAlkanes(m *Method) []Compound {
	var out []Compound
	for _, c := range m.Compounds {
		if c.AlkaneCarbons > 0 && !c.FromIndex {
			out = append(out, c)
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i].AlkaneCarbons < out[j].AlkaneCarbons })
	return out
}
