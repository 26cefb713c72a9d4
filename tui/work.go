package tui

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/report"
	"github.com/rampwise/rampwise/model/sweep"
	"github.com/rampwise/rampwise/optimizer"
	"github.com/rampwise/rampwise/optimizer/methodsearch"
)

// Anything slower than a keystroke runs here, as a tea.Cmd that returns a
// doneMsg; a progress dialog shows it and esc cancels it through the job's
// context. A result from a cancelled job is dropped (its id is stale), except
// the optimizer's, which offers the best program found before the stop.

// The requests components send to start work.
type (
	saveMsg struct {
		path string // "" is the method's own file
		quit bool   // quit once saved
	}
	saveAsMsg struct {
		path string
		quit bool
	}
	exportMsg       struct{ base string }
	startFitMsg     struct{ path string }
	startCompareMsg struct{ text string }
	startSweepMsg   struct{ spec sweepSpec }
)

// doneMsg carries the typed outcome of job id.
type doneMsg struct {
	id int
	v  any
}

type (
	optOutcome struct {
		res *optimizer.Result
		err error
	}
	saveOutcome struct {
		path  string
		m     *methodfile.Method
		err   error
		quit  bool
		fresh bool   // an existing method's text could not be kept: written anew
		data  []byte // the text written
	}
	exportOutcome struct {
		base    string
		unsaved bool // the program on screen differs from the file's
		err     error
	}
	fitOutcome struct {
		path string
		rep  *calibrate.Report
		sim  model.Result // the fitted method's run
		sys  *model.System
		err  error
	}
	compareOutcome struct{ out []methodsearch.Outcome }
	sweepOutcome   struct {
		spec sweepSpec
		pts  []sweep.Point
		err  error
	}
)

type optProgressMsg struct {
	id int
	p  optimizer.Progress
}

// progressTextMsg updates the progress dialog.
type progressTextMsg struct{ text string }

// startJob opens the progress dialog and returns the Cmd that runs work.
func (a *App) startJob(what string, work func(ctx context.Context) any) (*job, tea.Cmd) {
	if a.job != nil {
		a.job.cancel()
	}
	a.jobSeq++
	ctx, cancel := context.WithCancel(context.Background())
	j := &job{id: a.jobSeq, what: what, cancel: cancel}
	a.job = j
	a.open(newProgressDialog(&a.sh, what))
	id := j.id
	return j, func() tea.Msg { return doneMsg{id: id, v: work(ctx)} }
}

func (a *App) cancelJob() {
	j := a.job
	if j == nil {
		return
	}
	j.cancel()
	if j.ch != nil {
		a.toOverlay(progressTextMsg{text: "stopping the optimizer; the best program so far will be offered"})
		return
	}
	a.job = nil
	a.dropProgress()
	a.say(msgInfo, "stopped %s", j.what)
}

// dropProgress removes the progress display of finished work, from the
// slot or from the dialogs waiting for it.
func (a *App) dropProgress() {
	keep := a.pending[:0]
	for _, d := range a.pending {
		if _, ok := d.(*progressDialog); !ok {
			keep = append(keep, d)
		}
	}
	a.pending = keep
	if _, ok := a.overlay.(*progressDialog); ok {
		a.closeOverlay()
	}
}

// onDone takes a job's outcome.
func (a *App) onDone(msg doneMsg) tea.Cmd {
	if a.job == nil || msg.id != a.job.id {
		return nil // cancelled
	}
	a.job = nil
	a.dropProgress()
	switch v := msg.v.(type) {
	case optOutcome:
		a.optDone(v)
	case saveOutcome:
		return a.saveDone(v)
	case exportOutcome:
		if v.err != nil {
			a.say(msgError, "export: %v", inertErr(v.err))
			return nil
		}
		a.wrote[v.base+".png"], a.wrote[v.base+".md"] = true, true
		if v.unsaved {
			// the export is of what the screen shows, which the file does not hold yet
			a.say(msgWarn, "exported %s.png (figure) and %s.md (method sheet) of the method on screen, UNSAVED: the method file still holds the last saved program", inert(v.base), inert(v.base))
		} else {
			a.say(msgGood, "exported %s.png (figure) and %s.md (method sheet)", inert(v.base), inert(v.base))
		}
	case fitOutcome:
		if v.err != nil {
			a.say(msgError, "%v", inertErr(v.err))
			return nil
		}
		if v.path != a.plan.runs {
			a.plan.runs, a.plan.prior = v.path, nil // other runs: the method is their prior
		}
		a.open(newFitDialog(&a.sh, v))
		a.say(msgInfo, "fitted %d compounds from %s: y takes the fitted values into the method, n keeps the current ones", len(v.rep.Compounds), inert(v.path))
	case planOutcome:
		a.planDone(v)
	case verifyOutcome:
		a.verifyDone(v)
	case compareOutcome:
		a.open(newRankingDialog(&a.sh, v.out))
		a.say(msgGood, "ranked %d columns: enter switches the method to the chosen one", len(v.out))
	case sweepOutcome:
		if v.err != nil {
			a.say(msgError, "sweep: %v", inertErr(v.err))
			return nil
		}
		a.open(newSweepDialog(&a.sh, v.spec, v.pts))
		a.say(msgInfo, "window diagram of %s: minimum resolution and run time across %s–%s %s · esc closes", v.spec.label, trimNum(round(v.spec.lo, 3)), trimNum(round(v.spec.hi, 3)), v.spec.unit)
	}
	return nil
}

// --- save ---

// demoFileName is the name the save-as prompt offers for the built-in demo.
const demoFileName = "demo.toml"

func (a *App) saveAsPrompt(quit bool) component {
	prompt := "save as: "
	if quit {
		prompt = "save as (then quit): "
	}
	// The current file's name (the demo's own for the built-in demo),
	// selected: typing a path replaces it, an arrow key edits it.
	name := a.path
	if name == "" {
		name = demoFileName
	}
	return newPrompt(&a.sh, prompt, name, func(text string) tea.Msg { return saveAsMsg{path: strings.TrimSpace(text), quit: quit} })
}

// saveAs saves to a typed path, asking first when that is an existing file
// this session did not write.
func (a *App) saveAs(path string, quit bool) tea.Cmd {
	if path == "" {
		a.say(msgError, "no file name given; not saved")
		return nil
	}
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		a.say(msgError, "%s is a folder: give a file name in it, such as %s (not saved)", inert(path), inert(filepath.Join(path, "method.toml")))
		return nil
	}
	if _, err := os.Stat(path); err == nil && !a.wrote[path] {
		// the message line says this save, not what was said before
		a.say(msgWarn, "%s exists and was not written here: not saved yet", inert(path))
		a.open(newConfirm(&a.sh, "replace "+inert(path)+"?", "it exists and was not written here", []choice{
			{keys: []string{"y"}, label: "replace it", msgs: []tea.Msg{saveMsg{path: path, quit: quit}}},
			{keys: []string{"n", "esc"}, label: "choose another name", msgs: []tea.Msg{sayMsg{msgInfo, "not saved: " + inert(path) + " kept as it was; choose another name"}, openMsg{a.saveAsPrompt(quit)}}},
		}))
		return nil
	}
	return a.startSave(path, quit)
}

func (a *App) startSave(path string, quit bool) tea.Cmd {
	if path == "" {
		path = a.path
	}
	if path == "" {
		a.open(a.saveAsPrompt(quit))
		return nil
	}
	if !a.mayWrite(path, quit) {
		return nil
	}
	m := a.sh.method
	// The base text: the file's own when saving to the file the text came
	// from (as it is on disk now, so that what another program added there
	// stays); else (save as, the demo) the text loaded or last written, so
	// that the new file is the user's text with only the changes placed,
	// never a freshly written one.
	text, same := a.text, a.textOf != "" && samePath(path, a.textOf)
	j, cmd := a.startJob("saving "+inert(path), func(ctx context.Context) any {
		base := text
		if same {
			if cur, err := fsafe.ReadRegular(path, methodfile.MaxFileSize); err == nil {
				base = cur
			}
		}
		if base == nil {
			base = []byte{} // never the target's text (nil would read it)
		}
		data, kept, err := methodfile.SaveText(path, base, m)
		return saveOutcome{path: path, m: m, data: data, err: err, quit: quit, fresh: len(base) > 0 && !kept}
	})
	j.save = true
	return cmd
}

func (a *App) saveDone(v saveOutcome) tea.Cmd {
	if v.err != nil {
		a.say(msgError, "not saved: %v", inertErr(v.err))
		return nil
	}
	a.path, a.name, a.saved = v.path, v.path, v.m
	a.text, a.textOf = v.data, v.path
	if a.sh.method == v.m && v.data != nil {
		// messages name the file as it now is: its name and its lines
		a.sh.method = v.m.Located(v.path, v.data)
		a.saved = a.sh.method
	}
	a.wrote[v.path] = true
	a.savedFile(v.path)
	a.guard.update(a.path, a.sh.method, a.Dirty())
	a.say(msgGood, "saved to %s", inert(v.path))
	if v.fresh {
		a.say(msgWarn, "saved to %s, written anew: its layout could not be kept (comments lost)", inert(v.path))
	}
	if v.quit {
		return tea.Quit
	}
	return nil
}

// --- export ---

func (a *App) exportBase() string {
	if a.path == "" {
		return "rampwise-demo"
	}
	return strings.TrimSuffix(a.path, filepath.Ext(a.path))
}

// askExport exports the figure and the method sheet beside the method,
// asking first when either file exists and this session did not write it.
func (a *App) askExport() tea.Cmd {
	base := a.exportBase()
	var there []string
	for _, f := range []string{base + ".png", base + ".md"} {
		if _, err := os.Stat(f); err == nil && !a.wrote[f] {
			there = append(there, inert(f))
		}
	}
	if len(there) > 0 {
		a.open(newConfirm(&a.sh, "replace "+strings.Join(there, " and ")+"?", exportNote(a.Dirty()), []choice{
			{keys: []string{"y"}, label: "replace", msgs: []tea.Msg{exportMsg{base: base}}},
			{keys: []string{"n", "esc"}, label: "keep them (not exported)", msgs: []tea.Msg{sayMsg{msgInfo, "not exported"}}},
		}))
		return nil
	}
	return a.startExport(base)
}

// exportNote is the replace question's text: what the export writes, and
// that it is the method on screen when that is unsaved.
func exportNote(unsaved bool) string {
	if unsaved {
		return "the export writes the figure and the method sheet of the method on screen, unsaved (not the file's), there"
	}
	return "the export writes the figure and the method sheet there"
}

func (a *App) startExport(base string) tea.Cmd {
	m, unsaved := a.sh.method, a.Dirty()
	what := "exporting " + inert(base) + ".png and .md"
	if unsaved {
		what += " of the method on screen (unsaved)"
	}
	_, cmd := a.startJob(what, func(ctx context.Context) any {
		return exportOutcome{base: base, unsaved: unsaved, err: export(m, base)}
	})
	return cmd
}

func export(m *methodfile.Method, base string) error {
	s, err := report.Simulate(m)
	if err != nil {
		return err
	}
	fig, err := s.Figure("png", 1200, 800)
	if err != nil {
		return err
	}
	if err := methodfile.WriteAtomic(base+".png", fig); err != nil {
		return err
	}
	return methodfile.WriteAtomic(base+".md", s.Sheet())
}

// --- optimizer ---

func (a *App) startOptimize() tea.Cmd {
	m, sys := a.sh.method, a.sh.sys
	prob := methodsearch.Problem(m, sys)
	settings := a.optSettings
	ch := make(chan tea.Msg, 4)
	j, run := a.startJob("optimizing", func(ctx context.Context) any {
		res, err := optimizer.Optimize(ctx, prob, settings)
		return optOutcome{res: res, err: err}
	})
	j.ch = ch
	id := j.id
	settings.Progress = func(p optimizer.Progress) {
		select {
		case ch <- optProgressMsg{id: id, p: p}:
		default: // the UI is behind: drop this report, a newer one follows
		}
	}
	a.say(msgInfo, "optimizing… esc stops and keeps the best so far")
	done := make(chan tea.Msg, 1)
	go func() { done <- run() }()
	return waitFor(ch, done)
}

// waitFor is the re-armed "wait for the next report" Cmd: a progress report,
// or the outcome when the search ends.
func waitFor(ch, done chan tea.Msg) tea.Cmd {
	return func() tea.Msg {
		select {
		case p := <-ch:
			return progressWith{p.(optProgressMsg), ch, done}
		case d := <-done:
			return d
		}
	}
}

// progressWith is a progress report and the channels to wait on next.
type progressWith struct {
	optProgressMsg
	ch, done chan tea.Msg
}

func (a *App) onOptProgress(msg progressWith) tea.Cmd {
	if a.job == nil || msg.id != a.job.id {
		return waitFor(msg.ch, msg.done) // drain a stale run
	}
	p := msg.p
	var prev model.Result
	if err := a.sh.sys.Simulate(p.Program, &prev); err == nil {
		a.chart.Update(previewMsg{res: &prev, prog: p.Program, label: "best program so far", showIt: true})
	}
	state := "looking for a program that meets the target"
	if p.Feasible {
		state = fmt.Sprintf("best %.2f min", p.Objective/60)
	}
	a.toOverlay(progressTextMsg{text: fmt.Sprintf("%d evaluations · %s · Rs %.2f · %.1f s", p.Evaluations, state, p.MinResolution, p.Elapsed.Seconds())})
	return waitFor(msg.ch, msg.done)
}

func (a *App) optDone(v optOutcome) {
	if v.err != nil {
		a.say(msgError, "optimizer: %v", inertErr(v.err))
		a.chart.Update(previewMsg{})
		return
	}
	if v.res.Canceled && !v.res.Offer {
		// an early stop offers only a better program that meets the target
		a.say(msgInfo, "stopped early, nothing better to offer (%s); kept the current program", inert(v.res.Explanation))
		a.chart.Update(previewMsg{})
		return
	}
	after := methodsearch.Apply(a.sh.method, v.res)
	d := newResultDialog(&a.sh, v.res, after, v.res.Sim)
	if a.rob.ok {
		d.nowRob = a.rob.rep // the current program under the same tolerances
	}
	a.open(d)
	a.chart.Update(d.preview())
	if v.res.Feasible() {
		a.say(msgGood, "target met: y takes the new program, n keeps the old one, v shows the old run")
	} else {
		a.say(msgWarn, "target not met: %s. y takes the best program anyway, n keeps the old one", inert(v.res.Explanation))
	}
}

// --- calibration from a scouting runs file (F) ---

func (a *App) startFit(path string) tea.Cmd {
	if path == "" {
		a.say(msgError, "no runs file given")
		return nil
	}
	m := a.sh.method
	_, cmd := a.startJob("fitting to "+inert(path), func(ctx context.Context) any {
		return fitRuns(m, path)
	})
	return cmd
}

// fitRuns reads and fits a runs file, rounds what it fitted to what the
// file keeps, and simulates the fitted method, so that the review shows the
// minimum resolution that taking it gives.
func fitRuns(m *methodfile.Method, path string) fitOutcome {
	out := fitOutcome{path: path}
	runs, err := methodfile.ReadRuns(path, m)
	if err != nil {
		out.err = err
		return out
	}
	rep, err := calibrate.Fit(m, runs, calibrate.Options{})
	if err != nil {
		out.err = fmt.Errorf("fit: %v", err)
		return out
	}
	fm := rep.Method.Clone()
	methodfile.RoundFitted(fm) // the rule fit --out uses too
	rep.Method = fm
	out.rep = rep
	sys, err := fm.System()
	if err != nil {
		out.err = fmt.Errorf("fit: %v", err)
		return out
	}
	out.sys = sys
	if err := sys.Simulate(fm.ModelProgram(), &out.sim); err != nil {
		out.err = fmt.Errorf("fit: %v", err)
	}
	return out
}

// compoundDigits is how many decimals ΔH (kJ/mol), ΔS and ΔCp (J/(mol·K))
// keep when they are fitted or typed.
const compoundDigits = methodfile.FittedCompoundDecimals

// --- ranking of column dimensions (C) ---

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
	dims, err := parseDims(text, a.sh.method)
	if err != nil {
		a.say(msgError, "compare: %v", inertErr(err))
		return nil
	}
	var cands []methodsearch.Candidate
	for _, d := range dims {
		c := a.sh.method.Clone()
		c.Column.LengthM, c.Column.DiameterMM, c.Column.FilmUM = d[0], d[1], d[2]
		if err := validate(c); err != nil {
			a.say(msgError, "compare: %g m × %g mm × %g µm: %v", d[0], d[1], d[2], inertErr(err))
			return nil
		}
		cands = append(cands, methodsearch.Candidate{Source: fmt.Sprintf("%g m × %g mm × %g µm", d[0], d[1], d[2]), Method: c})
	}
	settings := a.optSettings
	_, cmd := a.startJob(fmt.Sprintf("optimizing %d candidate columns", len(cands)), func(ctx context.Context) any {
		return compareOutcome{out: methodsearch.Compare(ctx, cands, settings, nil)}
	})
	return cmd
}

// --- window diagram (s) ---

// sweepSpec is one value to vary: which, how to call it on screen, its
// unit, its current value and the allowed range.
type sweepSpec struct {
	value           model.ProgramValue
	label, unit     string
	current, lo, hi float64
}

// sweepPoints is how many steps a window diagram takes.
const sweepPoints = 60

func (a *App) startSweep(spec sweepSpec) tea.Cmd {
	m := a.sh.method
	if err := sweep.Check(m, spec.value); err != nil {
		a.say(msgError, "sweep: %v", inertErr(err))
		return nil
	}
	if !(spec.hi > spec.lo) {
		a.say(msgError, "sweep: %s has no room to vary within the limits (%s–%s %s)", spec.label, trimNum(round(spec.lo, 3)), trimNum(round(spec.hi, 3)), spec.unit)
		return nil
	}
	values := sortedUnique(append(sweep.Steps(spec.lo, spec.hi, sweepPoints), spec.current))
	_, cmd := a.startJob("sweeping "+spec.label, func(ctx context.Context) any {
		// in chunks, so that esc stops a slow sweep between them
		var pts []sweep.Point
		for i := 0; i < len(values); i += 8 {
			if ctx.Err() != nil {
				return sweepOutcome{spec: spec, err: ctx.Err()}
			}
			p, err := sweep.One(m, spec.value, values[i:min(i+8, len(values))], nil)
			if err != nil {
				return sweepOutcome{spec: spec, err: err}
			}
			pts = append(pts, p...)
		}
		return sweepOutcome{spec: spec, pts: pts}
	})
	return cmd
}

func sortedUnique(v []float64) []float64 {
	out := append([]float64(nil), v...)
	sort.Float64s(out)
	u := out[:0]
	for i, x := range out {
		if i == 0 || x != out[i-1] {
			u = append(u, x)
		}
	}
	return u
}

// programSweep is the window diagram of a program value, limited to what
// the method's limits allow.
func programSweep(f field, m *methodfile.Method) sweepSpec {
	v := f.value(m)
	s := sweepSpec{value: f.pv, label: f.name(), unit: f.unit, current: v}
	maxHold := m.Limits.MaxHoldMin
	switch f.pv.Kind {
	case model.InitialTemp:
		s.lo, s.hi = math.Max(m.Limits.OvenMinC, v-40), math.Min(m.Column.MaxTempC-1, v+40)
	case model.InitialHold:
		s.lo, s.hi = 0, math.Min(maxHold, math.Max(2, v*3))
	case model.RampFinal:
		prev := m.Oven.InitialC
		if f.ramp > 1 {
			prev = m.Oven.Ramps[f.ramp-2].FinalC
		}
		s.lo, s.hi = math.Max(prev+1, v-60), math.Min(m.Column.MaxTempC, v+60)
	case model.RampRate:
		s.lo, s.hi = math.Max(0.5, v/4), math.Min(m.Limits.MaxRateCMin, math.Max(v*3, 1))
	case model.RampHold:
		s.lo, s.hi = 0, math.Min(maxHold, math.Max(2, v*3))
	}
	s.lo, s.hi = math.Min(s.lo, v), math.Max(s.hi, v)
	return s
}

// carrierSweep is the window diagram of the column flow (constant flow)
// or the inlet pressure (constant pressure), within the method's limits.
func carrierSweep(m *methodfile.Method) sweepSpec {
	if m.Carrier.Mode == model.ConstantPressure {
		v := m.Carrier.InletKPa
		lo := math.Max(m.Limits.MinInletKPa, math.Max(1, v/3))
		hi := math.Min(m.Limits.MaxInletKPa, v*2.5)
		return sweepSpec{value: model.ProgramValue{Kind: model.InletPressure}, label: "inlet pressure", unit: "kPa", current: v, lo: math.Min(lo, v), hi: math.Max(hi, v)}
	}
	v := m.Carrier.FlowMLMin
	lo, hi := math.Max(0.1, v/3), v*3
	if m.Limits.MinFlowMLMin > 0 {
		lo = math.Max(lo, m.Limits.MinFlowMLMin)
	}
	if m.Limits.MaxFlowMLMin > 0 {
		hi = math.Min(hi, m.Limits.MaxFlowMLMin)
	}
	return sweepSpec{value: model.ProgramValue{Kind: model.CarrierFlow}, label: "column flow", unit: "mL/min", current: v, lo: math.Min(lo, v), hi: math.Max(hi, v)}
}
