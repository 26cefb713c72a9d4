package calibrate

import (
	"fmt"
	"math"
	"math/bits"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// gate is the largest |z| at which a peak may be assigned to a compound;
// leaving a compound out of a run costs gate².
const gate = 4.0

func hasUnnamed(runs *methodfile.Runs) bool {
	for i := range runs.Runs {
		if len(runs.Runs[i].Unnamed()) > 0 {
			return true
		}
	}
	return false
}

// startSpread is the spread (min) of a prediction from the method's own
// parameters before any fit: 0.01 min + 1 % of the time (common practice
// for transferred retention data; a guess, not a measured figure).
func startSpread(tMin float64) float64 { return 0.01 + 0.01*tMin }

// fittedSpread is the spread after a fit: twice the pooled residual SD
// (at least 2 s) plus 0.05 % of the time.
func fittedSpread(sd, tMin float64) float64 { return math.Max(2*sd, 0.004) + 0.0005*tMin }

// assignLoop assigns the unnamed peaks of every run to the method's
// compounds by minimum total cost (Hungarian method) and refits, until the
// assignment no longer changes (at most 8 rounds). The cost of compound i
// on peak k is z² = ((t_k − t̂_i)/s_i)², t̂ the prediction for the run's
// program (first from the method's values, aligned per run by a straight
// line fitted to the matches, then from the fit) and s_i its spread; a
// compound may also stay unassigned at cost gate², and each peak takes one
// compound at most.
func assignLoop(out, start *methodfile.Method, st []runSetup, runs *methodfile.Runs, opt Options, rep *Report) error {
	assigned := map[obsKey]bool{} // names set by the previous round
	fitted := map[string]bool{}
	type loo struct{ t, s float64 }
	loos := map[obsKey]loo{} // leave-one-out predictions of the last fit, min
	useArea := amountsDiffer(out)
	// assignments the method's own values left in doubt (round 0): the
	// close-pair search looks at them again after the fit
	unsure := map[obsKey]bool{}
	first := map[obsKey][2]float64{} // round 0: aligned prediction and spread, min
	sd := 0.0
	prev := ""
	var asg []Assignment
	for round := 0; round < 8; round++ {
		for k := range assigned {
			for i := range st {
				if st[i].name == k.run {
					st[i].run.DeleteRetention(k.compound)
				}
			}
		}
		assigned = map[obsKey]bool{}
		mcs, err := out.ModelCompounds()
		if err != nil {
			return err
		}
		asg = asg[:0]
		for ri := range st {
			s := &st[ri]
			r := s.run
			un := r.Unnamed()
			if len(un) == 0 {
				continue
			}
			var cand []int
			var pred, spread []float64
			for ci := range mcs {
				if _, named := r.Retention[mcs[ci].Name]; named {
					continue
				}
				tr, _ := s.cond.RetentionTime(&mcs[ci], s.prog)
				if !finite(tr) {
					continue
				}
				t := tr / 60
				sp := startSpread(t)
				if sc := compoundIndex(start, mcs[ci].Name); sc >= 0 && start.Compounds[sc].HasSE {
					// values from an earlier fit: predicted to the fit's precision
					sp = 1.5 * fittedSpread(assumedSD(start)/60, t)
				}
				if l, ok := loos[obsKey{s.name, mcs[ci].Name}]; ok {
					t, sp = l.t, l.s
				} else if fitted[mcs[ci].Name] {
					sp = fittedSpread(sd, t)
				}
				cand = append(cand, ci)
				pred = append(pred, t)
				spread = append(spread, sp)
			}
			// peaks at the holdup time (solvent, air) are never assigned
			tm, _ := s.cond.RetentionTime(nil, s.prog)
			if r.HasHoldup {
				tm = r.HoldupMin * 60
			}
			var keep []int
			for _, k := range un {
				if r.Peaks[k].TimeMin > 1.003*tm/60 {
					keep = append(keep, k)
				}
			}
			un = keep
			if len(un) == 0 {
				continue
			}
			if len(cand) == 0 {
				continue
			}
			times := make([]float64, len(un))
			for j, k := range un {
				times[j] = r.Peaks[k].TimeMin
			}
			var areaTerm [][]float64
			if useArea {
				areaTerm = areaCosts(mcs, cand, r, un)
			}
			a, b := 0.0, 1.0
			var match []int
			for pass := 0; pass < 5; pass++ {
				cost := costMatrix(pred, spread, times, a, b)
				addArea(cost, areaTerm, match)
				next := hungarian(cost)
				same := equalInts(next, match)
				match = next
				moved := false
				if len(fitted) == 0 {
					if na, nb, ok := alignLine(pred, times, match); ok && (math.Abs(na-a) > 1e-4 || math.Abs(nb-b) > 1e-5) {
						a, b, moved = na, nb, true
					}
				}
				if same && !moved {
					break
				}
			}
			if round == 0 {
				for i, ci := range cand {
					first[obsKey{s.name, mcs[ci].Name}] = [2]float64{a + b*pred[i], spread[i]}
				}
			}
			for i, j := range match {
				if j < 0 || j >= len(times) {
					continue
				}
				name := mcs[cand[i]].Name
				pk := r.Peaks[un[j]]
				r.SetRetention(name, pk.TimeMin, pk.WidthMin)
				assigned[obsKey{s.name, name}] = true
				conf := confidence(pred[i], spread[i], times, j, a, b)
				if round == 0 {
					if conf < 0.8 {
						unsure[obsKey{s.name, name}] = true
					}
				}
				asg = append(asg, Assignment{Run: s.name, Compound: name, MeasuredMin: pk.TimeMin,
					PredictedMin: a + b*pred[i], Confidence: conf})
			}
		}
		key := assignKey(asg)
		if key == prev {
			break
		}
		prev = key
		var junk []string
		fits, err := fitAll(out, st, runs, opt, nil, &junk)
		if err != nil {
			return err
		}
		var ssr float64
		dof := 0
		for _, f := range fits {
			ssr += f.ssr
			dof += len(f.obs) - len(f.free)
			ci := compoundIndex(out, f.Name)
			if ci < 0 {
				continue
			}
			c := &out.Compounds[ci]
			c.DHkJ, c.DS, c.DCp, c.RefTempC, c.FromIndex = f.DHkJ, f.DS, f.DCp, 100, false
			fitted[f.Name] = true
		}
		if dof > 0 {
			sd = math.Sqrt(ssr/float64(dof)) / 60
		}
		// leave-one-out predictions, linearised: t̂₍ᵢ₎ = t + rᵢ/(1 − hᵢᵢ),
		// spread 1.5 √(σ²/(1 − hᵢᵢ)) + 0.001 min
		loos = map[obsKey]loo{}
		for _, f := range fits {
			if f.cov == nil || len(f.obs) <= len(f.free) {
				continue
			}
			var hat mat.Dense
			hat.Product(f.jac, f.cov, f.jac.T())
			for i, o := range f.obs {
				h := hat.At(i, i)
				if h > 0.98 {
					continue
				}
				loos[obsKey{st[o.run].name, f.Name}] = loo{t: (o.t + f.resid[i]/(1-h)) / 60, s: 1.5*math.Sqrt(sd*sd/(1-h)) + 0.001}
			}
		}
	}
	n, ambiguous := pairSearch(start, out, st, assigned, unsure, first, sd, &rep.Warnings)
	for i := range asg {
		if ambiguous[asg[i].Compound] {
			asg[i].Confidence = math.Min(asg[i].Confidence, 0.5)
		}
	}
	if n > 0 {
		rep.Notes = append(rep.Notes, fmt.Sprintf("%d close %s re-assigned by trying both identities in every run and keeping the fit that is both tightest and closest to the method's values", n, plural(n, "pair", "pairs")))
		// refresh the predictions in the report
		mcs, _ := out.ModelCompounds()
		var junk []string
		if fits, err := fitAll(out, st, runs, opt, nil, &junk); err == nil {
			for _, f := range fits {
				if ci := compoundIndex(out, f.Name); ci >= 0 {
					c := &out.Compounds[ci]
					c.DHkJ, c.DS, c.DCp, c.RefTempC, c.FromIndex = f.DHkJ, f.DS, f.DCp, 100, false
				}
			}
			mcs, _ = out.ModelCompounds()
		}
		for i := range asg {
			for ri := range st {
				if st[ri].name != asg[i].Run {
					continue
				}
				asg[i].MeasuredMin = st[ri].run.Retention[asg[i].Compound]
				if ci := compoundIndex(out, asg[i].Compound); ci >= 0 && ci < len(mcs) {
					tp, _ := st[ri].cond.RetentionTime(&mcs[ci], st[ri].prog)
					asg[i].PredictedMin = tp / 60
				}
			}
		}
	}
	rep.Assignments = append([]Assignment(nil), asg...)
	sort.SliceStable(rep.Assignments, func(i, j int) bool {
		a, b := rep.Assignments[i], rep.Assignments[j]
		if a.Run != b.Run {
			return a.Run < b.Run
		}
		return a.MeasuredMin < b.MeasuredMin
	})
	low := map[string][]string{}
	var lowNames []string
	for _, a := range rep.Assignments {
		if a.Confidence < 0.8 {
			if low[a.Compound] == nil {
				lowNames = append(lowNames, a.Compound)
			}
			low[a.Compound] = append(low[a.Compound], fmt.Sprintf("%q %.3f min (%.2f)", a.Run, a.MeasuredMin, a.Confidence))
		}
	}
	sort.Strings(lowNames)
	for _, n := range lowNames {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: assigned with low confidence (another peak nearly as close to the prediction) in %s %s; check, or name it in the peak table", n, plural(len(low[n]), "run", "runs"), strings.Join(low[n], ", ")))
	}
	for i := range st {
		r := st[i].run
		left := 0
		for _, k := range r.Unnamed() {
			named := false
			for n, t := range r.Retention {
				if t == r.Peaks[k].TimeMin && assigned[obsKey{st[i].name, n}] {
					named = true
				}
			}
			if !named {
				left++
			}
		}
		if left > 0 {
			rep.Notes = append(rep.Notes, fmt.Sprintf("run %q: %d unnamed %s not assigned to any compound (solvent, impurities, or too far from every prediction)", st[i].name, left, plural(left, "peak", "peaks")))
		}
	}
	return nil
}

func assignKey(a []Assignment) string {
	var b strings.Builder
	for _, x := range a {
		fmt.Fprintf(&b, "%s\x00%s\x00%g\n", x.Run, x.Compound, x.MeasuredMin)
	}
	return b.String()
}

// costMatrix: rows the candidate compounds, columns the peaks then one
// "not in this run" column per compound.
func costMatrix(pred, spread, times []float64, a, b float64) [][]float64 {
	n, m := len(pred), len(times)
	cost := make([][]float64, n)
	for i := range cost {
		row := make([]float64, m+n)
		for j, t := range times {
			z := (t - (a + b*pred[i])) / spread[i]
			if math.Abs(z) > gate {
				row[j] = 1e9
			} else {
				row[j] = z * z
			}
		}
		for j := m; j < m+n; j++ {
			row[j] = gate * gate
		}
		cost[i] = row
	}
	return cost
}

// confidence of assigning peak j: its Gaussian weight among all peaks and
// the "not in this run" option.
func confidence(pred, spread float64, times []float64, j int, a, b float64) float64 {
	w := func(t float64) float64 {
		z := (t - (a + b*pred)) / spread
		return math.Exp(-z * z / 2)
	}
	sum := math.Exp(-gate * gate / 2)
	for _, t := range times {
		sum += w(t)
	}
	return w(times[j]) / sum
}

// alignLine fits t_measured = a + b t_predicted to the matched pairs by
// least squares (at least 4 pairs; b kept within 0.9..1.1, a within 1 min).
func alignLine(pred, times []float64, match []int) (a, b float64, ok bool) {
	var sx, sy, sxx, sxy, n float64
	for i, j := range match {
		if j < 0 || j >= len(times) {
			continue
		}
		x, y := pred[i], times[j]
		sx += x
		sy += y
		sxx += x * x
		sxy += x * y
		n++
	}
	if n < 4 {
		return 0, 1, false
	}
	den := n*sxx - sx*sx
	if den <= 0 {
		return 0, 1, false
	}
	b = (n*sxy - sx*sy) / den
	b = math.Max(0.9, math.Min(1.1, b))
	a = (sy - b*sx) / n
	a = math.Max(-1, math.Min(1, a))
	return a, b, true
}

// hungarian solves the rectangular assignment problem (rows ≤ columns):
// each row gets a distinct column, total cost least (Kuhn–Munkres with
// potentials, O(n² m)). It returns the column of each row.
func hungarian(cost [][]float64) []int {
	n := len(cost)
	if n == 0 {
		return nil
	}
	m := len(cost[0])
	inf := math.Inf(1)
	u := make([]float64, n+1)
	v := make([]float64, m+1)
	p := make([]int, m+1)
	way := make([]int, m+1)
	minv := make([]float64, m+1)
	used := make([]bool, m+1)
	for i := 1; i <= n; i++ {
		p[0] = i
		j0 := 0
		for j := range minv {
			minv[j] = inf
			used[j] = false
		}
		for {
			used[j0] = true
			i0 := p[j0]
			delta := inf
			j1 := 0
			for j := 1; j <= m; j++ {
				if used[j] {
					continue
				}
				cur := cost[i0-1][j-1] - u[i0] - v[j]
				if cur < minv[j] {
					minv[j] = cur
					way[j] = j0
				}
				if minv[j] < delta {
					delta = minv[j]
					j1 = j
				}
			}
			for j := 0; j <= m; j++ {
				if used[j] {
					u[p[j]] += delta
					v[j] -= delta
				} else {
					minv[j] -= delta
				}
			}
			j0 = j1
			if p[j0] == 0 {
				break
			}
		}
		for {
			j1 := way[j0]
			p[j0] = p[j1]
			j0 = j1
			if j0 == 0 {
				break
			}
		}
	}
	out := make([]int, n)
	for i := range out {
		out[i] = -1
	}
	for j := 1; j <= m; j++ {
		if p[j] != 0 {
			out[p[j]-1] = j - 1
		}
	}
	return out
}

// amountsDiffer: the method gives relative peak areas (amount) that are
// not all the same, so a peak's area says something about its identity.
func amountsDiffer(m *methodfile.Method) bool {
	for _, c := range m.Compounds {
		if c.Amount != m.Compounds[0].Amount {
			return true
		}
	}
	return false
}

// areaSD is the spread of ln(area/amount) between compounds of one run
// (a factor of about 1.4: response factors differ; common practice for
// flame ionisation, a guess for other detectors).
const areaSD = 0.35

// areaCosts: for candidate i and peak j, ln(area_j) − ln(amount_i), to be
// centred on the run's median and squared in addArea; NaN when the peak
// has no area.
func areaCosts(mcs []model.Compound, cand []int, r *methodfile.Run, un []int) [][]float64 {
	out := make([][]float64, len(cand))
	for i, ci := range cand {
		row := make([]float64, len(un))
		for j, k := range un {
			a := r.Peaks[k].Area
			if a > 0 && mcs[ci].Amount > 0 {
				row[j] = math.Log(a) - math.Log(mcs[ci].Amount)
			} else {
				row[j] = math.NaN()
			}
		}
		out[i] = row
	}
	return out
}

// addArea adds ((x − median)/areaSD)², at most 4, to the peak columns, the
// median over the current matches (none on the first pass: no area term).
func addArea(cost, area [][]float64, match []int) {
	if area == nil || match == nil {
		return
	}
	var xs []float64
	for i, j := range match {
		if j >= 0 && j < len(area[i]) && !math.IsNaN(area[i][j]) {
			xs = append(xs, area[i][j])
		}
	}
	if len(xs) < 3 {
		return
	}
	sort.Float64s(xs)
	med := xs[len(xs)/2]
	for i := range cost {
		for j := range area[i] {
			if x := area[i][j]; !math.IsNaN(x) && cost[i][j] < 1e8 {
				d := (x - med) / areaSD
				cost[i][j] += math.Min(d*d, 4)
			}
		}
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// pairSearch settles close pairs the alternation cannot: for two
// compounds assigned from unnamed peaks, adjacent in some run and within
// 0.05 min of each other there or left in doubt by the method's values, every choice of which runs swap their two peaks is
// fitted, and the choice with the least χ² = SSR/σ² plus the squared
// distance of both compounds' fitted ΔH, ΔS from the method's values (in
// units of goal.robust.prior_dH_kJ_mol and prior_dS_J_mol_K), plus the
// first round's time cost (the method's own predictions) and the peak-area
// term of the assignment when the method gives amounts, is kept.
// A labelling swapped in every run fits the times exactly as well; only the
// method's values (and the areas) tell it apart. It returns how many pairs
// changed.
func pairSearch(start, current *methodfile.Method, st []runSetup, assigned, unsure map[obsKey]bool, first map[obsKey][2]float64, sd float64, warn *[]string) (int, map[string]bool) {
	out := start
	curC, _ := current.ModelCompounds()
	ambiguous := map[string]bool{}
	sigma := math.Max(sd, 0.002) * 60
	pdh, pds := out.Goal.Robust.PriorDHkJ, out.Goal.Robust.PriorDS
	if !(pdh > 0) {
		pdh = 2
	}
	if !(pds > 0) {
		pds = 4
	}
	startC, err := out.ModelCompounds()
	if err != nil {
		return 0, ambiguous
	}
	type pair struct{ a, b string }
	var pairs []pair
	seen := map[pair]bool{}
	for ri := range st {
		var names []string
		for k := range assigned {
			if k.run == st[ri].name {
				names = append(names, k.compound)
			}
		}
		sort.Slice(names, func(i, j int) bool {
			return st[ri].run.Retention[names[i]] < st[ri].run.Retention[names[j]]
		})
		for i := 1; i < len(names); i++ {
			x, y := names[i-1], names[i]
			doubt := unsure[obsKey{st[ri].name, x}] || unsure[obsKey{st[ri].name, y}]
			if st[ri].run.Retention[y]-st[ri].run.Retention[x] > 0.05 && !doubt {
				continue
			}
			if x > y {
				x, y = y, x
			}
			p := pair{x, y}
			if !seen[p] {
				seen[p] = true
				pairs = append(pairs, p)
			}
		}
	}
	sort.Slice(pairs, func(i, j int) bool { return pairs[i].a+"\x00"+pairs[i].b < pairs[j].a+"\x00"+pairs[j].b })
	changed := 0
	for _, p := range pairs {
		ia, ib := compoundIndex(out, p.a), compoundIndex(out, p.b)
		if ia < 0 || ib < 0 {
			continue
		}
		var both []int
		for ri := range st {
			if assigned[obsKey{st[ri].name, p.a}] && assigned[obsKey{st[ri].name, p.b}] {
				both = append(both, ri)
			}
		}
		if len(both) == 0 || len(both) > 8 {
			continue
		}
		// peak-area evidence, as in the assignment: ln(area) − ln(amount)
		// against the run's median, in units of areaSD
		areaOf := func(r *methodfile.Run, name string) float64 {
			t := r.Retention[name]
			for _, pk := range r.Peaks {
				if pk.TimeMin == t && pk.Area > 0 {
					return pk.Area
				}
			}
			return math.NaN()
		}
		useArea := amountsDiffer(start)
		medians := map[int]float64{}
		if useArea {
			for _, ri := range both {
				r := st[ri].run
				var xs []float64
				for _, n := range r.Names() {
					if ci := compoundIndex(start, n); ci >= 0 && startC[ci].Amount > 0 {
						if a := areaOf(r, n); !math.IsNaN(a) {
							xs = append(xs, math.Log(a)-math.Log(startC[ci].Amount))
						}
					}
				}
				if len(xs) >= 3 {
					sort.Float64s(xs)
					medians[ri] = xs[len(xs)/2]
				}
			}
		}
		// fused peaks share their area by a drop line: no evidence then
		resolved := func(ri int) bool {
			r := st[ri].run
			wa, wb := r.Widths[p.a], r.Widths[p.b]
			return wa > 0 && wb > 0 && math.Abs(r.Retention[p.a]-r.Retention[p.b]) > 1.5*(wa+wb)/1.1774100225154747
		}
		areaCost := func(ri int, peakOf string, ci int) float64 {
			med, ok := medians[ri]
			if !resolved(ri) {
				return 0
			}
			a := areaOf(st[ri].run, peakOf)
			if !ok || math.IsNaN(a) || !(startC[ci].Amount > 0) {
				return 0
			}
			d := (math.Log(a) - math.Log(startC[ci].Amount) - med) / areaSD
			return math.Min(d*d, 4)
		}
		// the method's own prediction of each time (round 0), as in the
		// assignment's cost
		timeCost := func(ri int, peakOf, name string) float64 {
			v, ok := first[obsKey{st[ri].name, name}]
			if !ok || !(v[1] > 0) {
				return 0
			}
			z := (st[ri].run.Retention[peakOf] - v[0]) / v[1]
			return math.Min(z*z, gate*gate)
		}
		score := func(mask int) (float64, bool) {
			total := 0.0
			for bi, ri := range both {
				if mask&(1<<bi) != 0 {
					total += areaCost(ri, p.b, ia) + areaCost(ri, p.a, ib) + timeCost(ri, p.b, p.a) + timeCost(ri, p.a, p.b)
				} else {
					total += areaCost(ri, p.a, ia) + areaCost(ri, p.b, ib) + timeCost(ri, p.a, p.a) + timeCost(ri, p.b, p.b)
				}
			}
			for side, ci := range []int{ia, ib} {
				name := []string{p.a, p.b}[side]
				other := []string{p.b, p.a}[side]
				var obs []obsPoint
				for ri := range st {
					r := st[ri].run
					t, ok := r.Retention[name]
					if !ok {
						continue
					}
					for bi, rj := range both {
						if rj == ri && mask&(1<<bi) != 0 {
							t = r.Retention[other]
						}
					}
					obs = append(obs, obsPoint{run: ri, t: t * 60})
				}
				if len(obs) < 2 {
					return 0, false
				}
				th0 := []float64{startC[ci].DH, startC[ci].DS}
				// warm start: the current fit of the compound whose peaks
				// this side takes in most runs
				from := name
				if 2*bits.OnesCount(uint(mask)) > len(both) {
					from = other
				}
				if cj := compoundIndex(current, from); cj >= 0 && cj < len(curC) {
					th0 = []float64{curC[cj].DH, curC[cj].DS}
				}
				f, err := fitCompoundFrom(st, obs, startC[ci], false, th0)
				if err != nil {
					return 0, false
				}
				c := startC[ci]
				total += f.ssr/(sigma*sigma) + priorDist2(f, c, sigma, pdh, pds)
			}
			return total, true
		}
		// every swap pattern for up to 3 runs; beyond, none, all and each
		// single run swapped (and their mirrors)
		var masks []int
		full := (1 << len(both)) - 1
		close := false
		for _, ri := range both {
			if r := st[ri].run; math.Abs(r.Retention[p.a]-r.Retention[p.b]) <= 0.05 {
				close = true
			}
		}
		switch {
		case !close:
			// apart everywhere, in doubt only by the method's values: the
			// alternation settles single runs; test the mirror labelling
			masks = []int{0, full}
		case len(both) <= 3:
			for mask := 0; mask <= full; mask++ {
				masks = append(masks, mask)
			}
		default:
			masks = append(masks, 0, full)
			for bi := range both {
				masks = append(masks, 1<<bi, full^(1<<bi))
			}
		}
		best, bestScore := 0, math.Inf(1)
		for _, mask := range masks {
			if sc, ok := score(mask); ok && sc < bestScore {
				best, bestScore = mask, sc
			}
		}
		// the mirror labelling fits the times as well; unless the values
		// and areas favour one by Δ ≥ 6 (a likelihood ratio of 20:1) the
		// identities are a guess
		if alt, ok := score(full ^ best); ok && alt-bestScore < 6 {
			ambiguous[p.a], ambiguous[p.b] = true, true
			*warn = append(*warn, fmt.Sprintf("%s and %s: their peaks are too close and their values too alike to tell which is which from retention alone (the other labelling scores only %.1f worse); name one of them in a peak table", p.a, p.b, alt-bestScore))
		}
		if best == 0 {
			continue
		}
		changed++
		for bi, ri := range both {
			if best&(1<<bi) == 0 {
				continue
			}
			r := st[ri].run
			ta, tb := r.Retention[p.a], r.Retention[p.b]
			wa, wb := r.Widths[p.a], r.Widths[p.b]
			r.SetRetention(p.a, tb, wb)
			r.SetRetention(p.b, ta, wa)
		}
	}
	return changed, ambiguous
}

// priorDist2 is (θ̂ − θ₀)ᵀ (C_prior + C_fit)⁻¹ (θ̂ − θ₀) for ΔH (kJ/mol)
// and ΔS: the fit's own covariance is added so that the long, poorly
// determined direction along the ΔH–ΔS ridge does not count as evidence.
func priorDist2(f fitResult, c model.Compound, sigma, pdh, pds float64) float64 {
	d0, d1 := f.DHkJ-c.DH/1000, f.DS-c.DS
	a, b, d := pdh*pdh, 0.0, pds*pds
	if f.cov != nil && len(f.free) == 2 {
		s2 := sigma * sigma
		a += f.cov.At(0, 0) * s2 / 1e6
		b += f.cov.At(0, 1) * s2 / 1e3
		d += f.cov.At(1, 1) * s2
	}
	det := a*d - b*b
	if !(det > 0) {
		return d0*d0/a + d1*d1/d
	}
	return (d*d0*d0 - 2*b*d0*d1 + a*d1*d1) / det
}
