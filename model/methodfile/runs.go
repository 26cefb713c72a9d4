package methodfile

import (
	"fmt"
	"sort"
	"strings"
)

// Run is one scouting injection: its oven program, any carrier settings
// that differ from the method's, and the measured retention times (and
// optionally half-height widths) by compound name, in minutes.
type Run struct {
	Name       string
	HoldupMin  float64
	HasHoldup  bool
	Oven       Oven
	Carrier    rawCarrier // overrides; nil fields keep the method's
	Retention  map[string]float64
	Widths     map[string]float64
	Line       int      // where the run starts in its file
	names      []string // retention keys in name order
	hasCarrier bool
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
		if len(rr.Retention) == 0 && v.err == nil {
			v.fail(base+".retention_min", "no measured retention times")
		}
		for cname, t := range rr.Retention {
			key := base + ".retention_min." + cname
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
				v.fail(key, "a width for %q without its retention time", cname)
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
	r := &rawCarrier{Gas: ptr(c.Gas.String()), Mode: ptr(c.Mode.String()), Outlet: ptr(c.Outlet), AmbientKPa: ptr(c.AmbientKPa), InitialBand: ptr(c.InitialBand)}
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
