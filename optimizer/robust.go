package optimizer

import (
	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/robust"
)

// The robust tolerances and their report are the model/robust package's:
// the optimizer, the UI and the method sheet use one evaluation.
type (
	// Robust are the [goal.robust] tolerances (see robust.Tolerances).
	Robust = robust.Tolerances
	// RetentionSE is one compound's standard errors (see robust.SE).
	RetentionSE = robust.SE
	// RobustReport is how a program fares under them (see robust.Report).
	RobustReport = robust.Report
)

// rig is one carrier setting (a flow, or an inlet pressure at constant
// pressure): its nominal System and the robust evaluation on it.
type rig struct {
	value float64 // flow mL/min or inlet gauge kPa, on the keypad grid
	sys   *model.System
	set   *robust.Set
}

func newRig(value float64, sys *model.System, tol Robust) *rig {
	return &rig{value: value, sys: sys, set: robust.NewSet(sys, tol)}
}

// robustScratch is one goroutine's buffers for the robust checks.
type robustScratch = robust.Scratch

// robust evaluates the saved program q (nom is Simulate(q) on rg.sys).
func (p *Problem) robust(rg *rig, q model.Program, nom *model.Result, sc *robustScratch, stopBelow float64, rep *RobustReport) error {
	return rg.set.Evaluate(q, nom, sc, stopBelow, rep)
}

func minCounted(peaks []model.Peak, comps []model.Compound, end, scale, s0 float64) (float64, int, int) {
	return robust.MinCounted(peaks, comps, end, scale, s0)
}
