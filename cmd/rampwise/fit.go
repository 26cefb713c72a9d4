package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"text/tabwriter"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
)

const fitHelp = `Usage: rampwise fit METHOD RUNS [--out FILE] [--json] [--with-dcp]

Calibrates the method's compounds from scouting runs: for each compound seen
in at least two runs, ΔH and ΔS (and with --with-dcp ΔCp, from three runs or
more) by least squares on the measured retention times through the same
retention model simulate uses. With measured holdup times in the runs, the
column's effective internal diameter is calibrated first (on a packed
column its particle size, which sets the bed's permeability; the phase ratio
then follows from the diameter of an open tube and is the given one of a
packed column, since it cannot be told apart from ΔS); with measured
half-height widths, the plate-height factor. Reports standard errors and the
residual of every run, and warns about compounds seen once, runs too similar
to separate ΔH from ΔS, and residuals that suggest a misassigned peak.

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
	Runs      int                `json:"runs"`
	RMS       float64            `json:"rms_residual_min"`
	Max       float64            `json:"max_residual_min"`
	Residuals map[string]float64 `json:"residuals_min"`
	Added     bool               `json:"added"`
}

type fitJSON struct {
	Compounds []fitCompoundJSON `json:"compounds"`
	Column    struct {
		Diameter    float64  `json:"diameter_mm"`
		PlateHeight float64  `json:"plate_height_factor"`
		Particle    *float64 `json:"particle_um,omitempty"`
		PhaseRatio  float64  `json:"phase_ratio"`
	} `json:"column"`
	Warnings []string `json:"warnings"`
}

func runFit(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("fit", fitHelp, stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON")
	out := fs.String("out", "", "write the method with the fitted values to this `file` (atomically)")
	withDCp := fs.Bool("with-dcp", false, "also fit ΔCp (needs at least three runs)")
	files, err := parseArgsN(fs, args, 2, 2, "METHOD RUNS")
	if err != nil {
		return err
	}
	m, _, err := loadMethod(files[0])
	if err != nil {
		return err
	}
	runs, err := methodfile.ReadRuns(files[1], m)
	if err != nil {
		return err
	}
	rep, err := calibrate.Fit(m, runs, calibrate.Options{WithDCp: *withDCp})
	if err != nil {
		return badf("%s: %v", files[1], err)
	}
	if *out != "" {
		if err := saveMethodOut(*out, files[0], rep.Method); err != nil {
			return err
		}
	}
	if *asJSON {
		j := fitJSON{Compounds: []fitCompoundJSON{}, Warnings: append([]string{}, rep.Warnings...)}
		for _, c := range rep.Compounds {
			j.Compounds = append(j.Compounds, fitCompoundJSON{
				Name: c.Name, DH: c.DHkJ, DS: c.DS, DCp: c.DCp,
				StdErrDH: finiteOrNil(c.StdErrDH), StdErrDS: finiteOrNil(c.StdErrDS), StdErrDCp: finiteOrNil(c.StdErrDCp),
				Runs: c.Runs, RMS: c.RMS, Max: c.Max, Residuals: c.Residuals, Added: c.Added,
			})
		}
		j.Column.Diameter, j.Column.PlateHeight, j.Column.PhaseRatio = rep.DiameterMM, rep.PlateHeightFactor, rep.PhaseRatio
		if m.Column.Kind == "packed" {
			j.Column.Particle = &rep.ParticleUM
		}
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(j)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "compound\tΔH %s\t±\tΔS %s\t±\tΔCp\truns\trms min\tmax min\t\n", format.UnitDH, format.UnitDS)
	for _, c := range rep.Compounds {
		fmt.Fprintf(tw, "%s\t%.2f\t%s\t%.2f\t%s\t%.1f\t%d\t%.4f\t%.4f\t\n", textsafe.Inert(c.Name), c.DHkJ, fmtErr(c.StdErrDH), c.DS, fmtErr(c.StdErrDS), c.DCp, c.Runs, c.RMS, c.Max)
	}
	tw.Flush()
	if m.Column.Kind == "packed" {
		fmt.Fprintf(stdout, "\nparticle size %.2f µm%s · phase ratio %.4g (given) · plate-height factor %.3f%s\n", rep.ParticleUM, fitted(rep.ParticleFitted), rep.PhaseRatio, rep.PlateHeightFactor, fitted(rep.PlateFitted))
	} else {
		fmt.Fprintf(stdout, "\ncolumn diameter %.4f mm%s · phase ratio %.4g · plate-height factor %.3f%s\n", rep.DiameterMM, fitted(rep.DiameterFitted), rep.PhaseRatio, rep.PlateHeightFactor, fitted(rep.PlateFitted))
	}
	for _, w := range rep.Warnings {
		fmt.Fprintf(stdout, "warning: %s\n", textsafe.Inert(w))
	}
	if *out != "" {
		fmt.Fprintf(stdout, "saved the method with the fitted values to %s\n", textsafe.Inert(*out))
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
only by retention_index is modelled as the virtual n-alkane of that carbon
number (ΔH, ΔS linear in carbon number across the ladder).

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
			retention[i] = s.sys.Cond.RetentionFactor(&s.sys.Compounds[i], *iso+model.ZeroCelsius)
		}
	}
	for _, pk := range s.res.Peaks {
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
			e.From = "from retention index (virtual n-alkane)"
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
	fmt.Fprintln(stdout, "\nCompounds given by retention index are modelled as the virtual n-alkane of that carbon number: an assumption, refine them with fit when runs exist.")
	return nil
}
