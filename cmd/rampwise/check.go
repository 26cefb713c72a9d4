package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"
	"text/tabwriter"

	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
)

const checkHelp = `Usage: rampwise check METHOD RUN [--json] [--refit [--runs RUNS] [--out FILE]]

Compares a measured run of the method's program with the method's
prediction: per compound the retention-time difference (measured −
predicted), the resolution of every predicted adjacent pair as measured
(from the measured half-height widths, or the predicted ones when the run
has none), and whether the target resolution holds in the measured run:
every target found and every counted pair at or above goal.min_resolution.

RUN is a peak table (CSV, semicolon or tab separated), an AIA/ANDI
chromatogram (.cdf, .nc), or a scouting runs file whose last run is the one
checked (a peak table or chromatogram is taken as run with the method's own
program and carrier). Unnamed peaks are assigned as fit assigns them.

--refit adds the run to the fit: with a runs file, all its runs are fitted
again; with a single table, the scouting runs of --runs RUNS and this run.
--out FILE writes the refitted method.

Exit codes: 0 the target holds in the measured run, 3 it does not, 2 bad input.

Flags:
`

type checkCompoundJSON struct {
	Name      string   `json:"name"`
	Predicted float64  `json:"predicted_min"`
	Measured  *float64 `json:"measured_min"`
	Delta     *float64 `json:"delta_min"`
	Target    bool     `json:"target"`
	Assigned  bool     `json:"assigned"`
}

type checkPairJSON struct {
	First           string   `json:"first"`
	Second          string   `json:"second"`
	Predicted       float64  `json:"predicted_resolution"`
	Measured        *float64 `json:"measured_resolution"`
	Counts          bool     `json:"counts"`
	WidthsPredicted bool     `json:"widths_predicted"`
}

type checkJSON struct {
	Run            string              `json:"run"`
	Compounds      []checkCompoundJSON `json:"compounds"`
	Pairs          []checkPairJSON     `json:"pairs"`
	MinResolution  *float64            `json:"min_resolution_measured"`
	CriticalPair   []string            `json:"critical_pair"`
	Target         float64             `json:"target_resolution"`
	MissingTargets []string            `json:"missing_targets"`
	Met            bool                `json:"met"`
	Warnings       []string            `json:"warnings"`
	Notes          []string            `json:"notes"`
}

func runCheck(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("check", checkHelp, stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON")
	refit := fs.Bool("refit", false, "add the run to the fit and refit")
	runsFile := fs.String("runs", "", "with --refit and a single table: the scouting runs `file` to add it to")
	out := fs.String("out", "", "with --refit: write the refitted method to this `file` (atomically)")
	files, err := parseArgsN(fs, args, 2, 2, "METHOD RUN")
	if err != nil {
		return err
	}
	if (*runsFile != "" || *out != "") && !*refit {
		return badf("check: --runs and --out go with --refit")
	}
	if err := checkWritable(*out); err != nil {
		return err
	}
	m, _, err := loadMethod(files[0]) // - and @demo as every command reads them
	if err != nil {
		return err
	}
	run, all, err := readVerificationRun(m, files[1])
	if err != nil {
		return err
	}
	ck, err := calibrate.Verify(m, run)
	if err != nil {
		return badf("%s: %v", files[1], err)
	}
	var rep *calibrate.Report
	if *refit {
		switch {
		case all != nil && *runsFile != "":
			return badf("check: RUN is already a runs file; --runs is for a single table")
		case all == nil && *runsFile == "":
			return badf("check: --refit with a single table needs --runs RUNS (the scouting runs to add it to)")
		case all == nil:
			if all, err = methodfile.ReadRuns(*runsFile, m); err != nil {
				return err
			}
			all.AddRun(*run)
		}
		if rep, err = calibrate.Fit(m, all, calibrate.Options{}); err != nil {
			return badf("%s: %v", files[1], err)
		}
		methodfile.RoundFitted(rep.Method) // as fit --out saves them
		if *out != "" {
			if err := saveFitted(*out, rep.Method, func() error { return methodfile.WriteFile(*out, rep.Method) }); err != nil {
				return err
			}
		}
	}
	if *asJSON {
		j := checkJSON{Run: ck.Run.Name, Compounds: []checkCompoundJSON{}, Pairs: []checkPairJSON{}, Target: ck.Target,
			MinResolution: finiteOrNil(ck.MinResolution), MissingTargets: append([]string{}, ck.MissingTargets...), Met: ck.Met,
			Warnings: append([]string{}, ck.Warnings...), Notes: append([]string{}, ck.Notes...)}
		if ck.Critical[0] != "" {
			j.CriticalPair = []string{ck.Critical[0], ck.Critical[1]}
		}
		for _, c := range ck.Compounds {
			j.Compounds = append(j.Compounds, checkCompoundJSON{Name: c.Name, Predicted: c.PredictedMin, Measured: finiteOrNil(c.MeasuredMin), Delta: finiteOrNil(c.DeltaMin), Target: c.Target, Assigned: c.Assigned})
		}
		for _, p := range ck.Pairs {
			j.Pairs = append(j.Pairs, checkPairJSON{First: p.First, Second: p.Second, Predicted: p.Predicted, Measured: finiteOrNil(p.Measured), Counts: p.Counts, WidthsPredicted: p.WidthsPredicted})
		}
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(j); err != nil {
			return err
		}
	} else {
		printCheck(stdout, ck, rep, *out)
	}
	if !ck.Met {
		return exitError{exitNotReached}
	}
	return nil
}

func printCheck(w io.Writer, ck *calibrate.Check, rep *calibrate.Report, out string) {
	fmt.Fprintf(w, "verification run %s against the method's prediction\n\n", textsafe.Inert(ck.Run.Name))
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "compound\tpredicted min\tmeasured min\tΔt min\t\t")
	for _, c := range ck.Compounds {
		meas, d, how := "-", "-", ""
		if !math.IsNaN(c.MeasuredMin) {
			meas, d = fmt.Sprintf("%.4f", c.MeasuredMin), fmt.Sprintf("%+.4f", c.DeltaMin)
		} else if c.Target {
			how = "target not found"
		}
		if c.Assigned {
			how = fmt.Sprintf("assigned (confidence %.2f)", c.AssignedConfidence)
		}
		fmt.Fprintf(tw, "%s\t%.4f\t%s\t%s\t%s\t\n", textsafe.Inert(c.Name), c.PredictedMin, meas, d, how)
	}
	tw.Flush()
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "pair\tRs predicted\tRs measured\t\t")
	for _, p := range ck.Pairs {
		meas, how := "-", ""
		if !math.IsNaN(p.Measured) {
			meas = fmt.Sprintf("%.2f", p.Measured)
		}
		if p.WidthsPredicted && !math.IsNaN(p.Measured) {
			how = "widths predicted"
		}
		if !p.Counts {
			how = strings.TrimSpace(how + " (no target: not counted)")
		}
		fmt.Fprintf(tw, "%s / %s\t%.2f\t%s\t%s\t\n", textsafe.Inert(p.First), textsafe.Inert(p.Second), p.Predicted, meas, how)
	}
	tw.Flush()
	fmt.Fprintln(w)
	for _, x := range ck.Warnings {
		fmt.Fprintf(w, "warning: %s\n", textsafe.Inert(x))
	}
	for _, x := range ck.Notes {
		fmt.Fprintf(w, "note: %s\n", textsafe.Inert(x))
	}
	if len(ck.MissingTargets) > 0 {
		q := make([]string, len(ck.MissingTargets))
		for i, n := range ck.MissingTargets {
			q[i] = textsafe.Inert(n)
		}
		fmt.Fprintf(w, "targets not found in the run: %s\n", strings.Join(q, ", "))
	}
	if math.IsNaN(ck.MinResolution) {
		fmt.Fprintf(w, "no counted pair measured\n")
	} else {
		fmt.Fprintf(w, "measured minimum resolution %.2f (%s / %s), target %.2f\n", ck.MinResolution, textsafe.Inert(ck.Critical[0]), textsafe.Inert(ck.Critical[1]), ck.Target)
	}
	if ck.Met {
		fmt.Fprintln(w, "MET: the target holds in the measured run")
	} else {
		fmt.Fprintln(w, "NOT MET: the target does not hold in the measured run")
	}
	if rep != nil {
		fmt.Fprintf(w, "\nrefitted %d compounds with the run added (residual SD %.4f min, %d degrees of freedom)\n", len(rep.Compounds), rep.ResidualSDMin, rep.DOF)
		for _, x := range rep.Warnings {
			fmt.Fprintf(w, "refit warning: %s\n", textsafe.Inert(x))
		}
		if out != "" {
			fmt.Fprintf(w, "saved the refitted method to %s\n", out)
		}
	}
}

// readVerificationRun reads RUN: a runs file (its last run; all of it is
// returned too), or a peak table or chromatogram as a run of the method's
// program.
func readVerificationRun(m *methodfile.Method, path string) (*methodfile.Run, *methodfile.Runs, error) {
	if strings.EqualFold(filepath.Ext(path), ".toml") {
		all, err := methodfile.ReadRuns(path, m)
		if err != nil {
			return nil, nil, err
		}
		return &all.Runs[len(all.Runs)-1], all, nil
	}
	run, err := methodfile.ReadExportRun(path, m, nil)
	if err != nil {
		return nil, nil, bad(err)
	}
	return run, nil, nil
}
