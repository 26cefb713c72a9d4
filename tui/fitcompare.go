package tui

import (
	"context"
	"fmt"
	"strconv"
	"strings"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// --- calibration from a scouting runs file (F) ---

func (a *App) runFit(path string) {
	runs, err := methodfile.ReadRuns(path, a.method)
	if err != nil {
		a.say(msgError, "%v", err)
		return
	}
	rep, err := calibrate.Fit(a.method, runs, calibrate.Options{})
	if err != nil {
		a.say(msgError, "fit: %v", err)
		return
	}
	a.fit = rep
	a.say(msgInfo, "fitted %d compounds from %s: y takes the fitted values into the method, n keeps the current ones", len(rep.Compounds), path)
}

func (a *App) onFitDecision(msg tea.KeyMsg) {
	switch msg.String() {
	case "y", "enter":
		m := a.fit.Method
		a.fit = nil
		a.apply(m, "took the fitted parameters (u undoes)")
	case "n", "esc":
		a.fit = nil
		a.say(msgInfo, "kept the current parameters")
	}
}

func (a *App) fitLines(w, h int) []string {
	rep := a.fit
	lines := []string{a.st.Focused.Render("▸calibration ") + a.st.Dim.Render(fmt.Sprintf("diameter %.4f mm · plate-height factor %.3f · y takes · n keeps", rep.DiameterMM, rep.PlateHeightFactor))}
	lines = append(lines, a.st.TableHead.Render(ansi.Truncate(fmt.Sprintf(" %-20s %9s %6s %10s %6s %4s %9s", "compound", "ΔH kJ/mol", "±", "ΔS J/molK", "±", "runs", "rms min"), w, "…")))
	rows := h - 2 - min(len(rep.Warnings), 3)
	for i, c := range rep.Compounds {
		if i >= rows {
			break
		}
		lines = append(lines, ansi.Truncate(fmt.Sprintf(" %-20s %9.2f %6s %10.2f %6s %4d %9.4f", ansi.Truncate(c.Name, 20, "…"), c.DHkJ, errText(c.StdErrDH), c.DS, errText(c.StdErrDS), c.Runs, c.RMS), w, "…"))
	}
	for i, wr := range rep.Warnings {
		if i >= 3 || len(lines) >= h {
			break
		}
		lines = append(lines, a.st.Warn.Render(ansi.Truncate(" ⚠ "+wr, w, "…")))
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines[:h]
}

func errText(x float64) string {
	if x != x {
		return "-"
	}
	return strconv.FormatFloat(x, 'f', 2, 64)
}

// --- ranking of column dimensions (C) ---

type compareRun struct {
	running bool
	out     []optimizer.Outcome
	sel     int
	cancel  context.CancelFunc
}

type compareDoneMsg struct{ out []optimizer.Outcome }

// parseDims reads "L,L D,D F,F" (lengths m, diameters mm, films µm).
func parseDims(text string, m *methodfile.Method) ([][3]float64, error) {
	parts := strings.Fields(text)
	if len(parts) == 0 || len(parts) > 3 {
		return nil, fmt.Errorf("give lengths, then optionally diameters and films, e.g. 15,30 0.18,0.25 0.25")
	}
	lists := [][]float64{{m.Column.LengthM}, {m.Column.DiameterMM}, {m.Column.FilmUM}}
	for i, p := range parts {
		lists[i] = nil
		for _, f := range strings.Split(p, ",") {
			v, err := strconv.ParseFloat(f, 64)
			if err != nil || !(v > 0) {
				return nil, fmt.Errorf("%q is not a positive number", f)
			}
			lists[i] = append(lists[i], v)
		}
	}
	var out [][3]float64
	for _, l := range lists[0] {
		for _, d := range lists[1] {
			for _, f := range lists[2] {
				out = append(out, [3]float64{l, d, f})
			}
		}
	}
	if len(out) > 60 {
		return nil, fmt.Errorf("%d candidates; 60 at most here", len(out))
	}
	return out, nil
}

func (a *App) startCompare(text string) tea.Cmd {
	dims, err := parseDims(text, a.method)
	if err != nil {
		a.say(msgError, "compare: %v", err)
		return nil
	}
	var cands []optimizer.Candidate
	for _, d := range dims {
		c := a.method.Clone()
		c.Column.LengthM, c.Column.DiameterMM, c.Column.FilmUM = d[0], d[1], d[2]
		if err := validate(c); err != nil {
			a.say(msgError, "compare: %g m × %g mm × %g µm: %v", d[0], d[1], d[2], err)
			return nil
		}
		cands = append(cands, optimizer.Candidate{Source: fmt.Sprintf("%g m × %g mm × %g µm", d[0], d[1], d[2]), Method: c})
	}
	ctx, cancel := context.WithCancel(context.Background())
	a.cmp = &compareRun{running: true, cancel: cancel}
	settings := a.optSettings
	a.say(msgInfo, "optimizing %d candidate columns… esc stops", len(cands))
	return func() tea.Msg {
		return compareDoneMsg{out: optimizer.Compare(ctx, cands, settings, nil)}
	}
}

func (a *App) onCompareRankKey(msg tea.KeyMsg) {
	c := a.cmp
	if c.running {
		if msg.String() == "esc" {
			c.cancel()
		}
		return
	}
	switch msg.String() {
	case "up", "k":
		c.sel = (c.sel + len(c.out) - 1) % len(c.out)
	case "down", "j":
		c.sel = (c.sel + 1) % len(c.out)
	case "enter":
		o := c.out[c.sel]
		a.cmp = nil
		if o.Err != nil || o.Result == nil {
			a.say(msgError, "that candidate has no program")
			return
		}
		m := optimizer.Apply(o.Method, o.Result)
		a.apply(m, "switched to "+o.Source+" with its optimized program (u undoes)")
	case "esc", "n":
		a.cmp = nil
		a.say(msgInfo, "kept the current column")
	}
}

func (a *App) compareRankLines(w, h int) []string {
	c := a.cmp
	lines := []string{a.st.Focused.Render("▸column ranking ") + a.st.Dim.Render("↑/↓ choose · enter switches the method to it · esc closes")}
	if c.running {
		lines = append(lines, a.st.Info.Render(" optimizing every candidate…"))
	}
	for i, o := range c.out {
		if len(lines) >= h {
			break
		}
		text := fmt.Sprintf(" %2d %-26s ", i+1, o.Source)
		switch {
		case o.Err != nil:
			text += "error: " + o.Err.Error()
		case o.Result.Feasible():
			text += fmt.Sprintf("%.2f min  Rs %.2f", o.Time/60, o.Result.Sim.MinResolution)
		default:
			text += fmt.Sprintf("not reached (Rs %.2f)", o.Result.Sim.MinResolution)
		}
		if o.Err == nil {
			text += fmt.Sprintf("  inlet %.0f→%.0f kPa  max %.0f °C", o.InletStart/1000, o.InletEnd/1000, o.MaxTemp-273.15)
		}
		st := a.st.TableRow
		if i == c.sel {
			st = a.st.TableSel
		}
		lines = append(lines, st.Render(ansi.Truncate(text, w, "…")))
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines[:h]
}
