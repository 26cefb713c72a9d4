package tui

import (
	"context"
	"fmt"
	"strings"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer/plan"
)

// The planning key (P): a minimal form of the command `rampwise plan`. It
// asks for the runs file so far, plans in the background and shows the
// advice on the message line: the action, the program as the keypad takes
// it and the predicted resolution. The full reason and the [[run]] block
// to paste are the command's.

type (
	startPlanMsg struct{ path string }
	planOutcome  struct {
		p   *plan.Plan
		err error
	}
)

func (a *App) startPlan(path string) tea.Cmd {
	m := a.sh.method.Clone()
	opt := a.optSettings
	_, cmd := a.startJob("planning the next injection", func(ctx context.Context) any {
		var runs *methodfile.Runs
		if path != "" {
			r, err := methodfile.ReadRuns(path, m)
			if err != nil {
				return planOutcome{err: err}
			}
			runs = r
		}
		p, err := plan.Next(ctx, m, runs, plan.Settings{Optimizer: opt})
		return planOutcome{p: p, err: err}
	})
	return cmd
}

func (a *App) planDone(v planOutcome) {
	if v.err != nil {
		a.say(msgError, "plan: %v", inertErr(v.err))
		return
	}
	p := v.p
	prog := strings.Join(plan.KeypadLines(p.Oven, a.sh.method.Limits), "; ")
	switch p.Action {
	case plan.Done:
		a.say(msgGood, "plan: DONE, run %s verified the program (min Rs %.2f measured): %s", inert(p.VerifiedBy), p.MeasuredMinResolution, prog)
	case plan.Verify:
		a.say(msgGood, "plan: VERIFY this program once (predicted min Rs %.2f ± %.2f): %s · rampwise plan prints the runs-file block", p.ExpectedMinResolution, p.ExpectedSD, prog)
	default:
		a.say(msgInfo, "plan: INJECT this scouting run: %s · optimized program now Rs %s · rampwise plan gives the reason and the runs-file block", prog, fmtPlanRs(p))
	}
}

func fmtPlanRs(p *plan.Plan) string {
	if p.ExpectedSD > 10 {
		return fmt.Sprintf("%.2f, parameters only rough", p.ExpectedMinResolution)
	}
	return fmt.Sprintf("%.2f ± %.2f", p.ExpectedMinResolution, p.ExpectedSD)
}
