package methodfile

import (
	"errors"
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
)

// fromIndex gives compound i, which has only a retention index I, its dH,
// dS and dCp by interpolating ln K between the two ladder alkanes that
// bracket it (carbon numbers za ≤ I/100 < zb): with f = (I/100 − za)/(zb − za),
//
//	ln Kx(T) = (1 − f) ln Ka(T) + f ln Kb(T)
//
// at every temperature. ln K is linear in (dH, dS, dCp) referred to one
// temperature, so the compound's parameters are the same mixture of the two
// alkanes' parameters, and its Kováts index against them is exactly I at
// every temperature, index_temp_c included (the index is taken as
// independent of temperature: one value cannot say how it drifts). Outside
// the ladder the two nearest alkanes are extended the same way.
func fromIndex(m *Method, i int) error {
	ladder := ladderAlkanes(m)
	if len(ladder) < 2 {
		return errors.New("a compound given by retention index needs at least two ladder alkanes (alkane_carbons) with dH and dS in the file")
	}
	c := &m.Compounds[i]
	n := c.RetentionIndex / 100
	lo := 0
	for j := range ladder {
		if float64(ladder[j].AlkaneCarbons) <= n {
			lo = j
		}
	}
	hi := -1
	for j := lo + 1; j < len(ladder); j++ {
		if ladder[j].AlkaneCarbons > ladder[lo].AlkaneCarbons {
			hi = j
			break
		}
	}
	if hi < 0 { // above the ladder: the two highest different carbon numbers
		hi = len(ladder) - 1
		lo = -1
		for j := hi - 1; j >= 0; j-- {
			if ladder[j].AlkaneCarbons < ladder[hi].AlkaneCarbons {
				lo = j
				break
			}
		}
		if lo < 0 {
			return errors.New("the ladder alkanes must have at least two different carbon numbers")
		}
	}
	a, b := ladder[lo], ladder[hi]
	f := (n - float64(a.AlkaneCarbons)) / float64(b.AlkaneCarbons-a.AlkaneCarbons)
	tref := model.DefaultRefTemp
	at := func(x Compound) (dh, ds float64) {
		tx := x.RefTempC + model.ZeroCelsius
		return x.DHkJ*1000 + x.DCp*(tref-tx), x.DS + x.DCp*math.Log(tref/tx)
	}
	ha, sa := at(a)
	hb, sb := at(b)
	c.DHkJ = ((1-f)*ha + f*hb) / 1000
	c.DS = (1-f)*sa + f*sb
	c.DCp = (1-f)*a.DCp + f*b.DCp
	c.RefTempC = tref - model.ZeroCelsius
	if !(c.DHkJ < 0) || !finite(c.DS) {
		return fmt.Errorf("the ladder gives this index no retention (dH %.1f kJ/mol)", c.DHkJ)
	}
	return nil
}
