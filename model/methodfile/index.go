package methodfile

import (
	"errors"
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
)

// fromIndex gives compound i, which has only a retention index, its dH, dS
// and dCp by the virtual-alkane rule: the ladder alkanes' parameters
// (referred to 100 °C) are fitted as straight lines in carbon number and
// taken at carbon number retention_index/100. The compound is assumed to
// behave as that virtual n-alkane. When index_temp_c is given, dS is then
// adjusted so that the compound's Kováts index at that temperature against
// the bracketing ladder alkanes is exactly the given index.
func fromIndex(m *Method, i int) error {
	ladder := ladderAlkanes(m)
	if len(ladder) < 2 {
		return errors.New("a compound given by retention index needs at least two ladder alkanes (alkane_carbons) with dH and dS in the file")
	}
	c := &m.Compounds[i]
	tref := model.DefaultRefTemp
	var xs, hs, ss, cps []float64
	for _, a := range ladder {
		ta := a.RefTempC + model.ZeroCelsius
		dh := a.DHkJ*1000 + a.DCp*(tref-ta)
		ds := a.DS + a.DCp*math.Log(tref/ta)
		xs = append(xs, float64(a.AlkaneCarbons))
		hs = append(hs, dh)
		ss = append(ss, ds)
		cps = append(cps, a.DCp)
	}
	n := c.RetentionIndex / 100
	dh, err := lineAt(xs, hs, n)
	if err != nil {
		return err
	}
	ds, _ := lineAt(xs, ss, n)
	dcp, _ := lineAt(xs, cps, n)
	virt := model.Compound{DH: dh, DS: ds, DCp: dcp, RefTemp: tref}
	if c.HasIndexTemp {
		t := c.IndexTempC + model.ZeroCelsius
		lo, hi := -1, -1
		for j := range ladder {
			if float64(ladder[j].AlkaneCarbons) <= n {
				lo = j
			}
			if hi < 0 && float64(ladder[j].AlkaneCarbons) > n {
				hi = j
			}
		}
		if lo >= 0 && hi >= 0 {
			lnK := func(a Compound) float64 {
				mc := model.Compound{DH: a.DHkJ * 1000, DS: a.DS, DCp: a.DCp, RefTemp: a.RefTempC + model.ZeroCelsius}
				return mc.LnK(t)
			}
			a, b := ladder[lo], ladder[hi]
			f := (n - float64(a.AlkaneCarbons)) / float64(b.AlkaneCarbons-a.AlkaneCarbons)
			target := lnK(a) + f*(lnK(b)-lnK(a))
			virt.DS += model.GasConstant * (target - virt.LnK(t))
		}
	}
	c.DHkJ = virt.DH / 1000
	c.DS = virt.DS
	c.DCp = virt.DCp
	c.RefTempC = tref - model.ZeroCelsius
	if !(c.DHkJ < 0) || !finite(c.DS) {
		return fmt.Errorf("the ladder gives this index no retention (dH %.1f kJ/mol)", c.DHkJ)
	}
	return nil
}

// lineAt fits y = a + b x by least squares and evaluates it at x0.
func lineAt(xs, ys []float64, x0 float64) (float64, error) {
	var sx, sy, sxx, sxy float64
	n := float64(len(xs))
	for i := range xs {
		sx += xs[i]
		sy += ys[i]
		sxx += xs[i] * xs[i]
		sxy += xs[i] * ys[i]
	}
	den := n*sxx - sx*sx
	if den == 0 {
		return 0, errors.New("the ladder alkanes must have at least two different carbon numbers")
	}
	b := (n*sxy - sx*sy) / den
	a := (sy - b*sx) / n
	return a + b*x0, nil
}
