package calibrate

import (
	"fmt"
	"math"
	"sort"
	"strings"

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
func assignLoop(out *methodfile.Method, st []runSetup, runs *methodfile.Runs, opt Options, rep *Report) error {
	assigned := map[obsKey]bool{} // names set by the previous round
	fitted := map[string]bool{}
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
				cand = append(cand, ci)
				pred = append(pred, t)
				if fitted[mcs[ci].Name] {
					spread = append(spread, fittedSpread(sd, t))
				} else {
					spread = append(spread, startSpread(t))
				}
			}
			if len(cand) == 0 {
				continue
			}
			times := make([]float64, len(un))
			for j, k := range un {
				times[j] = r.Peaks[k].TimeMin
			}
			a, b := 0.0, 1.0
			var match []int
			for pass := 0; pass < 4; pass++ {
				cost := costMatrix(pred, spread, times, a, b)
				match = hungarian(cost)
				if round > 0 || len(fitted) > 0 {
					break
				}
				na, nb, ok := alignLine(pred, times, match)
				if !ok || math.Abs(na-a) < 1e-4 && math.Abs(nb-b) < 1e-5 {
					break
				}
				a, b = na, nb
			}
			for i, j := range match {
				if j < 0 || j >= len(times) {
					continue
				}
				name := mcs[cand[i]].Name
				pk := r.Peaks[un[j]]
				r.SetRetention(name, pk.TimeMin, pk.WidthMin)
				assigned[obsKey{s.name, name}] = true
				asg = append(asg, Assignment{Run: s.name, Compound: name, MeasuredMin: pk.TimeMin,
					PredictedMin: a + b*pred[i], Confidence: confidence(pred[i], spread[i], times, j, a, b)})
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
	}
	rep.Assignments = append([]Assignment(nil), asg...)
	sort.SliceStable(rep.Assignments, func(i, j int) bool {
		a, b := rep.Assignments[i], rep.Assignments[j]
		if a.Run != b.Run {
			return a.Run < b.Run
		}
		return a.MeasuredMin < b.MeasuredMin
	})
	for _, a := range rep.Assignments {
		if a.Confidence < 0.9 {
			rep.Warnings = append(rep.Warnings, fmt.Sprintf("run %q: the peak at %.3f min was assigned to %s (predicted %.3f min) with confidence %.2f only: another peak is nearly as close", a.Run, a.MeasuredMin, a.Compound, a.PredictedMin, a.Confidence))
		}
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
