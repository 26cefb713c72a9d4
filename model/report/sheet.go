package report

import (
	"fmt"
	"math"
	"strings"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/robust/methodtol"
	"github.com/rampwise/rampwise/model/textsafe"
)

// Sheet is the method sheet in Markdown: column, carrier and pressure mode
// (with the inlet pressure at the start temperature), the heated zones, the
// oven program, the limits, the expected retention table, the minimum
// resolution and critical pair, where the retention parameters come from,
// and the cautions.
func (s *Sim) Sheet() []byte {
	m := s.Method
	r := &s.Result
	var b strings.Builder
	title := m.Title
	if title == "" {
		title = "GC method"
	}
	fmt.Fprintf(&b, "# %s\n\n", textsafe.Inert(title))
	if m.Notes != "" {
		fmt.Fprintf(&b, "%s\n\n", inertLines(strings.TrimSpace(m.Notes)))
	}
	cond := s.System.Cond
	t0 := m.ModelProgram().Initial
	fmt.Fprintf(&b, "## Column and carrier\n\n")
	fmt.Fprintf(&b, "| | |\n|---|---|\n")
	phase := m.Column.Phase
	if phase == "" {
		phase = "(not named)"
	}
	fmt.Fprintf(&b, "| stationary phase | %s |\n", textsafe.Inert(phase))
	if m.Column.Kind != model.WallCoated {
		fmt.Fprintf(&b, "| column | %s, maximum %s °C |\n", m.Column.Describe(), num(m.Column.MaxTempC))
		if m.Column.Kind == model.PorousLayer { // a packed column's is in its description
			fmt.Fprintf(&b, "| phase ratio | %.1f |\n", cond.PhaseRatio())
		}
	} else {
		fmt.Fprintf(&b, "| column | %s m × %s mm i.d. × %s µm film, maximum %s °C |\n", num(m.Column.LengthM), num(m.Column.DiameterMM), num(m.Column.FilmUM), num(m.Column.MaxTempC))
	}
	fmt.Fprintf(&b, "| carrier gas | %s |\n", m.Carrier.Gas)
	if m.Carrier.Mode == model.ConstantPressure {
		fmt.Fprintf(&b, "| pressure mode | constant pressure, %s kPa (gauge) |\n", num(m.Carrier.InletKPa))
	} else {
		fmt.Fprintf(&b, "| pressure mode | constant flow, %s mL/min (at 25 °C, 101.325 kPa) |\n", num(m.Carrier.FlowMLMin))
	}
	fmt.Fprintf(&b, "| inlet pressure at the start (%s °C) | %.1f kPa (gauge) |\n", num(m.Oven.InitialC), cond.InletGauge(t0)/1000)
	fmt.Fprintf(&b, "| holdup time at the start | %.3f min |\n", cond.HoldupTimeAt(t0)/60)
	fmt.Fprintf(&b, "| outlet | %s |\n\n", m.Carrier.Outlet.String())

	fmt.Fprintf(&b, "## Heated zones\n\n| zone | temperature |\n|---|---|\n")
	in := m.Injection
	zone := func(has bool, v float64) string {
		if has {
			return num(v) + " °C"
		}
		return "(not set)"
	}
	fmt.Fprintf(&b, "| inlet | %s |\n", zone(in.HasInletTemp, in.InletTempC))
	fmt.Fprintf(&b, "| oven | %s → %s °C (program below) |\n", num(m.Oven.InitialC), num(round(m.ModelProgram().MaxTemp()-model.ZeroCelsius, 2)))
	fmt.Fprintf(&b, "| detector | %s |\n", zone(in.HasDetector, in.DetectorTempC))
	if in.Present {
		split := "splitless"
		if in.SplitRatio > 0 {
			split = "split " + num(in.SplitRatio) + ":1"
		}
		fmt.Fprintf(&b, "\nInjection: %s µL, %s.\n", num(in.VolumeUL), split)
	}

	fmt.Fprintf(&b, "\n## Oven program\n\n| step | rate (°C/min) | temperature (°C) | hold (min) |\n|---|---|---|---|\n")
	fmt.Fprintf(&b, "| initial | | %s | %s |\n", num(round(m.Oven.InitialC, 2)), num(round(m.Oven.InitialHoldMin, 3)))
	for i, rp := range m.Oven.Ramps {
		fmt.Fprintf(&b, "| ramp %d | %s | %s | %s |\n", i+1, num(round(rp.RateCMin, 2)), num(round(rp.FinalC, 2)), num(round(rp.HoldMin, 3)))
	}
	fmt.Fprintf(&b, "\nRun time %.2f min; oven cycle %.2f min (cool-down %.2f min, equilibration %s min).\n",
		r.RunTime/60, r.CycleTime/60, r.Cooldown/60, num(m.Limits.EquilibrationMin))

	l := m.Limits
	fmt.Fprintf(&b, "\n## Limits\n\nLowest start %s °C · fastest ramp %s °C/min · longest hold %s min · highest inlet pressure %s kPa · column maximum %s °C.\n",
		num(l.OvenMinC), num(l.MaxRateCMin), num(l.MaxHoldMin), num(l.MaxInletKPa), num(m.Column.MaxTempC))

	fmt.Fprintf(&b, "\n## Expected retention (model prediction)\n\n| # | compound | tR (min) | Te (°C) | w½ (s) | %s | %s |\n|---|---|---|---|---|---|---|\n", format.HeadRsNext, format.HeadTarget)
	for i, pk := range r.Peaks {
		c := &s.System.Compounds[pk.Compound]
		rs := ""
		if i < len(r.Pairs) {
			rs = format.Pair(r.Pairs[i].Resolution, m.Goal.MinResolution)
			if i == r.Critical {
				rs = format.CriticalMark + " " + rs
			}
		}
		tr := fmt.Sprintf("%.3f", pk.RetentionTime/60)
		if !pk.Eluted {
			tr = "after the run"
		}
		tgt := ""
		if c.Target {
			tgt = "yes"
		}
		fmt.Fprintf(&b, "| %d | %s | %s | %.1f | %.2f | %s | %s |\n", i+1, textsafe.Inert(c.Name), tr, pk.ElutionTemp-model.ZeroCelsius, pk.HalfWidth(), rs, tgt)
	}
	if missing := s.System.NotElutedTargets(r); r.Critical < 0 && len(missing) > 0 {
		fmt.Fprintf(&b, "\nNo counted pair; the goal is not met: %s.\n", format.NotEluted(inertNames(missing)))
	}
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		fmt.Fprintf(&b, "\nMinimum resolution %s, critical pair %s.\n", format.RsAll(r.MinResolution, m.Goal.MinResolution, inertNames(s.System.NotElutedTargets(r))),
			format.CriticalPair(textsafe.Inert(s.System.Compounds[cp.First].Name), textsafe.Inert(s.System.Compounds[cp.Second].Name)))
	}

	b.WriteString(s.robustSection())

	fmt.Fprintf(&b, "\n## Where the retention parameters come from\n\n")
	var idx, entered []string
	for _, c := range m.Compounds {
		if c.FromIndex {
			idx = append(idx, fmt.Sprintf("%s (I = %s)", textsafe.Inert(c.Name), num(c.RetentionIndex)))
		} else {
			entered = append(entered, textsafe.Inert(c.Name))
		}
	}
	if len(entered) > 0 {
		fmt.Fprintf(&b, "- ΔH and ΔS in the method file (entered, or fitted from scouting runs with `rampwise fit`): %s.\n", strings.Join(entered, ", "))
	}
	if len(idx) > 0 {
		fmt.Fprintf(&b, "- From retention indices on this phase, ln K interpolated between the bracketing ladder alkanes (the index taken as independent of temperature, an assumption): %s.\n", strings.Join(idx, ", "))
	}
	ideal := "ideal Golay column"
	if m.Column.Kind == model.Packed {
		ideal = "the van Deemter plate height with the column's eddy, obstruction and mobile-phase factors"
	}
	fmt.Fprintf(&b, "- Plate-height factor %s (1 = %s).\n", num(m.Column.PlateHeight), ideal)

	fmt.Fprintf(&b, "\n## Cautions\n\n")
	fmt.Fprintf(&b, "- These are model predictions. Verify the program with a standard injection before using it for samples.\n")
	fmt.Fprintf(&b, "- Never program the oven above the column's maximum temperature (%s °C).\n", num(m.Column.MaxTempC))
	fmt.Fprintf(&b, "- The oven, inlet and detector are hot; let them cool before touching the column or fittings.\n")
	if m.Carrier.Gas.Flammable() {
		fmt.Fprintf(&b, "- %s\n", model.HydrogenCaution)
	}
	if note := checks.CoolantNote(m); note != "" {
		fmt.Fprintf(&b, "- %s.\n- %s\n", strings.ToUpper(note[:1])+note[1:], model.CryogenCaution)
	}
	fmt.Fprintf(&b, "- Follow your local codes and the instrument maker's guidance for gases, pressurised cylinders and heated zones.\n")
	for _, w := range checks.Warnings(m, s.System, &s.Result) {
		fmt.Fprintf(&b, "- Warning: %s\n", textsafe.Inert(w))
	}
	return []byte(b.String())
}

// robustSection is the method sheet's account of the [goal.robust]
// tolerances: the nominal Rs, the worst corner of the instrument
// tolerances and which, and Rs ± σ of the critical pair from the retention
// parameters' standard errors (model/robust, the optimizer's own check).
func (s *Sim) robustSection() string {
	m := s.Method
	rep, err := methodtol.Check(m, s.System)
	if err != nil || !rep.On {
		return ""
	}
	rb := m.Goal.Robust
	var b strings.Builder
	fmt.Fprintf(&b, "\n## Robust margin\n\n")
	fmt.Fprintf(&b, "Tolerances (goal.robust): oven ±%s °C, flow ±%s %%, plate height +%s %%, z = %s.\n\n",
		num(rb.OvenOffsetC), num(rb.FlowPct), num(rb.EfficiencyPct), num(rb.RetentionSigma))
	fmt.Fprintf(&b, "| check | min Rs |\n|---|---|\n")
	fmt.Fprintf(&b, "| nominal | %.3f |\n", rep.Nominal)
	if !math.IsNaN(rep.Worst) {
		fmt.Fprintf(&b, "| worst corner (%s) | %.3f |\n", rep.Corner, rep.Worst)
	}
	if rep.Z > 0 && !math.IsNaN(rep.LowZ) {
		fmt.Fprintf(&b, "| critical pair Rs ± σ (retention parameters) | %.3f ± %.3f |\n", rep.Nominal, rep.Sigma)
		fmt.Fprintf(&b, "| lowest Rs − %s·σ over the pairs | %.3f |\n", num(rep.Z), rep.LowZ)
	}
	word := "met"
	if rep.Margin < m.Goal.MinResolution {
		word = "NOT met"
	}
	fmt.Fprintf(&b, "\nTarget %.2f %s at every corner and at Rs − z·σ (robust Rs %.3f).\n", m.Goal.MinResolution, word, rep.Margin)
	return b.String()
}

// inertLines makes each line of a multi-line text (the notes) inert,
// keeping the line breaks.
func inertLines(s string) string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		lines[i] = textsafe.Inert(strings.TrimSuffix(l, "\r"))
	}
	return strings.Join(lines, "\n")
}

// inertNames is names shown inert (textsafe.Inert).
func inertNames(names []string) []string {
	out := make([]string, len(names))
	for i, n := range names {
		out[i] = textsafe.Inert(n)
	}
	return out
}
