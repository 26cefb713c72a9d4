package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
)

// The root's own lines: title, method, summary and messages. Every string
// from the file goes through inert.

func (a *App) titleLine(w int) string {
	name := inert(a.name)
	if a.name == "" {
		name = "built-in demo"
	}
	left := " rampwise · " + name
	if t := a.sh.method.Title; t != "" {
		left += " · " + inert(t)
	}
	right := ""
	if a.Dirty() {
		right = "modified "
	}
	left = ansi.Truncate(left, w-len(right)-1, "…")
	pad := max(0, w-ansi.StringWidth(left)-ansi.StringWidth(right))
	return a.st.Title.Render(left+strings.Repeat(" ", pad)) + a.st.Modified.Render(right)
}

// methodLine shows the column and carrier at the precision they are saved.
func (a *App) methodLine(w int) string {
	m := a.sh.method
	c, g := m.Column, m.Carrier
	fs := map[string]field{}
	for _, f := range settingsFields(m) {
		fs[f.key] = f
	}
	v := func(key string) string { return fs[key].text(m) }
	var flow string
	if g.Mode == model.ConstantPressure {
		flow = fmt.Sprintf("%s kPa constant pressure", v("carrier.inlet_kpa"))
	} else {
		flow = fmt.Sprintf("%s mL/min constant flow", v("carrier.flow_ml_min"))
	}
	if g.Outlet == "vacuum" {
		flow += ", vacuum outlet"
	}
	phase := inert(c.Phase)
	if phase == "" {
		phase = "phase not named"
	}
	s := fmt.Sprintf(" %s m × %s mm × %s µm, max %s °C · %s %s · goal Rs %.2f, %s, %d ramps · %s",
		v("column.length_m"), v("column.diameter_mm"), v("column.film_um"), v("column.max_temp_c"), g.Gas, flow,
		m.Goal.MinResolution, m.Goal.Objective, m.Goal.Ramps, phase)
	if g.Gas.Flammable() {
		return a.st.Warn.Render(" ⚠ H₂ flammable ") + a.st.Dim.Render(ansi.Truncate(s, w-16, "…"))
	}
	return a.st.Dim.Render(ansi.Truncate(s, w, "…"))
}

func (a *App) summaryLine(w int) string {
	r := &a.res
	s := fmt.Sprintf(" holdup %.2f · run %.2f · cycle %.2f min · ", r.HoldupTime/60, r.RunTime/60, r.CycleTime/60)
	rs := "no counted pair"
	style := a.st.Good
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		target := a.sh.method.Goal.MinResolution
		if !format.Met(r.MinResolution, target) {
			style = a.st.Bad
		}
		// the pair before the target, so that a narrow screen still names it
		rs = "Rs " + format.RsNumber(r.MinResolution, target) + " " + format.Verdict(r.MinResolution, target) + " " +
			format.CriticalPair(inert(a.sh.sys.Compounds[cp.First].Name), inert(a.sh.sys.Compounds[cp.Second].Name)) +
			" (target " + format.Target(target) + ")"
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
	m := a.sh.method
	prog := m.ModelProgram()
	if at, over := a.sh.sys.Cond.OverPressure(m.Limits.MaxInletKPa*1000, prog.Initial, prog.MaxTemp()); over {
		tail += fmt.Sprintf(" · inlet over %s kPa from %.0f °C", trimNum(m.Limits.MaxInletKPa), at-model.ZeroCelsius)
	}
	return ansi.Truncate(a.st.Info.Render(s)+style.Render(rs)+a.st.Warn.Render(tail), w, "…")
}

// messageLines is the status message on two lines.
func (a *App) messageLines(w int) []string {
	st := a.st.Info
	switch a.kind {
	case msgWarn:
		st = a.st.Warn
	case msgError:
		st = a.st.Error
	case msgGood:
		st = a.st.Good
	}
	lines := wrap(" "+a.message, w)
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
		rs := []rune(s)
		cut := min(w, len(rs))
		for i := cut - 1; i > w/2; i-- {
			if rs[i] == ' ' {
				cut = i
				break
			}
		}
		// w columns can hold fewer runes than w when some are wide
		for ansi.StringWidth(string(rs[:cut])) > w && cut > 1 {
			cut--
		}
		lines = append(lines, string(rs[:cut]))
		s = " " + strings.TrimLeft(string(rs[cut:]), " ")
	}
	return append(lines, s)
}
