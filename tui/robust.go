package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/robust"
	"github.com/rampwise/rampwise/model/robust/methodtol"
)

// robustState is the method's own program under its [goal.robust]
// tolerances, evaluated after every simulation (model/robust, as the
// optimizer and the method sheet evaluate it), so that the summary shows
// the worst corner and the lowest Rs − z·σ of the program as it stands,
// taken from the optimizer or set by hand. The Systems of the corners
// depend on the column, the carrier and the compounds only: they are
// built again when those change, and a program edit costs a few
// simulations.
type robustState struct {
	key string // systemKey and tolerances the set was built for
	set *robust.Set
	sc  robust.Scratch
	rep robust.Report // valid when ok
	ok  bool
}

// updateRobust evaluates the method's program (a.res is its simulation).
func (a *App) updateRobust() {
	r := &a.rob
	r.ok, r.rep = false, robust.Report{}
	m := a.sh.method
	tol := methodtol.FromMethod(m)
	if !tol.On() || a.sh.sys == nil {
		r.set, r.key = nil, ""
		return
	}
	k := a.sysk + fmt.Sprintf("|%v", tol)
	if r.set == nil || r.key != k || r.set.Base != a.sh.sys {
		r.set, r.key = robust.NewSet(a.sh.sys, tol), k
	}
	var rep robust.Report
	if err := r.set.Evaluate(m.ModelProgram(), &a.res, &r.sc, math.Inf(-1), &rep); err != nil {
		return
	}
	r.rep, r.ok = rep, true
}

// robustSummary is the summary's robust part: the worst corner's minimum
// Rs and the lowest Rs − z·σ ("" without [goal.robust] or without a
// counted pair), with whether the lower of them meets the target when the
// nominal Rs does (when it does not, the summary already says not met,
// and neither can the margin, which is at most the nominal); met tells
// the style.
func (a *App) robustSummary() (text string, met bool) {
	r := a.rob.rep
	if !a.rob.ok || !r.On {
		return "", true
	}
	target := a.sh.method.Goal.MinResolution
	var parts []string
	low := math.Inf(1)
	if !math.IsNaN(r.Worst) && !math.IsInf(r.Worst, 0) {
		parts = append(parts, strings.ReplaceAll("worst corner "+format.RsNumber(r.Worst, target), " ", nbsp))
		low = math.Min(low, r.Worst)
	}
	if r.Z > 0 && !math.IsNaN(r.LowZ) && !math.IsInf(r.LowZ, 0) {
		parts = append(parts, strings.ReplaceAll(fmt.Sprintf("Rs − %sσ %s", format.Clean(r.Z), format.RsNumber(r.LowZ, target)), " ", nbsp))
		low = math.Min(low, r.LowZ)
	}
	if len(parts) == 0 {
		return "", true
	}
	s := strings.Join(parts, ", ")
	if format.MetAll(a.res.MinResolution, target, a.res.TargetsNotEluted) {
		s += " " + format.Verdict(low, target)
	}
	return s, format.Met(low, target)
}
