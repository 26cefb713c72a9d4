package calibrate

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"github.com/rampwise/rampwise/model/methodfile"
)

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

// findOutliers flags, per compound, the measurement with the largest
// externally studentized residual t = r / (σ₍ᵢ₎ √(1 − hᵢᵢ)), h the leverage
// from J(JᵀJ)⁻¹Jᵀ and σ₍ᵢ₎² = (Σ SSR − rᵢ²/(1 − hᵢᵢ)) / (ν − 1) the pooled
// variance without it (Belsley, Kuh & Welsch, Regression Diagnostics, 1980),
// when |t| > OutlierT and the residual exceeds 5 × retention_time_sd_min.
// With as many runs as parameters plus one, every residual of a compound has
// the same |t|; the run is then the one whose time departs most from the
// method's own prediction (start). The prediction reported is that of a
// fit to the other runs; the measurement is left out (Excluded) when the
// other runs still determine the parameters.
func findOutliers(fits []fitResult, st []runSetup, start *methodfile.Method, rep *Report, opt Options) []Outlier {
	ssr := 0.0
	dof := 0
	for _, f := range fits {
		ssr += f.ssr
		dof += len(f.obs) - len(f.free)
	}
	if dof < 2 {
		return nil
	}
	floor := 5 * assumedSD(start)
	startC, _ := start.ModelCompounds()
	var out []Outlier
	for _, f := range fits {
		n, p := len(f.obs), len(f.free)
		if n <= p || f.cov == nil {
			continue
		}
		var hat mat.Dense
		hat.Product(f.jac, f.cov, f.jac.T())
		best, bestT, bestTie := -1, 0.0, 0.0
		for i := 0; i < n; i++ {
			h := hat.At(i, i)
			if h > 1-1e-9 {
				continue
			}
			r := f.resid[i]
			s2 := (ssr - r*r/(1-h)) / float64(dof-1)
			if !(s2 > 0) {
				s2 = 1e-30
			}
			t := r / math.Sqrt(s2*(1-h))
			if math.Abs(t) <= opt.OutlierT || math.Abs(r) < floor {
				continue
			}
			tie := 0.0
			if ci := compoundIndex(start, f.Name); ci >= 0 {
				o := f.obs[i]
				if tp, _ := st[o.run].cond.RetentionTime(&startC[ci], st[o.run].prog); finite(tp) && tp > 0 {
					tie = math.Abs(o.t-tp) / tp
				}
			}
			switch {
			case best < 0, math.Abs(t) > 1.02*math.Abs(bestT):
				best, bestT, bestTie = i, t, tie
			case math.Abs(t) >= 0.98*math.Abs(bestT) && tie > bestTie:
				best, bestT, bestTie = i, t, tie
			}
		}
		if best < 0 {
			continue
		}
		o := f.obs[best]
		x := Outlier{Run: st[o.run].name, Compound: f.Name, MeasuredMin: o.t / 60, Studentized: bestT, PredictedMin: math.NaN()}
		rest := append(append([]obsPoint(nil), f.obs[:best]...), f.obs[best+1:]...)
		if len(rest) >= p {
			if g, err := fitCompound(st, rest, f.base, len(f.th) > 2 && len(rest) >= 3); err == nil {
				c := paramCompound(f.base, g.th)
				tp, _ := st[o.run].cond.RetentionTime(&c, st[o.run].prog)
				x.PredictedMin = tp / 60
				x.Excluded = true
			}
		}
		if math.IsNaN(x.PredictedMin) {
			x.PredictedMin = (o.t + f.resid[best]) / 60
		}
		out = append(out, x)
	}
	return out
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
		if n < 3 || len(f.th) > 2 || f.onlyDS || f.cov == nil {
			continue
		}
		th := append(append([]float64(nil), f.th...), 0)
		base := make([]float64, n)
		plus := make([]float64, n)
		residuals(st, f.obs, f.base, th, base)
		th[2] = 1
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
