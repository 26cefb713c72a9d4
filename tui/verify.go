package tui

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/report"
)

// A verification run (V): a measured run of the method's program, read as
// `rampwise check` reads it (calibrate.Verify), drawn below the predicted
// chromatogram on the same time axis with the matched peaks joined
// (report.Measured, the figure's overlay), and judged in a dialog: each
// compound's Δt and whether the measured run meets the target.

type (
	// startVerifyMsg asks the root to read and judge a verification run.
	startVerifyMsg struct{ path string }
	// measuredMsg tells the chart which measured run to draw below the
	// prediction (nil: none).
	measuredMsg struct{ meas *report.Measured }
)

type verifyOutcome struct {
	path string
	ck   *calibrate.Check
	meas *report.Measured
	// the prediction of the run's own program (a runs file's run may have
	// another program than the method's): shown in the chart while the
	// dialog is open, unless same
	pred model.Result
	prog model.Program
	same bool
	err  error
}

// readVerificationRun reads a runs file (its last run), or a peak table or
// chromatogram file as a run of the method's own program, as `check`
// does. Every file is opened only when it is a regular file.
func readVerificationRun(m *methodfile.Method, path string) (*methodfile.Run, error) {
	if strings.EqualFold(filepath.Ext(path), ".toml") {
		all, err := methodfile.ReadRuns(path, m)
		if err != nil {
			return nil, err
		}
		if len(all.Runs) == 0 {
			return nil, fmt.Errorf("%s: no [[run]] in it", path)
		}
		return &all.Runs[len(all.Runs)-1], nil
	}
	return methodfile.ReadExportRun(path, m, nil)
}

// verifyRun is the job: read, judge, and simulate the run's program.
func verifyRun(m *methodfile.Method, path string) verifyOutcome {
	out := verifyOutcome{path: path}
	run, err := readVerificationRun(m, path)
	if err != nil {
		out.err = err
		return out
	}
	ck, err := calibrate.Verify(m, run)
	if err != nil {
		out.err = fmt.Errorf("%s: %v", path, err)
		return out
	}
	out.ck, out.meas = ck, report.MeasuredFromCheck(ck)
	rm := m.RunMethod(ck.Run)
	out.same = rm.Oven.Describe() == m.Oven.Describe() && rm.Carrier == m.Carrier
	sys, err := rm.System()
	if err == nil {
		out.prog = rm.ModelProgram()
		err = sys.Simulate(out.prog, &out.pred)
	}
	if err != nil {
		out.err = fmt.Errorf("%s: %v", path, err)
	}
	return out
}

func (a *App) startVerify(path string) tea.Cmd {
	if path == "" {
		a.say(msgError, "no verification run given")
		return nil
	}
	m := a.sh.method
	_, cmd := a.startJob("reading the verification run "+inert(path), func(ctx context.Context) any {
		return verifyRun(m, path)
	})
	return cmd
}

func (a *App) verifyDone(v verifyOutcome) {
	if v.err != nil {
		a.say(msgError, "verification run: %v", inertErr(v.err))
		return
	}
	d := newVerifyDialog(&a.sh, v)
	a.open(d)
	a.chart.Update(measuredMsg{meas: v.meas})
	if !v.same {
		a.chart.Update(previewMsg{res: &d.v.pred, prog: d.v.prog, label: "predicted for the run's program", showIt: true})
	}
	if v.ck.Met {
		a.say(msgGood, "%s meets the target as measured · esc closes", inert(v.ck.Run.Name))
	} else {
		a.say(msgWarn, "%s does NOT meet the target as measured · esc closes", inert(v.ck.Run.Name))
	}
	if d.offProgram() != "" {
		a.say(a.kind, "%s · ⚠ its times are far from the prediction: is it a run of this program?", a.message)
	}
}

// --- the verification dialog ---

type verifyDialog struct {
	sh    *shared
	v     verifyOutcome
	keys  ListKeys
	off   int
	w, h  int
	lines []string
}

func newVerifyDialog(sh *shared, v verifyOutcome) *verifyDialog {
	k := scrollKeys(ListKeys{Reject: bind([]string{"esc", "q", "n"}, "esc/q", "close")})
	return &verifyDialog{sh: sh, v: v, keys: k}
}

func (d *verifyDialog) ShortHelp() []key.Binding {
	return []key.Binding{d.keys.Reject, d.keys.Up, d.keys.PageDown}
}
func (d *verifyDialog) FullHelp() [][]key.Binding {
	return [][]key.Binding{{d.keys.Reject, d.keys.Up, d.keys.PageDown}}
}
func (d *verifyDialog) View() string     { return strings.Join(d.lines, "\n") }
func (d *verifyDialog) SetSize(w, h int) { d.w, d.h = w, h; d.render() }
func (d *verifyDialog) rows() int        { return max(1, d.h-1-len(d.title(""))) }

// wantRows: the title, the table head and every row; the chart gives
// rows for them down to minDialogChartRows (App.heights).
func (d *verifyDialog) wantRows() int   { return len(d.title("")) + 1 + len(d.body()) }
func (d *verifyDialog) chartFloor() int { return minDialogChartRows }

func (d *verifyDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.KeyMsg:
		if key.Matches(msg, d.keys.Reject) {
			d.sh.send(closeMsg{}, measuredMsg{}, sayMsg{msgInfo, "closed the verification run"})
			return d, nil
		}
		scroll(&d.off, msg, d.keys, len(d.body()), d.rows())
		d.render()
	case refreshMsg:
		d.render()
	}
	return d, nil
}

func num3(x float64) string {
	if math.IsNaN(x) {
		return "-"
	}
	return fmt.Sprintf("%.3f", x)
}

// body is a row per compound in predicted elution order (predicted and
// measured time, Δt, the resolution to the next peak predicted and as
// measured), then the warnings, notes and missing targets.
func (d *verifyDialog) body() []string {
	st, ck := d.sh.st, d.v.ck
	var out []string
	for i, c := range ck.Compounds {
		rs := ""
		if i < len(ck.Pairs) {
			p := ck.Pairs[i]
			meas := "-"
			if !math.IsNaN(p.Measured) {
				meas = fmt.Sprintf("%.2f", p.Measured)
				if p.WidthsPredicted {
					meas += "*"
				}
			}
			mark := " "
			if p.First == ck.Critical[0] && p.Second == ck.Critical[1] {
				mark = format.CriticalMark
			}
			if !p.Counts {
				mark = "·"
			}
			rs = fmt.Sprintf("%s%6.2f %7s", mark, p.Predicted, meas)
		}
		delta := "-"
		if !math.IsNaN(c.DeltaMin) {
			delta = fmt.Sprintf("%+.3f", c.DeltaMin)
		}
		// the last column: the confidence of a peak assigned here (an
		// unnamed peak), or a target the run lacks
		how := ""
		missing := math.IsNaN(c.MeasuredMin) && c.Target
		switch {
		case c.Assigned:
			how = fmt.Sprintf("%.2f", c.AssignedConfidence)
		case missing:
			how = verifyMissing
		}
		tgt := " "
		if c.Target {
			tgt = "t"
		}
		nw := d.nameWidth()
		line := fmt.Sprintf(" %2d %s %s %8s %8s %7s  %s  %s", i+1, padRight(ansi.Truncate(inert(c.Name), nw, "…"), nw), tgt, num3(c.PredictedMin), num3(c.MeasuredMin), delta, padRight(rs, 15), how)
		s := st.TableRow
		if missing {
			s = st.Warn
		}
		out = append(out, s.Render(ansi.Truncate(line, d.w, "…")))
	}
	add := func(prefix string, xs []string) {
		for _, x := range xs {
			for _, l := range wrap(" "+prefix+inert(x), d.w) {
				out = append(out, st.Warn.Render(l))
			}
		}
	}
	if len(ck.MissingTargets) > 0 {
		add("⚠ targets not found in the run: ", []string{strings.Join(ck.MissingTargets, ", ")})
	}
	add("⚠ ", ck.Warnings)
	add("note: ", ck.Notes)
	return out
}

// verifyMissing is the last column of a target the run lacks; the
// column's heading, "assigned", is as wide.
const verifyMissing = "not found"

// verifyFixed is the width of a row without the compound's name: the
// columns from # to the assigned one (9 wide).
const verifyFixed = 60

// nameWidth is the compound column's width: the longest name, at least
// "compound", at most what leaves the other columns whole (20 at 80
// columns; a longer name is cut there, with "…").
func (d *verifyDialog) nameWidth() int {
	n := len("compound")
	for _, c := range d.v.ck.Compounds {
		n = max(n, ansi.StringWidth(inert(c.Name)))
	}
	return max(8, min(n, 40, d.w-verifyFixed))
}

func (d *verifyDialog) render() {
	st := d.sh.st
	nw := d.nameWidth()
	head := st.TableHead.Render(ansi.Truncate(fmt.Sprintf(" %2s %-*s %s %8s %8s %7s  %-15s  %-9s", "#", nw, "compound", "t", "pred min", "meas min", "Δt min", " Rs pred   meas", "assigned"), d.w, "…"))
	body := d.body()
	rows := d.rows()
	d.off = max(0, min(d.off, len(body)-rows))
	title := d.title("")
	if len(body) > rows {
		// where the rows are, on the first line it fits whole (before
		// the legend)
		plain := fmt.Sprintf(" · rows %d–%d of %d", d.off+1, min(len(body), d.off+rows), len(body))
		pos := st.Dim.Render(plain)
		if ansi.StringWidth(strings.TrimRight(head, " ")+pos) <= d.w {
			head = strings.TrimRight(head, " ") + pos
		} else if t := d.title(plain); strings.Contains(ansi.Strip(strings.Join(t, "\n")), plain) {
			title = t
		} else {
			for i := range title {
				if ansi.StringWidth(title[i]+pos) <= d.w {
					title[i] += pos
					break
				}
			}
		}
	}
	lines := append(title, head)
	lines = append(lines, body[d.off:min(len(body), d.off+rows)]...)
	d.lines = fill(lines, d.h)
}

// title (with pos, the rows shown, before the legend) is the verdict
// with what fails it (the pair under the target or
// the targets not found), the measured critical pair, and a warning when
// the measured times are far from the prediction (a run of another
// program?), each wrapped whole; the legend follows when it fits whole.
func (d *verifyDialog) title(pos string) []string {
	st, ck := d.sh.st, d.v.ck
	verdict := st.Good.Render("target met as measured")
	if !ck.Met {
		verdict = st.Bad.Render("target NOT met as measured" + d.failing())
	}
	rs := "no counted pair measured"
	if !math.IsNaN(ck.MinResolution) {
		rs = fmt.Sprintf("min Rs %s %s", format.RsNumber(ck.MinResolution, ck.Target), format.CriticalPair(inert(ck.Critical[0]), inert(ck.Critical[1])))
	}
	rs += ", target " + format.Target(ck.Target)
	head := st.Focused.Render("▸verification "+inert(ck.Run.Name)+": ") + verdict
	legend := pos + " · Δt = measured − predicted · * widths predicted · assigned: the confidence of an unnamed peak's match"
	var lines []string
	if one := head + st.Dim.Render(" · "+rs); ansi.StringWidth(one) <= d.w {
		lines = []string{fitTitle(one, st.Dim, legend, d.w)}
	} else if !math.IsNaN(ck.MinResolution) && ck.MinResolution < ck.Target {
		// the verdict names the pair and its Rs already: no second line
		lines = wrapStyled(head, d.w)
		lines[len(lines)-1] = fitTitle(lines[len(lines)-1], st.Dim, legend, d.w)
	} else {
		lines = wrapStyled(head, d.w)
		if second := wrapStyled(st.Dim.Render(" "+rs), d.w); len(second) > 1 {
			lines = append(lines, second...)
		} else {
			lines = append(lines, fitTitle(second[0], st.Dim, legend, d.w))
		}
	}
	if off := d.offProgram(); off != "" {
		lines = append(lines, wrapStyled(st.Warn.Render(" ⚠ "+off), d.w)...)
	}
	return lines
}

// failing says what fails the target: the counted pair below it, or the
// targets the run lacks.
func (d *verifyDialog) failing() string {
	ck := d.v.ck
	var why []string
	if n := len(ck.MissingTargets); n > 0 {
		why = append(why, fmt.Sprintf("%d %s not found", n, plural(n, "target", "targets")))
	}
	if !math.IsNaN(ck.MinResolution) && ck.MinResolution < ck.Target {
		why = append(why, fmt.Sprintf("%s / %s at Rs %s < %s", inert(ck.Critical[0]), inert(ck.Critical[1]),
			format.RsNumber(ck.MinResolution, ck.Target), format.Target(ck.Target)))
	}
	if len(why) == 0 {
		return ""
	}
	return ": " + strings.Join(why, ", ")
}

// farFactor: a measured time more than this many retention-time SDs
// (goal.robust.retention_time_sd_min) from the prediction, and more than
// the predicted half-height width, is far from it.
const farFactor = 25

// offProgram is a warning when most measured peaks are far from the
// prediction: the run was most likely made with another program (or
// column, or carrier setting) than the one it is checked against.
func (d *verifyDialog) offProgram() string {
	sd := d.sh.method.Goal.Robust.RetentionTimeSDMin
	if !(sd > 0) {
		sd = methodfile.DefaultRetentionTimeSDMin
	}
	measured, far, worst := 0, 0, 0.0
	for _, c := range d.v.ck.Compounds {
		if math.IsNaN(c.DeltaMin) {
			continue
		}
		measured++
		if x := math.Abs(c.DeltaMin); x > farFactor*sd && x > c.PredictedWidthMin {
			far++
		}
		worst = max(worst, math.Abs(c.DeltaMin))
	}
	if measured < 2 || 2*far <= measured {
		return ""
	}
	return fmt.Sprintf("measured times differ from the prediction by up to %.1f min (%d of %d peaks): is this run of this program?", worst, far, measured)
}
