package robust

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/rampwise/rampwise/model"
)

// The measurement part of σ_Rs (MeasureSD, WidthScatter) agrees with a
// Monte-Carlo estimate: the nominal chromatogram "measured" many times, each
// retention time with Gaussian noise of MeasureSD and each width with
// relative noise WidthScatter, the resolution of the critical pair read from
// each measurement, its spread taken. The parameters are taken as known
// (standard errors near zero), so σ is the measurement's alone.
func TestMeasurementSigmaMatchesMonteCarlo(t *testing.T) {
	col := model.Column{Length: 15, Diameter: 0.25e-3, Film: 0.25e-6, MaxTemp: 300 + model.ZeroCelsius}
	car := model.Carrier{Gas: model.Helium, Mode: model.ConstantFlow, Flow: 1.2e-6 / 60}
	cond, err := model.NewConditions(col, car)
	if err != nil {
		t.Fatal(err)
	}
	// invented compounds: a series with one close pair
	mk := func(name string, n, tweak float64) model.Compound {
		return model.Compound{Name: name, DH: -(9 + 4.9*n) * 1000, DS: -(44 + 6*n) + tweak, Target: true}
	}
	comps := []model.Compound{mk("a", 6, 0), mk("b", 8.0, 0), mk("c", 8.06, -0.25), mk("d", 10, 0)}
	sys, err := model.NewSystem(cond, comps, model.DefaultOven())
	if err != nil {
		t.Fatal(err)
	}
	prog := model.Program{Initial: 333.15, InitialHold: 30, Ramps: []model.Ramp{{Rate: 8.0 / 60, Final: 520}}}
	var nom model.Result
	if err := sys.Simulate(prog, &nom); err != nil {
		t.Fatal(err)
	}
	const timeSD, widthSD = 0.12, 0.03 // s, relative: 0.002 min and 3 %
	se := make([]SE, len(comps))
	for i := range se {
		se[i] = SE{DH: 1e-3, DS: 1e-6}
	}
	set := NewSet(sys, Tolerances{Z: 3, Retention: se, MeasureSD: timeSD, WidthScatter: widthSD})
	var rep Report
	if err := set.Evaluate(prog, &nom, &Scratch{}, math.Inf(-1), &rep); err != nil {
		t.Fatal(err)
	}
	pr := nom.Pairs[nom.Critical]
	var a, b model.Peak
	for _, pk := range nom.Peaks {
		switch pk.Compound {
		case pr.First:
			a = pk
		case pr.Second:
			b = pk
		}
	}
	rng := rand.New(rand.NewPCG(5, 6))
	n := 20000
	var sum, sum2 float64
	for k := 0; k < n; k++ {
		ta := a.RetentionTime + timeSD*rng.NormFloat64()
		tb := b.RetentionTime + timeSD*rng.NormFloat64()
		sa := a.Sigma * (1 + widthSD*rng.NormFloat64())
		sb := b.Sigma * (1 + widthSD*rng.NormFloat64())
		rs := (tb - ta) / (2 * (sa + sb))
		sum += rs
		sum2 += rs * rs
	}
	mean := sum / float64(n)
	sd := math.Sqrt(sum2/float64(n) - mean*mean)
	t.Logf("Rs %.4f: first-order measurement σ %.4f, Monte Carlo %.4f (%d draws)", nom.MinResolution, rep.Sigma, sd, n)
	// first order against the spread; the Monte-Carlo σ has a relative
	// standard error of about 1/sqrt(2n) (0.5 %)
	if math.Abs(rep.Sigma-sd) > 0.03*sd {
		t.Errorf("first-order measurement σ %.4f, Monte Carlo %.4f: off by more than 3 %%", rep.Sigma, sd)
	}
	if want := nom.MinResolution - 3*rep.Sigma; math.Abs(rep.LowZ-want) > 1e-9 && rep.LowPair == nom.Critical {
		t.Errorf("LowZ %.6f, want Rs − 3σ = %.6f", rep.LowZ, want)
	}
	// without the measurement terms σ is the parameters' alone: near zero
	set0 := NewSet(sys, Tolerances{Z: 3, Retention: se})
	var rep0 Report
	if err := set0.Evaluate(prog, &nom, &Scratch{}, math.Inf(-1), &rep0); err != nil {
		t.Fatal(err)
	}
	if !(rep0.Sigma < 0.01*rep.Sigma) {
		t.Errorf("without the measurement σ %.6f, with it %.6f", rep0.Sigma, rep.Sigma)
	}
}
