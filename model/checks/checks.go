// Package checks holds the cautions a simulated method raises beyond its
// resolution: peaks after the run, sample overload of the column, and the
// method's advice (methodfile.Method.Advice: search bounds the program
// breaks, a detector too cool for the oven). Instrument limits are not
// cautions: Validate refuses a method that breaks one. simulate, the UI and the method sheet all use these, so they say
// the same thing.
package checks

import (
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// ReferenceCapacity is the sample capacity assumed per compound for a
// 0.25 mm × 0.25 µm column, in ng (common practice, from memory; the user
// overrides it with capacity_ng in [column]).
const ReferenceCapacity = 100.0

// PackedCapacity is the sample capacity assumed per compound on a packed
// column, in ng: 10 µg (MODEL.md §10, from memory); capacity_ng overrides it.
const PackedCapacity = 10000.0

// DetectorMargin is how far (°C) the detector should be above the highest
// oven temperature so that the effluent does not condense (common practice).
const DetectorMargin = methodfile.DetectorMargin

// MassOnColumn is the mass of a compound reaching the column in ng: volume
// (µL) × concentration (mg/mL, i.e. µg/µL) / (split ratio + 1); a split
// ratio of 0 is splitless (everything reaches the column).
func MassOnColumn(volumeUL, concMgML, split float64) float64 {
	return volumeUL * concMgML * 1000 / (split + 1)
}

// Capacity is the column's estimated sample capacity per compound in ng:
// proportional to the film volume per length (∝ diameter × film thickness),
// anchored at ReferenceCapacity for 0.25 mm × 0.25 µm; override > 0 wins.
func Capacity(diameterMM, filmUM, override float64) float64 {
	if override > 0 {
		return override
	}
	return ReferenceCapacity * (diameterMM / 0.25) * (filmUM / 0.25)
}

// ColumnCapacity is the capacity per compound (ng) of the method's column:
// capacity_ng when given, PackedCapacity for a packed column, else the
// film-volume estimate of Capacity (for a porous layer, with the layer's
// thickness).
func ColumnCapacity(c methodfile.Column) float64 {
	if c.HasCapacity && c.CapacityNG > 0 {
		return c.CapacityNG
	}
	if c.Kind == model.Packed {
		return PackedCapacity
	}
	return Capacity(c.DiameterMM, c.FilmUM, 0)
}

// Overload is one compound over the column's capacity.
type Overload struct {
	Name     string
	MassNG   float64
	Capacity float64
}

// Factor is how many times the capacity the mass is.
func (o Overload) Factor() float64 { return o.MassNG / o.Capacity }

// Overloads lists the compounds whose mass on column exceeds the capacity.
// Without an [injection] table or a concentration nothing is known.
func Overloads(m *methodfile.Method) []Overload {
	if !m.Injection.Present {
		return nil
	}
	capNG := ColumnCapacity(m.Column)
	var out []Overload
	for _, c := range m.Compounds {
		if !c.HasConc {
			continue
		}
		mass := MassOnColumn(m.Injection.VolumeUL, c.Concentration, m.Injection.SplitRatio)
		if mass > capNG {
			out = append(out, Overload{Name: c.Name, MassNG: mass, Capacity: capNG})
		}
	}
	return out
}

// remedy is the column change that raises capacity, by kind.
func remedy(kind model.ColumnKind) string {
	switch kind {
	case model.Packed:
		return "higher loading or a wider tube"
	case model.PorousLayer:
		return "thicker layer or a wider bore"
	}
	return "thicker film"
}

// CoolantNote says that the method needs the oven's coolant, and why, or
// is "" when it has none: with coolant_c the oven cools toward the coolant
// after every run and may start below ambient (MODEL.md §12). The safety
// note model.CryogenCaution goes with it.
func CoolantNote(m *methodfile.Method) string {
	if !m.Limits.HasCoolant {
		return ""
	}
	if m.Oven.InitialC <= m.Limits.AmbientC {
		return fmt.Sprintf("a coolant is needed: the program starts at %g °C, below the ambient %g °C, and the oven cools toward the coolant (%g °C, limits.coolant_c) after every run",
			m.Oven.InitialC, m.Limits.AmbientC, m.Limits.CoolantC)
	}
	return fmt.Sprintf("the oven cools toward its coolant (%g °C, limits.coolant_c) after every run, so the cycle time assumes the coolant is on", m.Limits.CoolantC)
}

// FirstTargetK is the first eluting target of res and its retention
// factor (ok false when no target elutes): goal.min_first_k bounds it.
func FirstTargetK(sys *model.System, res *model.Result) (name string, k float64, ok bool) {
	first := -1
	for i, pk := range res.Peaks {
		if pk.Eluted && sys.Compounds[pk.Compound].Target && (first < 0 || pk.RetentionTime < res.Peaks[first].RetentionTime) {
			first = i
		}
	}
	if first < 0 {
		return "", 0, false
	}
	pk := res.Peaks[first]
	return sys.Compounds[pk.Compound].Name, pk.RetentionFactor, true
}

// KAtElution says which k goal.min_first_k and the tables' k(Te) are, so
// that it is not read as the apparent (tR − tM)/tM of a programmed run,
// which the ramp makes larger.
const KAtElution = "k(Te) is k at its elution temperature, not (tR − tM)/tM of the run"

// Warnings are the cautions for method m whose program simulated to res.
func Warnings(m *methodfile.Method, sys *model.System, res *model.Result) []string {
	var w []string
	for _, pk := range res.Peaks {
		if !pk.Eluted {
			at := "never at this final temperature"
			if !math.IsInf(pk.RetentionTime, 0) && pk.RetentionTime < 1e12 {
				at = fmt.Sprintf("predicted at %.2f min", pk.RetentionTime/60)
			}
			w = append(w, fmt.Sprintf("%s does not elute before the program ends (%s): extend the final hold or raise the final temperature, or it carries over into the next run",
				sys.Compounds[pk.Compound].Name, at))
		}
	}
	for _, o := range Overloads(m) {
		w = append(w, fmt.Sprintf("%s: about %.0f ng on the column, %.1f× its estimated capacity of %.0f ng per compound: an overloaded peak fronts or tails and its retention shifts, so the predicted resolution is optimistic (raise the split ratio, dilute, or use a %s)",
			o.Name, o.MassNG, o.Factor(), o.Capacity, remedy(m.Column.Kind)))
	}
	// the first target must be retained enough to stand clear of the
	// unretained peak and the solvent (goal.min_first_k, a search bound)
	if name, k, ok := FirstTargetK(sys, res); ok && k < m.Goal.MinFirstK {
		w = append(w, fmt.Sprintf("goal.min_first_k: the first target, %s, elutes with k(Te) = %.2f, below %g (%s): it may not stand clear of the unretained peak and the solvent (start cooler or slower)",
			name, k, m.Goal.MinFirstK, KAtElution))
	}
	// search bounds and rules of thumb the program breaks (never refused)
	for _, n := range m.Advice() {
		w = append(w, n.String())
	}
	return w
}

// Cautions are everything a chromatographer is warned of with this
// result: Warnings, then the safety notes that go with the method (the
// hydrogen caution for a flammable carrier, the coolant note and the
// cryogen caution). simulate prints them and the UI lists them.
func Cautions(m *methodfile.Method, sys *model.System, res *model.Result) []string {
	return append(Warnings(m, sys, res), Safety(m)...)
}

// Safety are the safety notes that go with method m's program and carrier:
// the hydrogen caution for a flammable carrier, the coolant note and the
// cryogen caution for an oven with a coolant. Every command that prints a
// program prints these with it (simulate and optimize through Cautions,
// plan and compare directly).
func Safety(m *methodfile.Method) []string {
	var w []string
	if m.Carrier.Gas.Flammable() {
		w = append(w, model.HydrogenCaution)
	}
	if note := CoolantNote(m); note != "" {
		w = append(w, note, model.CryogenCaution)
	}
	return w
}
