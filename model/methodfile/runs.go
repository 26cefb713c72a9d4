package methodfile

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/rampwise/rampwise/model/andi"
	"github.com/rampwise/rampwise/model/peaktable"
)

// Run is one scouting injection: its oven program, any carrier settings
// that differ from the method's, and the measured retention times (and
// optionally half-height widths) by compound name, in minutes.
type Run struct {
	Name      string
	HoldupMin float64
	HasHoldup bool
	Oven      Oven
	Carrier   rawCarrier // overrides; nil fields keep the method's
	Retention map[string]float64
	Widths    map[string]float64
	Line      int // where the run starts in its file
	// File is the runs file the run was read from; keyLines the line of
	// each [run.retention_min] name in it (see NameWhere).
	File       string
	keyLines   map[string]int
	names      []string // retention keys in name order
	hasCarrier bool

	// From a data-system export (peaks = … or chromatogram = …): Source is
	// "peaks" or "chromatogram", SourceFile the path as resolved against the
	// runs file's folder. Peaks holds every peak of the run in time order,
	// named or not; the named ones are also in Retention (and Widths).
	// Trace is the detector signal of a chromatogram file.
	Source     string
	SourceFile string
	Peaks      []Peak
	Trace      *andi.Chromatogram
	// Found is true when the peaks were found in the trace (the file had
	// no peak table).
	Found bool
}

// Peak is one measured peak of a run from a data-system export. Times and
// widths in minutes (width at half height, 0 when not given).
type Peak struct {
	Name     string
	TimeMin  float64
	WidthMin float64
	Area     float64
	Height   float64
	Line     int // line in a peak table, 0 otherwise
}

// Unnamed are the indices in Peaks of the peaks without a name.
func (r *Run) Unnamed() []int {
	var out []int
	for i, p := range r.Peaks {
		if p.Name == "" {
			out = append(out, i)
		}
	}
	return out
}

// SetRetention records a measured retention time (and half-height width
// when > 0) under a compound name, as an assignment does.
func (r *Run) SetRetention(name string, tMin, wMin float64) {
	if _, ok := r.Retention[name]; !ok {
		r.names = append(r.names, name)
		sort.Strings(r.names)
	}
	r.Retention[name] = tMin
	if wMin > 0 {
		r.Widths[name] = wMin
	} else {
		delete(r.Widths, name)
	}
}

// DeleteRetention removes a compound's measured time and width.
func (r *Run) DeleteRetention(name string) {
	if _, ok := r.Retention[name]; !ok {
		return
	}
	delete(r.Retention, name)
	delete(r.Widths, name)
	for i, n := range r.names {
		if n == name {
			r.names = append(r.names[:i:i], r.names[i+1:]...)
			break
		}
	}
}

// CloneRuns copies a runs file deeply enough that assignments to the copy
// leave the original alone (traces are shared, they are never changed).
func (r *Runs) CloneRuns() *Runs {
	c := *r
	c.Runs = make([]Run, len(r.Runs))
	for i, x := range r.Runs {
		y := x
		y.Retention = map[string]float64{}
		for k, v := range x.Retention {
			y.Retention[k] = v
		}
		y.Widths = map[string]float64{}
		for k, v := range x.Widths {
			y.Widths[k] = v
		}
		y.names = append([]string(nil), x.names...)
		y.Peaks = append([]Peak(nil), x.Peaks...)
		y.Oven.Ramps = append([]Ramp(nil), x.Oven.Ramps...)
		c.Runs[i] = y
	}
	return &c
}

// NameWhere is where the run names compound name: "file:line" of its
// [run.retention_min] key, or of its peak-table row, or "" when unknown.
func (r *Run) NameWhere(name string) string {
	if n := r.keyLines[name]; n > 0 && r.File != "" {
		return fmt.Sprintf("%s:%d", r.File, n)
	}
	for _, p := range r.Peaks {
		if p.Name == name && p.Line > 0 && r.SourceFile != "" {
			return fmt.Sprintf("%s:%d", r.SourceFile, p.Line)
		}
	}
	return ""
}

// Names are the compounds measured in the run, sorted.
func (r *Run) Names() []string { return r.names }

// Runs is a scouting runs file.
type Runs struct {
	File string
	Runs []Run
	loc  Locations
}

// Line is the line of a key path in the runs file (0 when unknown).
func (r *Runs) Line(path string) int { return r.loc.Line(path) }

type rawRun struct {
	Name      *string            `toml:"name"`
	HoldupMin *float64           `toml:"holdup_min"`
	Oven      *rawOven           `toml:"oven"`
	Carrier   *rawCarrier        `toml:"carrier"`
	Retention map[string]float64 `toml:"retention_min"`
	Width     map[string]float64 `toml:"width_min"`
	Peaks     *string            `toml:"peaks"`
	Chrom     *string            `toml:"chromatogram"`
	Columns   *rawColumns        `toml:"columns"`
}

// rawColumns is [run.columns]: which peak-table columns hold what, by
// header text or 1-based number, and what the reader must not guess.
type rawColumns struct {
	Time      any     `toml:"time"`
	Name      any     `toml:"name"`
	Area      any     `toml:"area"`
	Height    any     `toml:"height"`
	Width     any     `toml:"width"`
	TimeUnit  *string `toml:"time_unit"`
	WidthKind *string `toml:"width_kind"`
	Separator *string `toml:"separator"`
	Decimal   *string `toml:"decimal"`
}

type rawRuns struct {
	Run []rawRun `toml:"run"`
}

// ReadRuns reads and validates a scouting runs file against the method
// (whose column limits the programs).
func ReadRuns(path string, m *Method) (*Runs, error) {
	data, err := readLimited(path)
	if err != nil {
		return nil, err
	}
	return ParseRuns(path, data, m)
}

// ParseRuns decodes a scouting runs file's contents.
func ParseRuns(name string, data []byte, m *Method) (*Runs, error) {
	var raw rawRuns
	loc, err := decodeStrict(name, data, &raw)
	if err != nil {
		return nil, err
	}
	v := &validator{file: name, loc: loc}
	out := &Runs{File: name, loc: loc}
	if len(raw.Run) == 0 {
		v.fail("run", "no [[run]] entries")
	}
	if len(raw.Run) > MaxRuns {
		v.fail(fmt.Sprintf("run[%d]", MaxRuns+1), "more than %d runs", MaxRuns)
		return nil, v.err
	}
	seen := map[string]int{}
	for i, rr := range raw.Run {
		base := fmt.Sprintf("run[%d]", i+1)
		r := Run{Line: loc.Line(base), Retention: map[string]float64{}, Widths: map[string]float64{}}
		r.Name = v.uniqueName(base, rr.Name, seen, i+1, "run")
		if rr.HoldupMin != nil {
			r.HoldupMin = v.num(base+".holdup_min", rr.HoldupMin, false, 0, positive(1000), "min")
			r.HasHoldup = true
		}
		// the run's program, checked with the method file's rules
		sub := &validator{file: name, loc: prefixed(loc, base+".")}
		tmp := &Method{Column: m.Column, Limits: m.Limits}
		if rr.Oven == nil {
			v.fail(base+".oven", "missing [run.oven] table")
		} else {
			sub.oven(&rawMethod{Oven: rr.Oven}, tmp)
			if sub.err != nil && v.err == nil {
				v.err = rebase(sub.err, base+".")
			}
			r.Oven = tmp.Oven
		}
		if rr.Carrier != nil {
			r.Carrier = *rr.Carrier
			r.hasCarrier = true
			csub := &validator{file: name, loc: prefixed(loc, base+".")}
			cm := &Method{}
			csub.carrier(&rawMethod{Carrier: overlayCarrier(carrierRaw(m.Carrier), rr.Carrier)}, cm)
			if csub.err == nil {
				csub.checkCarrier(cm)
			}
			if csub.err != nil && v.err == nil {
				v.err = rebase(csub.err, base+".")
			}
		}
		if v.err == nil {
			v.exportedPeaks(name, base, &rr, &r)
		}
		if len(rr.Retention) == 0 && r.Source == "" && v.err == nil {
			v.fail(base+".retention_min", "no measured retention times")
		}
		r.File = name
		r.keyLines = map[string]int{}
		for cname, t := range rr.Retention {
			key := base + ".retention_min." + cname
			r.keyLines[cname] = loc.Line(key)
			x := t
			tv := v.num(key, &x, true, 0, positive(10000), "min")
			if r.HasHoldup && v.err == nil && tv <= r.HoldupMin {
				v.fail(key, "retention time %s min is not after the run's holdup time %s min", fmtNum(tv), fmtNum(r.HoldupMin))
			}
			r.Retention[cname] = tv
			r.names = append(r.names, cname)
		}
		for cname, w := range rr.Width {
			key := base + ".width_min." + cname
			x := w
			r.Widths[cname] = v.num(key, &x, true, 0, positive(100), "min")
			if _, ok := rr.Retention[cname]; !ok && v.err == nil {
				v.fail(key, "a width for %s without its retention time", quoted(cname))
			}
		}
		sort.Strings(r.names)
		out.Runs = append(out.Runs, r)
	}
	if v.err != nil {
		return nil, v.err
	}
	return out, nil
}

// RunMethod is the method as it was for run r: its program and carrier.
func (m *Method) RunMethod(r *Run) *Method {
	c := m.Clone()
	c.Oven = r.Oven
	c.Oven.Ramps = append([]Ramp(nil), r.Oven.Ramps...)
	if r.hasCarrier {
		c.Carrier = mergeCarrier(m.Carrier, &r.Carrier)
	}
	return c
}

// mergeCarrier is base with the run's overrides o, checked by the method
// file's carrier rules (ParseRuns has already reported any error).
func mergeCarrier(base Carrier, o *rawCarrier) Carrier {
	v := &validator{loc: Locations{}}
	cm := &Method{}
	v.carrier(&rawMethod{Carrier: overlayCarrier(carrierRaw(base), o)}, cm)
	if v.checkCarrier(cm); v.err != nil {
		return base
	}
	return cm.Carrier
}

// overlayCarrier sets in r every key o gives.
func overlayCarrier(r, o *rawCarrier) *rawCarrier {
	if o.Gas != nil {
		r.Gas = o.Gas
	}
	if o.Mode != nil {
		r.Mode = o.Mode
	}
	if o.FlowMLMin != nil {
		r.FlowMLMin = o.FlowMLMin
	}
	if o.InletKPa != nil {
		r.InletKPa = o.InletKPa
	}
	if o.Outlet != nil {
		r.Outlet = o.Outlet
	}
	if o.AmbientKPa != nil {
		r.AmbientKPa = o.AmbientKPa
	}
	if o.InitialBand != nil {
		r.InitialBand = o.InitialBand
	}
	return r
}

func carrierRaw(c Carrier) *rawCarrier {
	r := &rawCarrier{Gas: ptr(c.Gas.String()), Mode: ptr(c.Mode.String()), Outlet: ptr(c.Outlet.String()), AmbientKPa: ptr(c.AmbientKPa), InitialBand: ptr(c.InitialBand)}
	if c.FlowMLMin > 0 {
		r.FlowMLMin = ptr(c.FlowMLMin)
	}
	if c.InletKPa > 0 {
		r.InletKPa = ptr(c.InletKPa)
	}
	return r
}

// prefixed views the locations of one array element as if it were the root.
func prefixed(l Locations, prefix string) Locations {
	out := Locations{}
	for k, v := range l {
		if strings.HasPrefix(k, prefix) {
			out[strings.TrimPrefix(k, prefix)] = v
		}
	}
	return out
}

func rebase(err error, prefix string) error {
	if fe, ok := err.(*Error); ok {
		c := *fe
		c.Key = prefix + c.Key
		return &c
	}
	return err
}

// columnRef reads one [run.columns] role: a header text or a 1-based
// column number.
func (v *validator) columnRef(path string, x any) string {
	switch c := x.(type) {
	case nil:
		return ""
	case string:
		if strings.TrimSpace(c) == "" {
			v.fail(path, "empty column name")
		}
		return c
	case int64:
		if c < 1 || c > 1000 {
			v.fail(path, "column number %d is out of range [1, 1000]", c)
		}
		return strconv.FormatInt(c, 10)
	}
	v.fail(path, "wrong type: expected a header in quotes or a column number, got %T", x)
	return ""
}

// exportedPeaks reads a run's peak table or chromatogram file, named
// relative to the runs file's folder.
func (v *validator) exportedPeaks(file, base string, rr *rawRun, r *Run) {
	if rr.Peaks != nil && rr.Chrom != nil {
		v.fail(base+".chromatogram", "give peaks or chromatogram, not both")
		return
	}
	if (rr.Peaks != nil || rr.Chrom != nil) && len(rr.Retention) > 0 {
		key := base + ".peaks"
		if rr.Chrom != nil {
			key = base + ".chromatogram"
		}
		v.fail(key, "give [run.retention_min] or a data-system export, not both")
		return
	}
	if rr.Columns != nil && rr.Peaks == nil {
		v.fail(base+".columns", "[run.columns] describes a peak table, but the run has no peaks = file")
		return
	}
	resolve := func(p string) string {
		if filepath.IsAbs(p) {
			return p
		}
		return filepath.Join(filepath.Dir(file), p)
	}
	var peaks []Peak
	var key string
	switch {
	case rr.Peaks != nil:
		key = base + ".peaks"
		if strings.TrimSpace(*rr.Peaks) == "" {
			v.fail(key, "empty file name")
			return
		}
		var cols peaktable.Columns
		if c := rr.Columns; c != nil {
			cb := base + ".columns."
			cols.Time = v.columnRef(cb+"time", c.Time)
			cols.Name = v.columnRef(cb+"name", c.Name)
			cols.Area = v.columnRef(cb+"area", c.Area)
			cols.Height = v.columnRef(cb+"height", c.Height)
			cols.Width = v.columnRef(cb+"width", c.Width)
			cols.TimeUnit = v.str(cb+"time_unit", c.TimeUnit, false, "", "min", "s")
			cols.WidthKind = v.str(cb+"width_kind", c.WidthKind, false, "", "half-height", "base", "sigma")
			cols.Separator = v.str(cb+"separator", c.Separator, false, "", ",", ";", "tab")
			cols.Decimal = v.str(cb+"decimal", c.Decimal, false, "", ".", ",")
			if v.err != nil {
				return
			}
		}
		r.Source, r.SourceFile = "peaks", resolve(*rr.Peaks)
		tab, err := peaktable.Read(r.SourceFile, cols)
		if err != nil {
			v.fail(key, "%v", err)
			return
		}
		for _, p := range tab.Peaks {
			peaks = append(peaks, Peak{Name: p.Name, TimeMin: p.TimeMin, WidthMin: p.WidthMin, Area: p.Area, Height: p.Height, Line: p.Line})
		}
	default:
		if rr.Chrom == nil {
			return
		}
		key = base + ".chromatogram"
		if strings.TrimSpace(*rr.Chrom) == "" {
			v.fail(key, "empty file name")
			return
		}
		r.Source, r.SourceFile = "chromatogram", resolve(*rr.Chrom)
		c, err := andi.Read(r.SourceFile)
		if err != nil {
			v.fail(key, "%v", err)
			return
		}
		r.Trace = c
		src := c.Peaks
		if src == nil {
			src = c.FindPeaks(andi.FindOptions{})
			r.Found = true
		}
		for _, p := range src {
			peaks = append(peaks, Peak{Name: p.Name, TimeMin: p.TimeMin, WidthMin: p.WidthMin, Area: p.Area, Height: p.Height})
		}
	}
	if len(peaks) == 0 {
		v.fail(key, "%s: no peaks", r.SourceFile)
		return
	}
	if len(peaks) > MaxCompounds*5 {
		v.fail(key, "%s: %d peaks, more than %d", r.SourceFile, len(peaks), MaxCompounds*5)
		return
	}
	sort.SliceStable(peaks, func(a, b int) bool { return peaks[a].TimeMin < peaks[b].TimeMin })
	at := func(p Peak) string {
		if p.Line > 0 {
			return fmt.Sprintf("%s:%d", r.SourceFile, p.Line)
		}
		return r.SourceFile
	}
	seen := map[string]Peak{}
	for _, p := range peaks {
		if !(p.TimeMin > 0) || p.TimeMin > 10000 || math.IsInf(p.TimeMin, 0) {
			v.fail(key, "%s: retention time %g min is out of range (0, 10000]", at(p), p.TimeMin)
			return
		}
		if p.Name == "" {
			continue
		}
		if q, dup := seen[p.Name]; dup {
			v.fail(key, "%s: %s named twice (also at %s min)", at(p), quoted(p.Name), fmtNum(q.TimeMin))
			return
		}
		seen[p.Name] = p
		if r.HasHoldup && p.TimeMin <= r.HoldupMin {
			v.fail(key, "%s: %s at %s min is not after the run's holdup time %s min", at(p), quoted(p.Name), fmtNum(p.TimeMin), fmtNum(r.HoldupMin))
			return
		}
		r.Retention[p.Name] = p.TimeMin
		r.names = append(r.names, p.Name)
		if p.WidthMin > 0 && p.WidthMin <= 100 {
			r.Widths[p.Name] = p.WidthMin
		}
	}
	r.Peaks = peaks
}

// ReadExportRun reads one peak table or chromatogram file (by its
// extension: .cdf or .nc is an AIA/ANDI chromatogram, anything else a peak
// table) as a run of the method's own program and carrier, named after the
// file.
func ReadExportRun(path string, m *Method, cols *rawColumns) (*Run, error) {
	v := &validator{file: path, loc: Locations{}}
	r := Run{Name: filepath.Base(path), Oven: m.Oven, Retention: map[string]float64{}, Widths: map[string]float64{}}
	r.Oven.Ramps = append([]Ramp(nil), m.Oven.Ramps...)
	base := filepath.Base(path)
	rr := rawRun{Columns: cols}
	switch strings.ToLower(filepath.Ext(path)) {
	case ".cdf", ".nc":
		rr.Chrom = &base
	default:
		rr.Peaks = &base
	}
	v.exportedPeaks(path, "run", &rr, &r)
	if v.err != nil {
		if fe, ok := v.err.(*Error); ok {
			msg := fe.Msg
			if !strings.HasPrefix(msg, path) {
				msg = path + ": " + msg
			}
			return nil, errors.New(msg)
		}
		return nil, v.err
	}
	sort.Strings(r.names)
	return &r, nil
}

// AddRun appends a run (a verification run joining the scouting runs),
// renaming it with a suffix when its name is taken.
func (r *Runs) AddRun(run Run) {
	name := run.Name
	for k := 2; ; k++ {
		taken := false
		for _, x := range r.Runs {
			if x.Name == name {
				taken = true
			}
		}
		if !taken {
			break
		}
		name = fmt.Sprintf("%s (%d)", run.Name, k)
	}
	run.Name = name
	r.Runs = append(r.Runs, run)
}
