// Package calibrate turns scouting runs into model parameters: each
// compound's ΔH and ΔS (and optionally ΔCp) by least squares on retention
// times through the forward model, the column's effective diameter from
// measured holdup times (for a packed column, its particle size: the
// permeability of the bed), and the plate-height factor from measured
// widths.
package calibrate

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// Options tune a fit. The zero value fits ΔH and ΔS only.
type Options struct {
	WithDCp bool // also fit ΔCp (needs ≥ 3 runs)
	// AddUnknown adds compounds the method lacks even when their name is
	// close to a method name (a likely misspelling); they are added as
	// non-targets either way, never as targets.
	AddUnknown bool
	// OutlierT is the externally studentized residual beyond which a
	// measurement is flagged and left out of the fit (default 4).
	OutlierT float64
}

// CompoundFit is one compound's result. Energies in kJ/mol, entropies and
// heat capacities in J/(mol·K), times in min.
type CompoundFit struct {
	Name               string
	DHkJ, DS, DCp      float64
	StdErrDH, StdErrDS float64 // NaN when no residual variance is known
	StdErrDCp          float64
	CorrDHDS           float64 // correlation of the ΔH and ΔS estimates
	Runs               int
	RMS, Max           float64 // residuals, min
	Residuals          map[string]float64
	Fitted             bool
	Added              bool // was in the runs, not in the method (added as a non-target)
	// NotWritten: the fitted values are outside the method file's ranges
	// and were not written to the method (a warning says so).
	NotWritten bool
	// HeldDH: ΔH was held (the runs cannot tell it from ΔS); its ± is the
	// method's prior uncertainty, carried into ΔS's.
	HeldDH         bool
	ElutionSpreadC float64
	Condition      float64 // condition number of the scaled normal matrix
	withDCp        bool
}

// Assignment is an unnamed peak given a compound's name.
type Assignment struct {
	Run          string
	Compound     string
	MeasuredMin  float64
	PredictedMin float64 // by the final fit (before it, by the start values)
	// Confidence is the weight of this peak among the compound's
	// candidates (the other peaks and "not in this run") under a Gaussian
	// of the prediction's spread: near 1 when no other peak is close.
	Confidence float64
}

// Outlier is a measurement the fit distrusts.
type Outlier struct {
	Run, Compound string
	MeasuredMin   float64
	PredictedMin  float64 // from the other runs
	Studentized   float64 // externally studentized residual
	Excluded      bool    // left out of the final fit
}

// Suspect is a compound whose runs disagree beyond their noise where the
// data cannot tell which run is wrong (one run more than the fitted
// parameters, and no run's removal clearly more plausible than another's):
// nothing is left out, the runs are named.
type Suspect struct {
	Compound    string
	Runs        []string
	Studentized float64
}

// Report is a whole calibration.
type Report struct {
	Compounds      []CompoundFit
	DiameterMM     float64 // effective internal diameter used
	DiameterFitted bool
	// ParticleUM is the packed column's effective particle size used, fitted
	// from the holdup times in place of the diameter (MODEL.md §10).
	ParticleUM     float64
	ParticleFitted bool
	// PhaseRatio is β of the calibrated column: for an open tube it follows
	// from the fitted diameter (exact annulus), for a packed column it is
	// the given one (holdup times do not tell it; it and ΔS are one
	// parameter, ΔS − R ln β).
	PhaseRatio        float64
	PlateHeightFactor float64
	PlateFitted       bool
	Warnings          []string
	Notes             []string           // information that needs no action (order changes, peaks left over)
	Method            *methodfile.Method // the method with the fitted values
	Assignments       []Assignment
	Outliers          []Outlier
	Suspects          []Suspect
	// ResidualSDMin is the pooled residual standard deviation of the
	// retention times, DOF its degrees of freedom (Σ runs − parameters over
	// the fitted compounds). With DOF 0 the method's
	// goal.robust.retention_time_sd_min is used instead (SDAssumed).
	ResidualSDMin float64
	DOF           int
	SDAssumed     bool
	// Runs holds the runs as fitted: with the assigned names filled in.
	Runs *methodfile.Runs
}

type runSetup struct {
	name string
	cond *model.Conditions
	prog model.Program
	run  *methodfile.Run
	meth *methodfile.Method
}

func setups(m *methodfile.Method, runs *methodfile.Runs) ([]runSetup, error) {
	var out []runSetup
	for i := range runs.Runs {
		r := &runs.Runs[i]
		rm := m.RunMethod(r)
		car, err := rm.ModelCarrier()
		if err != nil {
			return nil, fmt.Errorf("run %q: %v", r.Name, err)
		}
		cond, err := model.NewConditions(rm.ModelColumn(), car)
		if err != nil {
			return nil, fmt.Errorf("run %q: %v", r.Name, err)
		}
		out = append(out, runSetup{name: r.Name, cond: cond, prog: rm.ModelProgram(), run: r, meth: rm})
	}
	return out, nil
}

// Fit calibrates the method against the runs: names are checked against
// the method (an unknown name never becomes a target), unnamed peaks are
// assigned to compounds (alternating with the fit until the assignment is
// stable), each compound is fitted by least squares, a measurement with a
// large studentized residual is flagged and left out, and the standard
// errors use the residual variance pooled over all compounds.
func Fit(m *methodfile.Method, runsIn *methodfile.Runs, opt Options) (*Report, error) {
	if opt.WithDCp && len(runsIn.Runs) < 3 {
		return nil, fmt.Errorf("--with-dcp needs at least 3 scouting runs (and fits ΔCp only for compounds seen in 4 or more, so that a residual degree of freedom is left); the runs file has %d", len(runsIn.Runs))
	}
	if opt.OutlierT <= 0 {
		opt.OutlierT = 4
	}
	runs := runsIn.CloneRuns()
	rep := &Report{DiameterMM: m.Column.DiameterMM, PlateHeightFactor: m.Column.PlateHeight, Runs: runs}
	out := m.Clone()

	// 1. effective diameter from holdup times
	var withHoldup []int
	for i, r := range runs.Runs {
		if r.HasHoldup {
			withHoldup = append(withHoldup, i)
		}
	}
	rep.ParticleUM = m.Column.ParticleUM
	if len(withHoldup) > 0 && out.Column.Kind == model.Packed {
		dp, err := fitParticle(out, runs, withHoldup)
		if err != nil {
			return nil, err
		}
		out.Column.ParticleUM = dp
		rep.ParticleUM, rep.ParticleFitted = dp, true
		if w := dimensionWarning("particle size", "µm", dp, m.Column.ParticleUM); w != "" {
			rep.Warnings = append(rep.Warnings, w)
		}
	} else if len(withHoldup) > 0 {
		d, err := fitDiameter(out, runs, withHoldup)
		if err != nil {
			return nil, err
		}
		out.Column.DiameterMM = d
		rep.DiameterMM, rep.DiameterFitted = d, true
		if w := dimensionWarning("column diameter", "mm", d, m.Column.DiameterMM); w != "" {
			rep.Warnings = append(rep.Warnings, w)
		}
	}
	rep.PhaseRatio = out.ModelColumn().PhaseRatio()
	st, err := setups(out, runs)
	if err != nil {
		return nil, err
	}

	// 2. names the method lacks
	rep.Warnings = append(rep.Warnings, checkNames(out, runs, opt, "the fit")...)

	// 3. assignment of unnamed peaks, alternating with the fit
	start := out.Clone()
	if hasUnnamed(runs) {
		if err := assignLoop(out, start, st, runs, opt, rep); err != nil {
			return nil, err
		}
	}

	// 4. the fit, outliers left out, pooled errors
	fits, err := fitAll(out, st, runs, opt, nil, &rep.Warnings)
	if err != nil {
		return nil, err
	}
	pool(fits, out, rep)
	excluded := map[obsKey]bool{}
	for round := 0; round < 3; round++ {
		o, sus := findOutliers(fits, st, start, rep, opt)
		for _, x := range sus {
			dup := false
			for _, y := range rep.Suspects {
				dup = dup || y.Compound == x.Compound
			}
			if !dup {
				rep.Suspects = append(rep.Suspects, x)
			}
		}
		if len(o) == 0 {
			break
		}
		any := false
		for _, x := range o {
			k := obsKey{x.Run, x.Compound}
			if !excluded[k] && x.Excluded {
				excluded[k] = true
				any = true
			}
			rep.Outliers = append(rep.Outliers, x)
		}
		if !any {
			break
		}
		var w []string
		if fits, err = fitAll(out, st, runs, opt, excluded, &w); err != nil {
			return nil, err
		}
		pool(fits, out, rep)
	}
	for _, x := range rep.Outliers {
		left := "kept in the fit (too few other runs to leave it out)"
		if x.Excluded {
			left = "left out of the fit"
		}
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: run %q measured %.3f min but the other runs predict %.3f min (studentized residual %.1f): likely a misassigned or mistyped peak; %s", x.Compound, x.Run, x.MeasuredMin, x.PredictedMin, x.Studentized, left))
	}
	for _, x := range rep.Suspects {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: the runs %s disagree beyond their noise (studentized residual %.1f): one of them is likely a misassigned or mistyped peak, but with one run more than the fitted parameters any two fit exactly and no choice gives clearly more plausible parameters: cannot tell which run is wrong; all kept in the fit, so its values are suspect; check the peaks or add a run", x.Compound, quoteList(x.Runs), x.Studentized))
	}
	implausible := trendWarnings(fits)
	for _, f := range fits {
		cf := f.CompoundFit
		if w, ok := implausible[cf.Name]; ok {
			rep.Warnings = append(rep.Warnings, w)
		}
		if f.onlyDS {
			w := fmt.Sprintf("%s: elutes too close to the holdup time to tell ΔH from ΔS; ΔH held at the homologous rule's −(9 + 4.9 n) kJ/mol = %.2f kJ/mol with n = %.2f, the (fractional) carbon number at which the rule's ΔH and ΔS reproduce run %q's time; then ΔS alone fitted to all runs (%.2f J/(mol·K), the rule's would be %.2f)", cf.Name, cf.DHkJ, f.ruleN, st[f.ruleRun].name, cf.DS, -(44 + 6.0*f.ruleN))
			// The held ΔH has no standard error from the runs: it gets the
			// uncertainty of a value not measured (goal.robust
			// prior_dH_kJ_mol), carried into ΔS along the ridge that keeps
			// the measured times; what is shown is what --out writes.
			if sH := out.Goal.Robust.PriorDHkJ; finite(cf.StdErrDS) && sH > 0 {
				given := cf.StdErrDS
				sS := math.Hypot(given, f.ridgeSlope*sH)
				cf.StdErrDH, cf.StdErrDS, cf.CorrDHDS, cf.HeldDH = sH, sS, f.ridgeSlope*sH/sS, true
				w += fmt.Sprintf("; its errors: ΔH ± %s kJ/mol (the held value's uncertainty, goal.robust.prior_dH_kJ_mol), ΔS ± %s J/(mol·K) (± %.2f with ΔH fixed, widened along the ΔH–ΔS ridge that keeps the measured times), correlation %.3f: written with --out", SEText(sH), SEText(sS), given, cf.CorrDHDS)
			}
			rep.Warnings = append(rep.Warnings, w)
		}
		if !f.onlyDS && (cf.ElutionSpreadC < 3 || cf.Condition > 1e10) {
			rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: the runs elute it at nearly the same temperature (spread %.1f °C): too similar to separate ΔH from ΔS reliably (ill-conditioned); add a run with a clearly different ramp rate", cf.Name, cf.ElutionSpreadC))
		}
		ci := compoundIndex(out, cf.Name)
		if ci < 0 {
			cf.Added = true
			rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: in the runs but not in the method; added as a non-target with the fitted parameters (make it a target in the method if it is one)", cf.Name))
			out.Compounds = append(out.Compounds, methodfile.Compound{Name: cf.Name, RefTempC: 100, Amount: 1, Target: false})
			ci = len(out.Compounds) - 1
		}
		c := &out.Compounds[ci]
		prev := *c
		c.DHkJ, c.DS, c.DCp, c.RefTempC, c.FromIndex = cf.DHkJ, cf.DS, cf.DCp, 100, false
		c.FromFormula = false
		c.HasSE = false
		// A fitted value outside what a method file accepts is never
		// written: the method keeps the compound as it was (an added
		// compound is not added).
		if err := out.ValidateKey(fmt.Sprintf("compound[%d].dH_kJ_mol", ci+1)); err != nil {
			cf.NotWritten = true
			what := err.Error()
			var fe *methodfile.Error
			if errors.As(err, &fe) {
				what = strings.TrimPrefix(fe.Key, fmt.Sprintf("compound[%d].", ci+1)) + " " + fe.Msg
			}
			if cf.Added {
				out.Compounds = out.Compounds[:ci]
				rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: the fitted values are outside what a method file allows (%s): not added to the method; the runs do not determine it", cf.Name, what))
			} else {
				*c = prev
				rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: the fitted values are outside what a method file allows (%s): not written; the method keeps ΔH %.2f kJ/mol, ΔS %.2f J/(mol·K), ΔCp %.1f J/(mol·K)", cf.Name, what, prev.DHkJ, prev.DS, prev.DCp))
			}
			rep.Compounds = append(rep.Compounds, cf)
			continue
		}
		if finite(cf.StdErrDH) && finite(cf.StdErrDS) && (cf.StdErrDH > 500 || cf.StdErrDS > 1000) {
			rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: standard errors ±%.3g kJ/mol, ±%.3g J/(mol·K): the runs hardly determine it; errors not written to the method", cf.Name, cf.StdErrDH, cf.StdErrDS))
		} else if finite(cf.StdErrDH) && finite(cf.StdErrDS) {
			if cf.LargeError() && !cf.HeldDH {
				rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: large standard errors ±%s kJ/mol on ΔH, ±%s J/(mol·K) on ΔS (large: over %g kJ/mol or %g J/(mol·K)): the runs determine it poorly; predictions away from the scouted programs are uncertain; add a run with a clearly different ramp or starting temperature", cf.Name, SEText(cf.StdErrDH), SEText(cf.StdErrDS), LargeSEDHkJ, LargeSEDS))
			}
			c.DHSE, c.DSSE, c.DHDSCorr, c.HasSE = RoundSE(cf.StdErrDH), RoundSE(cf.StdErrDS), math.Round(cf.CorrDHDS*1e6)/1e6, true
		}
		rep.Compounds = append(rep.Compounds, cf)
	}
	if !opt.WithDCp {
		if w := dcpTrend(fits, st, rep); w != "" {
			rep.Warnings = append(rep.Warnings, w)
		}
	}
	orderChecks(out, st, runs, rep)

	// 5. plate-height factor from widths
	if phi, ok, err := fitPlateHeight(out, runs); err != nil {
		return nil, err
	} else if ok {
		out.Column.PlateHeight = phi
		rep.PlateHeightFactor, rep.PlateFitted = phi, true
		if w := plateHeightWarning(phi); w != "" {
			if far(phi, m.Column.PlateHeight) {
				w += "; " + otherSetupHint
			}
			rep.Warnings = append(rep.Warnings, w)
		} else if w := dimensionWarning("plate-height factor", "", phi, m.Column.PlateHeight); w != "" {
			rep.Warnings = append(rep.Warnings, w)
		}
	}
	rep.Method = out
	return rep, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// roundSig rounds to d significant digits (the file keeps what matters).
// SESigDigits is how many significant digits a standard error is saved
// with (dH_se_kJ_mol, dS_se_J_mol_K).
const SESigDigits = 3

// RoundSE is a standard error as the method file saves it.
func RoundSE(x float64) float64 { return roundSig(x, SESigDigits) }

// SEText is a standard error as it is saved, written out ("25.2",
// "0.317", "2.00"), for what is shown to say what is saved.
func SEText(x float64) string {
	v := RoundSE(x)
	if v == 0 || !finite(v) {
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	d := SESigDigits - 1 - int(math.Floor(math.Log10(math.Abs(v))))
	return strconv.FormatFloat(v, 'f', max(0, d), 64)
}

func roundSig(x float64, d int) float64 {
	if x == 0 || !finite(x) {
		return x
	}
	p := math.Pow(10, float64(d)-math.Ceil(math.Log10(math.Abs(x))))
	return math.Round(x*p) / p
}

type obsKey struct{ run, compound string }

// fitAll fits every compound seen in at least two runs (excluded
// measurements left out), in name order.
func fitAll(out *methodfile.Method, st []runSetup, runs *methodfile.Runs, opt Options, excluded map[obsKey]bool, warn *[]string) ([]fitResult, error) {
	mcs, err := out.ModelCompounds()
	if err != nil {
		return nil, err
	}
	var names []string
	seen := map[string]bool{}
	for _, r := range runs.Runs {
		for _, n := range r.Names() {
			if !seen[n] {
				seen[n] = true
				names = append(names, n)
			}
		}
	}
	sort.Strings(names)
	var fits []fitResult
	var held []string // --with-dcp, too few runs: ΔCp kept at the method's value
	defer func() {
		if len(held) > 0 && len(runs.Runs) <= 3 {
			*warn = append(*warn, fmt.Sprintf("ΔCp not fitted (for any compound): ΔH, ΔS and ΔCp from %d runs leave no residual degree of freedom (the fit would pass exactly through the times, its values and errors meaningless); ΔH and ΔS fitted with ΔCp kept at the method's value; a fourth run with a clearly different ramp lets ΔCp be fitted", len(runs.Runs)))
		} else if len(held) > 0 {
			*warn = append(*warn, fmt.Sprintf("ΔCp not fitted for %s: seen in 3 runs or fewer, and ΔH, ΔS and ΔCp from 3 runs leave no residual degree of freedom (the fit would pass exactly through the times, its values and errors meaningless); ΔH and ΔS fitted with ΔCp kept at the method's value; a fourth run with a clearly different ramp lets ΔCp be fitted", strings.Join(held, ", ")))
		}
	}()
	for _, name := range names {
		var obs []obsPoint
		for i, s := range st {
			if t, ok := s.run.Retention[name]; ok && !excluded[obsKey{s.name, name}] {
				obs = append(obs, obsPoint{run: i, t: t * 60})
			}
		}
		ci := compoundIndex(out, name)
		if len(obs) < 2 {
			if ci >= 0 {
				*warn = append(*warn, fmt.Sprintf("%s: seen in one run only; parameters not fitted", name))
			} else {
				*warn = append(*warn, fmt.Sprintf("%s: in the runs but not in the method, and seen in one run only; not added", name))
			}
			continue
		}
		base := model.Compound{Name: name, Target: false}
		if ci >= 0 {
			base = mcs[ci]
		}
		// ΔCp is fitted only with a run to spare: with as many runs as
		// parameters the curve passes exactly through the times, leaving
		// no residual to judge it by, and the three values can go anywhere
		// along the near-degenerate valley (ΔCp from −42 to +21 J/(mol·K),
		// true 0, with zero residuals on the demo's three runs).
		withDCp := opt.WithDCp && len(obs) >= 4
		if opt.WithDCp && !withDCp {
			held = append(held, name)
		}
		var th0 []float64
		if ci >= 0 && (base.RefTemp == 0 || base.RefTemp == model.DefaultRefTemp) {
			th0 = []float64{base.DH, base.DS, base.DCp} // warm start from the method's values
		}
		cf, err := fitCompoundFrom(st, obs, base, withDCp, th0)
		if err != nil {
			*warn = append(*warn, fmt.Sprintf("%s: %v; parameters not fitted", name, err))
			continue
		}
		cf.Name = name
		cf.obs = obs
		cf.base = base
		cf.Residuals = map[string]float64{}
		for i, o := range obs {
			cf.Residuals[st[o.run].name] = cf.resid[i] / 60
		}
		fits = append(fits, cf)
	}
	return fits, nil
}

type obsPoint struct {
	run int
	t   float64 // s
}

type fitResult struct {
	CompoundFit
	resid  []float64 // s
	onlyDS bool
	// ruleN is, for an onlyDS fit, the (fractional) carbon number n at
	// which the homologous rule's ΔH and ΔS reproduce run ruleRun's time:
	// ΔH is held at −(9 + 4.9 n) kJ/mol.
	ruleN   float64
	ruleRun int
	// ridgeSlope (onlyDS) is dΔS/dΔH along the ridge that keeps the
	// measured times, J/(mol·K) per kJ/mol.
	ridgeSlope float64
	obs        []obsPoint
	base       model.Compound
	th         []float64  // ΔH J/mol, ΔS, (ΔCp)
	free       []int      // fitted entries of th
	jac        *mat.Dense // ∂t/∂θ_free at the solution, s per unit
	cov        *mat.Dense // (JᵀJ)⁻¹, nil when singular
	ssr        float64    // s²
}

// paramCompound builds the compound for parameter vector θ = (ΔH J/mol, ΔS, ΔCp).
func paramCompound(base model.Compound, th []float64) model.Compound {
	c := base
	c.DH, c.DS, c.RefTemp = th[0], th[1], model.DefaultRefTemp
	c.DCp = 0
	if len(th) > 2 {
		c.DCp = th[2]
	}
	return c
}

func residuals(st []runSetup, obs []obsPoint, base model.Compound, th []float64, out []float64) (float64, []float64) {
	c := paramCompound(base, th)
	ssr := 0.0
	for i, o := range obs {
		tr, _ := st[o.run].cond.RetentionTime(&c, st[o.run].prog)
		out[i] = tr - o.t
		if math.IsInf(tr, 0) || math.IsNaN(tr) {
			out[i] = 1e9
		}
		ssr += out[i] * out[i]
	}
	return ssr, out
}

// startValues follow the homologous-series rule ΔH = −(9 + 4.9 n) kJ/mol,
// ΔS = −(44 + 6.0 n) J/(mol·K) of a nonpolar phase (the demo's rule of thumb),
// with n found so that the first observation is matched; this puts the
// start in the right valley of the strongly correlated ΔH–ΔS surface.
func startValues(st []runSetup, obs []obsPoint, base model.Compound) ([]float64, float64) {
	at := func(n float64) []float64 { return []float64{-(9 + 4.9*n) * 1000, -(44 + 6.0*n)} }
	o := obs[0]
	lo, hi := -1.5, 60.0
	for it := 0; it < 36; it++ { // 61.5 / 2^36 ≈ 1e-9 carbon numbers
		mid := (lo + hi) / 2
		c := paramCompound(base, at(mid))
		tr, _ := st[o.run].cond.RetentionTime(&c, st[o.run].prog)
		if tr > o.t {
			hi = mid
		} else {
			lo = mid
		}
	}
	n := (lo + hi) / 2
	return at(n), n
}

// fitCompound is Levenberg–Marquardt on the retention-time residuals with
// a forward-difference Jacobian; standard errors from σ² (JᵀJ)⁻¹.
func fitCompound(st []runSetup, obs []obsPoint, base model.Compound, withDCp bool) (fitResult, error) {
	return fitCompoundFrom(st, obs, base, withDCp, nil)
}

// fitCompoundFrom is fitCompound started from th0 (ΔH J/mol, ΔS) when given
// (a warm start: a fit of nearly the same data), falling back to the
// homologous-rule start when that fails.
func fitCompoundFrom(st []runSetup, obs []obsPoint, base model.Compound, withDCp bool, th0 []float64) (fitResult, error) {
	// params builds θ from ΔH and ΔS: with ΔCp fitted (from dcp0) or, when
	// ΔCp is not fitted, held at the compound's own value.
	params := func(dh, ds, dcp0 float64) ([]float64, []int) {
		th, free := []float64{dh, ds}, []int{0, 1}
		if withDCp {
			th, free = append(th, dcp0), append(free, 2)
		} else if base.DCp != 0 {
			th = append(th, base.DCp)
		}
		return th, free
	}
	if len(th0) >= 2 {
		dcp := 0.0
		if len(th0) > 2 {
			dcp = th0[2]
		}
		th, free := params(th0[0], th0[1], dcp)
		if res, err := fitFree(st, obs, base, th, free); err == nil && determined(res) {
			return res, nil
		}
	}
	sv, n := startValues(st, obs, base)
	th, free := params(sv[0], sv[1], 0)
	res, err := fitFree(st, obs, base, th, free)
	if err == nil && determined(res) {
		return res, nil
	}
	if err == nil {
		err = errors.New("the runs do not determine ΔH")
	}
	// Too little retention to tell ΔH from ΔS: hold ΔH at the homologous
	// rule's value for the carbon number n whose rule retention matches the
	// first run, and fit ΔS alone.
	th, _ = params(sv[0], sv[1], 0)
	if len(th) > 2 && withDCp {
		th[2] = base.DCp
	}
	res, err2 := fitFree(st, obs, base, th, []int{1})
	if err2 != nil {
		return res, err
	}
	res.onlyDS = true
	res.ruleN = n
	res.ruleRun = obs[0].run
	// the ΔH–ΔS ridge: how much the fitted ΔS moves when the held ΔH is
	// 1 kJ/mol higher (the held value's uncertainty carries into ΔS)
	th2 := append([]float64(nil), res.th...)
	th2[0] += 1000
	if r2, err := fitFree(st, obs, base, th2, []int{1}); err == nil {
		res.ridgeSlope = r2.DS - res.DS
	}
	return res, nil
}

// determined: with a retention-time SD of 0.002 min the fit's ΔH would be
// known to better than half its size (else ΔH and ΔS are not separable
// from these runs: a compound eluting near the holdup time).
func determined(r fitResult) bool {
	if r.cov == nil || len(r.free) < 2 || r.free[0] != 0 {
		return r.cov != nil
	}
	se := 0.12 * math.Sqrt(math.Abs(r.cov.At(0, 0))) / 1000
	return se < 0.5*math.Abs(r.DHkJ)
}

// fitFree fits the parameters listed in free (0 ΔH, 1 ΔS, 2 ΔCp) from th.
func fitFree(st []runSetup, obs []obsPoint, base model.Compound, th []float64, free []int) (fitResult, error) {
	withDCp := false
	for _, f := range free {
		withDCp = withDCp || f == 2
	}
	p := len(free)
	n := len(obs)
	allSteps := []float64{5, 0.01, 0.1}
	steps := make([]float64, p)
	for j, f := range free {
		steps[j] = allSteps[f]
	}
	r := make([]float64, n)
	rt := make([]float64, n)
	ssr, _ := residuals(st, obs, base, th, r)
	lambda := 1e-3
	J := mat.NewDense(n, p, nil)
	var jtj mat.Dense
	// jacobian fills J by forward differences at th (residuals r) and JᵀJ.
	jacobian := func(J *mat.Dense, jtj *mat.Dense) {
		for j := 0; j < p; j++ {
			tp := append([]float64(nil), th...)
			tp[free[j]] += steps[j]
			residuals(st, obs, base, tp, rt)
			for i := 0; i < n; i++ {
				J.Set(i, j, (rt[i]-r[i])/steps[j])
			}
		}
		jtj.Mul(J.T(), J)
	}
	converged := false
	for iter := 0; iter < 60; iter++ {
		jacobian(J, &jtj)
		g := mat.NewVecDense(n, append([]float64(nil), r...))
		var jtr mat.VecDense
		jtr.MulVec(J.T(), g)
		improved := false
		for tries := 0; tries < 20; tries++ {
			a := mat.NewDense(p, p, nil)
			a.Copy(&jtj)
			for j := 0; j < p; j++ {
				a.Set(j, j, a.At(j, j)*(1+lambda)+1e-12)
			}
			var delta mat.VecDense
			if err := delta.SolveVec(a, &jtr); err != nil {
				lambda *= 10
				continue
			}
			tn := append([]float64(nil), th...)
			for j := 0; j < p; j++ {
				tn[free[j]] -= delta.AtVec(j)
			}
			small := true
			for j := 0; j < p; j++ {
				if math.Abs(delta.AtVec(j)) > 1e-4*steps[j] {
					small = false
				}
			}
			sn, _ := residuals(st, obs, base, tn, rt)
			if sn >= ssr && small {
				// at the minimum: even a tiny step no longer helps
				iter = 1 << 30
				improved = true
				break
			}
			if sn < ssr {
				if ssr-sn < 1e-7*ssr+1e-12 {
					small = true // no longer worth another iteration
				}
				th, ssr = tn, sn
				copy(r, rt)
				lambda = math.Max(lambda/10, 1e-12)
				improved = true
				if small {
					iter = 1 << 30
				}
				break
			}
			lambda *= 10
		}
		if !improved || iter >= 1<<30 {
			converged = true
			break
		}
		if len(free) > 1 && th[0] > 0 {
			break // ΔH > 0 is no retention: the data cannot tell ΔH from ΔS
		}
	}
	// Jacobian at the solution for errors and conditioning
	jacobian(J, &jtj)
	res := fitResult{resid: append([]float64(nil), r...)}
	res.DHkJ, res.DS = th[0]/1000, th[1]
	if len(th) > 2 {
		res.DCp = th[2] // fitted, or held at the compound's own value
	}
	res.withDCp = withDCp
	res.Runs = n
	res.Fitted = true
	for _, x := range r {
		res.RMS += x * x / float64(n)
		res.Max = math.Max(res.Max, math.Abs(x)/60)
	}
	res.RMS = math.Sqrt(res.RMS) / 60
	res.StdErrDH, res.StdErrDS, res.StdErrDCp = math.NaN(), math.NaN(), math.NaN()
	// scaled condition number
	scaled := mat.NewDense(n, p, nil)
	for j := 0; j < p; j++ {
		norm := 0.0
		for i := 0; i < n; i++ {
			norm += J.At(i, j) * J.At(i, j)
		}
		norm = math.Sqrt(norm)
		for i := 0; i < n; i++ {
			if norm > 0 {
				scaled.Set(i, j, J.At(i, j)/norm)
			}
		}
	}
	var sjtj mat.Dense
	sjtj.Mul(scaled.T(), scaled)
	res.Condition = mat.Cond(&sjtj, 2)
	res.th, res.free, res.ssr = append([]float64(nil), th...), append([]int(nil), free...), ssr
	res.jac = mat.DenseCopyOf(J)
	var cov mat.Dense
	if err := cov.Inverse(&jtj); err == nil {
		res.cov = &cov
	}
	// spread of elution temperatures across the runs
	c := paramCompound(base, th)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, o := range obs {
		_, te := st[o.run].cond.RetentionTime(&c, st[o.run].prog)
		lo, hi = math.Min(lo, te), math.Max(hi, te)
	}
	res.ElutionSpreadC = hi - lo
	if !converged {
		return res, errors.New("the fit did not converge (the runs do not pin ΔH and ΔS down)")
	}
	if !(res.DHkJ < 0) || math.IsNaN(res.DS) {
		return res, errors.New("the fit did not converge to a retained compound")
	}
	return res, nil
}

// fitDiameter finds the internal diameter (mm) whose holdup times best match
// the measured ones (golden-section search between 0.5 and 1.5 times the
// nominal diameter).
func fitDiameter(m *methodfile.Method, runs *methodfile.Runs, idx []int) (float64, error) {
	d0 := m.Column.DiameterMM
	a, b := 0.5*d0, 1.5*d0
	if min := 2 * m.Column.FilmUM * 1e-3 * 1.01; a < min {
		a = min
	}
	d, err := fitHoldup(m, runs, idx, func(c *methodfile.Method, x float64) { c.Column.DiameterMM = x }, a, b)
	if err != nil {
		return 0, errors.New("holdup calibration failed: no diameter reproduces the measured holdup times")
	}
	return d, nil
}

// fitParticle finds a packed column's particle size (µm) whose
// Kozeny–Carman permeability best reproduces the measured holdup times
// (golden section between 0.5 and 1.5 times the nominal size, within the
// file's 50-400 µm).
func fitParticle(m *methodfile.Method, runs *methodfile.Runs, idx []int) (float64, error) {
	p0 := m.Column.ParticleUM
	a, b := math.Max(0.5*p0, 50), math.Min(1.5*p0, 400)
	dp, err := fitHoldup(m, runs, idx, func(c *methodfile.Method, x float64) { c.Column.ParticleUM = x }, a, b)
	if err != nil {
		return 0, errors.New("holdup calibration failed: no particle size in 50-400 µm reproduces the measured holdup times")
	}
	return dp, nil
}

// fitHoldup is the golden-section search on [a, b] for the column value
// that set writes, minimising the squared holdup-time residuals of runs idx.
func fitHoldup(m *methodfile.Method, runs *methodfile.Runs, idx []int, set func(*methodfile.Method, float64), a, b float64) (float64, error) {
	ssr := func(x float64) float64 {
		c := m.Clone()
		set(c, x)
		s := 0.0
		for _, i := range idx {
			r := &runs.Runs[i]
			rm := c.RunMethod(r)
			car, err := rm.ModelCarrier()
			if err != nil {
				return math.Inf(1)
			}
			cond, err := model.NewConditions(rm.ModelColumn(), car)
			if err != nil {
				return math.Inf(1)
			}
			tm, _ := cond.RetentionTime(nil, rm.ModelProgram())
			e := tm/60 - r.HoldupMin
			s += e * e
		}
		return s
	}
	gr := (math.Sqrt(5) - 1) / 2
	for i := 0; i < 100; i++ {
		c, d := b-gr*(b-a), a+gr*(b-a)
		if ssr(c) < ssr(d) {
			b = d
		} else {
			a = c
		}
	}
	x := (a + b) / 2
	if math.IsInf(ssr(x), 0) {
		return 0, errors.New("no value reproduces the holdup times")
	}
	return x, nil
}

// fitPlateHeight fits φ from measured half-height widths: σ² = φ a + σ0²,
// with a the column's variance at φ = 1, by least squares in σ².
func fitPlateHeight(m *methodfile.Method, runs *methodfile.Runs) (float64, bool, error) {
	var num, den float64
	count := 0
	for i := range runs.Runs {
		r := &runs.Runs[i]
		if len(r.Widths) == 0 {
			continue
		}
		rm := m.RunMethod(r)
		rm.Column.PlateHeight = 1
		sys, err := rm.System()
		if err != nil {
			return 0, false, err
		}
		var res model.Result
		if err := sys.Simulate(rm.ModelProgram(), &res); err != nil {
			return 0, false, fmt.Errorf("run %q: %v", r.Name, err)
		}
		s0 := sys.Cond.Carrier.InitialBand
		for _, pk := range res.Peaks {
			w, ok := r.Widths[sys.Compounds[pk.Compound].Name]
			if !ok {
				continue
			}
			sObs := w * 60 / 2.3548200450309493
			a := pk.Sigma*pk.Sigma - s0*s0
			num += a * (sObs*sObs - s0*s0)
			den += a * a
			count++
		}
	}
	if count == 0 || den == 0 {
		return 0, false, nil
	}
	phi := num / den
	if !(phi > 0) {
		return 0, false, errors.New("the measured widths are narrower than the injection band alone; check initial_band_s")
	}
	return phi, true, nil
}

// Plate-height factors outside PlateHeightLow..PlateHeightHigh are warned:
// a column in good condition, at its optimum-ish flow, usually comes within
// about −20 %..+30 % of the model's plate height (common practice, no
// published bound).
const (
	PlateHeightLow  = 0.8
	PlateHeightHigh = 1.3
)

// DimensionTolerance is how far (a fraction) a fitted column value (the
// diameter from holdup times, a packed column's particle size, the
// plate-height factor from widths) may lie from the method's before the
// fit warns: a column is made to within a few per cent of its nominal
// diameter (common practice, from memory), so 15 % more says the runs do
// not match the method as given.
const DimensionTolerance = 0.15

// otherSetupHint is what a fitted value far from the method's may mean.
const otherSetupHint = "the runs may have been made under another carrier (gas, flow or pressure) or on another column than the method's: a run made with a carrier setting that differed should carry its own [run.carrier] (the method's [carrier] keys that differ), and the method's [column] should be the column the runs were made on"

// far: fitted lies more than DimensionTolerance from nominal.
func far(fitted, nominal float64) bool {
	return nominal > 0 && math.Abs(fitted/nominal-1) > DimensionTolerance
}

// dimensionWarning warns a fitted column value (what, in unit) more than
// DimensionTolerance from the method's nominal value, or is "".
func dimensionWarning(what, unit string, fitted, nominal float64) string {
	if !far(fitted, nominal) {
		return ""
	}
	u := ""
	if unit != "" {
		u = " " + unit
	}
	return fmt.Sprintf("%s %.4g%s fitted from the runs is %.0f %% from the method's %g%s (more than %.0f %%): %s; the fitted value is written as fitted",
		what, fitted, u, 100*math.Abs(fitted/nominal-1), nominal, u, 100*DimensionTolerance, otherSetupHint)
}

// plateHeightWarning warns a fitted plate-height factor far from 1.
func plateHeightWarning(phi float64) string {
	if phi >= PlateHeightLow && phi <= PlateHeightHigh {
		return ""
	}
	return fmt.Sprintf("plate-height factor %.3f from the measured widths is outside the usual %g–%g (common practice): columns usually come close to the model's plate height; the peaks are %.0f %% %s than predicted: check the widths are at half height and in minutes, the column's condition (an old or overloaded column broadens peaks), the flow and the injection band; the factor is written as fitted",
		phi, PlateHeightLow, PlateHeightHigh, 100*math.Abs(math.Sqrt(phi)-1), map[bool]string{true: "wider", false: "narrower"}[phi > 1])
}

func compoundIndex(m *methodfile.Method, name string) int {
	for i, c := range m.Compounds {
		if c.Name == name {
			return i
		}
	}
	return -1
}
