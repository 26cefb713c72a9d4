package optimizer

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/rampwise/rampwise/model"
)

// σ_Rs from first-order propagation agrees with a Monte-Carlo estimate:
// (ΔH, ΔS) of both compounds of the pair drawn from the bivariate normal
// of their standard errors and correlation, the pair simulated afresh for
// each draw, the spread of Rs measured.
func TestSigmaMatchesMonteCarlo(t *testing.T) {
	comps := smallCompounds()
	p := smallProblem(t, comps, 1)
	p.Robust = Robust{Z: 2, Retention: []RetentionSE{
		{DH: 30, DS: 0.08, Corr: 0.999}, {DH: 30, DS: 0.075, Corr: 0.999}, {DH: 25, DS: 0.065, Corr: 0.998}, {DH: 30, DS: 0.08, Corr: 0.999},
	}}
	if err := p.check(); err != nil {
		t.Fatal(err)
	}
	prog := model.Program{Initial: 333.15, InitialHold: 30, Ramps: []model.Ramp{{Rate: 8 * perMin, Final: 520}}}
	var nom model.Result
	if err := p.System.Simulate(prog, &nom); err != nil {
		t.Fatal(err)
	}
	rg := newRig(0, p.System, p.Robust)
	var rep RobustReport
	if err := p.robust(rg, prog, &nom, &robustScratch{}, math.Inf(-1), &rep); err != nil {
		t.Fatal(err)
	}
	// the critical pair is b / c (indices 1, 2)
	pr := nom.Pairs[nom.Critical]
	if pr.First+pr.Second != 3 {
		t.Fatalf("critical pair %d/%d, want b/c", pr.First, pr.Second)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	n := 300
	if testing.Short() {
		n = 80
	}
	var sum, sum2 float64
	for k := 0; k < n; k++ {
		c := append([]model.Compound(nil), comps...)
		for _, i := range []int{pr.First, pr.Second} {
			e := p.Robust.Retention[i]
			z1, z2 := rng.NormFloat64(), rng.NormFloat64()
			c[i].DH += e.DH * z1
			c[i].DS += e.DS * (e.Corr*z1 + math.Sqrt(1-e.Corr*e.Corr)*z2)
		}
		sys, err := model.NewSystem(p.System.Cond, c, p.System.Oven)
		if err != nil {
			t.Fatal(err)
		}
		var res model.Result
		if err := sys.Simulate(prog, &res); err != nil {
			t.Fatal(err)
		}
		var a, b model.Peak
		for _, pk := range res.Peaks {
			switch pk.Compound {
			case pr.First:
				a = pk
			case pr.Second:
				b = pk
			}
		}
		rs := math.Abs(b.RetentionTime-a.RetentionTime) / (2 * (a.Sigma + b.Sigma))
		sum += rs
		sum2 += rs * rs
	}
	mean := sum / float64(n)
	sd := math.Sqrt(sum2/float64(n) - mean*mean)
	t.Logf("Rs %.4f: first-order σ %.4f, Monte Carlo σ %.4f (%d draws), Rs − 2σ %.4f", nom.MinResolution, rep.Sigma, sd, n, rep.LowZ)
	// the Monte-Carlo σ has a relative standard error of about 1/sqrt(2n)
	if tol := 0.1 + 3/math.Sqrt(2*float64(n)); math.Abs(rep.Sigma-sd) > tol*sd {
		t.Errorf("first-order σ_Rs %.4f, Monte Carlo %.4f: off by more than %.0f %%", rep.Sigma, sd, 100*tol)
	}
	// without the covariance (ΔH and ΔS taken as independent) σ is much larger
	for i := range p.Robust.Retention {
		p.Robust.Retention[i].Corr = 0
	}
	var rep0 RobustReport
	p.robust(newRig(0, p.System, p.Robust), prog, &nom, &robustScratch{}, math.Inf(-1), &rep0)
	if !(rep0.Sigma > 3*rep.Sigma) {
		t.Errorf("ignoring the correlation gives σ %.4f, with it %.4f: expected several times larger", rep0.Sigma, rep.Sigma)
	}
}
