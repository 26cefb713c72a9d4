package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
	"github.com/rampwise/rampwise/optimizer"
	"github.com/rampwise/rampwise/optimizer/plan"
)

const planHelp = `Usage: rampwise plan METHOD [RUNS] [--json] [--seed N] [--injections N]

Says what to inject next so that the next injection is the last:

  inject   a scouting program, within every instrument limit of the method,
           chosen to shrink the uncertainty of the resolution of the pairs
           that are or could become critical near the optimum (the run that
           leaves the least shortfall of the margin, by the expected
           posterior SD of those resolutions);
  verify   the optimized program, when its predicted minimum resolution
           clears the target by z standard deviations (z = [goal.robust]
           retention_sigma, at least 3; parameters and measurement) and holds
           at every corner of the [goal.robust] instrument tolerances;
  done     when RUNS already holds a run that meets the target as measured.

The injection budget (--injections, default 3) counts the verification run:
while two or more scouting runs are left in it, each is designed together
with the next (two runs at different elution temperatures tell both
parameters of every compound); once the runs so far are one short of it,
any program that holds the margin is advised for verification, however
much another scouting run might shorten it (the reason then says so).

The method's values are the starting point (entered, from indices, or for a
compound with only a formula a rough estimate, about ± 8 kJ/mol); RUNS, the
scouting runs so far, update them (the fit, with the method's values and
their uncertainty as the prior). Give the method as it was before fitting
these runs. The program is printed as an oven keypad takes it, with a
[[run]] block to paste into the runs file once the run is made. Exit 0
whatever the advice (it is in "action"); 2 for bad input.

Flags:
`

type carrierJSON struct {
	Gas       string   `json:"gas"`
	Mode      string   `json:"mode"`
	FlowMLMin *float64 `json:"flow_ml_min,omitempty"`
	InletKPa  *float64 `json:"inlet_kpa,omitempty"`
}

type planJSON struct {
	Action                string      `json:"action"`
	Program               programJSON `json:"program"`
	Carrier               carrierJSON `json:"carrier"`
	Reason                string      `json:"reason"`
	ExpectedMinResolution *float64    `json:"expected_min_resolution"`
	ExpectedSD            *float64    `json:"expected_sd"`
	ExpectedSDAfter       *float64    `json:"expected_sd_after,omitempty"`
	TargetResolution      float64     `json:"target_resolution"`
	CriticalPair          []string    `json:"critical_pair"`
	Optimized             programJSON `json:"optimized_program"`
	VerifiedBy            string      `json:"verified_by,omitempty"`
	MeasuredMinResolution *float64    `json:"measured_min_resolution,omitempty"`
	EstimatedFromFormula  []string    `json:"estimated_from_formula"`
	RetentionTimeSDMin    float64     `json:"retention_time_sd_min"`
	RunName               string      `json:"run_name,omitempty"`
	// Warnings are the fit's warnings on the runs (a misspelled name left
	// out, a poorly determined compound, ...), as fit prints them.
	Warnings []string `json:"warnings"`
	// Cautions are the safety notes for the planned program and carrier
	// (hydrogen, coolant and cryogen), as simulate prints them.
	Cautions []string `json:"cautions"`
}

func carrierToJSON(c methodfile.Carrier) carrierJSON {
	j := carrierJSON{Gas: c.Gas.String(), Mode: c.Mode.String()}
	if c.Mode == model.ConstantPressure {
		j.InletKPa = &c.InletKPa
	} else {
		j.FlowMLMin = &c.FlowMLMin
	}
	return j
}

func runPlan(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("plan", planHelp, stderr)
	asJSON := fs.Bool("json", false, "print the advice as JSON")
	seed := fs.Uint64("seed", 1, "seed of the optimizer's starting points: the same seed gives the same advice")
	injections := fs.Int("injections", 3, "injection budget, the verification run included, 2 to 20")
	files, err := parseArgsN(fs, args, 1, 2, "METHOD [RUNS]")
	if err != nil {
		return err
	}
	if *injections < 2 || *injections > 20 {
		return badf("plan: --injections must be 2 to 20 (one scouting run and the verification at least), got %d", *injections)
	}
	m, name, err := loadMethod(files[0])
	if err != nil {
		return err
	}
	if _, err := simulateMethod(m, name); err != nil {
		return err
	}
	var runs *methodfile.Runs
	if len(files) == 2 {
		runs, err = readRuns(files[1], m)
		if err != nil {
			return err
		}
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	p, err := plan.Next(ctx, m, runs, plan.Settings{Optimizer: optimizer.Settings{Seed: *seed}, Injections: *injections})
	if err != nil {
		where := name
		if runs != nil {
			where = files[1]
		}
		return badf("%s: %v", where, strings.TrimPrefix(strings.TrimPrefix(err.Error(), "plan: "), "model: "))
	}
	if err := p.Method.Validate(); err != nil {
		return fmt.Errorf("the planned program breaks an instrument limit (please report this): %v", err)
	}
	runName := ""
	if p.Action != plan.Done {
		runName = p.RunName
	}
	if *asJSON {
		j := planJSON{
			Action: string(p.Action), Program: programToJSON(p.Oven), Carrier: carrierToJSON(p.Carrier),
			Reason: p.Reason, ExpectedMinResolution: finiteOrNil(round(p.ExpectedMinResolution, 3)), ExpectedSD: finiteOrNil(round(p.ExpectedSD, 3)),
			TargetResolution: m.Goal.MinResolution, CriticalPair: []string{}, Optimized: programToJSON(p.Optimized),
			VerifiedBy: p.VerifiedBy, EstimatedFromFormula: append([]string{}, p.Estimated...),
			RetentionTimeSDMin: round(p.RetentionSDMin, 5), RunName: runName,
			Warnings: planWarnings(p), Cautions: append([]string{}, checks.Safety(p.Method)...),
		}
		if p.Action == plan.Inject {
			j.ExpectedSDAfter = finiteOrNil(round(p.SDAfter, 3))
		}
		if p.Action == plan.Done {
			j.MeasuredMinResolution = finiteOrNil(round(p.MeasuredMinResolution, 3))
		}
		if p.CriticalPair[0] != "" {
			j.CriticalPair = p.CriticalPair[:]
		}
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(j)
	}
	writePlan(stdout, m, p, runName)
	return nil
}

func writePlan(w io.Writer, m *methodfile.Method, p *plan.Plan, runName string) {
	switch p.Action {
	case plan.Inject:
		fmt.Fprintln(w, "next: INJECT this scouting run")
	case plan.Verify:
		fmt.Fprintln(w, "next: VERIFY the optimized program with one injection")
	default:
		fmt.Fprintln(w, "next: DONE, no further injection")
	}
	fmt.Fprintf(w, "\nwhy: %s\n\n", textsafe.Inert(p.Reason))
	title := "program, as the oven keypad takes it:"
	if p.Action == plan.Done {
		title = "verified program:"
	}
	fmt.Fprintln(w, title)
	for _, l := range plan.KeypadLines(p.Oven, m.Limits) {
		fmt.Fprintf(w, "  %s\n", l)
	}
	fmt.Fprintf(w, "carrier: %s\n", describeCarrier(p.Carrier))
	if !math.IsInf(p.ExpectedMinResolution, 0) && !math.IsNaN(p.ExpectedMinResolution) {
		sd := fmt.Sprintf("± %.2f", p.ExpectedSD)
		if p.ExpectedSD > 10 {
			sd = "± more than 10 (the parameters are only rough)"
		}
		fmt.Fprintf(w, "optimized program: predicted min Rs %.2f %s (target %.2f, %s)\n", p.ExpectedMinResolution, sd, m.Goal.MinResolution,
			textsafe.Inert(strings.Join(p.CriticalPair[:], " / ")))
	}
	if p.Action == plan.Done && len(p.Optimized.Ramps) > 0 && !model.FileProgram(p.Optimized).Equal(model.FileProgram(p.Oven)) &&
		methodfile.ProgramToModel(p.Optimized).RunTime() < 0.98*methodfile.ProgramToModel(p.Oven).RunTime() {
		fmt.Fprintln(w, "a faster program now optimized (verify it too if the time matters):")
		for _, l := range plan.KeypadLines(p.Optimized, m.Limits) {
			fmt.Fprintf(w, "  %s\n", l)
		}
	}
	if len(p.Estimated) > 0 {
		var names []string
		for _, n := range p.Estimated {
			names = append(names, textsafe.Inert(n))
		}
		fmt.Fprintf(w, "estimated from the formula only (rough, about ± 8 kJ/mol in ΔH): %s\n", strings.Join(names, ", "))
	}
	for _, x := range planWarnings(p) {
		fmt.Fprintf(w, "warning: %s\n", textsafe.Inert(x))
	}
	if p.Action != plan.Done {
		fmt.Fprintln(w, "\nonce the run is made, add it to the runs file with the measured times:")
		fmt.Fprint(w, plan.RunBlock(runName, p.Oven, &p.Carrier, m.Limits, p.Compounds))
		fmt.Fprintln(w, "\nThe oven and inlet are hot; never program above the column's maximum temperature.")
	}
	for _, c := range checks.Safety(p.Method) {
		fmt.Fprintf(w, "caution: %s\n", textsafe.Inert(c))
	}
}

// planWarnings are the warnings of the fit of the runs the plan rests on
// (empty without runs).
func planWarnings(p *plan.Plan) []string {
	out := []string{}
	if p.Fit != nil {
		for _, w := range p.Fit.Warnings {
			// the fit leaves such a compound as it was; the planner
			// does not: it updates it from that one run, the method's
			// value as the prior
			if strings.HasSuffix(w, ": seen in one run only; parameters not fitted") {
				w += " (plan updates them from that run, with the method's values as the prior)"
			}
			out = append(out, w)
		}
	}
	return out
}

func describeCarrier(c methodfile.Carrier) string {
	if c.Mode == model.ConstantPressure {
		return fmt.Sprintf("%s, constant pressure %.1f kPa", c.Gas, c.InletKPa)
	}
	return fmt.Sprintf("%s, constant flow %.2f mL/min", c.Gas, c.FlowMLMin)
}
