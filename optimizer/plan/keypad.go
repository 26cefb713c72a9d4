package plan

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

func stepOr(x, def float64) float64 {
	if x > 0 {
		return x
	}
	return def
}

// onSteps puts a program on the method's keypad steps ([limits]
// temp_step_c, rate_step_c_min, hold_step_min): the start to the nearest
// step, final temperatures, rates and holds down, so that no value passes a
// limit the exact one kept. Until the optimizer rounds on these steps
// itself, this is the planner's own rounding.
func onSteps(o methodfile.Oven, l methodfile.Limits) methodfile.Oven {
	ts, rs, hs := stepOr(l.TempStepC, 0.1), stepOr(l.RateStepCMin, 0.1), stepOr(l.HoldStepMin, 0.01)
	down := func(x, s float64) float64 { return snap(math.Floor(x/s+1e-9)*s, s) }
	out := methodfile.Oven{InitialC: snap(math.Round(o.InitialC/ts)*ts, ts), InitialHoldMin: snap(math.Round(o.InitialHoldMin/hs)*hs, hs)}
	prev := out.InitialC
	for _, r := range o.Ramps {
		nr := methodfile.Ramp{RateCMin: math.Max(down(r.RateCMin, rs), rs), FinalC: down(r.FinalC, ts), HoldMin: down(r.HoldMin, hs)}
		if nr.FinalC <= prev {
			// a ramp rounded away: keep its hold on the previous step
			if len(out.Ramps) > 0 {
				out.Ramps[len(out.Ramps)-1].HoldMin = snap(out.Ramps[len(out.Ramps)-1].HoldMin+nr.HoldMin, hs)
			} else {
				out.InitialHoldMin = snap(out.InitialHoldMin+nr.HoldMin, hs)
			}
			continue
		}
		out.Ramps = append(out.Ramps, nr)
		prev = nr.FinalC
	}
	return out
}

// snap removes the binary noise of a multiple of a decimal step.
func snap(x, step float64) float64 {
	d := decimals(step)
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'f', d, 64), 64)
	return v
}

// decimals is how many decimals a keypad step has (0.1 → 1, 0.01 → 2).
func decimals(step float64) int {
	for d := 0; d < 6; d++ {
		if math.Abs(step*math.Pow(10, float64(d))-math.Round(step*math.Pow(10, float64(d)))) < 1e-9 {
			return d
		}
	}
	return 6
}

// Format is one program value at its keypad step's decimals.
func Format(x, step float64) string { return strconv.FormatFloat(x, 'f', decimals(step), 64) }

// KeypadLines is the program as an oven's keypad takes it: one line per
// step, every value at its keypad step.
func KeypadLines(o methodfile.Oven, l methodfile.Limits) []string {
	ts, rs, hs := stepOr(l.TempStepC, 0.1), stepOr(l.RateStepCMin, 0.1), stepOr(l.HoldStepMin, 0.01)
	lines := []string{fmt.Sprintf("initial temperature  %s °C   hold %s min", Format(o.InitialC, ts), Format(o.InitialHoldMin, hs))}
	for i, r := range o.Ramps {
		lines = append(lines, fmt.Sprintf("ramp %d  rate %s °C/min   to %s °C   hold %s min", i+1, Format(r.RateCMin, rs), Format(r.FinalC, ts), Format(r.HoldMin, hs)))
	}
	return lines
}

// RunBlock is a runs-file [[run]] entry for the program, to paste into the
// runs file once the run is made: the measured retention times and widths
// go in as the commented compound lines show, in the order given (the
// planner gives them in predicted elution order). With a carrier, the
// block records it as [run.carrier] (gas, mode and the flow or inlet
// pressure), so that a later change of the method's carrier does not
// silently reinterpret the run.
func RunBlock(name string, o methodfile.Oven, c *methodfile.Carrier, l methodfile.Limits, compounds []string) string {
	ts, rs, hs := stepOr(l.TempStepC, 0.1), stepOr(l.RateStepCMin, 0.1), stepOr(l.HoldStepMin, 0.01)
	var b strings.Builder
	fmt.Fprintf(&b, "[[run]]\nname = %s\n[run.oven]\ninitial_c = %s\ninitial_hold_min = %s\n", tomlQuote(name), Format(o.InitialC, ts), Format(o.InitialHoldMin, hs))
	for _, r := range o.Ramps {
		fmt.Fprintf(&b, "[[run.oven.ramp]]\nrate_c_min = %s\nfinal_c = %s\nhold_min = %s\n", Format(r.RateCMin, rs), Format(r.FinalC, ts), Format(r.HoldMin, hs))
	}
	if c != nil {
		fmt.Fprintf(&b, "[run.carrier]         # the carrier of this run\ngas = %s\nmode = %s\n", tomlQuote(c.Gas.String()), tomlQuote(c.Mode.String()))
		if c.Mode == model.ConstantPressure {
			fmt.Fprintf(&b, "inlet_kpa = %s\n", strconv.FormatFloat(c.InletKPa, 'f', -1, 64))
		} else {
			fmt.Fprintf(&b, "flow_ml_min = %s\n", strconv.FormatFloat(c.FlowMLMin, 'f', -1, 64))
		}
	}
	b.WriteString("[run.retention_min]   # measured retention time (min) of each peak\n")
	for _, n := range compounds {
		fmt.Fprintf(&b, "# %s = \n", tomlQuote(n))
	}
	b.WriteString("[run.width_min]       # optional: measured half-height widths (min)\n")
	return b.String()
}

// NextRunName names the planned run after the runs so far: scout-N or
// verify-N, N one more than the runs, or the next N whose name is not
// taken.
func NextRunName(a Action, runs *methodfile.Runs) string {
	base := "scout"
	if a == Verify {
		base = "verify"
	}
	used := map[string]bool{}
	n := 0
	if runs != nil {
		n = len(runs.Runs)
		for _, r := range runs.Runs {
			used[r.Name] = true
		}
	}
	for i := n + 1; ; i++ {
		if s := fmt.Sprintf("%s-%d", base, i); !used[s] {
			return s
		}
	}
}

// tomlQuote is s as a TOML basic string: quotes and backslashes escaped,
// and every rune that is not printable (control characters, bidi
// overrides) as \uXXXX, so that the text stays inert on a terminal.
func tomlQuote(s string) string {
	var b strings.Builder
	b.WriteByte('"')
	for _, r := range s {
		switch {
		case r == '"' || r == '\\':
			b.WriteByte('\\')
			b.WriteRune(r)
		case !unicode.IsPrint(r):
			if r > 0xFFFF {
				fmt.Fprintf(&b, "\\U%08X", r)
			} else {
				fmt.Fprintf(&b, "\\u%04X", r)
			}
		default:
			b.WriteRune(r)
		}
	}
	b.WriteByte('"')
	return b.String()
}
