package calibrate

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// Standard errors above these are called large, by fit and by the UI
// alike (our threshold: about what moves a retention factor at 100 °C by
// 30 %: δ ln k = δΔH/(R T) with T = 373 K gives 0.32 for 1 kJ/mol, δΔS/R
// gives 0.30 for 2.5 J/(mol·K)).
const (
	LargeSEDHkJ = 1.0 // kJ/mol
	LargeSEDS   = 2.5 // J/(mol·K)
)

// LargeError reports whether either standard error is above its threshold
// (LargeSEDHkJ, LargeSEDS); an unknown error is not called large.
func (c *CompoundFit) LargeError() bool {
	return c.StdErrDH > LargeSEDHkJ || c.StdErrDS > LargeSEDS
}

// assumedSD is the retention-time SD (s) used when no residual freedom is
// left: the method's goal.robust.retention_time_sd_min.
func assumedSD(m *methodfile.Method) float64 {
	sd := m.Goal.Robust.RetentionTimeSDMin
	if !(sd > 0) {
		sd = methodfile.DefaultRetentionTimeSDMin
	}
	return sd * 60
}

// pool sets every fit's standard errors from the residual variance pooled
// over the compounds: σ² = Σ SSR / ν with ν = Σ (n − p), the runs less the
// fitted parameters of each compound; SE(θ_j) = σ √((JᵀJ)⁻¹_jj) and the
// correlation of ΔH and ΔS from the same matrix. The errors thus assume
// one retention-time noise level for all compounds (common practice for
// calibration of several analytes from the same injections). With ν = 0 the
// method's retention_time_sd_min stands in for σ.
func pool(fits []fitResult, m *methodfile.Method, rep *Report) {
	ssr := 0.0
	dof := 0
	for _, f := range fits {
		ssr += f.ssr
		dof += len(f.obs) - len(f.free)
	}
	sigma := assumedSD(m)
	rep.SDAssumed = true
	if dof > 0 {
		sigma = math.Sqrt(ssr / float64(dof))
		rep.SDAssumed = false
	}
	rep.DOF = dof
	rep.ResidualSDMin = sigma / 60
	for i := range fits {
		f := &fits[i]
		f.StdErrDH, f.StdErrDS, f.StdErrDCp, f.CorrDHDS = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		if f.cov == nil {
			continue
		}
		col := map[int]int{}
		for j, fr := range f.free {
			col[fr] = j
			e := sigma * math.Sqrt(math.Abs(f.cov.At(j, j)))
			switch fr {
			case 0:
				f.StdErrDH = e / 1000
			case 1:
				f.StdErrDS = e
			case 2:
				f.StdErrDCp = e
			}
		}
		if a, ok := col[0]; ok {
			if b, ok := col[1]; ok {
				f.CorrDHDS = f.cov.At(a, b) / math.Sqrt(f.cov.At(a, a)*f.cov.At(b, b))
			}
		}
	}
}

// findOutliers flags, per compound, the measurement that the other runs
// predict worst: each run is left out in turn, the compound refitted to the
// others, and the left-out time compared with that prediction:
// t = e / (σ₍ᵢ₎ √(1 + g C gᵀ)), e the measured less the predicted time, g
// the prediction's gradient, C the refit's (JᵀJ)⁻¹ and σ₍ᵢ₎² the pooled
// residual variance without the point (the externally studentized
// prediction residual; Belsley, Kuh & Welsch, Regression Diagnostics,
// 1980). A point is flagged when |t| > OutlierT and |e| exceeds 5 ×
// retention_time_sd_min. With one run more than parameters every point has
// nearly the same |t|; the run named is then the one whose removal leaves
// the most plausible parameters (closest to the method's own values, or to
// the enthalpy–entropy compensation line ΔS ≈ 1.224 ΔH − 33 of the
// homologous rule). The point is left out of the fit (Excluded).
//
// With one run more than parameters the plausibility must single one run
// out: the most plausible choice within 1 unit (see plausibility) and every
// other at least 1.5 units and 1 unit worse. Otherwise the compound is
// returned as a Suspect (the runs named, none left out): the data cannot
// tell which run is wrong, and dropping a good run would fit the error.
func findOutliers(fits []fitResult, st []runSetup, start *methodfile.Method, rep *Report, opt Options) ([]Outlier, []Suspect) {
	var sus []Suspect
	ssr := 0.0
	dof := 0
	for _, f := range fits {
		ssr += f.ssr
		dof += len(f.obs) - len(f.free)
	}
	if dof < 2 {
		return nil, nil
	}
	floor := 5 * assumedSD(start)
	startC, _ := start.ModelCompounds()
	var out []Outlier
	for _, f := range fits {
		n, p := len(f.obs), len(f.free)
		if f.onlyDS {
			p = 2 // a gross error also makes ΔH look undeterminable: judge by two-parameter refits
		}
		if n <= p {
			continue
		}
		// screen: leave-one-out residuals rᵢ/(1 − hᵢᵢ) all below the floor
		// cannot make an outlier
		if f.cov != nil {
			var hat mat.Dense
			hat.Product(f.jac, f.cov, f.jac.T())
			big := false
			for i, r := range f.resid {
				if h := hat.At(i, i); h > 0.98 || math.Abs(r)/(1-h) >= floor {
					big = true
				}
			}
			if !big {
				continue
			}
		}
		type cand struct {
			i          int
			t, e, pred float64
			plaus      float64
		}
		var cs []cand
		for i := 0; i < n; i++ {
			rest := append(append([]obsPoint(nil), f.obs[:i]...), f.obs[i+1:]...)
			g, err := fitCompoundFrom(st, rest, f.base, f.withDCp && len(rest) >= 4, f.th)
			if err != nil || g.onlyDS {
				continue
			}
			o := f.obs[i]
			c := paramCompound(f.base, g.th)
			tp, _ := st[o.run].cond.RetentionTime(&c, st[o.run].prog)
			if !finite(tp) {
				continue
			}
			pv := 0.0
			if g.cov != nil {
				grad := make([]float64, len(g.free))
				steps := []float64{5, 0.01, 0.1}
				for j, fr := range g.free {
					th := append([]float64(nil), g.th...)
					th[fr] += steps[fr]
					cc := paramCompound(f.base, th)
					t2, _ := st[o.run].cond.RetentionTime(&cc, st[o.run].prog)
					grad[j] = (t2 - tp) / steps[fr]
				}
				for a := range grad {
					for b := range grad {
						pv += grad[a] * g.cov.At(a, b) * grad[b]
					}
				}
			}
			s2 := (ssr - f.ssr + g.ssr) / float64(dof-1)
			if !(s2 > 0) {
				s2 = 1e-12
			}
			e := o.t - tp
			x := cand{i: i, e: e, pred: tp, t: e / math.Sqrt(s2*(1+math.Abs(pv)))}
			x.plaus = plausibility(g.th, startC, compoundIndex(start, f.Name), start)
			cs = append(cs, x)
		}
		if len(cs) == 0 {
			continue
		}
		best := 0
		for k := range cs {
			if math.Abs(cs[k].t) > math.Abs(cs[best].t) {
				best = k
			}
		}
		top := math.Abs(cs[best].t)
		for k := range cs {
			if math.Abs(cs[k].t) >= 0.85*top && cs[k].plaus < cs[best].plaus {
				best = k
			}
		}
		if n == p+1 {
			// |t| is nearly the same for every run: judge by plausibility
			// alone; a run whose refit failed counts as implausible.
			best = 0
			for k := range cs {
				if cs[k].plaus < cs[best].plaus {
					best = k
				}
			}
			clear := cs[best].plaus <= 1
			for k := range cs {
				if k != best && (cs[k].plaus < 1.5 || cs[k].plaus < cs[best].plaus+1) {
					clear = false
				}
			}
			if !clear {
				maxE := 0.0
				for _, c := range cs {
					maxE = math.Max(maxE, math.Abs(c.e))
				}
				if top <= opt.OutlierT || maxE < floor {
					continue
				}
				x := Suspect{Compound: f.Name, Studentized: cs[best].t}
				for _, o := range f.obs {
					x.Runs = append(x.Runs, st[o.run].name)
				}
				sus = append(sus, x)
				continue
			}
		}
		b := cs[best]
		if math.Abs(b.t) <= opt.OutlierT || math.Abs(b.e) < floor {
			continue
		}
		o := f.obs[b.i]
		out = append(out, Outlier{Run: st[o.run].name, Compound: f.Name, MeasuredMin: o.t / 60, PredictedMin: b.pred / 60, Studentized: b.t, Excluded: true})
	}
	return out, sus
}

// plausibility of fitted θ (lower is more plausible): the smaller of the
// distance to the method's own values in units of the priors
// (goal.robust.prior_dH_kJ_mol, prior_dS_J_mol_K) and the distance from the
// compensation line ΔS = 1.224 ΔH − 33 in units of 15 J/(mol·K) (the
// demo's homologous rule; a loose guide for other classes).
func plausibility(th []float64, startC []model.Compound, ci int, m *methodfile.Method) float64 {
	dh, ds := th[0]/1000, th[1]
	comp := math.Abs(ds-(1.224*dh-33)) / 15
	if ci < 0 || ci >= len(startC) {
		return comp
	}
	c := startC[ci]
	pdh, pds := m.Goal.Robust.PriorDHkJ, m.Goal.Robust.PriorDS
	if !(pdh > 0) {
		pdh = 2
	}
	if !(pds > 0) {
		pds = 4
	}
	// the start's values at the fit's reference temperature
	sc := c
	if c.RefTemp != 0 && c.RefTemp != model.DefaultRefTemp || c.DCp != 0 {
		return comp
	}
	prior := math.Hypot((dh-sc.DH/1000)/pdh, (ds-sc.DS)/pds)
	return math.Min(prior, comp)
}

// dcpTrend tests for a ΔCp the fit leaves out: per compound (≥ 3 runs) the
// one-step estimate d = −(j⊥·r)/(j⊥·j⊥) with j⊥ the ΔCp column of the
// Jacobian made orthogonal to the ΔH and ΔS columns (a score test), pooled
// over the compounds with weights j⊥·j⊥/σ². A mean |z| > 3, or a χ² of the
// estimates far above its degrees of freedom, is the systematic residual
// trend with temperature an unfitted ΔCp leaves.
func dcpTrend(fits []fitResult, st []runSetup, rep *Report) string {
	sigma := rep.ResidualSDMin * 60
	if !(sigma > 0) {
		return ""
	}
	var sw, swd, chi float64
	k := 0
	for _, f := range fits {
		n := len(f.obs)
		if n < 3 || f.withDCp || f.onlyDS || f.cov == nil {
			continue
		}
		th := append([]float64(nil), f.th...)
		if len(th) < 3 {
			th = append(th, 0) // ΔCp held at 0; else at the compound's value
		}
		base := make([]float64, n)
		plus := make([]float64, n)
		residuals(st, f.obs, f.base, th, base)
		th[2]++
		residuals(st, f.obs, f.base, th, plus)
		j3 := mat.NewVecDense(n, nil)
		for i := range plus {
			j3.SetVec(i, plus[i]-base[i])
		}
		var jt, proj, perp mat.VecDense
		jt.MulVec(f.jac.T(), j3)
		var coef mat.VecDense
		coef.MulVec(f.cov, &jt)
		proj.MulVec(f.jac, &coef)
		perp.SubVec(j3, &proj)
		jj := mat.Dot(&perp, &perp)
		if !(jj > 0) {
			continue
		}
		r := mat.NewVecDense(n, append([]float64(nil), f.resid...))
		d := -mat.Dot(&perp, r) / jj
		w := jj / (sigma * sigma)
		sw += w
		swd += w * d
		chi += w * d * d
		k++
	}
	if k == 0 {
		return ""
	}
	mean := swd / sw
	z := mean * math.Sqrt(sw)
	if math.Abs(z) > 3 || chi > float64(k)+4*math.Sqrt(2*float64(k))+9 {
		return fmt.Sprintf("the residuals trend with elution temperature the way an unfitted ΔCp does (one-step estimate %.0f J/(mol·K) on average, z = %.1f over %d compounds): ΔH and ΔS absorb it and their errors are understated; predictions outside the scouted temperatures may be biased; fit with --with-dcp (three runs or more, better four with different starts)", mean, z, k)
	}
	return ""
}

// orderChecks: within a run, two compounds measured in one order while the
// fitted model clearly puts them the other way round (a swapped
// assignment?); across runs, pairs whose measured order changes (which the
// model may well predict: a note).
func orderChecks(m *methodfile.Method, st []runSetup, runs *methodfile.Runs, rep *Report) {
	mcs, err := m.ModelCompounds()
	if err != nil {
		return
	}
	sd := rep.ResidualSDMin
	type obs struct {
		name       string
		meas, pred float64
	}
	orders := make([]map[string]float64, len(st))
	for ri, s := range st {
		var xs []obs
		for _, name := range s.run.Names() {
			ci := compoundIndex(m, name)
			if ci < 0 {
				continue
			}
			tp, _ := s.cond.RetentionTime(&mcs[ci], s.prog)
			if !finite(tp) {
				continue
			}
			xs = append(xs, obs{name, s.run.Retention[name], tp / 60})
		}
		sort.Slice(xs, func(i, j int) bool { return xs[i].meas < xs[j].meas })
		orders[ri] = map[string]float64{}
		for _, x := range xs {
			orders[ri][x.name] = x.meas
		}
		for i := 1; i < len(xs); i++ {
			a, b := xs[i-1], xs[i]
			if a.pred-b.pred > 3*sd+0.003 {
				rep.Warnings = append(rep.Warnings, fmt.Sprintf("run %q: %s measured before %s (%.3f, %.3f min) but the fitted model puts %s first (%.3f, %.3f min): a swapped assignment?", s.name, a.name, b.name, a.meas, b.meas, b.name, b.pred, a.pred))
			}
		}
	}
	seen := map[string]bool{}
	for ri := range st {
		for rj := ri + 1; rj < len(st); rj++ {
			for a, ta := range orders[ri] {
				for b, tb := range orders[ri] {
					if a >= b {
						continue
					}
					ua, okA := orders[rj][a]
					ub, okB := orders[rj][b]
					if !okA || !okB || (ta < tb) == (ua < ub) || ta == tb || ua == ub {
						continue
					}
					key := a + "\x00" + b
					if seen[key] {
						continue
					}
					seen[key] = true
					first, second := a, b
					if tb < ta {
						first, second = b, a
					}
					rep.Notes = append(rep.Notes, fmt.Sprintf("the elution order of %s and %s changes: %s first in run %q, %s first in run %q", a, b, first, st[ri].name, second, st[rj].name))
				}
			}
		}
	}
	sort.Strings(rep.Notes)
}

// trendWarnings flags fitted parameters implausible for a compound: ΔS far
// from the ΔH–ΔS line. On one stationary phase ΔS of retention falls
// nearly linearly with ΔH across compounds (enthalpy–entropy compensation;
// common practice: the homologous-series rule the fit starts from,
// ΔH = −(9 + 4.9 n), ΔS = −(44 + 6.0 n), is that line, ΔS ≈ 1.224 ΔH − 33).
// The line is fitted by least squares to the other well-determined
// compounds of this fit (not held at the rule's ΔH, errors not large) when
// there are at least 4 spanning 10 kJ/mol or more, else the rule's line is
// used. A compound is flagged when its ΔS is off the line by more than
// max(15 J/(mol·K), 4 × the others' scatter about it) and by more than 3
// standard errors of that distance (from the fit's ΔH, ΔS covariance): a
// gross error that
// the fit passed through (a misassigned peak in one of three runs moves
// ΔS by tens of J/(mol·K) along the ΔH–ΔS valley).
func trendWarnings(fits []fitResult) map[string]string {
	out := map[string]string{}
	good := func(f *fitResult) bool {
		return !f.onlyDS && finite(f.StdErrDH) && !f.LargeError()
	}
	for i := range fits {
		f := &fits[i]
		if f.onlyDS {
			continue
		}
		var xs, ys []float64
		for j := range fits {
			if j != i && good(&fits[j]) {
				xs, ys = append(xs, fits[j].DHkJ), append(ys, fits[j].DS)
			}
		}
		a, b, scatter, src := 1.224, -33.0, 0.0, "the homologous-series rule's line"
		if len(xs) >= 4 {
			lo, hi := math.Inf(1), math.Inf(-1)
			var mx, my float64
			for k := range xs {
				lo, hi = math.Min(lo, xs[k]), math.Max(hi, xs[k])
				mx += xs[k] / float64(len(xs))
				my += ys[k] / float64(len(xs))
			}
			if hi-lo >= 10 {
				var sxy, sxx float64
				for k := range xs {
					sxy += (xs[k] - mx) * (ys[k] - my)
					sxx += (xs[k] - mx) * (xs[k] - mx)
				}
				a = sxy / sxx
				b = my - a*mx
				for k := range xs {
					r := ys[k] - (a*xs[k] + b)
					scatter += r * r
				}
				scatter = math.Sqrt(scatter / float64(len(xs)-2))
				src = fmt.Sprintf("the trend of the other %d fitted compounds", len(xs))
			}
		}
		tol := math.Max(15, 4*scatter)
		dev := f.DS - (a*f.DHkJ + b)
		// the fit's own uncertainty of the distance from the line (a poorly
		// determined compound has its large ± warned instead)
		sdDev := 0.0
		if finite(f.StdErrDH) && finite(f.StdErrDS) && finite(f.CorrDHDS) {
			sdDev = math.Sqrt(math.Max(0, f.StdErrDS*f.StdErrDS+a*a*f.StdErrDH*f.StdErrDH-2*a*f.CorrDHDS*f.StdErrDS*f.StdErrDH))
		}
		if math.Abs(dev) > tol && math.Abs(dev) > 3*sdDev {
			out[f.Name] = fmt.Sprintf("%s: fitted ΔH %.2f kJ/mol, ΔS %.2f J/(mol·K) look implausible: ΔS is %+.0f J/(mol·K) off %s (ΔS ≈ %.3f ΔH %+.1f; flagged beyond ±%.0f J/(mol·K)); on one phase ΔH and ΔS of retention keep close to one line (enthalpy–entropy compensation): likely a misassigned or mistyped peak in one of its runs; check its peaks", f.Name, f.DHkJ, f.DS, dev, src, a, b, tol)
		}
	}
	return out
}
