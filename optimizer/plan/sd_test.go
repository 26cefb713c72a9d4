package plan

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// The planner's first-order SD of a pair's resolution agrees with a
// Monte-Carlo estimate under the posterior of two scouting runs, whose ΔH
// and ΔS are correlated to 0.999 and more: both compounds' (ΔH, ΔS) drawn
// from their posterior normal, the pair simulated afresh for each draw, the
// spread of Rs measured. Finite-difference steps too large for that
// correlation (20 J/mol and 0.05 J/(mol·K)) gave 0.16 against 0.083 here.
func TestPosteriorSDMatchesMonteCarlo(t *testing.T) {
	truth, rough := newSample(t, 6002)
	l := &lab{truth: truth, rng: rand.New(rand.NewPCG(6002, 99))}
	for i, r := range [][2]float64{{50, 15}, {35, 10}} {
		o := methodfile.Oven{InitialC: r[0], InitialHoldMin: 1, Ramps: []methodfile.Ramp{{RateCMin: r[1], FinalC: 300, HoldMin: 10}}}
		if _, err := l.inject(string(rune('a'+i)), o); err != nil {
			t.Fatal(err)
		}
	}
	runs, err := l.runsFile(rough)
	if err != nil {
		t.Fatal(err)
	}
	st, err := newState(rough, runs)
	if err != nil {
		t.Fatal(err)
	}
	// a step program of the kind the optimizer returns for this sample
	prog := methodfile.ProgramToModel(methodfile.Oven{InitialC: 48, InitialHoldMin: 2.43,
		Ramps: []methodfile.Ramp{{RateCMin: 60, FinalC: 79.4, HoldMin: 2.95}, {RateCMin: 60, FinalC: 209}}})
	if err := st.sens.eval(prog); err != nil {
		t.Fatal(err)
	}
	s := st.sens
	var order []int
	for i := 0; i < s.n; i++ {
		if s.eluted[i] {
			order = append(order, i)
		}
	}
	sort.Slice(order, func(x, y int) bool { return s.t[order[x]] < s.t[order[y]] })
	a, b, least := -1, -1, math.Inf(1)
	for k := 0; k+1 < len(order); k++ {
		if rs, _, _ := s.resolution(order[k], order[k+1]); rs < least {
			a, b, least = order[k], order[k+1], rs
		}
	}
	rs, ga, gb := s.resolution(a, b)
	sp := rsSD(ga, gb, st.cov[a], st.cov[b])
	for _, i := range []int{a, b} {
		c := st.cov[i]
		if corr := c.hs / math.Sqrt(c.hh*c.ss); math.Abs(corr) < 0.99 {
			t.Logf("%s: posterior correlation %.4f", st.sys.Compounds[i].Name, corr)
		}
	}
	rng := rand.New(rand.NewPCG(7, 8))
	const n = 400
	var sum, sum2 float64
	for k := 0; k < n; k++ {
		var cs []model.Compound
		for _, i := range []int{a, b} {
			c := st.sys.Compounds[i]
			v := st.cov[i]
			l11 := math.Sqrt(v.hh)
			l21 := v.hs / l11
			l22 := math.Sqrt(math.Max(v.ss-l21*l21, 0))
			z1, z2 := rng.NormFloat64(), rng.NormFloat64()
			c.DH += l11 * z1
			c.DS += l21*z1 + l22*z2
			c.Target = true
			cs = append(cs, c)
		}
		sys, err := model.NewSystem(st.sys.Cond, cs, st.sys.Oven)
		if err != nil {
			t.Fatal(err)
		}
		var res model.Result
		if err := sys.Simulate(prog, &res); err != nil {
			t.Fatal(err)
		}
		p, q := res.Peaks[0], res.Peaks[1]
		r := math.Abs(q.RetentionTime-p.RetentionTime) / (2 * (p.Sigma + q.Sigma))
		sum += r
		sum2 += r * r
	}
	mean := sum / n
	sd := math.Sqrt(sum2/n - mean*mean)
	t.Logf("%s / %s: Rs %.3f, first-order SD %.4f, Monte Carlo %.4f (%d draws)", st.sys.Compounds[a].Name, st.sys.Compounds[b].Name, rs, sp, sd, n)
	// the Monte-Carlo SD has a relative standard error of about 1/sqrt(2n)
	if tol := 0.1 + 3/math.Sqrt(2*n); math.Abs(sp-sd) > tol*sd {
		t.Errorf("first-order SD %.4f, Monte Carlo %.4f: off by more than %.0f %%", sp, sd, 100*tol)
	}
}
