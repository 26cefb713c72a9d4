package methodfile

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"regexp"
	"sort"
	"strings"

	toml "github.com/pelletier/go-toml/v2"
	"github.com/pelletier/go-toml/v2/unstable"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/textsafe"
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

// quoted is a name from a file in a message: in quotes, shown inert
// (textsafe.Inert), the same way in every message.
func quoted(s string) string { return `"` + textsafe.Inert(s) + `"` }

// Error is file:line: key: message, the file name and key shown inert (a
// key may hold a compound's name).
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(textsafe.Inert(e.File))
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	for _, s := range []string{textsafe.Inert(e.Key), e.Msg} {
		if s == "" {
			continue
		}
		if b.Len() > 0 {
			b.WriteString(": ")
		}
		b.WriteString(s)
	}
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
// file, or 0. An element of an array of tables that the file does not have
// (a ramp added in the UI: oven.ramp[5] of a file with 4) has no line: the
// array's other elements are no place of its keys.
func (l Locations) Line(path string) int {
	for path != "" {
		if n, ok := l[path]; ok {
			return n
		}
		if strings.HasSuffix(path, "]") {
			return 0 // an element not in the file
		}
		i := strings.LastIndexAny(path, ".[")
		if i < 0 {
			break
		}
		path = path[:i]
	}
	return 0
}

// Located is a copy of m whose messages name the file name and the lines
// of its keys in data, the text m was just saved as (the lines of a file
// written anew are not those of the file it was read from).
func (m *Method) Located(name string, data []byte) *Method {
	c := m.Clone()
	c.file, c.loc = name, locate(data)
	return c
}

// ElementRemoved tells m that element n (from 1) of the array of tables
// array ("oven.ramp", "compound") was removed from it, so that messages
// name the lines of the elements that follow as the file has them (the
// element n+1 of the file is now element n).
func (m *Method) ElementRemoved(array string, n int) {
	if m.loc == nil {
		return
	}
	loc := make(Locations, len(m.loc)) // a clone shares the map: never edit it
	pre := array + "["
	for k, v := range m.loc {
		if !strings.HasPrefix(k, pre) {
			loc[k] = v
			continue
		}
		var j int
		end := strings.IndexByte(k[len(pre):], ']')
		if end < 0 {
			loc[k] = v
			continue
		}
		if _, err := fmt.Sscanf(k[len(pre):len(pre)+end], "%d", &j); err != nil {
			loc[k] = v
			continue
		}
		rest := k[len(pre)+end+1:]
		switch {
		case j < n:
			loc[k] = v
		case j > n:
			loc[fmt.Sprintf("%s%d]%s", pre, j-1, rest)] = v
		}
	}
	m.loc = loc
}

// locate records the line of every table header and key in a TOML document.
// It stops quietly at a syntax error (the decoder reports that one).
func locate(data []byte) Locations {
	loc := Locations{}
	lineOf := lineTable(data)
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
				line = lineOf(int(k.Raw.Offset))
			}
		}
		return parts, line
	}
	canon := func(parts []string, arrayHeader bool) string { return canonPath(parts, counts, arrayHeader) }
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
	m := v.fill(&raw)
	if v.err != nil {
		return nil, v.err
	}
	if err := m.Validate(); err != nil {
		return nil, err
	}
	if v.deriveIndexed(m); v.err != nil {
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
		if err := checkExactKeys(name, data, target); err != nil {
			return nil, err
		}
		return locate(data), nil
	}
	var strict *toml.StrictMissingError
	if errors.As(err, &strict) && len(strict.Errors) > 0 {
		de := strict.Errors[0]
		line, _ := de.Position()
		msg := "unknown key"
		if hint := suggestKey(target, de.Key()); hint != "" {
			msg += " (did you mean " + hint + "?)"
		}
		return nil, &Error{File: name, Line: line, Key: canonicalKey(data, line, de.Key()), Msg: msg}
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
		return nil, &Error{File: name, Line: line, Key: canonicalKey(data, line, de.Key()), Msg: msg}
	}
	return nil, &Error{File: name, Msg: strings.TrimPrefix(err.Error(), "toml: ")}
}

// canonicalKey is the decoder's key path as the other messages write it,
// with the element of each array of tables (run[2].holdup_min, not
// run.holdup_min): the located key on that line with the same last part.
func canonicalKey(data []byte, line int, key []string) string {
	plain := strings.Join(key, ".")
	if line == 0 || len(key) == 0 {
		return plain
	}
	last := key[len(key)-1]
	for k, l := range locate(data) {
		if l == line && (k == last || strings.HasSuffix(k, "."+last)) {
			return k
		}
	}
	return plain
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

// typeMismatch matches go-toml's type errors: "cannot decode TOML string
// into struct field ... of type *float64", and for a map's value "cannot
// decode TOML string into float64".
var typeMismatch = regexp.MustCompile(`cannot decode TOML (\w+) into (?:.* of type )?(\S+)$`)

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

// fmtNum is a number in a message: at most 12 significant digits, so that
// a computed value never shows binary noise (format.Clean).
func fmtNum(x float64) string { return format.Clean(x) }

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
	if !v.in(path, x, b.rng(unit), "") {
		return def
	}
	return x
}

// choice reads an optional or required name parsed by parse (a gas, a
// mode, an objective), or def when absent.
func choice[T any](v *validator, path string, p *string, required bool, def T, parse func(string) (T, error)) T {
	if p == nil {
		if required {
			v.fail(path, "missing (required)")
		}
		return def
	}
	x, err := parse(*p)
	if err != nil {
		v.fail(path, "%v", err)
		return def
	}
	return x
}

// parseOutlet is model.ParseOutlet with the file's word quoted as every
// methodfile message quotes text from a file (inert, not Go's %q).
func parseOutlet(s string) (model.Outlet, error) {
	o, err := model.ParseOutlet(s)
	if err != nil {
		return o, fmt.Errorf("%s %s", quoted(s), outletChoices)
	}
	return o, nil
}

// outletChoices is the end of the message for a word that is not an outlet.
const outletChoices = "is not one of atmospheric, vacuum"

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
	v.fail(path, "%s is not one of %s", quoted(*p), strings.Join(choices, ", "))
	return def
}

// uniqueName reads the required name of element n of an array of tables
// (a compound, a run) and checks it is neither empty nor a repeat.
func (v *validator) uniqueName(base string, p *string, seen map[string]int, n int, what string) string {
	name := strings.TrimSpace(v.str(base+".name", p, true, ""))
	v.distinct(base+".name", name, seen, n, what)
	return name
}

// distinct checks that name (of element n) is neither empty nor a repeat.
func (v *validator) distinct(path, name string, seen map[string]int, n int, what string) {
	if v.err == nil && name == "" {
		v.fail(path, "empty name")
	}
	if j, dup := seen[name]; dup && v.err == nil {
		v.fail(path, "duplicate %s name %s (also %s %d)", what, quoted(name), what, j)
	}
	seen[name] = n
}

func positive(hi float64) bound    { return bound{lo: 0, hi: hi, loOpen: true} }
func nonNegative(hi float64) bound { return bound{lo: 0, hi: hi} }

// opt reads an optional or required number without judging it (Validate
// does): def when absent.
func (v *validator) opt(path string, p *float64, required bool, def float64) float64 {
	if p == nil {
		if required {
			v.fail(path, "missing (required)")
		}
		return def
	}
	return *p
}

// whole converts a TOML integer, saturating far outside any valid range
// (Validate reports the range).
func whole(x int64) int {
	if x > math.MaxInt32 {
		return math.MaxInt32
	}
	if x < math.MinInt32 {
		return math.MinInt32
	}
	return int(x)
}

// fill converts the decoded file into a Method with the defaults applied,
// reporting only what decoding can see: a missing table or required key, a
// name that is not one of its choices. Every other rule is Validate's.
func (v *validator) fill(r *rawMethod) *Method {
	m := &Method{file: v.file, loc: v.loc}
	if r.Title != nil {
		m.Title = *r.Title
	}
	if r.Notes != nil {
		m.Notes = *r.Notes
	}
	v.column(r, m)
	v.carrier(r, m)
	v.limits(r, m)
	v.fillOven(r.Oven, m)
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
	m.Column.Kind = choice(v, "column.kind", c.Kind, false, model.WallCoated, model.ParseColumnKind)
	kr := rulesFor(m.Column.Kind)
	m.Column.LengthM = v.opt("column.length_m", c.LengthM, true, 30)
	m.Column.DiameterMM = v.opt("column.diameter_mm", c.DiameterMM, true, 0.25)
	m.Column.FilmUM = v.opt("column.film_um", c.FilmUM, kr.filmRequired, kr.filmDefault)
	m.Column.Phase = v.str("column.phase", c.Phase, false, "")
	m.Column.MaxTempC = v.opt("column.max_temp_c", c.MaxTempC, true, 300)
	m.Column.Diffusivity = v.opt("column.stationary_diffusivity_m2_s", c.Diffusivity, false, kr.diffusivity)
	m.Column.PlateHeight = v.opt("column.plate_height_factor", c.PlateHeight, false, 1)
	if c.CapacityNG != nil {
		m.Column.CapacityNG = *c.CapacityNG
		m.Column.HasCapacity = true
	}
	if c.MaxIsoC != nil {
		m.Column.MaxIsothermalC = *c.MaxIsoC
		m.Column.HasMaxIsothermal = true
	}
	v.packedKeys(c, m)
}

func (v *validator) carrier(r *rawMethod, m *Method) {
	if r.Carrier == nil {
		v.fail("carrier", "missing [carrier] table")
		return
	}
	c := r.Carrier
	m.Carrier.Gas = choice(v, "carrier.gas", c.Gas, true, model.Helium, model.ParseGas)
	m.Carrier.Mode = choice(v, "carrier.mode", c.Mode, true, model.ConstantFlow, model.ParsePressureMode)
	m.Carrier.FlowMLMin = v.opt("carrier.flow_ml_min", c.FlowMLMin, m.Carrier.Mode == model.ConstantFlow, 0)
	m.Carrier.InletKPa = v.opt("carrier.inlet_kpa", c.InletKPa, m.Carrier.Mode == model.ConstantPressure, 0)
	m.Carrier.Outlet = choice(v, "carrier.outlet", c.Outlet, false, model.AtmosphericOutlet, parseOutlet)
	m.Carrier.AmbientKPa = v.opt("carrier.ambient_kpa", c.AmbientKPa, false, 101.325)
	m.Carrier.InitialBand = v.opt("carrier.initial_band_s", c.InitialBand, false, 0)
}

func (v *validator) limits(r *rawMethod, m *Method) {
	l := r.Limits
	if l == nil {
		l = &rawLimits{}
	}
	m.Limits.AmbientC = v.opt("limits.ambient_c", l.AmbientC, false, 25)
	if l.CoolantC != nil {
		m.Limits.CoolantC = *l.CoolantC
		m.Limits.HasCoolant = true
	}
	// with a coolant the oven cools toward it and may start below ambient
	// (MODEL.md §12); oven_min_c then defaults to coolant_c + 10
	sink := m.Limits.AmbientC
	if m.Limits.HasCoolant {
		sink = m.Limits.CoolantC
	}
	m.Limits.OvenMinC = v.opt("limits.oven_min_c", l.OvenMinC, false, sink+10)
	m.Limits.MaxRateCMin = v.opt("limits.max_rate_c_min", l.MaxRateCMin, false, 100)
	m.Limits.MaxHoldMin = v.opt("limits.max_hold_min", l.MaxHoldMin, false, 10)
	m.Limits.CooldownTauMin = v.opt("limits.cooldown_tau_min", l.CooldownTauMin, false, 2.0)
	m.Limits.EquilibrationMin = v.opt("limits.equilibration_min", l.EquilibrationMin, false, 0.5)
	m.Limits.MaxInletKPa = v.opt("limits.max_inlet_kpa", l.MaxInletKPa, false, 690)
	m.Limits.MinInletKPa = v.opt("limits.min_inlet_kpa", l.MinInletKPa, false, 0)
	m.Limits.MinFlowMLMin = v.opt("limits.min_flow_ml_min", l.MinFlowMLMin, false, 0)
	m.Limits.MaxFlowMLMin = v.opt("limits.max_flow_ml_min", l.MaxFlowMLMin, false, 0)
	m.Limits.TempStepC = v.opt("limits.temp_step_c", l.TempStepC, false, DefaultTempStepC)
	m.Limits.RateStepCMin = v.opt("limits.rate_step_c_min", l.RateStepCMin, false, DefaultRateStepCMin)
	m.Limits.HoldStepMin = v.opt("limits.hold_step_min", l.HoldStepMin, false, DefaultHoldStepMin)
	m.Limits.FlowStepMLMin = v.opt("limits.flow_step_ml_min", l.FlowStepMLMin, false, DefaultFlowStepMLMin)
	m.Limits.PressureStepKPa = v.opt("limits.pressure_step_kpa", l.PressureStepKPa, false, DefaultPressureStepKPa)
	for i, rb := range l.RateBand {
		base := fmt.Sprintf("limits.rate_band[%d]", i+1)
		m.Limits.RateBands = append(m.Limits.RateBands, RateBand{
			AboveC:      v.opt(base+".above_c", rb.AboveC, true, 0),
			MaxRateCMin: v.opt(base+".max_rate_c_min", rb.MaxRateCMin, true, 0),
		})
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

// fillOven reads the [oven] table (or a run's) into m.Oven.
func (v *validator) fillOven(o *rawOven, m *Method) {
	if o == nil {
		v.fail("oven", "missing [oven] table")
		return
	}
	m.Oven.InitialC = v.opt("oven.initial_c", o.InitialC, true, 40)
	m.Oven.InitialHoldMin = v.opt("oven.initial_hold_min", o.InitialHoldMin, false, 0)
	if len(o.Ramp) > MaxRamps {
		v.fail(fmt.Sprintf("oven.ramp[%d]", MaxRamps+1), "more than %d ramps; no oven takes that many", MaxRamps)
		return
	}
	prev := m.Oven.InitialC
	for i, rr := range o.Ramp {
		base := fmt.Sprintf("oven.ramp[%d]", i+1)
		var rp Ramp
		rp.RateCMin = v.opt(base+".rate_c_min", rr.RateCMin, true, 10)
		rp.FinalC = v.opt(base+".final_c", rr.FinalC, true, prev+10)
		rp.HoldMin = v.opt(base+".hold_min", rr.HoldMin, false, 0)
		prev = rp.FinalC
		m.Oven.Ramps = append(m.Oven.Ramps, rp)
	}
}

// oven reads and checks a program on its own (a scouting run's): its shape
// and the column's temperature range, not the oven's limits.
func (v *validator) oven(r *rawMethod, m *Method) {
	v.fillOven(r.Oven, m)
	if v.err == nil {
		v.programShape(m)
	}
}

func (v *validator) goal(r *rawMethod, m *Method) {
	g := r.Goal
	if g == nil {
		g = &rawGoal{}
	}
	m.Goal.MinResolution = v.opt("goal.min_resolution", g.MinResolution, false, 1.5)
	m.Goal.Objective = choice(v, "goal.objective", g.Objective, false, model.RunTime, model.ParseObjective)
	m.Goal.Ramps = min(max(len(m.Oven.Ramps), 1), 5)
	if g.Ramps != nil {
		m.Goal.Ramps = whole(*g.Ramps)
	}
	m.Goal.TailMin = v.opt("goal.tail_min", g.TailMin, false, 0.5)
	m.Goal.MinFirstK = v.opt("goal.min_first_k", g.MinFirstK, false, DefaultMinFirstK)
	if g.BakeoutC != nil {
		m.Goal.BakeoutC = *g.BakeoutC
		m.Goal.HasBakeout = true
	}
	if g.BakeoutMin != nil && g.BakeoutC == nil {
		v.fail("goal.bakeout_min", "given without goal.bakeout_c (the bake-out temperature)")
	}
	m.Goal.BakeoutMin = v.opt("goal.bakeout_min", g.BakeoutMin, false, 0)
	rb := g.Robust
	if rb == nil {
		rb = &rawRobust{}
	}
	m.Goal.Robust = Robust{
		OvenOffsetC:        v.opt("goal.robust.oven_offset_c", rb.OvenOffsetC, false, 0),
		FlowPct:            v.opt("goal.robust.flow_pct", rb.FlowPct, false, 0),
		EfficiencyPct:      v.opt("goal.robust.efficiency_pct", rb.EfficiencyPct, false, 0),
		RetentionSigma:     v.opt("goal.robust.retention_sigma", rb.RetentionSigma, false, 0),
		PriorDHkJ:          v.opt("goal.robust.prior_dH_kJ_mol", rb.PriorDHkJ, false, DefaultPriorDHkJ),
		PriorDS:            v.opt("goal.robust.prior_dS_J_mol_K", rb.PriorDS, false, DefaultPriorDS),
		RetentionTimeSDMin: v.opt("goal.robust.retention_time_sd_min", rb.RetentionTimeSD, false, DefaultRetentionTimeSDMin),
	}
	for _, name := range g.Lock {
		if strings.EqualFold(strings.TrimSpace(name), FlowLockName) {
			// the carrier flow (inlet pressure at constant pressure), which
			// the optimizer otherwise varies with the program
			m.Goal.Lock = append(m.Goal.Lock, model.ProgramValue{Kind: model.CarrierFlow})
			continue
		}
		pv, err := model.ParseProgramValue(name)
		if err != nil || !pv.Kind.InProgram() {
			v.fail("goal.lock", "%s is not a program value (use %s or %s)", quoted(name), model.ValueNames(model.ProgramValues(m.Goal.Ramps)), FlowLockName)
			break
		}
		m.Goal.Lock = append(m.Goal.Lock, pv)
	}
}

func (v *validator) injection(r *rawMethod, m *Method) {
	in := r.Injection
	if in == nil {
		return
	}
	m.Injection.Present = true
	m.Injection.VolumeUL = v.opt("injection.volume_ul", in.VolumeUL, false, 1.0)
	m.Injection.SplitRatio = v.opt("injection.split_ratio", in.SplitRatio, false, 0)
	if in.InletTempC != nil {
		m.Injection.InletTempC = *in.InletTempC
		m.Injection.HasInletTemp = true
	}
	if in.DetectorTempC != nil {
		m.Injection.DetectorTempC = *in.DetectorTempC
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
	for i, rc := range r.Compound {
		base := fmt.Sprintf("compound[%d]", i+1)
		var c Compound
		c.Name = strings.TrimSpace(v.str(base+".name", rc.Name, true, ""))
		if rc.AromaticRings != nil {
			c.AromaticRings = whole(*rc.AromaticRings)
		}
		if rc.Formula != nil {
			c.Formula = *rc.Formula
		}
		c.DCp = v.opt(base+".dCp_J_mol_K", rc.DCp, false, 0)
		c.RefTempC = v.opt(base+".ref_temp_c", rc.RefTempC, false, 100)
		c.Amount = v.opt(base+".amount", rc.Amount, false, 1)
		c.Target = true
		if rc.Target != nil {
			c.Target = *rc.Target
		}
		if rc.Concentration != nil {
			c.Concentration = *rc.Concentration
			c.HasConc = true
		}
		if rc.AlkaneCarbons != nil {
			c.AlkaneCarbons = whole(*rc.AlkaneCarbons)
			if c.AlkaneCarbons == 0 { // 0 would read as "not a ladder alkane"
				v.intIn(base+".alkane_carbons", 0, 1, 100)
			}
		}
		if rc.RetentionIndex != nil {
			c.RetentionIndex = *rc.RetentionIndex
		}
		if rc.IndexTempC != nil {
			c.IndexTempC = *rc.IndexTempC
			c.HasIndexTemp = true
		}
		if rc.DHSE != nil || rc.DSSE != nil || rc.DHDSCorr != nil {
			c.HasSE = true
			c.DHSE = v.opt(base+".dH_se_kJ_mol", rc.DHSE, true, 0)
			c.DSSE = v.opt(base+".dS_se_J_mol_K", rc.DSSE, true, 0)
			c.DHDSCorr = v.opt(base+".dH_dS_corr", rc.DHDSCorr, false, 0)
		}
		switch {
		case rc.DHkJ != nil || rc.DS != nil || (rc.RetentionIndex == nil && rc.Formula == nil):
			c.DHkJ = v.opt(base+".dH_kJ_mol", rc.DHkJ, true, -40)
			c.DS = v.opt(base+".dS_J_mol_K", rc.DS, true, -80)
		case rc.RetentionIndex != nil:
			c.FromIndex = true
		default:
			fromFormula(&c) // only a formula: a rough estimate (formulaestimate.go)
		}
		m.Compounds = append(m.Compounds, c)
	}
}

// deriveIndexed gives every compound known only by its retention index its
// dH, dS and dCp from the ladder.
func (v *validator) deriveIndexed(m *Method) {
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
