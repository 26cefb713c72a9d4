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

// titleLines are the file's name and the method's title, "modified" at the
// right; "rampwise ·" only when it fits on one line. A long title wraps
// (at most maxTitleRows lines).
func (a *App) titleLines(w int) []string {
	name := inert(a.name)
	if a.name == "" {
		name = "built-in demo"
	}
	text := name
	if t := a.sh.method.Title; t != "" {
		text += " · " + inert(t)
	}
	right := ""
	if a.Dirty() {
		right = "modified "
	}
	room := w - ansi.StringWidth(right) - 1
	left := " rampwise · " + text
	if ansi.StringWidth(left) > room {
		left = " " + text
	}
	lines := wrap(left, room)
	if len(lines) > maxTitleRows {
		lines = lines[:maxTitleRows]
		lines[maxTitleRows-1] = ansi.Truncate(lines[maxTitleRows-1], room-1, "") + "…"
	}
	for i, l := range lines {
		r := ""
		if i == 0 {
			r = right
		}
		pad := max(0, w-ansi.StringWidth(l)-ansi.StringWidth(r))
		lines[i] = a.st.Title.Render(l+strings.Repeat(" ", pad)) + a.st.Modified.Render(r)
	}
	return lines
}

// capRows keeps at most maxLineRows lines (text from a file can be of any
// length; the settings and the peak table show it whole), the last ending
// in "…" when more were cut.
func capRows(lines []string, w int) []string {
	if len(lines) <= maxLineRows {
		return lines
	}
	lines = lines[:maxLineRows]
	lines[maxLineRows-1] = ansi.Truncate(lines[maxLineRows-1], w-1, "") + "…"
	return lines
}

// maxLineRows is the most the method or the summary line takes.
const maxLineRows = 3

// maxTitleRows is the most the title takes.
const maxTitleRows = 3

// methodLines show the column and carrier at the precision they are
// saved, wrapped.
func (a *App) methodLines(w int) []string {
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
	if g.Outlet == model.VacuumOutlet {
		flow += ", vacuum outlet"
	}
	phase := inert(c.Phase)
	if phase == "" {
		phase = "phase not named"
	}
	col := fmt.Sprintf("%s m × %s mm × %s µm", v("column.length_m"), v("column.diameter_mm"), v("column.film_um"))
	switch c.Kind {
	case model.Packed:
		col = fmt.Sprintf("packed %s m × %s mm, %s µm particles", v("column.length_m"), v("column.diameter_mm"), v("column.particle_um"))
	case model.PorousLayer:
		col = fmt.Sprintf("porous-layer %s m × %s mm × %s µm layer", v("column.length_m"), v("column.diameter_mm"), v("column.film_um"))
	}
	// the target resolution is in the summary below
	// goal.ramps is how many ramps the optimizer may use, not how many the
	// program has: said so, so that it cannot be read as the program's count
	s := fmt.Sprintf(" %s, max %s °C · %s %s · optimizer: %s, up to %d %s · %s",
		col, v("column.max_temp_c"), g.Gas, flow,
		m.Goal.Objective, m.Goal.Ramps, plural(m.Goal.Ramps, "ramp", "ramps"), phase)
	const h2 = " ⚠ H₂ flammable ·"
	if g.Gas.Flammable() {
		s = h2 + s
	}
	lines := capRows(wrap(s, w), w)
	for i, l := range lines {
		if i == 0 && g.Gas.Flammable() {
			lines[i] = a.st.Warn.Render(h2) + a.st.Dim.Render(strings.TrimPrefix(l, h2))
			continue
		}
		lines[i] = a.st.Dim.Render(l)
	}
	return lines
}

// summaryLines are the run's times, the critical pair and what the
// program breaks, wrapped.
func (a *App) summaryLines(w int) []string {
	r := &a.res
	s := fmt.Sprintf(" holdup %.2f · run %.2f · cycle %.2f min · ", r.HoldupTime/60, r.RunTime/60, r.CycleTime/60)
	rs := "no counted pair"
	style := a.st.Good
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		target := a.sh.method.Goal.MinResolution
		if !format.MetAll(r.MinResolution, target, r.TargetsNotEluted) {
			style = a.st.Bad
		}
		// the pair before the target, so that a narrow screen still names it
		rs = "Rs " + format.RsNumber(r.MinResolution, target) + " " + format.VerdictAll(r.MinResolution, target, r.TargetsNotEluted) + " " +
			format.CriticalPair(inert(a.sh.sys.Compounds[cp.First].Name), inert(a.sh.sys.Compounds[cp.Second].Name)) +
			" (target " + format.Target(target) + ")"
	}
	// the worst corner and Rs − z·σ of the program as it stands
	robust := ""
	robustStyle := a.st.Good
	if text, met := a.robustSummary(); text != "" {
		robust = " · " + text
		if !met {
			robustStyle = a.st.Warn
		}
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
	if n := len(a.cautions()); n > 0 {
		tail += fmt.Sprintf(" · %d %s (! lists)", n, plural(n, "caution", "cautions"))
	}
	return capRows(wrapStyled(a.st.Info.Render(s)+style.Render(rs)+robustStyle.Render(robust)+a.st.Warn.Render(tail), w), w)
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// nbsp joins words that wrapStyled keeps on one line ("Rs − 2σ 1.50");
// it is shown as a space.
const nbsp = "\u00a0"

// wrapStyled wraps styled text at spaces into lines of at most w columns,
// the lines after the first indented by one.
func wrapStyled(s string, w int) []string {
	// ansi.Wrap breaks at every hyphen: keep names such as beta-pinene
	// whole (a non-breaking hyphen, as wide, stands in while wrapping)
	const nbh = "\u2011"
	lines := strings.Split(ansi.Wrap(strings.ReplaceAll(s, "-", nbh), w-1, ""), "\n")
	for i := range lines {
		lines[i] = strings.ReplaceAll(strings.ReplaceAll(lines[i], nbh, "-"), nbsp, " ")
		if i > 0 {
			lines[i] = " " + strings.TrimLeft(lines[i], " ")
		}
	}
	return lines
}

// messageLines is the status message, wrapped, on at most n lines (none
// when there is none); one that needs more ends with a pointer to the
// cautions list, which shows it whole.
func (a *App) messageLines(w, n int) []string {
	if a.message == "" || n <= 0 {
		return nil
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
	lines := wrap(" "+a.message, w)
	if len(lines) > n {
		const more = "… (! shows it all)"
		lines = lines[:n]
		lines[n-1] = ansi.Truncate(lines[n-1], w-ansi.StringWidth(more), "") + more
	}
	for i := range lines {
		lines[i] = st.Render(lines[i])
	}
	return lines
}

// wrap breaks plain text into lines of at most w columns at spaces.
func wrap(s string, w int) []string {
	w = max(w, 3) // narrower never ends (" " and a wide rune need 3)
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
