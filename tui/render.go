package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/report"
)

// ShortHelp is the focused pane's key help line.
func (a *App) ShortHelp() []key.Binding {
	g := a.keys
	var b []key.Binding
	if a.opt != nil && a.opt.running {
		return []key.Binding{g.Cancel}
	}
	switch a.focus {
	case paneProgram:
		b = []key.Binding{a.pkeys.Prev, a.pkeys.Up, a.pkeys.Type, a.pkeys.AddRamp}
	case paneChart:
		b = []key.Binding{a.ckeys.ZoomIn, a.ckeys.Left, a.ckeys.Reset}
	case panePeaks:
		b = []key.Binding{a.tkeys.Up, a.tkeys.Toggle, a.tkeys.Type}
	case paneSettings:
		b = []key.Binding{a.skeys.Prev, a.skeys.Up, a.skeys.Type}
	}
	return append(b, g.Optimize, g.Save, g.Undo, g.Focus, g.Help, g.Quit)
}

// FullHelp is every key, by group.
func (a *App) FullHelp() [][]key.Binding {
	g := a.keys
	p, s, c, t := a.pkeys, a.skeys, a.ckeys, a.tkeys
	return [][]key.Binding{
		{p.Prev, p.Up, p.BigUp, p.Type, p.AddRamp, p.DelRamp, p.Sweep},
		{c.ZoomIn, c.Left, c.Reset, t.Up, t.Toggle, t.Type},
		{s.Prev, s.Up, s.BigUp, s.Type},
		{g.Optimize, g.Cancel, g.Save, g.SaveAs, g.Undo, g.Redo, g.Export, g.Fit, g.Compare},
		{g.Focus, g.FocusBack, g.Help, g.Quit},
	}
}

// refresh recomputes every piece of the screen from the state.
func (a *App) refresh() {
	if !a.ready || a.width < MinWidth || a.height < MinHeight {
		return
	}
	w := a.width
	v := &a.view
	v.title = a.titleLine(w)
	v.method = a.methodLine(w)
	prog := a.programLines(w)
	v.program = strings.Join(prog, "\n")
	v.summary = a.summaryLine(w)
	msg := a.messageLines(w)
	v.message = strings.Join(msg, "\n")
	v.help = ansi.Truncate(a.help.ShortHelpView(a.ShortHelp()), w, "…")

	rest := a.height - 1 - 1 - len(prog) - 1 - len(msg) - 1
	chartH := rest * 11 / 20
	if chartH < 7 {
		chartH = 7
	}
	lowerH := rest - chartH
	res, prg := &a.res, a.method.ModelProgram()
	if a.opt != nil && a.opt.running && a.opt.hasPrev {
		res, prg = &a.opt.preview, a.opt.last.Program
	}
	t0, t1 := a.window()
	comps := a.sys.Compounds
	plot := a.chart.render(chartInput{res: res, prog: prg, comps: comps, t0: t0, t1: t1}, w, chartH-1, &a.st)
	v.chart = append([]string{a.heading(paneChart, w, a.chartHeading(t0, t1))}, plot...)
	switch {
	case a.full:
		v.lower = a.fullHelpLines(w, lowerH)
	case a.sweepView != nil:
		v.lower = a.sweepLines(w, lowerH)
	case a.fit != nil:
		v.lower = a.fitLines(w, lowerH)
	case a.cmp != nil:
		v.lower = a.compareRankLines(w, lowerH)
	case a.opt != nil && a.opt.result != nil:
		v.lower = a.compareLines(w, lowerH)
	case a.lower == paneSettings:
		v.lower = a.settingsLines(w, lowerH)
	default:
		v.lower = a.peakLines(w, lowerH)
	}
}

func (a *App) heading(p int, w int, extra string) string {
	st := a.st.Blurred
	mark := " "
	if a.focus == p {
		st = a.st.Focused
		mark = "▸"
	}
	return ansi.Truncate(st.Render(mark+paneNames[p])+a.st.Dim.Render(extra), w, "…")
}

func (a *App) chartHeading(t0, t1 float64) string {
	s := fmt.Sprintf("  %.2f–%.2f min", t0/60, t1/60)
	if a.zoom > 1 {
		s += fmt.Sprintf(" (zoom ×%.1f)", a.zoom)
	}
	if a.opt != nil && a.opt.running {
		s += " · best program so far"
	}
	return s + " · numbers are elution order · oven temperature at right"
}

func (a *App) titleLine(w int) string {
	name := a.name
	if name == "" {
		name = "built-in demo"
	}
	left := " rampwise · " + name
	if a.method.Title != "" {
		left += " · " + a.method.Title
	}
	right := ""
	if a.Dirty() {
		right = "modified "
	}
	left = ansi.Truncate(left, w-len(right)-1, "…")
	pad := w - ansi.StringWidth(left) - ansi.StringWidth(right)
	if pad < 0 {
		pad = 0
	}
	return a.st.Title.Render(left+strings.Repeat(" ", pad)) + a.st.Modified.Render(right)
}

func (a *App) methodLine(w int) string {
	m := a.method
	c, g := m.Column, m.Carrier
	flow := fmt.Sprintf("%s mL/min constant flow", trimNum(g.FlowMLMin))
	if g.Mode == model.ConstantPressure {
		flow = fmt.Sprintf("%s kPa constant pressure", trimNum(g.InletKPa))
	}
	if g.Outlet == "vacuum" {
		flow += ", vacuum outlet"
	}
	phase := c.Phase
	if phase == "" {
		phase = "phase not named"
	}
	s := fmt.Sprintf(" %s m × %s mm × %s µm, max %s °C · %s %s · goal Rs %.2f, %s, %d ramps · %s",
		trimNum(c.LengthM), trimNum(c.DiameterMM), trimNum(c.FilmUM), trimNum(c.MaxTempC), g.Gas, flow,
		m.Goal.MinResolution, m.Goal.Objective, m.Goal.Ramps, phase)
	if g.Gas.Flammable() {
		return a.st.Warn.Render(" ⚠ H₂ flammable ") + a.st.Dim.Render(ansi.Truncate(s, w-16, "…"))
	}
	return a.st.Dim.Render(ansi.Truncate(s, w, "…"))
}

// programLines shows the program with the selected value highlighted; it
// wraps onto a second line at a step boundary when needed.
func (a *App) programLines(w int) []string {
	fs := programFields(a.method)
	val := func(i int) string {
		f := fs[i]
		s := f.text(a.method) + " " + f.unit
		if i == a.progSel && a.focus == paneProgram {
			return a.st.Selected.Render(s)
		}
		if i == a.progSel {
			return a.st.Value.Underline(true).Render(s)
		}
		return a.st.Value.Render(s)
	}
	lab := a.st.Label.Render
	steps := []string{lab("start ") + val(0) + lab(" hold ") + val(1)}
	for r := range a.method.Oven.Ramps {
		i := 2 + 3*r
		steps = append(steps, lab(fmt.Sprintf("│ %d: ", r+1))+val(i)+lab(" → ")+val(i+1)+lab(" hold ")+val(i+2))
	}
	head := a.heading(paneProgram, w, "") + " "
	lines := []string{head}
	for _, s := range steps {
		cur := lines[len(lines)-1]
		if ansi.StringWidth(cur)+ansi.StringWidth(s)+1 > w && len(lines) < 2 {
			lines = append(lines, "   "+s)
			continue
		}
		lines[len(lines)-1] = cur + " " + s
	}
	for i := range lines {
		lines[i] = ansi.Truncate(lines[i], w, "…")
	}
	if len(lines) == 1 {
		lines = append(lines, "")
	}
	return lines
}

func (a *App) summaryLine(w int) string {
	r := &a.res
	s := fmt.Sprintf(" holdup %.2f · run %.2f · cycle %.2f min · ", r.HoldupTime/60, r.RunTime/60, r.CycleTime/60)
	rs := "no counted pair"
	style := a.st.Good
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		ok := "✓"
		if r.MinResolution < a.method.Goal.MinResolution {
			ok, style = "✗", a.st.Bad
		}
		rs = fmt.Sprintf("Rs %.2f %s %s / %s (target %.2f)", r.MinResolution, ok,
			a.sys.Compounds[cp.First].Name, a.sys.Compounds[cp.Second].Name, a.method.Goal.MinResolution)
	}
	late := 0
	for _, pk := range r.Peaks {
		if !pk.Eluted {
			late++
		}
	}
	tail := ""
	if late > 0 {
		tail = fmt.Sprintf(" · %d not eluted", late)
	}
	prog := a.method.ModelProgram()
	if at, over := a.sys.Cond.OverPressure(a.method.Limits.MaxInletKPa*1000, prog.Initial, prog.MaxTemp()); over {
		tail += fmt.Sprintf(" · inlet over %s kPa from %.0f °C", trimNum(a.method.Limits.MaxInletKPa), at-model.ZeroCelsius)
	}
	return ansi.Truncate(a.st.Info.Render(s)+style.Render(rs)+a.st.Warn.Render(tail), w, "…")
}

func (a *App) messageLines(w int) []string {
	if a.inMode != inputNone {
		return []string{ansi.Truncate(a.input.View(), w, "…"), a.st.Dim.Render(" enter sets · esc leaves it")}
	}
	text := a.message
	if a.opt != nil && a.opt.running {
		p := a.opt.last
		state := "looking for a program that meets the target"
		if p.Feasible {
			state = fmt.Sprintf("best %.2f min", p.Objective/60)
		}
		text = fmt.Sprintf("optimizing: %d evaluations · %s · Rs %.2f · %.1f s · esc stops and keeps the best", p.Evaluations, state, p.MinResolution, p.Elapsed.Seconds())
	}
	st := a.st.Info
	switch a.kind {
	case msgWarn:
		st = a.st.Warn
	case msgError:
		st = a.st.Error
	case msgGood:
		st = a.st.Good
	}
	lines := wrap(" "+text, w)
	for len(lines) < 2 {
		lines = append(lines, "")
	}
	if len(lines) > 2 {
		lines = lines[:2]
		lines[1] = ansi.Truncate(lines[1], w-1, "") + "…"
	}
	for i := range lines {
		lines[i] = st.Render(lines[i])
	}
	return lines
}

// wrap breaks plain text into lines of at most w columns at spaces.
func wrap(s string, w int) []string {
	var lines []string
	for ansi.StringWidth(s) > w {
		cut := w
		rs := []rune(s)
		for i := w; i > w/2; i-- {
			if rs[i] == ' ' {
				cut = i
				break
			}
		}
		lines = append(lines, string(rs[:cut]))
		s = " " + strings.TrimLeft(string(rs[cut:]), " ")
	}
	return append(lines, s)
}

// peakLines is the peak table: elution order, name, retention time, elution
// temperature, half-height width, resolution to the next peak, target mark,
// and the compound's ΔH and ΔS (editable when the pane has focus).
func (a *App) peakLines(w, h int) []string {
	r := &a.res
	lines := []string{a.heading(panePeaks, w, "  t toggles target · enter edits ΔH/ΔS")}
	head := fmt.Sprintf("%3s %-18s %7s %6s %5s %7s %3s %9s %9s", "#", "compound", "tR min", "Te °C", "w½ s", "Rs next", "tgt", "ΔH kJ/mol", "ΔS J/molK")
	lines = append(lines, a.st.TableHead.Render(ansi.Truncate(head, w, "…")))
	rows := h - 2
	if rows < 1 {
		return lines
	}
	if a.peakSel >= len(r.Peaks) {
		a.peakSel = len(r.Peaks) - 1
	}
	first := 0
	if a.peakSel >= rows {
		first = a.peakSel - rows + 1
	}
	for i := first; i < len(r.Peaks) && i < first+rows; i++ {
		pk := r.Peaks[i]
		c := &a.method.Compounds[pk.Compound]
		rs := ""
		if i < len(r.Pairs) {
			rs = fmt.Sprintf("%.2f", r.Pairs[i].Resolution)
			if i == r.Critical {
				rs = "◆" + rs
			}
		}
		tgt := ""
		if c.Target {
			tgt = "yes"
		}
		tr := fmt.Sprintf("%.3f", pk.RetentionTime/60)
		if !pk.Eluted {
			tr = "late"
		}
		name := ansi.Truncate(c.Name, 18, "…")
		dh := fmt.Sprintf("%9.2f", c.DHkJ)
		ds := fmt.Sprintf("%9.2f", c.DS)
		sel := i == a.peakSel && a.focus == panePeaks
		if sel {
			if a.peakCol == 0 {
				dh = a.st.Selected.Render(dh)
			} else {
				ds = a.st.Selected.Render(ds)
			}
		}
		row := fmt.Sprintf("%3d %-18s %7s %6.1f %5.2f %7s %3s ", i+1, name, tr, pk.ElutionTemp-model.ZeroCelsius, pk.HalfWidth(), rs, tgt)
		st := a.st.TableRow
		if sel {
			st = a.st.TableSel
		}
		if i == r.Critical || (i == r.Critical+1 && r.Critical >= 0) {
			row = a.st.Critical.Render(row)
		} else {
			row = st.Render(row)
		}
		lines = append(lines, ansi.Truncate(row+dh+" "+ds, w, "…"))
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines
}

func (a *App) settingsLines(w, h int) []string {
	fs := settingsFields(a.method)
	extra := "  ↑/↓ choose · +/- change · enter types"
	lines := []string{a.heading(paneSettings, w, extra)}
	rows := h - 1
	if a.method.Carrier.Gas.Flammable() {
		lines = append(lines, ansi.Truncate(a.st.Warn.Render(" ⚠ "+model.HydrogenCaution), w, "…"))
		rows--
	}
	first := 0
	if a.setSel >= rows {
		first = a.setSel - rows + 1
	}
	for i := first; i < len(fs) && i < first+rows; i++ {
		f := fs[i]
		val := f.text(a.method) + " " + f.unit
		if i == a.setSel && a.focus == paneSettings {
			val = a.st.Selected.Render(val)
		} else {
			val = a.st.Value.Render(val)
		}
		lines = append(lines, ansi.Truncate(a.st.Label.Render(fmt.Sprintf("  %-30s ", f.label))+val+a.st.Dim.Render("   "+f.key), w, "…"))
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines
}

func describeOven(o methodfile.Oven) string { return report.Program(o) }

func (a *App) rsText(r *model.Result) string {
	if r.Critical < 0 {
		return "no counted pair"
	}
	cp := r.Pairs[r.Critical]
	return fmt.Sprintf("%.2f  %s / %s", r.MinResolution, a.sys.Compounds[cp.First].Name, a.sys.Compounds[cp.Second].Name)
}

// compareLines puts the old and the new program side by side.
func (a *App) compareLines(w, h int) []string {
	o := a.opt
	res := o.result
	state := a.st.Good.Render("target met")
	if !res.Feasible() {
		state = a.st.Bad.Render("target NOT met")
	}
	if res.Canceled {
		state += a.st.Dim.Render(" (stopped early)")
	}
	lines := []string{ansi.Truncate(a.st.Focused.Render("▸optimizer result: ")+state+a.st.Dim.Render(fmt.Sprintf("  %d evaluations in %.2f s", res.Evaluations, res.Elapsed.Seconds())), w, "…")}
	col := (w - 14) / 2
	cell := func(s string) string { return padRight(ansi.Truncate(s, col-1, "…"), col) }
	row := func(label, before, after string) string {
		return ansi.Truncate(a.st.Label.Render(fmt.Sprintf(" %-12s ", label))+a.st.Value.Render(cell(before))+a.st.Value.Render(cell(after)), w, "…")
	}
	lines = append(lines, row("", "now", "optimized"))
	lines = append(lines, row("program", describeOven(a.method.Oven), describeOven(o.after.Oven)))
	lines = append(lines, row("run time", fmt.Sprintf("%.2f min", a.res.RunTime/60), fmt.Sprintf("%.2f min", o.afterR.RunTime/60)))
	lines = append(lines, row("cycle time", fmt.Sprintf("%.2f min", a.res.CycleTime/60), fmt.Sprintf("%.2f min", o.afterR.CycleTime/60)))
	lines = append(lines, row("min Rs", a.rsText(&a.res), a.rsText(&o.afterR)))
	if !res.Feasible() {
		for _, l := range wrap(" why: "+res.Explanation, w) {
			lines = append(lines, a.st.Warn.Render(l))
		}
	}
	lines = append(lines, a.st.Dim.Render(" enter/y takes the optimized program · n/esc keeps the current one"))
	if len(lines) > h {
		lines = lines[:h]
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines
}

func (a *App) fullHelpLines(w, h int) []string {
	lines := []string{a.st.Focused.Render("▸keys") + a.st.Dim.Render("  (? or esc closes)")}
	for _, l := range strings.Split(a.help.FullHelpView(a.FullHelp()), "\n") {
		lines = append(lines, ansi.Truncate(l, w, "…"))
	}
	if len(lines) > h {
		lines = lines[:h]
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines
}
