package tui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/report"
)

// heading is a pane's first line: a marker and the name, bold when focused.
func heading(st *Styles, focused bool, name string, w int, extra string) string {
	s, mark := st.Blurred, " "
	if focused {
		s, mark = st.Focused, "▸"
	}
	return ansi.Truncate(s.Render(mark+name)+st.Dim.Render(extra), w, "…")
}

// selected marks the selected value so that it shows without colour too
// (NO_COLOR forbids colour, and some terminals drop reverse video):
// brackets around it, and the selection style.
func selected(st *Styles, s string) string { return st.Selected.Render("[" + s + "]") }

// --- a list of editable fields (program and settings share it) ---

type fieldList struct {
	sh     *shared
	keys   FieldKeys
	sel    int
	fields func(m *methodfile.Method) []field
}

func (l *fieldList) clamp() {
	n := len(l.fields(l.sh.method))
	if l.sel >= n {
		l.sel = n - 1
	}
	if l.sel < 0 {
		l.sel = 0
	}
}

// key handles choosing, stepping and typing; it reports whether msg was
// one of those.
func (l *fieldList) key(msg tea.KeyMsg) bool {
	fs := l.fields(l.sh.method)
	k := l.keys
	switch {
	case key.Matches(msg, k.Prev):
		l.sel = (l.sel + len(fs) - 1) % len(fs)
	case key.Matches(msg, k.Next):
		l.sel = (l.sel + 1) % len(fs)
	case key.Matches(msg, k.Up), key.Matches(msg, k.Down), key.Matches(msg, k.BigUp), key.Matches(msg, k.BigDown):
		n := 1.0
		if key.Matches(msg, k.Down) || key.Matches(msg, k.BigDown) {
			n = -1
		}
		big := key.Matches(msg, k.BigUp) || key.Matches(msg, k.BigDown)
		f := fs[l.sel]
		l.sh.send(fieldEdit(l.sh, f, f.stepped(l.sh.method, n, big)))
	case key.Matches(msg, k.Type):
		f := fs[l.sel]
		sh := l.sh
		l.sh.send(openMsg{newPrompt(sh, fieldPrompt(f), f.text(sh.method), func(text string) tea.Msg {
			m, note, err := f.typed(sh.method, text)
			if err != nil {
				return sayMsg{msgError, err.Error() + " (kept the last valid value)"}
			}
			e := fieldEdit(sh, f, m)
			if note != "" {
				e.what += " · " + note
			}
			return e
		})})
	default:
		return false
	}
	return true
}

// fieldPrompt asks for field f by name, with its unit or its choices.
func fieldPrompt(f field) string {
	switch {
	case f.choices != nil:
		return fmt.Sprintf("%s (%s): ", f.name(), strings.Join(f.choices, ", "))
	case f.unit != "":
		return fmt.Sprintf("%s (%s): ", f.name(), f.unit)
	}
	return f.name() + ": "
}

// fieldEdit is the edit that sets field f as m has it. A gas or pressure
// mode switch also sets the flow or the inlet pressure so that the holdup
// time (under the program, as the status line shows it) stays what it was,
// as nearly as the keypad step allows.
func fieldEdit(sh *shared, f field, m *methodfile.Method) editMsg {
	what := fmt.Sprintf("%s = %s", f.key, f.shown(m))
	editKey := f.key
	if f.key == "limits.oven_min_c" {
		sh.ovenMinGiven = true // typed or stepped: no longer the default
	}
	if f.after != nil {
		if more := f.after(sh, sh.method, m); more != "" {
			what = strings.TrimSpace(what) + " · " + more
			editKey = "" // it changed other keys too: check all of it
		}
	}
	if (f.key == "carrier.mode" || f.key == "carrier.gas") && sh.sys != nil && m.Carrier != sh.method.Carrier {
		tm := sh.res.HoldupTime // under the program, as the status line shows it
		if desc, err := keepHoldup(m, tm); err == nil {
			what += " · " + desc
		} else {
			what += " · " + err.Error()
		}
	}
	return editMsg{m: m, what: strings.TrimSpace(what), key: editKey}
}

// --- program pane ---

type programPane struct {
	list  fieldList
	w, h  int
	lines []string
	// added is the ramp count an added ramp gives (0: none pending): once
	// the root has taken the edit, the selection moves to its rate
	added int
}

func newProgramPane(sh *shared) *programPane {
	return &programPane{list: fieldList{sh: sh, keys: DefaultProgramKeys(), fields: programFields}}
}

func (p *programPane) ShortHelp() []key.Binding  { return p.list.keys.ShortHelp() }
func (p *programPane) FullHelp() [][]key.Binding { return p.list.keys.FullHelp() }
func (p *programPane) SetSize(w, h int)          { p.w, p.h = w, h; p.render() }
func (p *programPane) View() string              { return strings.Join(p.lines, "\n") }

func (p *programPane) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case refreshMsg:
		if p.added > 0 {
			if n := len(p.list.sh.method.Oven.Ramps); n == p.added {
				p.list.sel = 2 + 3*(n-1) // the new ramp's first value, its rate
			}
			p.added = 0
		}
		p.list.clamp()
		p.render()
	case tea.KeyMsg:
		if !p.list.key(msg) {
			p.key(msg)
		}
		p.list.clamp()
	}
	return p, nil
}

func (p *programPane) key(msg tea.KeyMsg) {
	sh, k := p.list.sh, p.list.keys
	switch {
	case key.Matches(msg, k.AddRamp):
		p.addRamp()
	case key.Matches(msg, k.DelRamp):
		p.removeRamp()
	case key.Matches(msg, k.Sweep):
		f := programFields(sh.method)[p.list.sel]
		sh.send(startSweepMsg{spec: programSweep(f, sh.method)})
	}
}

// maxEditRamps is how many ramps a adds up to: as many as a method file
// holds (the optimizer's goal.ramps, 1–5, is how many it searches with,
// not a limit of the program).
const maxEditRamps = methodfile.MaxRamps

func (p *programPane) addRamp() {
	sh := p.list.sh
	m := sh.method.Clone()
	if len(m.Oven.Ramps) >= maxEditRamps {
		sh.say(msgError, fmt.Sprintf("%d ramps at most: a method file holds no more (oven.ramp)", maxEditRamps))
		return
	}
	prev := m.Oven.InitialC
	rate := 10.0
	if n := len(m.Oven.Ramps); n > 0 {
		prev = m.Oven.Ramps[n-1].FinalC
		rate = m.Oven.Ramps[n-1].RateCMin
	}
	final := math.Min(m.Column.MaxTempC, prev+20)
	if final <= prev {
		sh.say(msgError, fmt.Sprintf("the program is already at the column maximum %s °C; no room for another ramp", trimNum(m.Column.MaxTempC)))
		return
	}
	m.Oven.Ramps = append(m.Oven.Ramps, methodfile.Ramp{RateCMin: rate, FinalC: final})
	sh.send(editMsg{m: m, what: fmt.Sprintf("added ramp %d", len(m.Oven.Ramps))})
	p.added = len(m.Oven.Ramps) // selected once the edit is taken
}

func (p *programPane) removeRamp() {
	sh := p.list.sh
	fs := programFields(sh.method)
	r := fs[p.list.sel].ramp
	if r == 0 {
		r = len(sh.method.Oven.Ramps)
	}
	if r == 0 {
		sh.say(msgError, "no ramp to remove")
		return
	}
	m := sh.method.Clone()
	m.Oven.Ramps = append(m.Oven.Ramps[:r-1], m.Oven.Ramps[r:]...)
	m.ElementRemoved("oven.ramp", r) // messages name the later ramps' own lines
	if len(m.Oven.Ramps) == 0 && m.Oven.InitialHoldMin == 0 {
		m.Oven.InitialHoldMin = 10
	}
	sh.send(editMsg{m: m, what: fmt.Sprintf("removed ramp %d", r)})
}

// steps are the program's steps as drawn: the start, then each ramp.
func (p *programPane) steps() []string {
	sh := p.list.sh
	st := sh.st
	m := sh.method
	fs := programFields(m)
	focused := sh.focus == paneProgram
	val := func(i int) string {
		s := fs[i].shown(m)
		switch {
		case i == p.list.sel && focused:
			return selected(st, s)
		case i == p.list.sel:
			return " " + st.Value.Underline(true).Render(s) + " "
		}
		return " " + st.Value.Render(s) + " "
	}
	lab := st.Label.Render
	steps := []string{lab("start ") + val(0) + lab(" hold ") + val(1)}
	for r := range m.Oven.Ramps {
		i := 2 + 3*r
		steps = append(steps, lab(fmt.Sprintf(" │ %d: ", r+1))+val(i)+lab(" → ")+val(i+1)+lab(" hold ")+val(i+2))
	}
	return steps
}

func (p *programPane) head() string {
	sh := p.list.sh
	return heading(sh.st, sh.focus == paneProgram, "program", p.w, "") + " "
}

// The hints where steps are left out: how many, and the key that
// reaches them.
func moreBefore(n int) string { return fmt.Sprintf("← %d more ", n) }
func moreAfter(n int) string  { return fmt.Sprintf(" %d more →", n) }

// placeSteps lays steps first..last out on at most rows lines of w
// columns, one step never split, with the hints for the steps left out at
// either side; ok is false when they do not fit.
func placeSteps(st *Styles, head string, steps []string, first, last, rows, w int) (lines []string, ok bool) {
	lines = []string{head}
	if first > 0 {
		lines[0] += st.Dim.Render(moreBefore(first))
	}
	for i := first; i <= last; i++ {
		s := steps[i]
		reserve := 0
		if i == last && last < len(steps)-1 {
			reserve = ansi.StringWidth(moreAfter(len(steps) - 1 - last))
		}
		cur := lines[len(lines)-1]
		if ansi.StringWidth(cur)+ansi.StringWidth(s)+reserve > w {
			if len(lines) >= rows || ansi.StringWidth("   "+s)+reserve > w {
				return nil, false
			}
			lines = append(lines, "   "+s)
			continue
		}
		lines[len(lines)-1] = cur + s
	}
	if last < len(steps)-1 {
		lines[len(lines)-1] += st.Dim.Render(moreAfter(len(steps) - 1 - last))
	}
	return lines, true
}

// rowsFor is how many lines of w columns the whole program takes (at
// least 2, the pane's height before programs had many ramps).
func (p *programPane) rowsFor(w int) int {
	save := p.w
	p.w = w
	steps, head := p.steps(), p.head()
	p.w = save
	for rows := 2; ; rows++ {
		if _, ok := placeSteps(p.list.sh.st, head, steps, 0, len(steps)-1, rows, w); ok || rows > len(steps) {
			return rows
		}
	}
}

// render lays the program out on the pane's lines, one step (the start,
// then each ramp) never split; when the steps do not all fit, the lines
// show the steps around the selection, with how many more there are at
// each side and the arrow that reaches them ("← 2 more", "3 more →").
func (p *programPane) render() {
	p.list.clamp()
	st := p.list.sh.st
	steps := p.steps()
	selStep := 0
	if p.list.sel >= 2 {
		selStep = (p.list.sel-2)/3 + 1
	}
	head := p.head()
	w, rows := p.w, max(1, p.h)
	first := 0
	for first < selStep {
		if _, ok := placeSteps(st, head, steps, first, selStep, rows, w); ok {
			break
		}
		first++
	}
	last := selStep
	lines, ok := placeSteps(st, head, steps, first, last, rows, w)
	if !ok {
		lines = []string{head, "   " + steps[selStep]}
	}
	for last+1 < len(steps) {
		next, ok := placeSteps(st, head, steps, first, last+1, rows, w)
		if !ok {
			break
		}
		last++
		lines = next
	}
	for i := range lines {
		lines[i] = ansi.Truncate(lines[i], w, "…")
	}
	p.lines = fill(lines, p.h)
}

// --- chart pane ---

type chartPane struct {
	sh           *shared
	keys         ChartKeys
	zoom, center float64
	w, h         int
	c            chart
	lines        []string
	// a run shown instead of the method's: the optimizer's best so far
	// or its result, while it waits for a decision
	prev      *model.Result
	prevProg  model.Program
	prevLabel string
	showPrev  bool
	faint     bool // draw the other run faint beneath (a waiting result)
	// a measured run drawn below the prediction (a verification run)
	meas *report.Measured
}

func newChartPane(sh *shared) *chartPane {
	return &chartPane{sh: sh, keys: DefaultChartKeys(), zoom: 1}
}

func (c *chartPane) ShortHelp() []key.Binding  { return c.keys.ShortHelp() }
func (c *chartPane) FullHelp() [][]key.Binding { return c.keys.FullHelp() }
func (c *chartPane) SetSize(w, h int)          { c.w, c.h = w, h; c.render() }
func (c *chartPane) View() string              { return strings.Join(c.lines, "\n") }

func (c *chartPane) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case refreshMsg:
		c.render()
	case measuredMsg:
		c.meas = msg.meas
		c.render()
	case previewMsg:
		if msg.res == nil {
			c.prev, c.showPrev, c.faint = nil, false, false
		} else {
			c.prev, c.prevProg, c.prevLabel, c.showPrev, c.faint = msg.res, msg.prog, msg.label, msg.showIt, msg.faint
		}
		c.render()
	case tea.KeyMsg:
		c.key(msg)
		c.render()
	}
	return c, nil
}

// shown is the run on screen and its program.
func (c *chartPane) shown() (*model.Result, model.Program) {
	if c.prev != nil && c.showPrev {
		return c.prev, c.prevProg
	}
	return c.sh.res, c.sh.method.ModelProgram()
}

func (c *chartPane) fullWindow() (float64, float64) {
	res, _ := c.shown()
	end := res.RunTime
	for _, pk := range res.Peaks {
		if pk.Eluted && pk.RetentionTime+4*pk.Sigma > end {
			end = pk.RetentionTime + 4*pk.Sigma
		}
	}
	if c.meas != nil { // every measured peak on the same axis
		for _, p := range c.meas.Peaks {
			end = math.Max(end, (p.TimeMin+2*p.WidthMin)*60)
		}
	}
	return 0, end
}

func (c *chartPane) window() (float64, float64) {
	t0, t1 := c.fullWindow()
	if c.zoom <= 1 {
		return t0, t1
	}
	w := (t1 - t0) / c.zoom
	lo := math.Max(t0, math.Min(t1-w, c.center-w/2))
	return lo, lo + w
}

func (c *chartPane) key(msg tea.KeyMsg) {
	k := c.keys
	t0, t1 := c.window()
	if c.zoom <= 1 {
		c.center = (t0 + t1) / 2
	}
	switch {
	case key.Matches(msg, k.ZoomIn):
		c.zoom = math.Min(c.zoom*1.5, 200)
		c.center = (t0 + t1) / 2
	case key.Matches(msg, k.ZoomOut):
		c.zoom = math.Max(1, c.zoom/1.5)
		c.center = (t0 + t1) / 2
	case key.Matches(msg, k.Left):
		c.center = (t0+t1)/2 - (t1-t0)*0.2
	case key.Matches(msg, k.Right):
		c.center = (t0+t1)/2 + (t1-t0)*0.2
	case key.Matches(msg, k.Reset):
		c.zoom = 1
	}
}

func (c *chartPane) render() {
	if c.w < MinWidth || c.h < 3 {
		c.lines = fill(nil, c.h)
		return
	}
	st := c.sh.st
	res, prog := c.shown()
	t0, t1 := c.window()
	extra := fmt.Sprintf("  %.2f–%.2f min", t0/60, t1/60)
	if c.zoom > 1 {
		extra += fmt.Sprintf(" (zoom ×%.1f)", c.zoom)
	}
	switch {
	case c.prev != nil && c.showPrev && c.faint:
		extra += " · " + c.prevLabel + " · ⠄⠄ dotted: the current run"
	case c.prev != nil && c.showPrev:
		extra += " · " + c.prevLabel
	case c.prev != nil && c.faint:
		extra += " · the current run · ⠄⠄ dotted: " + c.prevLabel
	case c.prev != nil:
		extra += " · the current program"
	}
	legend := []string{" · numbers are elution order", " · oven temperature at right"}
	if c.meas != nil {
		extra += " · below: measured " + inert(c.meas.Label)
		legend = append([]string{" · ╱ joins matched peaks"}, legend...)
	}
	// the legend, each item whole or not at all
	for _, l := range legend {
		if ansi.StringWidth(" chromatogram"+extra+l) <= c.w {
			extra += l
		}
	}
	in := chartInput{res: res, prog: prog, comps: c.sh.sys.Compounds, t0: t0, t1: t1, meas: c.meas}
	if c.prev != nil && c.faint {
		// the other run, faint and dotted beneath the one shown
		in.under = c.sh.res
		if !c.showPrev {
			in.under = c.prev
		}
	}
	plot := c.c.render(in, c.w, c.h-1, st)
	c.lines = fill(append([]string{heading(st, c.sh.focus == paneChart, "chromatogram", c.w, extra)}, plot...), c.h)
}

// --- peaks pane ---

// The compound values the peak table edits.
var peakColumns = []struct{ name, unit string }{{"ΔH", format.UnitDH}, {"ΔS", format.UnitDS}, {"ΔCp", format.UnitDCp}}

type peaksPane struct {
	sh    *shared
	keys  PeakKeys
	sel   int // the selected row (elution order)
	comp  int // the selected compound (index in the method), -1 before any
	col   int // index into peakColumns
	w, h  int
	lines []string
}

func newPeaksPane(sh *shared) *peaksPane {
	return &peaksPane{sh: sh, keys: DefaultPeakKeys(), comp: -1}
}

func (p *peaksPane) ShortHelp() []key.Binding  { return p.keys.ShortHelp() }
func (p *peaksPane) FullHelp() [][]key.Binding { return p.keys.FullHelp() }
func (p *peaksPane) SetSize(w, h int)          { p.w, p.h = w, h; p.render() }
func (p *peaksPane) View() string              { return strings.Join(p.lines, "\n") }

func (p *peaksPane) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case refreshMsg:
		p.render()
	case tea.KeyMsg:
		p.key(msg)
	}
	return p, nil
}

// clamp keeps the selection on the same compound when the table re-sorts
// (an edit moves it in the elution order), else within the table.
func (p *peaksPane) clamp() {
	peaks := p.sh.res.Peaks
	for i, pk := range peaks {
		if p.comp >= 0 && pk.Compound == p.comp {
			p.sel = i
			return
		}
	}
	if n := len(peaks); p.sel >= n {
		p.sel = n - 1
	}
	if p.sel < 0 {
		p.sel = 0
	}
	if p.sel < len(peaks) {
		p.comp = peaks[p.sel].Compound
	}
}

func (p *peaksPane) key(msg tea.KeyMsg) {
	sh, k := p.sh, p.keys
	n := len(sh.res.Peaks)
	if n == 0 {
		return
	}
	p.clamp()
	switch {
	case key.Matches(msg, k.Up):
		p.sel = (p.sel + n - 1) % n
		p.comp = sh.res.Peaks[p.sel].Compound
	case key.Matches(msg, k.Down):
		p.sel = (p.sel + 1) % n
		p.comp = sh.res.Peaks[p.sel].Compound
	case key.Matches(msg, k.Column):
		p.col = (p.col + 1) % len(peakColumns)
	case key.Matches(msg, k.ColumnBack):
		p.col = (p.col + len(peakColumns) - 1) % len(peakColumns)
	case key.Matches(msg, k.Toggle):
		ci := sh.res.Peaks[p.sel].Compound
		m := sh.method.Clone()
		m.Compounds[ci].Target = !m.Compounds[ci].Target
		state := "no longer a target"
		if m.Compounds[ci].Target {
			state = "a target"
		}
		sh.send(editMsg{m: m, what: fmt.Sprintf("%s is %s", inert(m.Compounds[ci].Name), state)})
	case key.Matches(msg, k.Type):
		ci := sh.res.Peaks[p.sel].Compound
		col := p.col
		c := sh.method.Compounds[ci]
		pc := peakColumns[col]
		prompt := fmt.Sprintf("%s %s (%s): ", inert(c.Name), pc.name, pc.unit)
		sh.send(openMsg{newPrompt(sh, prompt, trimNum(*compoundValue(&c, col)), func(text string) tea.Msg {
			v, err := strconv.ParseFloat(strings.TrimSpace(text), 64)
			if err != nil {
				return sayMsg{msgError, fmt.Sprintf("%q is not a number (kept the last valid value)", inert(text))}
			}
			m := sh.method.Clone()
			cc := &m.Compounds[ci]
			*compoundValue(cc, col) = round(v, compoundDigits)
			cc.FromIndex = false
			return editMsg{m: m, what: fmt.Sprintf("%s %s = %s %s", inert(cc.Name), pc.name, trimNum(*compoundValue(cc, col)), pc.unit), key: fmt.Sprintf("compound[%d]", ci+1)}
		})})
	}
}

func compoundValue(c *methodfile.Compound, col int) *float64 {
	switch col {
	case 0:
		return &c.DHkJ
	case 1:
		return &c.DS
	}
	return &c.DCp
}

// render is the peak table: elution order, name, retention time, elution
// temperature, half-height width, resolution to the next peak, target mark,
// and the compound's ΔH, ΔS and ΔCp (the chosen one editable).
func (p *peaksPane) render() {
	sh, st := p.sh, p.sh.st
	p.clamp()
	r := sh.res
	focused := sh.focus == panePeaks
	lines := []string{heading(st, focused, "peaks", p.w, "  t target · enter edits "+peakColumns[p.col].name+" · ΔH kJ/mol, ΔS and ΔCp J/(mol·K)")}
	nw := min(32, max(16, 16+p.w-80)) // the name column takes what a wide terminal gives
	head := fmt.Sprintf(" %2s %s %7s %5s %5s %6s %3s %8s  %8s  %7s", "#", padRight("compound", nw), "tR min", "Te °C", "w½ s", "Rs nxt", "tgt", "ΔH", "ΔS", "ΔCp")
	lines = append(lines, st.TableHead.Render(ansi.Truncate(head, p.w, "…")))
	rows := p.h - 2
	first := 0
	if p.sel >= rows && rows > 0 {
		first = p.sel - rows + 1
	}
	for i := first; i < len(r.Peaks) && i < first+rows; i++ {
		pk := r.Peaks[i]
		c := &sh.method.Compounds[pk.Compound]
		rs := ""
		if i < len(r.Pairs) {
			rs = format.Pair(r.Pairs[i].Resolution, sh.method.Goal.MinResolution)
			if i == r.Critical {
				rs = format.CriticalMark + rs
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
		sel := i == p.sel && focused
		vals := make([]string, 3)
		for k, wd := range []int{8, 8, 7} {
			vals[k] = fmt.Sprintf("%*s", wd, fmtNum(*compoundValue(c, k), 2, compoundDigits))
			if sel && k == p.col {
				vals[k] = selected(st, strings.TrimLeft(vals[k], " "))
				vals[k] = strings.Repeat(" ", max(0, wd+2-ansi.StringWidth(vals[k]))) + vals[k]
			} else {
				vals[k] = " " + vals[k] + " "
			}
		}
		mark := " "
		if sel {
			mark = "›"
		}
		row := fmt.Sprintf("%s%2d %s %7s %5.1f %5.2f %6s %3s", mark, i+1, padRight(ansi.Truncate(inert(c.Name), nw, "…"), nw), tr, pk.ElutionTemp-model.ZeroCelsius, pk.HalfWidth(), rs, tgt)
		rowSt := st.TableRow
		if sel {
			rowSt = st.TableSel
		}
		if i == r.Critical || (i == r.Critical+1 && r.Critical >= 0) {
			rowSt = st.Critical
		}
		lines = append(lines, ansi.Truncate(rowSt.Render(row)+strings.Join(vals, ""), p.w, "…"))
	}
	p.lines = fill(lines, p.h)
}

// --- settings pane ---

type settingsPane struct {
	list  fieldList
	w, h  int
	lines []string
}

func newSettingsPane(sh *shared) *settingsPane {
	return &settingsPane{list: fieldList{sh: sh, keys: DefaultSettingsKeys(), fields: settingsFields}}
}

func (p *settingsPane) ShortHelp() []key.Binding {
	return append(p.list.keys.ShortHelp(), p.list.keys.Sweep)
}
func (p *settingsPane) FullHelp() [][]key.Binding { return p.list.keys.FullHelp() }
func (p *settingsPane) SetSize(w, h int)          { p.w, p.h = w, h; p.render() }
func (p *settingsPane) View() string              { return strings.Join(p.lines, "\n") }

func (p *settingsPane) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case refreshMsg:
		p.list.clamp()
		p.render()
	case tea.KeyMsg:
		if !p.list.key(msg) {
			if key.Matches(msg, p.list.keys.Sweep) {
				p.list.sh.send(startSweepMsg{spec: carrierSweep(p.list.sh.method)})
			}
		}
		p.list.clamp()
	}
	return p, nil
}

// cryogenShort stands for the coolant note and model.CryogenCaution where
// the settings have no room for them whole.
const cryogenShort = "cryogens cause cold burns and can asphyxiate; ! shows the coolant and safety cautions in full"

// coolantShort is the whole sentence the settings show for the coolant
// note and the cryogen caution when they have no room for them whole.
func coolantShort(m *methodfile.Method) string {
	if m.Oven.InitialC <= m.Limits.AmbientC {
		return "a coolant is needed (the program starts below ambient): " + cryogenShort
	}
	return "coolant in use: " + cryogenShort
}

// minSettingRows is how many setting rows the settings always show (the
// selected one and those around it), fewer only on a pane that has fewer
// rows than that.
const minSettingRows = 3

// hydrogenShort is the whole sentence the settings show for the hydrogen
// caution when the pane has no room for it whole beside minSettingRows
// setting rows (the chart has then already given its rows).
const hydrogenShort = "Hydrogen carrier gas is flammable: ! shows its safety caution in full"

// safetyShort is the last resort: one line pointing to the cautions.
const safetyShort = "safety cautions (hydrogen, coolant): ! shows them in full"

// safety is the settings' safety text (the coolant note and cryogen
// caution, the hydrogen caution) for a pane of width w with free rows
// below its heading: the whole text when it leaves minSettingRows setting
// rows, else whole shorter sentences that name the hazards and where the
// text stands in full. Safety text is never cut, and never hides the
// selected setting.
func (p *settingsPane) safety(w, free int) []string {
	m := p.list.sh.method
	var coolWhole, coolShort, h2, h2Short []string
	if note := checks.CoolantNote(m); note != "" {
		// the cautions in full are one key away (!), and open by
		// themselves when a coolant is added
		coolWhole = append(wrap(" ⚠ "+note, w), wrap(" ⚠ "+model.CryogenCaution, w)...)
		coolShort = wrap(" ⚠ "+coolantShort(m), w)
	}
	if m.Carrier.Gas.Flammable() {
		h2, h2Short = wrap(" ⚠ "+model.HydrogenCaution, w), wrap(" ⚠ "+hydrogenShort, w)
	}
	if coolWhole == nil && h2 == nil {
		return nil
	}
	for _, c := range []struct {
		lines [][]string
		rows  int // the setting rows it must leave
	}{
		{[][]string{coolWhole, h2}, minSettingRows + 1}, // the derived inlet pressure too
		{[][]string{coolShort, h2}, minSettingRows},
		{[][]string{coolShort, h2Short}, minSettingRows},
		{[][]string{wrap(" ⚠ "+safetyShort, w)}, minSettingRows},
	} {
		var out []string
		for _, l := range c.lines {
			out = append(out, l...)
		}
		if len(out)+c.rows <= free {
			return out
		}
	}
	return nil // the method line above says ⚠ H₂ flammable; ! lists the cautions
}

// wantRows is the rows the settings need at width w to show their safety
// text whole (the coolant's in its short sentence) and a few setting rows
// around the selection: the chart gives them up (App.heights). 0 when
// there is no safety text.
func (p *settingsPane) wantRows(w int) int {
	m := p.list.sh.method
	n := 0
	if checks.CoolantNote(m) != "" {
		n += len(wrap(" ⚠ "+coolantShort(m), w))
	}
	if m.Carrier.Gas.Flammable() {
		n += len(wrap(" ⚠ "+model.HydrogenCaution, w))
	}
	if n == 0 {
		return 0
	}
	return 1 + n + minSettingRows + 1 // heading, the text, setting rows
}

func (p *settingsPane) render() {
	p.list.clamp()
	sh, st := p.list.sh, p.list.sh.st
	m := sh.method
	fs := settingsFields(m)
	focused := sh.focus == paneSettings
	lines := []string{heading(st, focused, "settings", p.w, "  ↑/↓ choose · +/- change · enter types · s sweeps the flow or pressure")}
	for _, l := range p.safety(p.w, p.h-len(lines)) {
		lines = append(lines, st.Warn.Render(l))
	}
	// the derived inlet pressure gives way when fewer than three settings
	// would show
	if m.Carrier.Mode == model.ConstantFlow && sh.sys != nil && p.h-len(lines)-1 >= 3 {
		prog := m.ModelProgram()
		lo, hi := sh.sys.Cond.InletGauge(prog.Initial)/1000, sh.sys.Cond.InletGauge(prog.MaxTemp())/1000
		lines = append(lines, ansi.Truncate(st.Label.Render(fmt.Sprintf("  %-30s ", "inlet pressure (gauge), derived"))+
			st.Value.Render(fmt.Sprintf(" %.1f kPa at %s °C → %.1f kPa at %s °C", lo, fmtNum(m.Oven.InitialC, 1, 2), hi, fmtNum(prog.MaxTemp()-model.ZeroCelsius, 1, 2))), p.w, "…"))
	}
	rows := p.h - len(lines)
	first := 0
	if p.list.sel >= rows && rows > 0 {
		first = p.list.sel - rows + 1
	}
	for i := first; i < len(fs) && i < first+rows; i++ {
		f := fs[i]
		v := f.shown(m)
		mark := " "
		if i == p.list.sel && focused {
			v, mark = selected(st, strings.TrimSpace(v)), "›"
		} else {
			v = " " + st.Value.Render(strings.TrimSpace(v)) + " "
		}
		lines = append(lines, ansi.Truncate(st.Label.Render(fmt.Sprintf("%s %-30s ", mark, f.label))+padRight(v, 18)+st.Dim.Render(" "+f.key), p.w, "…"))
	}
	p.lines = fill(lines, p.h)
}
