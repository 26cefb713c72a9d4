package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
)

const fitHelp = `Usage: rampwise fit METHOD RUNS [--out FILE] [--json] [--with-dcp] [--add-unknown]

Calibrates the method's compounds from scouting runs: for each compound seen
in at least two runs, ΔH and ΔS (and with --with-dcp ΔCp, for a compound
seen in four runs or more: from three, three parameters would leave no
residual to judge them by, so ΔCp keeps the method's value and a warning
says so) by least squares on the measured retention times through the same
retention model simulate uses. With measured holdup times in the runs, the
column's effective internal diameter is calibrated first (on a packed
column its particle size, which sets the bed's permeability; the phase ratio
then follows from the diameter of an open tube and is the given one of a
packed column, since it cannot be told apart from ΔS); with measured
half-height widths, the plate-height factor.

A run gives its times in [run.retention_min], or names a data-system export:
peaks = "FILE" (a peak table: comma, semicolon or tab separated, decimal
point or comma, minutes or seconds, detected; [run.columns] settles what
cannot be detected) or chromatogram = "FILE" (AIA/ANDI netCDF; without a
peak table in the file the peaks are found in the trace). Unnamed peaks are
assigned to the method's compounds by their predicted retention (minimum
total cost, alternating with the fit until stable), each with a confidence.

The fit distrusts bad data: a measurement far from what the other runs
predict is flagged (run, compound, predicted time) and left out; with one
run more than parameters, when no run can be singled out, the runs are named
("cannot tell which run is wrong") and none is left out; parameters off the
ΔH–ΔS trend of the other compounds are warned as implausible; a value
outside the method file's ranges is never written (warned); a large ± is
marked ⚠ and warned (the thresholds the UI uses, printed under the
table); a name the
method lacks never becomes a target: a near miss of a method name ("tolune")
is reported with the suggestion and left out (in a peak table: treated as
unnamed), other names are added as non-targets. Standard errors (±) use the
residual variance pooled over all compounds, with Σ(runs − parameters)
degrees of freedom. A residual trend with temperature that an unfitted ΔCp
leaves is reported. --out writes dH_se_kJ_mol, dS_se_J_mol_K and dH_dS_corr
(for a compound whose ΔH is held: ΔH's is goal.robust.prior_dH_kJ_mol, ΔS's
widened along the ΔH–ΔS ridge that keeps the measured times).

Flags:
`

type fitCompoundJSON struct {
	Name      string             `json:"name"`
	DH        float64            `json:"dH_kJ_mol"`
	DS        float64            `json:"dS_J_mol_K"`
	DCp       float64            `json:"dCp_J_mol_K"`
	StdErrDH  *float64           `json:"stderr_dH_kJ_mol"`
	StdErrDS  *float64           `json:"stderr_dS_J_mol_K"`
	StdErrDCp *float64           `json:"stderr_dCp_J_mol_K,omitempty"`
	Corr      *float64           `json:"corr_dH_dS,omitempty"`
	Runs      int                `json:"runs"`
	RMS       float64            `json:"rms_residual_min"`
	Max       float64            `json:"max_residual_min"`
	Residuals map[string]float64 `json:"residuals_min"`
	Added     bool               `json:"added"`
	// NotWritten: outside the method file's ranges, not saved (warned).
	NotWritten bool `json:"not_written,omitempty"`
	LargeError bool `json:"large_error,omitempty"`
	// HeldDH: ΔH held (not separable from ΔS); its ± is the method's prior.
	HeldDH bool `json:"dH_held,omitempty"`
}

type fitJSON struct {
	Compounds []fitCompoundJSON `json:"compounds"`
	Column    struct {
		Diameter    float64  `json:"diameter_mm"`
		PlateHeight float64  `json:"plate_height_factor"`
		Particle    *float64 `json:"particle_um,omitempty"`
		PhaseRatio  float64  `json:"phase_ratio"`
	} `json:"column"`
	Warnings    []string         `json:"warnings"`
	Notes       []string         `json:"notes"`
	ResidualSD  float64          `json:"residual_sd_min"`
	DOF         int              `json:"residual_dof"`
	SDAssumed   bool             `json:"residual_sd_assumed"`
	Assignments []assignmentJSON `json:"assignments"`
	Outliers    []outlierJSON    `json:"outliers"`
	// Suspects: runs that disagree where the data cannot tell which is wrong.
	Suspects []suspectJSON `json:"unplaced_errors"`
}

type suspectJSON struct {
	Compound    string   `json:"compound"`
	Runs        []string `json:"runs"`
	Studentized float64  `json:"studentized_residual"`
}

type assignmentJSON struct {
	Run        string  `json:"run"`
	Compound   string  `json:"compound"`
	Measured   float64 `json:"measured_min"`
	Predicted  float64 `json:"predicted_min"`
	Confidence float64 `json:"confidence"`
}

type outlierJSON struct {
	Run         string  `json:"run"`
	Compound    string  `json:"compound"`
	Measured    float64 `json:"measured_min"`
	Predicted   float64 `json:"predicted_min"`
	Studentized float64 `json:"studentized_residual"`
	Excluded    bool    `json:"excluded"`
}

func runFit(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("fit", fitHelp, stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON")
	out := fs.String("out", "", "write the method with the fitted values to this `file` (atomically)")
	withDCp := fs.Bool("with-dcp", false, "also fit ΔCp (for compounds seen in at least four runs)")
	addUnknown := fs.Bool("add-unknown", false, "add names close to a method name too (as non-targets) instead of leaving them out")
	files, err := parseArgsN(fs, args, 2, 2, "METHOD RUNS")
	if err != nil {
		return err
	}
	if err := checkWritable(*out); err != nil {
		return err
	}
	m, _, err := loadMethod(files[0])
	if err != nil {
		return err
	}
	runs, err := readRuns(files[1], m)
	if err != nil {
		return err
	}
	rep, err := calibrate.Fit(m, runs, calibrate.Options{WithDCp: *withDCp, AddUnknown: *addUnknown})
	if err != nil {
		return badf("%s: %v", files[1], err)
	}
	// fitted values at the decimals the file keeps (the UI's fit saves
	// the same), never 16 digits
	methodfile.RoundFitted(rep.Method)
	if *out != "" {
		if err := saveFitted(*out, rep.Method, func() error { return saveMethodOut(*out, files[0], rep.Method) }); err != nil {
			return err
		}
	}
	if *asJSON {
		j := fitJSON{Compounds: []fitCompoundJSON{}, Warnings: append([]string{}, rep.Warnings...), Notes: append([]string{}, rep.Notes...),
			ResidualSD: rep.ResidualSDMin, DOF: rep.DOF, SDAssumed: rep.SDAssumed,
			Assignments: []assignmentJSON{}, Outliers: []outlierJSON{}, Suspects: []suspectJSON{}}
		for _, x := range rep.Suspects {
			j.Suspects = append(j.Suspects, suspectJSON{x.Compound, append([]string{}, x.Runs...), x.Studentized})
		}
		for _, c := range rep.Compounds {
			j.Compounds = append(j.Compounds, fitCompoundJSON{
				Name: c.Name, DH: c.DHkJ, DS: c.DS, DCp: c.DCp,
				StdErrDH: finiteOrNil(c.StdErrDH), StdErrDS: finiteOrNil(c.StdErrDS), StdErrDCp: finiteOrNil(c.StdErrDCp),
				Corr: finiteOrNil(c.CorrDHDS),
				Runs: c.Runs, RMS: c.RMS, Max: c.Max, Residuals: c.Residuals, Added: c.Added,
				NotWritten: c.NotWritten, LargeError: c.LargeError(), HeldDH: c.HeldDH,
			})
		}
		for _, a := range rep.Assignments {
			j.Assignments = append(j.Assignments, assignmentJSON{a.Run, a.Compound, a.MeasuredMin, a.PredictedMin, a.Confidence})
		}
		for _, o := range rep.Outliers {
			j.Outliers = append(j.Outliers, outlierJSON{o.Run, o.Compound, o.MeasuredMin, o.PredictedMin, o.Studentized, o.Excluded})
		}
		j.Column.Diameter, j.Column.PlateHeight, j.Column.PhaseRatio = rep.DiameterMM, rep.PlateHeightFactor, rep.PhaseRatio
		if m.Column.Kind == model.Packed {
			j.Column.Particle = &rep.ParticleUM
		}
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(j)
	}
	if len(rep.Assignments) > 0 {
		tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
		fmt.Fprintln(tw, "run\tpeak min\tassigned to\tpredicted min\tconfidence\t")
		for _, a := range rep.Assignments {
			fmt.Fprintf(tw, "%s\t%.4f\t%s\t%.4f\t%.2f\t\n", textsafe.Inert(a.Run), a.MeasuredMin, textsafe.Inert(a.Compound), a.PredictedMin, a.Confidence)
		}
		tw.Flush()
		fmt.Fprintln(stdout)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "compound\tΔH %s\t±\tΔS %s\t±\tΔCp\t±\truns\trms min\tmax min\t\n", format.UnitDH, format.UnitDS)
	marked := false
	for _, c := range rep.Compounds {
		mark := ""
		switch {
		case c.NotWritten:
			mark, marked = "  ✗ not written", true
		case c.HeldDH:
			mark, marked = "  ΔH held", true
		case c.LargeError():
			mark, marked = "  ⚠ large ±", true
		}
		fmt.Fprintf(tw, "%s\t%.2f\t%s\t%.2f\t%s\t%.1f\t%s\t%d\t%.4f\t%.4f\t%s\n", textsafe.Inert(c.Name), c.DHkJ, fmtErr(c.StdErrDH), c.DS, fmtErr(c.StdErrDS), c.DCp, fmtErr(c.StdErrDCp), c.Runs, c.RMS, c.Max, mark)
	}
	tw.Flush()
	if marked {
		fmt.Fprintf(stdout, "\n⚠ large ±: a standard error over %g %s (ΔH) or %g %s (ΔS); ✗ not written: outside the method file's ranges, the method keeps its values; ΔH held: the runs cannot tell ΔH from ΔS, ΔH's ± is goal.robust.prior_dH_kJ_mol and ΔS's is widened to match (these are written)\n", calibrate.LargeSEDHkJ, format.UnitDH, calibrate.LargeSEDS, format.UnitDS)
	}
	how := fmt.Sprintf("pooled over the compounds: %.4f min with %d degrees of freedom", rep.ResidualSDMin, rep.DOF)
	if rep.SDAssumed {
		how = fmt.Sprintf("no degrees of freedom left: the method's retention_time_sd_min %.4f min assumed", rep.ResidualSDMin)
	}
	fmt.Fprintf(stdout, "\n± is one standard error; residual SD %s\n", how)
	if m.Column.Kind == model.Packed {
		fmt.Fprintf(stdout, "\nparticle size %.2f µm%s · phase ratio %.4g (given) · plate-height factor %.3f%s\n", rep.ParticleUM, fitted(rep.ParticleFitted), rep.PhaseRatio, rep.PlateHeightFactor, fitted(rep.PlateFitted))
	} else {
		fmt.Fprintf(stdout, "\ncolumn diameter %.4f mm%s · phase ratio %.4g · plate-height factor %.3f%s\n", rep.DiameterMM, fitted(rep.DiameterFitted), rep.PhaseRatio, rep.PlateHeightFactor, fitted(rep.PlateFitted))
	}
	for _, w := range rep.Warnings {
		fmt.Fprintf(stdout, "warning: %s\n", textsafe.Inert(w))
	}
	for _, n := range rep.Notes {
		fmt.Fprintf(stdout, "note: %s\n", textsafe.Inert(n))
	}
	if *out != "" {
		fmt.Fprintf(stdout, "saved the method with the fitted values to %s\n", textsafe.Inert(*out))
	}
	return nil
}

// saveFitted saves a fitted method to the user's --out path with save. The
// fit never writes a value the method file refuses (it warns instead);
// should the fitted method still not validate, it refuses before touching
// the file, naming the user's path, not a line of text never written. Any
// failure is bad input (exit 2) naming the path.
func saveFitted(out string, m *methodfile.Method, save func() error) error {
	if err := m.Validate(); err != nil {
		what := err.Error()
		var fe *methodfile.Error
		if errors.As(err, &fe) {
			what = fe.Key + ": " + fe.Msg
		}
		return badf("--out %s: not saved: the fitted method would not be valid (%s)", out, what)
	}
	if err := save(); err != nil {
		if strings.Contains(err.Error(), out) {
			return bad(err)
		}
		return badf("--out %s: not saved: %v", out, err)
	}
	return nil
}

func fitted(b bool) string {
	if b {
		return " (fitted)"
	}
	return " (as in the method)"
}

func fmtErr(x float64) string {
	if math.IsNaN(x) {
		return "-"
	}
	return fmt.Sprintf("%.2f", x)
}

const indexHelp = `Usage: rampwise index METHOD [--isothermal-c T] [--json]

Retention indices of the method's compounds against its ladder n-alkanes
(compounds with alkane_carbons): programmed indices (van den Dool & Kratz)
under the method's oven program, or with --isothermal-c isothermal Kováts
indices at T °C. Compounds outside the ladder get no index. A compound given
only by retention_index has its ln K interpolated between the two ladder
alkanes that bracket it, so it keeps its index at every temperature.

Flags:
`

type indexJSON struct {
	Mode        string           `json:"mode"`
	Temperature *float64         `json:"temperature_c,omitempty"`
	Indices     []indexEntryJSON `json:"indices"`
}

type indexEntryJSON struct {
	Name  string   `json:"name"`
	Index *float64 `json:"index"`
	Given *float64 `json:"given_index,omitempty"`
	From  string   `json:"parameters"`
}

func runIndex(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("index", indexHelp, stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON")
	iso := fs.Float64("isothermal-c", math.NaN(), "compute isothermal Kováts indices at this temperature (°C)")
	files, err := parseArgsN(fs, args, 1, 1, "METHOD")
	if err != nil {
		return err
	}
	m, name, err := loadMethod(files[0])
	if err != nil {
		return err
	}
	s, err := simulateMethod(m, name)
	if err != nil {
		return err
	}
	kovats := !math.IsNaN(*iso)
	if kovats && (*iso < -100 || *iso > m.Column.MaxTempC) {
		return badf("index: --isothermal-c %g is outside −100 °C .. the column maximum %g °C", *iso, m.Column.MaxTempC)
	}
	var ladder []model.LadderPoint
	retention := make([]float64, len(m.Compounds))
	for i := range m.Compounds {
		if kovats {
			retention[i] = s.System.Cond.RetentionFactor(&s.System.Compounds[i], *iso+model.ZeroCelsius)
		}
	}
	for _, pk := range s.Result.Peaks {
		if !kovats {
			retention[pk.Compound] = pk.RetentionTime
		}
	}
	for i, c := range m.Compounds {
		if c.AlkaneCarbons > 0 && !c.FromIndex {
			ladder = append(ladder, model.LadderPoint{Carbons: c.AlkaneCarbons, Retention: retention[i]})
		}
	}
	if len(ladder) < 2 {
		return badf("%s: retention indices need at least two ladder alkanes (alkane_carbons)", files[0])
	}
	sort.Slice(ladder, func(a, b int) bool { return ladder[a].Carbons < ladder[b].Carbons })
	out := indexJSON{Mode: "programmed", Indices: []indexEntryJSON{}}
	if kovats {
		out.Mode = "isothermal"
		out.Temperature = iso
	}
	for i, c := range m.Compounds {
		e := indexEntryJSON{Name: c.Name, From: "entered"}
		if c.FromIndex {
			e.From = "from retention index (ln K between the bracketing ladder alkanes)"
		}
		if c.RetentionIndex > 0 {
			g := c.RetentionIndex
			e.Given = &g
		}
		if v, err := model.IndexFromLadder(retention[i], ladder, kovats); err == nil {
			e.Index = &v
		}
		out.Indices = append(out.Indices, e)
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(out)
	}
	if kovats {
		fmt.Fprintf(stdout, "Kováts retention indices at %g °C (isothermal)\n\n", *iso)
	} else {
		fmt.Fprintf(stdout, "programmed retention indices (van den Dool & Kratz) under %s\n\n", describeProgram(m.Oven))
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "compound\tindex\tgiven\tparameters\t")
	for _, e := range out.Indices {
		idx, given := "outside the ladder", ""
		if e.Index != nil {
			idx = fmt.Sprintf("%.1f", *e.Index)
		}
		if e.Given != nil {
			given = fmt.Sprintf("%.1f", *e.Given)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t\n", textsafe.Inert(e.Name), idx, given, textsafe.Inert(e.From))
	}
	tw.Flush()
	fmt.Fprintln(stdout, "\nCompounds given by retention index have ln K interpolated between the bracketing ladder alkanes (their index taken as independent of temperature): an assumption, refine them with fit when runs exist.")
	return nil
}
