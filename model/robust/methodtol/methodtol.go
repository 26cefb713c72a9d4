// Package methodtol reads a method file's [goal.robust] tolerances and
// standard errors for model/robust, and checks the method's own program
// against them (for the UI and the method sheet); the optimizer itself
// gets its tolerances through optimizer/methodsearch.
package methodtol

import (
	"math"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/robust"
)

// FromMethod is the method's [goal.robust] tolerances in SI units, with
// each compound's standard errors (dH_se_kJ_mol, dS_se_J_mol_K, dH_dS_corr).
func FromMethod(m *methodfile.Method) robust.Tolerances {
	rb := m.Goal.Robust
	t := robust.Tolerances{
		OvenOffset:    rb.OvenOffsetC,
		FlowPct:       rb.FlowPct,
		EfficiencyPct: rb.EfficiencyPct,
		Z:             rb.RetentionSigma,
		PriorDH:       rb.PriorDHkJ * 1000,
		PriorDS:       rb.PriorDS,
	}
	if rb.RetentionSigma > 0 {
		t.Retention = make([]robust.SE, len(m.Compounds))
		for i, c := range m.Compounds {
			if c.HasSE {
				t.Retention[i] = robust.SE{DH: c.DHSE * 1000, DS: c.DSSE, Corr: c.DHDSCorr}
			}
		}
	}
	return t
}

// Check is how the method's own program fares under its tolerances (sys
// is the method's System): nominal Rs, the worst corner and which, and
// Rs ± σ of the critical pair. It is zero (On false) without [goal.robust].
func Check(m *methodfile.Method, sys *model.System) (robust.Report, error) {
	tol := FromMethod(m)
	if !tol.On() {
		return robust.Report{}, nil
	}
	prog := m.ModelProgram()
	var res model.Result
	if err := sys.Simulate(prog, &res); err != nil {
		return robust.Report{}, err
	}
	var rep robust.Report
	err := robust.NewSet(sys, tol).Evaluate(prog, &res, &robust.Scratch{}, math.Inf(-1), &rep)
	return rep, err
}
