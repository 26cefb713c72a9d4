package tui

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer/plan"
)

// The planned next run (P): optimizer/plan's advice (inject a scouting
// run, verify the optimized program, or done) as `rampwise plan` gives it,
// computed in the background (esc stops it). Its program can be taken into
// the method as an edit (u undoes). The runs are the scouting runs file
// last fitted with F; once a plan was shown, every fit review that closes
// plans again, so that adding a measured run updates the advice.

type (
	// startPlanMsg asks the root to plan the next run.
	startPlanMsg struct{}
	// replanMsg: a fit review closed; plan again if a plan was shown.
	replanMsg struct{}
	// fitTakenMsg: the fitted parameters from runs file path were taken;
	// prior is the method before (the plan's prior for those runs).
	fitTakenMsg struct {
		path  string
		prior *methodfile.Method
	}
	// askFitMsg opens the prompt for a scouting runs file (F).
	askFitMsg struct{}
)

type planOutcome struct {
	p     *plan.Plan
	runs  int    // how many runs it was planned from
	path  string // the runs file, "" for none
	limit methodfile.Limits
	err   error
}

// planState is what the root keeps for planning: the runs file last
// fitted, the method before its fit was taken, and whether a plan was shown.
type planState struct {
	runs  string
	prior *methodfile.Method
	shown bool
}

// planMethod is the method to plan from: the current one, with the
// parameters it had before the runs' fit was taken (the planner updates
// them from the runs itself; counting the runs twice would overstate what
// is known).
func (a *App) planMethod() *methodfile.Method {
	m := a.sh.method.Clone()
	if pr := a.plan.prior; pr != nil && a.plan.runs != "" {
		m.Compounds = pr.Clone().Compounds
		m.Column.DiameterMM, m.Column.PlateHeight = pr.Column.DiameterMM, pr.Column.PlateHeight
	}
	return m
}

func (a *App) startPlan() tea.Cmd {
	m, path := a.planMethod(), a.plan.runs
	settings := plan.Settings{Optimizer: a.optSettings}
	what := "planning the next run from the method's values"
	if path != "" {
		what = "planning the next run from " + inert(path)
	}
	a.plan.shown = true
	_, cmd := a.startJob(what, func(ctx context.Context) any {
		return planRun(ctx, m, path, settings)
	})
	a.say(msgInfo, "%s… esc stops", what)
	return cmd
}

func planRun(ctx context.Context, m *methodfile.Method, path string, s plan.Settings) planOutcome {
	out := planOutcome{path: path, limit: m.Limits}
	var runs *methodfile.Runs
	if path != "" {
		r, err := methodfile.ReadRuns(path, m)
		if err != nil {
			out.err = err
			return out
		}
		runs, out.runs = r, len(r.Runs)
	}
	p, err := plan.Next(ctx, m, runs, s)
	if err == nil && ctx.Err() != nil {
		err = ctx.Err()
	}
	out.p, out.err = p, err
	return out
}

func (a *App) planDone(v planOutcome) {
	if v.err != nil {
		a.say(msgError, "plan: %v", inertErr(v.err))
		return
	}
	d := newPlanDialog(&a.sh, v)
	a.open(d)
	// the planned run in the chart, the current one dotted beneath
	pm := d.taken()
	var r model.Result
	if a.sh.sys != nil && pm.Carrier == a.sh.method.Carrier && a.sh.sys.Simulate(pm.ModelProgram(), &r) == nil {
		a.chart.Update(previewMsg{res: &r, prog: pm.ModelProgram(), label: "planned run", showIt: true, faint: true})
	}
	switch v.p.Action {
	case plan.Inject:
		a.say(msgInfo, "next: inject the scouting run shown · enter takes its program into the method (u undoes) · F adds a measured run")
	case plan.Verify:
		a.say(msgGood, "next: one verification injection of the optimized program · enter takes it into the method")
	default:
		a.say(msgGood, "done: the runs already hold a verification run that meets the target")
	}
}

// --- the plan dialog ---

type planDialog struct {
	sh    *shared
	v     planOutcome
	keys  ListKeys
	fit   key.Binding
	off   int
	w, h  int
	lines []string
}

func newPlanDialog(sh *shared, v planOutcome) *planDialog {
	k := scrollKeys(ListKeys{
		Accept: bind([]string{"enter", "y"}, "enter/y", "take its program into the method"),
		Reject: bind([]string{"esc", "n", "q"}, "esc/n/q", "close"),
	})
	return &planDialog{sh: sh, v: v, keys: k, fit: bind([]string{"F"}, "F", "add a measured run (fit a runs file)")}
}

func (d *planDialog) ShortHelp() []key.Binding {
	return []key.Binding{d.keys.Accept, d.keys.Reject, d.fit, d.keys.Up}
}
func (d *planDialog) FullHelp() [][]key.Binding {
	return [][]key.Binding{{d.keys.Accept, d.keys.Reject, d.fit, d.keys.Up, d.keys.PageDown}}
}
func (d *planDialog) View() string     { return strings.Join(d.lines, "\n") }
func (d *planDialog) SetSize(w, h int) { d.w, d.h = w, h; d.render() }
func (d *planDialog) rows() int        { return max(1, d.h-1) }

// wantRows: the title and the whole body; the chart (the planned run)
// gives rows for them down to minDialogChartRows (App.heights).
func (d *planDialog) wantRows() int   { return 1 + len(d.body()) }
func (d *planDialog) chartFloor() int { return minDialogChartRows }

// taken is the method with the planned program (and its carrier).
func (d *planDialog) taken() *methodfile.Method {
	m := d.sh.method.Clone()
	m.Oven = d.v.p.Oven
	m.Oven.Ramps = append([]methodfile.Ramp(nil), d.v.p.Oven.Ramps...)
	m.Carrier = d.v.p.Carrier
	return m
}

func (d *planDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.KeyMsg:
		switch {
		case key.Matches(msg, d.keys.Accept):
			what := map[plan.Action]string{plan.Inject: "took the planned scouting program (u undoes)",
				plan.Verify: "took the program to verify (u undoes)", plan.Done: "took the verified program (u undoes)"}[d.v.p.Action]
			d.sh.send(closeMsg{}, editMsg{m: d.taken(), what: what})
			return d, nil
		case key.Matches(msg, d.keys.Reject):
			d.sh.send(closeMsg{}, sayMsg{msgInfo, "closed the plan (P plans again)"})
			return d, nil
		case key.Matches(msg, d.fit):
			d.sh.send(closeMsg{}, askFitMsg{})
			return d, nil
		}
		scroll(&d.off, msg, d.keys, len(d.body()), d.rows())
		d.render()
	case refreshMsg:
		d.render()
	}
	return d, nil
}

func sdText(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "-"
	}
	if x > 10 {
		return "more than 10"
	}
	return fmt.Sprintf("%.2f", x)
}

// body: the program as the keypad takes it and the carrier, the reason,
// the expected resolution, the estimates, and the [[run]] block to paste.
func (d *planDialog) body() []string {
	st, p, w := d.sh.st, d.v.p, d.w
	var out []string
	head := map[plan.Action]string{plan.Inject: " program to inject, as the oven keypad takes it:",
		plan.Verify: " program to verify with one injection, as the oven keypad takes it:", plan.Done: " verified program:"}[p.Action]
	put := func(style lipgloss.Style, s string) {
		for _, l := range wrap(s, w) {
			out = append(out, style.Render(l))
		}
	}
	put(st.TableHead, head)
	for _, l := range plan.KeypadLines(p.Oven, d.v.limit) {
		put(st.Value, "   "+l)
	}
	car := fmt.Sprintf("   carrier %s, constant flow %s mL/min", p.Carrier.Gas, fmtNum(p.Carrier.FlowMLMin, 2, 2))
	if p.Carrier.Mode == model.ConstantPressure {
		car = fmt.Sprintf("   carrier %s, constant pressure %s kPa", p.Carrier.Gas, fmtNum(p.Carrier.InletKPa, 1, 1))
	}
	put(st.Value, car)
	for _, l := range wrap(" why: "+inert(p.Reason), w) {
		out = append(out, st.Info.Render(l))
	}
	if !math.IsNaN(p.ExpectedMinResolution) && !math.IsInf(p.ExpectedMinResolution, 0) {
		s := fmt.Sprintf(" optimized program: predicted min Rs %s ± %s (target %s, %s)", format.RsNumber(p.ExpectedMinResolution, d.sh.method.Goal.MinResolution),
			sdText(p.ExpectedSD), format.Target(d.sh.method.Goal.MinResolution), inert(strings.Join(p.CriticalPair[:], " / ")))
		if p.Action == plan.Inject {
			s += " · after this run ± " + sdText(p.SDAfter) + " expected (the parameters' part)"
		}
		for _, l := range wrap(s, w) {
			out = append(out, st.Info.Render(l))
		}
	}
	if p.Action == plan.Done && p.VerifiedBy != "" {
		put(st.Good, fmt.Sprintf(" verified by run %s: measured min Rs %.2f", inert(p.VerifiedBy), p.MeasuredMinResolution))
	}
	if len(p.Estimated) > 0 {
		var names []string
		for _, n := range p.Estimated {
			names = append(names, inert(n))
		}
		for _, l := range wrap(" ⚠ estimated from the formula only (rough, about ± 8 kJ/mol in ΔH): "+strings.Join(names, ", "), w) {
			out = append(out, st.Warn.Render(l))
		}
	}
	if p.Action != plan.Done {
		put(st.TableHead, " once the run is made, add it to the runs file (then F fits it and the plan updates):")
		for _, l := range strings.Split(strings.TrimRight(plan.RunBlock(d.runName(), p.Oven, &p.Carrier, d.v.limit, p.Compounds), "\n"), "\n") {
			for _, l := range wrapTOML("   "+inert(l), w) {
				out = append(out, st.Dim.Render(l))
			}
		}
	}
	return out
}

// runName names the planned run as the planner does (scout-N or
// verify-N, a name the runs file does not have yet).
func (d *planDialog) runName() string { return d.v.p.RunName }

func (d *planDialog) render() {
	st, p := d.sh.st, d.v.p
	action := map[plan.Action]string{plan.Inject: "INJECT this scouting run", plan.Verify: "VERIFY the optimized program", plan.Done: "DONE, no further injection"}[p.Action]
	from := " · from the method's values"
	if d.v.path != "" {
		from = fmt.Sprintf(" · from %d runs · in %s", d.v.runs, inert(d.v.path))
	}
	body := d.body()
	rows := d.rows()
	d.off = max(0, min(d.off, len(body)-rows))
	// items that do not fit are left out whole, the counter first
	title := fitTitle(st.Focused.Render("▸next run: ")+st.Good.Render(action), st.Dim, scrollCounter(d.off, rows, len(body))+from, d.w)
	d.lines = fill(append([]string{title}, body[d.off:min(len(body), d.off+rows)]...), d.h)
}

// scrollCounter says how many of n lines, shown rows at a time from off,
// lie above and below the view (" · ↑ 3 above · ↓ 12 below"); "" when all
// show.
func scrollCounter(off, rows, n int) string {
	above, below := off, max(0, n-off-rows)
	s := ""
	if above > 0 {
		s += fmt.Sprintf(" · ↑ %d above", above)
	}
	if below > 0 {
		s += fmt.Sprintf(" · ↓ %d below", below)
	}
	return s
}

// wrapTOML wraps a line of TOML to w columns without changing what it
// means when pasted: a comment that does not fit goes on the lines below,
// each a comment; a line too wide without one wraps at spaces.
func wrapTOML(l string, w int) []string {
	if ansi.StringWidth(l) <= w {
		return []string{l}
	}
	if i := strings.Index(l, "#"); i > 0 && !strings.Contains(l[:i], "\"") {
		code, comment := strings.TrimRight(l[:i], " "), strings.TrimSpace(strings.TrimPrefix(l[i:], "#"))
		indent := l[:len(l)-len(strings.TrimLeft(l, " "))]
		var out []string
		if strings.TrimSpace(code) != "" {
			out = wrap(code, w)
		}
		for _, c := range wrap(comment, w-len(indent)-2) {
			out = append(out, indent+"# "+strings.TrimLeft(c, " "))
		}
		return out
	}
	return wrap(l, w)
}
