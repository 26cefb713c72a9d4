package tui

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/sweep"
	"github.com/rampwise/rampwise/optimizer"
	"github.com/rampwise/rampwise/optimizer/methodsearch"
	"github.com/rampwise/rampwise/tui/canvas"
)

// The dialogs that wait for a decision about a computed result: the
// optimizer's program, a fit, a column ranking; and the window diagram.

func decisionKeys() ListKeys {
	return scrollKeys(ListKeys{
		Accept: bind([]string{"enter", "y"}, "enter/y", "take it"),
		Reject: bind([]string{"esc", "n", "q"}, "n/esc/q", "keep the current"),
	})
}

// scroll keeps an offset into n body rows shown rows at a time.
func scroll(off *int, km tea.KeyMsg, k ListKeys, n, rows int) {
	switch {
	case key.Matches(km, k.Up):
		*off--
	case key.Matches(km, k.Down):
		*off++
	case key.Matches(km, k.PageUp):
		*off -= rows
	case key.Matches(km, k.PageDown):
		*off += rows
	}
	*off = max(0, min(*off, n-rows))
}

// rsText is the minimum resolution and its pair.
func rsText(sh *shared, sys *model.System, r *model.Result) string {
	if r.Critical < 0 {
		return "no counted pair"
	}
	cp := r.Pairs[r.Critical]
	var missing []string
	for _, n := range sys.NotElutedTargets(r) {
		missing = append(missing, inert(n))
	}
	return format.RsAll(r.MinResolution, sh.method.Goal.MinResolution, missing) + " " + format.CriticalPair(inert(sys.Compounds[cp.First].Name), inert(sys.Compounds[cp.Second].Name))
}

// --- the optimizer's result ---

type resultDialog struct {
	sh      *shared
	res     *optimizer.Result
	after   *methodfile.Method
	afterR  model.Result
	showNew bool // the chart shows the optimized run
	// nowRob is the current program under the [goal.robust] tolerances
	// (the optimized one's is res.Robust)
	nowRob optimizer.RobustReport
	keys   ListKeys
	off    int
	w, h   int
	body   []string
	lines  []string
}

func newResultDialog(sh *shared, res *optimizer.Result, after *methodfile.Method, afterR model.Result) *resultDialog {
	k := decisionKeys()
	k.Toggle = bind([]string{"v"}, "v", "old/new run")
	return &resultDialog{sh: sh, res: res, after: after, afterR: afterR, showNew: true, keys: k}
}

// preview is what the chart shows while the result waits.
func (d *resultDialog) preview() previewMsg {
	return previewMsg{res: &d.afterR, prog: d.after.ModelProgram(), label: "optimized run", showIt: d.showNew, faint: true}
}

func (d *resultDialog) ShortHelp() []key.Binding {
	return []key.Binding{d.keys.Accept, d.keys.Reject, d.keys.Toggle, d.keys.Up}
}
func (d *resultDialog) FullHelp() [][]key.Binding { return d.keys.FullHelp() }

// resultKeyRows is how many rows of the result's body hold what decides:
// the carrier and the run time, the minimum Rs, the worst corner and
// Rs − z·σ (the body's first rows).
const resultKeyRows = 5

// wantRows is the rows the dialog needs to show its title, its key rows
// and the whole program; on a small terminal the chart gives up rows for
// them (App.heights).
func (d *resultDialog) wantRows() int {
	return 1 + max(resultKeyRows, 3+len(d.after.Oven.Ramps)) // carrier, head, start, ramps
}
func (d *resultDialog) View() string     { return strings.Join(d.lines, "\n") }
func (d *resultDialog) SetSize(w, h int) { d.w, d.h = w, h; d.render() }

func (d *resultDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.KeyMsg:
		switch {
		case key.Matches(msg, d.keys.Accept):
			what := "took the optimized program (u undoes)"
			if c := carrierChange(d.sh.method.Carrier, d.after.Carrier); strings.Contains(c, "→") {
				what = "took the optimized program and " + c + " (u undoes)"
			}
			d.sh.send(closeMsg{}, editMsg{m: d.after, what: what})
		case key.Matches(msg, d.keys.Reject):
			d.sh.send(closeMsg{}, sayMsg{msgInfo, "kept the old program"})
		case key.Matches(msg, d.keys.Toggle):
			d.showNew = !d.showNew
			d.sh.send(d.preview())
		default:
			scroll(&d.off, msg, d.keys, len(d.body), d.h-1)
		}
		d.render()
	case refreshMsg:
		d.render()
	}
	return d, nil
}

// render: the whole optimized program as a step table at the left, the
// comparison with the current one at the right.
func (d *resultDialog) render() {
	st := d.sh.st
	res := d.res
	state := st.Good.Render("target met")
	if !res.Feasible() {
		state = st.Bad.Render("target NOT met")
	}
	if res.Canceled {
		state += st.Dim.Render(" (stopped early)")
	}
	chart := "chart: optimized run"
	if !d.showNew {
		chart = "chart: current run"
	}
	// whole items only: what does not fit is left out, never cut
	name, worst := "▸optimizer result: ", ""
	if r := res.Robust; r.On && r.Corner != "" && !math.IsNaN(r.Worst) {
		// which corner is the worst, where even 80 columns show it
		name, worst = "▸optimizer: ", "worst at "+r.Corner
	}
	head := st.Focused.Render(name) + state
	title := func(more string) string {
		items := []string{""}
		if worst != "" {
			items = append(items, worst)
		}
		if more != "" {
			items = append(items, more)
		}
		items = append(items, fmt.Sprintf("%d evaluations in %.2f s", res.Evaluations, res.Elapsed.Seconds()), chart)
		return fitTitle(head, st.Dim, strings.Join(items, " · "), d.w)
	}
	o := d.after.Oven
	// the carrier setting the optimizer varies goes with the program: say
	// it first, before the user takes it, where 80×24 shows it
	left := []string{st.Info.Render(" " + carrierChange(d.sh.method.Carrier, d.after.Carrier))}
	left = append(left, st.TableHead.Render(fmt.Sprintf(" %-5s %7s %7s %8s", "step", "°C/min", "to °C", "hold min")))
	left = append(left, fmt.Sprintf(" %-5s %7s %7s %8s", "start", "", fmtNum(o.InitialC, 1, 2), fmtNum(o.InitialHoldMin, 2, 3)))
	for i, r := range o.Ramps {
		left = append(left, fmt.Sprintf(" %-5d %7s %7s %8s", i+1, fmtNum(r.RateCMin, 1, 2), fmtNum(r.FinalC, 1, 2), fmtNum(r.HoldMin, 2, 3)))
	}
	lw := 31
	rw := d.w - lw - 2
	now := d.sh.res
	cell := func(s string, n int) string { return padRight(ansi.Truncate(s, n, "…"), n) }
	const labelW = 13 // "worst corner" and a space
	half := min(20, (rw-labelW-1)/2)
	row := func(label, a, b string) string {
		return st.Label.Render(fmt.Sprintf("%-*s", labelW, label)) + st.Value.Render(cell(a, half)+" "+cell(b, half))
	}
	target := d.sh.method.Goal.MinResolution
	rs := func(r *model.Result) string {
		if r.Critical < 0 {
			return "no counted pair"
		}
		return format.RsNumber(r.MinResolution, target) + " " + format.VerdictAll(r.MinResolution, target, r.TargetsNotEluted)
	}
	// the figures that decide come first (run time, minimum Rs, the worst
	// corner, Rs − z·σ), so that 80×24 shows them without scrolling
	right := []string{
		st.TableHead.Render(fmt.Sprintf("%-*s", labelW, "") + cell("now", half) + " " + cell("optimized", half)),
		row("run time", fmt.Sprintf("%.2f min", now.RunTime/60), fmt.Sprintf("%.2f min", d.afterR.RunTime/60)),
	}
	cycle := row("cycle time", fmt.Sprintf("%.2f min", now.CycleTime/60), fmt.Sprintf("%.2f min", d.afterR.CycleTime/60))
	robust := res.Robust.On || d.nowRob.On
	if robust {
		// the robust margin ([goal.robust]): nominal, worst corner, Rs − z·σ
		verdict := func(on bool, x float64) string {
			if !on || math.IsNaN(x) || math.IsInf(x, 0) {
				return "-"
			}
			return format.RsNumber(x, target) + " " + format.Verdict(x, target)
		}
		worst := func(r optimizer.RobustReport) string { return verdict(r.On, r.Worst) }
		lowZ := func(r optimizer.RobustReport) string { return verdict(r.On && r.Z > 0, r.LowZ) }
		sigma := func(r optimizer.RobustReport) string {
			if !r.On || math.IsNaN(r.Sigma) || math.IsInf(r.Nominal, 0) {
				return "-"
			}
			return fmt.Sprintf("%.2f ± %.2f", r.Nominal, r.Sigma)
		}
		z := res.Robust.Z
		if z == 0 {
			z = d.nowRob.Z
		}
		right = append(right,
			row("nominal Rs", rs(now), rs(&d.afterR)),
			row("worst corner", worst(d.nowRob), worst(res.Robust)))
		if z > 0 {
			right = append(right, row("Rs − "+format.Clean(z)+"σ", lowZ(d.nowRob), lowZ(res.Robust)))
		}
		right = append(right, cycle)
		if z > 0 {
			right = append(right, row("Rs ± σ", sigma(d.nowRob), sigma(res.Robust)))
		}
	} else {
		right = append(right, row("min Rs", rs(now), rs(&d.afterR)), cycle,
			row("ramps", fmt.Sprint(len(d.sh.method.Oven.Ramps)), fmt.Sprint(len(o.Ramps))))
	}
	var body []string
	for i := 0; i < max(len(left), len(right)); i++ {
		l, r := "", ""
		if i < len(left) {
			l = left[i]
		}
		if i < len(right) {
			r = right[i]
		}
		body = append(body, ansi.Truncate(padRight(l, lw)+"  "+r, d.w, "…"))
	}
	if robust {
		corner := func(r optimizer.RobustReport) string {
			if !r.On || r.Corner == "" || math.IsNaN(r.Worst) {
				return "no instrument tolerance set"
			}
			return r.Corner
		}
		for _, l := range wrap(" worst corner: optimized "+corner(res.Robust)+" · now "+corner(d.nowRob), d.w) {
			body = append(body, st.Info.Render(l))
		}
	}
	for _, l := range wrap(" critical pair now "+rsText(d.sh, d.sh.sys, now)+" · optimized "+rsText(d.sh, d.sh.sys, &d.afterR), d.w) {
		body = append(body, st.Info.Render(l))
	}
	if !res.Feasible() {
		for _, l := range wrap(" why: "+inert(res.Explanation), d.w) {
			body = append(body, st.Warn.Render(l))
		}
	}
	d.body = body
	rows := d.h - 1
	d.off = max(0, min(d.off, len(body)-rows))
	lines := []string{title("")}
	if len(body) > rows && rows > 0 {
		lines[0] = title(fmt.Sprintf("↑/↓ %d more", len(body)-rows))
	}
	lines = append(lines, body[d.off:min(len(body), d.off+rows)]...)
	d.lines = fill(lines, d.h)
}

// --- the fit review ---

// Standard errors above these are called large: the thresholds fit uses
// too (calibrate.LargeSEDHkJ, LargeSEDS).
const (
	largeErrDH = calibrate.LargeSEDHkJ // kJ/mol
	largeErrDS = calibrate.LargeSEDS   // J/(mol·K)
)

type fitDialog struct {
	sh    *shared
	fit   fitOutcome
	order []calibrate.CompoundFit // in elution order under the fitted values
	keys  ListKeys
	off   int
	w, h  int
	lines []string
}

func newFitDialog(sh *shared, f fitOutcome) *fitDialog {
	d := &fitDialog{sh: sh, fit: f, keys: decisionKeys()}
	pos := map[string]int{}
	for i, pk := range f.sim.Peaks {
		pos[f.sys.Compounds[pk.Compound].Name] = i
	}
	d.order = append(d.order, f.rep.Compounds...)
	sort.SliceStable(d.order, func(i, j int) bool {
		pi, oki := pos[d.order[i].Name]
		pj, okj := pos[d.order[j].Name]
		if oki != okj {
			return oki
		}
		return pi < pj
	})
	return d
}

func (d *fitDialog) ShortHelp() []key.Binding {
	return []key.Binding{d.keys.Accept, d.keys.Reject, d.keys.Up, d.keys.PageDown}
}
func (d *fitDialog) FullHelp() [][]key.Binding { return d.keys.FullHelp() }
func (d *fitDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *fitDialog) SetSize(w, h int)          { d.w, d.h = w, h; d.render() }

func (d *fitDialog) rows() int { return max(1, d.h-2-len(d.rsLines())) }

// tall: the review draws over the chart too (it shows the current run
// only), so that 80×24 lists a dozen compounds at once.
func (d *fitDialog) tall() bool { return true }

// rsLines are the minimum Rs now and with the fitted values, wrapped
// whole (one line at 80 columns for the demo).
func (d *fitDialog) rsLines() []string {
	return wrapStyled(d.sh.st.Info.Render(fmt.Sprintf(" min Rs now %s → fitted %s", rsShort(d.sh.res), rsText(d.sh, d.fit.sys, &d.fit.sim))), d.w)
}

// body is the table rows, then the fit's warnings.
func (d *fitDialog) body() []string {
	st := d.sh.st
	var out []string
	for _, c := range d.order {
		mark := " "
		if c.LargeError() {
			mark = "⚠"
		}
		added := ""
		if c.Added {
			added = " (new)"
		}
		line := fmt.Sprintf(" %-20s %9.3f ±%-6s %9.3f ±%-6s %4d %8.4f %s", ansi.Truncate(inert(c.Name)+added, 20, "…"), c.DHkJ, errText(c.StdErrDH), c.DS, errText(c.StdErrDS), c.Runs, c.RMS, mark)
		if mark != " " {
			line = st.Warn.Render(line)
		}
		out = append(out, ansi.Truncate(line, d.w, "…"))
	}
	for _, wr := range d.fit.rep.Warnings {
		// a warning is a sentence: it wraps, whole
		for _, l := range wrap(" ⚠ "+inert(wr), d.w) {
			out = append(out, st.Warn.Render(l))
		}
	}
	return out
}

func (d *fitDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok {
		switch {
		case key.Matches(km, d.keys.Accept):
			d.sh.send(closeMsg{}, fitTakenMsg{path: d.fit.path, prior: d.sh.method}, editMsg{m: d.fit.rep.Method, what: "took the fitted parameters (u undoes)"}, replanMsg{})
		case key.Matches(km, d.keys.Reject):
			d.sh.send(closeMsg{}, sayMsg{msgInfo, "kept the current parameters"}, replanMsg{})
		default:
			scroll(&d.off, km, d.keys, len(d.body()), d.rows())
		}
	}
	d.render()
	return d, nil
}

func (d *fitDialog) render() {
	st := d.sh.st
	rep := d.fit.rep
	m := rep.Method
	title := dialogTitle(st, "calibration", fmt.Sprintf("  diameter %s mm · plate-height factor %s · ⚠ large ± over %g kJ/mol or %g J/(mol·K) · in elution order",
		fmtNum(m.Column.DiameterMM, 3, 4), fmtNum(m.Column.PlateHeight, 2, 3), largeErrDH, largeErrDS), d.w)
	head := st.TableHead.Render(ansi.Truncate(fmt.Sprintf(" %-20s %9s  %-6s %9s  %-6s %4s %8s", "compound", "ΔH "+format.UnitDH, "±", "ΔS "+format.UnitDS, "±", "runs", "rms min"), d.w, "…"))
	body := d.body()
	rows := d.rows()
	d.off = max(0, min(d.off, len(body)-rows))
	if len(body) > rows {
		// where the rows are, whole on the first line it fits
		pos := st.Dim.Render(fmt.Sprintf(" · rows %d–%d of %d", d.off+1, min(len(body), d.off+rows), len(body)))
		switch {
		case ansi.StringWidth(head+pos) <= d.w:
			head += pos
		case ansi.StringWidth(title+pos) <= d.w:
			title += pos
		}
	}
	lines := append([]string{title}, d.rsLines()...)
	lines = append(lines, head)
	lines = append(lines, body[d.off:min(len(body), d.off+rows)]...)
	d.lines = fill(lines, d.h)
}

func rsShort(r *model.Result) string {
	if r.Critical < 0 {
		return "-"
	}
	return fmt.Sprintf("%.2f", r.MinResolution)
}

// errText is a standard error as the fit saves it (calibrate.RoundSE:
// three significant digits), so that what the review shows is what the
// method file gets.
func errText(x float64) string {
	if x != x {
		return "-"
	}
	return calibrate.SEText(x)
}

// --- the column ranking ---

type rankingDialog struct {
	sh    *shared
	out   []methodsearch.Outcome
	sel   int
	keys  ListKeys
	w, h  int
	lines []string
}

func newRankingDialog(sh *shared, out []methodsearch.Outcome) *rankingDialog {
	k := ListKeys{
		Up:     bind([]string{"up", "k"}, "↑/↓", "choose"),
		Down:   bind([]string{"down", "j"}, "↓", "next"),
		Accept: bind([]string{"enter", "y"}, "enter", "switch to it"),
		Reject: bind([]string{"esc", "n", "q"}, "esc/n/q", "keep the current column"),
	}
	return &rankingDialog{sh: sh, out: out, keys: k}
}

func (d *rankingDialog) ShortHelp() []key.Binding {
	return []key.Binding{d.keys.Up, d.keys.Accept, d.keys.Reject}
}
func (d *rankingDialog) FullHelp() [][]key.Binding { return d.keys.FullHelp() }
func (d *rankingDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *rankingDialog) SetSize(w, h int)          { d.w, d.h = w, h; d.render() }

func (d *rankingDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok && len(d.out) > 0 {
		switch {
		case key.Matches(km, d.keys.Up):
			d.sel = (d.sel + len(d.out) - 1) % len(d.out)
		case key.Matches(km, d.keys.Down):
			d.sel = (d.sel + 1) % len(d.out)
		case key.Matches(km, d.keys.Accept):
			d.sh.send(closeMsg{}, d.choose(d.out[d.sel]))
		case key.Matches(km, d.keys.Reject):
			d.sh.send(closeMsg{}, sayMsg{msgInfo, "kept the current column"})
		}
	} else if ok {
		d.sh.send(closeMsg{})
	}
	d.render()
	return d, nil
}

// choose is the edit that switches to candidate o with its program.
func (d *rankingDialog) choose(o methodsearch.Outcome) tea.Msg {
	if o.Err != nil || o.Result == nil {
		return sayMsg{msgError, "that candidate has no program"}
	}
	m := methodsearch.Apply(o.Method, o.Result)
	return editMsg{m: m, what: "switched to " + o.Source + " with its optimized program (u undoes)"}
}

func (d *rankingDialog) render() {
	st := d.sh.st
	lines := []string{dialogTitle(st, "column ranking", "  met targets first, fastest first · ↑/↓ choose · enter switches the method to it", d.w)}
	lines = append(lines, st.TableHead.Render(ansi.Truncate(fmt.Sprintf(" %2s %-24s %8s %5s %-13s %-9s %6s", "#", "column (L × d × film)", "time min", "Rs", "carrier", "inlet kPa", "max °C"), d.w, "…")))
	rows := d.h - 2
	first := 0
	if d.sel >= rows && rows > 0 {
		first = d.sel - rows + 1
	}
	for i := first; i < len(d.out) && i < first+rows; i++ {
		o := d.out[i]
		mark := " "
		if i == d.sel {
			mark = "›"
		}
		text := fmt.Sprintf("%s%2d %-24s ", mark, i+1, ansi.Truncate(o.Source, 24, "…"))
		switch {
		case o.Err != nil:
			text += "error: " + inertErr(o.Err)
		default:
			t := fmt.Sprintf("%.2f", o.Time/60)
			if !o.Result.Feasible() {
				t = "not met"
			}
			// the carrier setting the optimizer chose with the program
			c := methodsearch.Apply(o.Method, o.Result).Carrier
			car := fmt.Sprintf("%s mL/min", fmtNum(c.FlowMLMin, 2, 2))
			if c.Mode == model.ConstantPressure {
				car = fmt.Sprintf("%s kPa const", fmtNum(c.InletKPa, 1, 1))
			}
			text += fmt.Sprintf("%8s %5.2f %-13s %-9s %6.0f", t, o.Result.Sim.MinResolution, car,
				fmt.Sprintf("%.0f→%.0f", o.InletStart/1000, o.InletEnd/1000), o.MaxTemp-model.ZeroCelsius)
		}
		s := st.TableRow
		if i == d.sel {
			s = st.TableSel
		}
		lines = append(lines, s.Render(ansi.Truncate(text, d.w, "…")))
	}
	if len(d.out) == 0 {
		lines = append(lines, st.Info.Render(" no candidates came back"))
	}
	d.lines = fill(lines, d.h)
}

// --- the window diagram ---

type sweepDialog struct {
	sh    *shared
	spec  sweepSpec
	pts   []sweep.Point
	close key.Binding
	w, h  int
	lines []string
}

func newSweepDialog(sh *shared, spec sweepSpec, pts []sweep.Point) *sweepDialog {
	return &sweepDialog{sh: sh, spec: spec, pts: pts, close: bind([]string{"esc", "q", "s"}, "esc", "close")}
}

func (d *sweepDialog) tall() bool                { return true }
func (d *sweepDialog) ShortHelp() []key.Binding  { return []key.Binding{d.close} }
func (d *sweepDialog) FullHelp() [][]key.Binding { return [][]key.Binding{{d.close}} }
func (d *sweepDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *sweepDialog) SetSize(w, h int)          { d.w, d.h = w, h; d.render() }

func (d *sweepDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok && key.Matches(km, d.close) {
		d.sh.send(closeMsg{})
	}
	return d, nil
}

// Layers of the window diagram.
const (
	layerRs     = layerPeak
	layerTarget = layerTemp
	layerRun    = 2
)

// render draws the minimum resolution (left axis) and the run time (right
// axis) against the value, the target as a dotted line and the current
// value as a vertical line, with ticks on every axis.
func (d *sweepDialog) render() {
	st := d.sh.st
	sv := d.spec
	target := d.sh.method.Goal.MinResolution
	lines := []string{dialogTitle(st, "window diagram ", fmt.Sprintf("%s (%s) · │ now %s · ┄ target Rs %.2f", sv.label, sv.unit, trimNum(sv.current), target), d.w)}
	lines[0] = ansi.Truncate(lines[0], d.w, "…")
	reason := ""
	for _, p := range d.pts {
		if !p.Valid && p.Reason != "" {
			reason = "gaps: " + inert(p.Reason)
			break
		}
	}
	// the legend and the range, whole items on as many lines as they need
	// (two at 80 columns), never cut
	foot := packItems([]styledItem{
		{st.Peak, "left: min Rs (solid)"},
		{st.Label, "right: run time, min (dotted)"},
		{st.Dim, fmt.Sprintf("%s %s–%s %s, within the method's limits", sv.label, trimNum(round(d.lo(), 3)), trimNum(round(d.hi(), 3)), sv.unit)},
		{st.Dim, reason},
	}, d.w)
	const lw, rw = 6, 7
	ph, pw := d.h-2-len(foot), d.w-lw-rw-1
	if ph < 2 || pw < 10 || len(d.pts) < 2 {
		d.lines = fill(lines, d.h)
		return
	}
	cv := canvas.New(pw, ph)
	dw, dh := cv.DotSize()
	lo, hi := d.pts[0].Value, d.pts[len(d.pts)-1].Value
	ymax := target * 1.5
	tmax := 0.0
	for _, p := range d.pts {
		if p.Valid && !math.IsNaN(p.MinRs) && p.MinRs > ymax {
			ymax = p.MinRs
		}
		if p.Valid && p.RunTime > tmax {
			tmax = p.RunTime
		}
	}
	ymax = niceCeil(math.Min(ymax, target*4))
	tmax = niceCeil(math.Max(tmax, 1))
	xOf := func(v float64) int { return int(math.Round((v - lo) / (hi - lo) * float64(dw-1))) }
	yOf := func(r, top float64) int { return dh - 1 - int(math.Round(math.Min(r, top)/top*float64(dh-1))) }
	for x := 0; x < dw; x += 3 {
		cv.Set(x, yOf(target, ymax), layerTarget)
	}
	cv.VLine(xOf(sv.current), 0, dh-1, layerTarget)
	for _, trace := range []struct {
		layer int
		y     func(p sweep.Point) (float64, bool)
		top   float64
	}{
		{layerRun, func(p sweep.Point) (float64, bool) { return p.RunTime, p.Valid }, tmax},
		{layerRs, func(p sweep.Point) (float64, bool) { return p.MinRs, p.Valid && !math.IsNaN(p.MinRs) }, ymax},
	} {
		px, py := -1, 0
		for _, p := range d.pts {
			v, ok := trace.y(p)
			if !ok {
				px = -1
				continue
			}
			x, y := xOf(p.Value), yOf(v, trace.top)
			switch {
			case trace.layer == layerRun && px >= 0:
				// dotted, so that it differs from min Rs without colour
				for xx := px + 1; xx <= x; xx++ {
					if xx%2 == 0 {
						cv.Set(xx, py+(y-py)*(xx-px)/max(1, x-px), trace.layer)
					}
				}
			case px >= 0:
				cv.Line(px, py, x, y, trace.layer)
			default:
				cv.Set(x, y, trace.layer)
			}
			px, py = x, y
		}
	}
	rsTicks, runTicks := tickRows(ymax, ph), tickRows(tmax, ph)
	tick := func(r int, ticks map[int]string) string { return ticks[r] }
	for r := 0; r < ph; r++ {
		var b strings.Builder
		b.WriteString(st.Peak.Render(fmt.Sprintf("%*s", lw-1, tick(r, rsTicks))) + st.Axis.Render("┤"))
		for col := 0; col < pw; col++ {
			c := cv.At(col, r)
			s := string(c.Rune)
			switch {
			case c.Layers&(1<<layerRs) != 0:
				s = st.Peak.Render(s)
			case c.Layers&(1<<layerRun) != 0:
				s = st.Label.Render(s)
			case c.Layers&(1<<layerTarget) != 0:
				s = st.Temp.Render(s)
			}
			b.WriteString(s)
		}
		b.WriteString(st.Axis.Render("├") + st.Label.Render(tick(r, runTicks)))
		lines = append(lines, ansi.Truncate(b.String(), d.w, ""))
	}
	lines = append(lines, st.Axis.Render(strings.Repeat(" ", lw)+valueAxis(lo, hi, pw, sv.unit)))
	lines = append(lines, foot...)
	d.lines = fill(lines, d.h)
}

// lo and hi are the ends of the swept range (0 without points).
func (d *sweepDialog) lo() float64 {
	if len(d.pts) == 0 {
		return 0
	}
	return d.pts[0].Value
}

func (d *sweepDialog) hi() float64 {
	if len(d.pts) == 0 {
		return 0
	}
	return d.pts[len(d.pts)-1].Value
}

// styledItem is one item of a legend and its style.
type styledItem struct {
	style lipgloss.Style
	text  string
}

// packItems puts the non-empty items on lines of w columns, " · " between
// them, each whole on one line (an item wider than a line is wrapped at
// its spaces), each line starting with a space.
func packItems(items []styledItem, w int) []string {
	var lines []string
	cur, curW := "", 0
	for _, it := range items {
		if it.text == "" {
			continue
		}
		iw := ansi.StringWidth(it.text)
		switch {
		case curW > 0 && curW+3+iw <= w:
			cur += it.style.Render(" · " + it.text)
			curW += 3 + iw
			continue
		case curW > 0:
			lines = append(lines, cur)
		}
		parts := wrap(" "+it.text, w)
		for _, l := range parts[:len(parts)-1] {
			lines = append(lines, it.style.Render(l))
		}
		last := parts[len(parts)-1]
		cur, curW = it.style.Render(last), ansi.StringWidth(last)
	}
	if curW > 0 {
		lines = append(lines, cur)
	}
	return lines
}

// tickRows labels the rows of an axis from 0 (bottom row) to top (top
// row) at round values, about one every other row.
func tickRows(top float64, rows int) map[int]string {
	out := map[int]string{}
	if rows < 2 || !(top > 0) {
		return out
	}
	step := niceStep(top / math.Max(1, float64(rows)/2))
	for v := 0.0; v <= top+1e-9; v += step {
		r := rows - 1 - int(math.Round(v/top*float64(rows-1)))
		if _, taken := out[r]; !taken {
			out[r] = trimNum(round(v, decimalsFor(step)))
		}
	}
	return out
}

// niceCeil rounds x up to 1, 2 or 5 times a power of ten.
func niceCeil(x float64) float64 {
	if x <= 0 {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*p >= x-1e-12 {
			return m * p
		}
	}
	return 10 * p
}

// valueAxis is a row of ticks for [lo, hi] over w columns, with the unit.
func valueAxis(lo, hi float64, w int, unit string) string {
	line := []rune(strings.Repeat("─", w))
	if !(hi > lo) {
		return string(line)
	}
	step := niceStep((hi - lo) / math.Max(1, float64(w)/12))
	tail := []rune(" " + unit)
	for v := math.Ceil(lo/step) * step; v <= hi+1e-9; v += step {
		col := int(math.Round((v - lo) / (hi - lo) * float64(w-1)))
		txt := []rune(trimNum(round(v, decimalsFor(step))))
		if col+1+len(txt) >= w-len(tail) {
			break
		}
		line[col] = '┴'
		copy(line[col+1:], txt)
	}
	if len(tail) < w {
		copy(line[w-len(tail):], tail)
	}
	return string(line)
}

// carrierChange says the carrier setting of a result against the method's:
// "flow 1.20 → 2.15 mL/min" (or the inlet pressure in constant pressure),
// "flow 1.20 mL/min kept" when it did not change.
func carrierChange(now, after methodfile.Carrier) string {
	name, unit, a, b := "flow", "mL/min", fmtNum(now.FlowMLMin, 2, 2), fmtNum(after.FlowMLMin, 2, 2)
	if after.Mode == model.ConstantPressure {
		name, unit, a, b = "inlet", "kPa", fmtNum(now.InletKPa, 1, 1), fmtNum(after.InletKPa, 1, 1)
	}
	if a == b {
		return name + " " + a + " " + unit + " kept"
	}
	return name + " " + a + " → " + b + " " + unit
}
