package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strings"
	"syscall"
	"time"
	"unicode/utf8"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
	"github.com/rampwise/rampwise/optimizer"
	"github.com/rampwise/rampwise/optimizer/methodsearch"
)

const optimizeHelp = `Usage: rampwise optimize [FILE] [--out F [--write-best]] [--json] [--seed N] [--ramps N]
                         [--objective run-time|cycle-time] [--min-resolution RS]

Searches oven programs (initial temperature and hold, then up to N ramps with
their rates, final temperatures and holds) and the carrier flow (the inlet
pressure at constant pressure) for the shortest run time, or oven cycle time,
in which every pair involving a target compound reaches the target
resolution. Every limit is a hard constraint: the column's max_temp_c (and
the detector temperature - 20 °C), max_isothermal_c for every hold, the
ramp-rate limit and [[limits.rate_band]], the hold limit, the inlet-pressure
limits, the flow range (default 0.5x-3x the optimum velocity) and
goal.min_first_k. Everything injected must elute within the run (or within
the goal.bakeout_c / bakeout_min step, which is then appended). Values named
in goal.lock (and "flow") stay exactly as the method has them.

The program found is cut to end at the last peak plus goal.tail_min, and it
is exactly on the keypad steps of [limits] (temp_step_c, rate_step_c_min,
hold_step_min, flow_step_ml_min, pressure_step_kpa): what is shown and saved
meets the target as saved. With [goal.robust] it also meets it at every
corner of the oven offset, flow and efficiency tolerances and at Rs - z*sigma
for the retention parameters' standard errors; the result reports the
nominal Rs, the worst corner and Rs +/- sigma.

Shows the program before and after; --out writes the whole method with the
new program and carrier setting (atomically). Exit 0 when the target is met,
3 when no program within the limits meets it (the best program found and the
limiting pair are still reported; --out then writes nothing unless
--write-best is given). --out is checked before the search: a path that
cannot be written stops at once (exit 2). --json carries the safety
cautions (hydrogen, coolant) as cautions. Progress goes to standard error:
a bar on a terminal, otherwise a line every 5 s of search and a closing
line. Without FILE the built-in demo method is used.

Flags override the file's [goal]:
`

type rampJSON struct {
	Rate  float64 `json:"rate_c_min"`
	Final float64 `json:"final_c"`
	Hold  float64 `json:"hold_min"`
}

type programJSON struct {
	Initial     float64    `json:"initial_c"`
	InitialHold float64    `json:"initial_hold_min"`
	Ramps       []rampJSON `json:"ramps"`
}

// robustJSON is how the saved program fares under [goal.robust].
type robustJSON struct {
	Nominal     float64  `json:"nominal_resolution"`
	WorstCorner *float64 `json:"worst_corner_resolution"`
	Corner      string   `json:"worst_corner,omitempty"`
	Sigma       float64  `json:"sigma_resolution"`
	Z           float64  `json:"z"`
	LowZ        *float64 `json:"resolution_minus_z_sigma"`
	Margin      float64  `json:"robust_resolution"`
}

type optimizeJSON struct {
	Feasible      bool        `json:"feasible"`
	Objective     string      `json:"objective"`
	Program       programJSON `json:"program"`
	Carrier       carrierJSON `json:"carrier"`
	Robust        *robustJSON `json:"robust,omitempty"`
	RunTime       float64     `json:"run_time_min"`
	CycleTime     float64     `json:"cycle_time_min"`
	MinResolution *float64    `json:"min_resolution"`
	CriticalPair  []string    `json:"critical_pair"`
	Evaluations   int         `json:"evaluations"`
	Elapsed       float64     `json:"elapsed_s"`
	TargetRs      float64     `json:"target_resolution"`
	Limiting      [][]string  `json:"limiting_pairs"`
	Explanation   string      `json:"explanation,omitempty"`
	Canceled      bool        `json:"canceled"`
	// Cautions are the safety notes for the program and carrier found
	// (checks.Safety), as plan --json and compare --json carry them.
	Cautions []string `json:"cautions"`
}

func programToJSON(o methodfile.Oven) programJSON {
	p := programJSON{Initial: o.InitialC, InitialHold: o.InitialHoldMin, Ramps: []rampJSON{}}
	for _, r := range o.Ramps {
		p.Ramps = append(p.Ramps, rampJSON{r.RateCMin, r.FinalC, r.HoldMin})
	}
	return p
}

func robustToJSON(r optimizer.RobustReport) *robustJSON {
	if !r.On {
		return nil
	}
	j := &robustJSON{Nominal: r.Nominal, Corner: r.Corner, Sigma: r.Sigma, Z: r.Z, Margin: r.Margin}
	j.WorstCorner = finiteOrNil(r.Worst)
	j.LowZ = finiteOrNil(r.LowZ)
	return j
}

// describeRobust is the robust margin in one line.
func describeRobust(r optimizer.RobustReport) string {
	if !r.On {
		return ""
	}
	s := fmt.Sprintf("robust margin: nominal Rs %.3f", r.Nominal)
	if !math.IsNaN(r.Worst) {
		s += fmt.Sprintf(", worst corner Rs %.3f (%s)", r.Worst, r.Corner)
	}
	if r.Z > 0 {
		s += fmt.Sprintf(", critical pair Rs %.3f ± %.3f (1σ), lowest Rs − %gσ %.3f", r.Nominal, r.Sigma, r.Z, r.LowZ)
	}
	return s
}

func runOptimize(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("optimize", optimizeHelp, stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON")
	out := fs.String("out", "", "write the method with the optimized program to this `file` (atomically)")
	seed := fs.Uint64("seed", 1, "seed of the starting points: the same seed gives the same program")
	ramps := fs.Int("ramps", 0, "ramps the program may use, 1..5 (default: goal.ramps)")
	objective := fs.String("objective", "", "run-time or cycle-time (default: goal.objective)")
	minRs := fs.Float64("min-resolution", 0, "target resolution of every counted pair, in (0, 100] (default: goal.min_resolution)")
	writeBest := fs.Bool("write-best", false, "with --out, write the best program found even when the target is not met (exit 3)")
	file, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := checkWritable(*out); err != nil { // before the search, not after it
		return err
	}
	m, name, err := loadMethod(file)
	if err != nil {
		return err
	}
	if given(fs, "ramps") {
		m.Goal.Ramps = *ramps
		if err := override(m, "ramps", "goal.ramps"); err != nil {
			return err
		}
	}
	if *objective != "" {
		o, err := model.ParseObjective(*objective)
		if err != nil {
			return badf("optimize: --objective: %v", err)
		}
		m.Goal.Objective = o
	}
	if given(fs, "min-resolution") {
		if !(*minRs > 0 && *minRs <= 100) {
			return badf("optimize: --min-resolution must be in (0, 100], got %v", *minRs)
		}
		m.Goal.MinResolution = *minRs
		if err := override(m, "min-resolution", "goal.min_resolution"); err != nil {
			return err
		}
	}
	before, err := simulateMethod(m, name)
	if err != nil {
		return err
	}
	prob := methodsearch.Problem(m, before.System)

	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	pp := newProgress(stderr)
	settings := optimizer.Settings{Seed: *seed, Progress: pp.update}
	res, err := optimizeSearch(ctx, prob, settings)
	pp.end()
	if err != nil {
		return bad(fmt.Errorf("%s: %v", name, strings.TrimPrefix(err.Error(), "optimizer: ")))
	}

	after := methodsearch.Apply(m, res)
	afterSim, err := simulateMethod(after, name)
	if err != nil {
		return fmt.Errorf("optimized program does not simulate: %v", err)
	}
	meets := func(s *simulation) bool {
		return s.Result.Critical < 0 || s.Result.MinResolution >= m.Goal.MinResolution
	}
	met := res.Offer && meets(afterSim)

	wrote := false
	if *out != "" && (met || *writeBest) {
		if err := saveMethodOut(*out, file, after); err != nil {
			return err
		}
		wrote = true
	}
	if *asJSON {
		j := optimizeJSON{
			Feasible:    met,
			Objective:   m.Goal.Objective.String(),
			Program:     programToJSON(after.Oven),
			Carrier:     carrierToJSON(after.Carrier),
			Robust:      robustToJSON(res.Robust),
			RunTime:     round(afterSim.Result.RunTime/60, 4), // 0.006 s: below any timer's reading
			CycleTime:   round(afterSim.Result.CycleTime/60, 4),
			Evaluations: res.Evaluations,
			Elapsed:     res.Elapsed.Seconds(),
			TargetRs:    m.Goal.MinResolution,
			Limiting:    [][]string{},
			Explanation: res.Explanation,
			Canceled:    res.Canceled,
			Cautions:    append([]string{}, checks.Safety(after)...),
		}
		sj := afterSim.json(after.ModelProgram())
		j.MinResolution, j.CriticalPair = sj.MinResolution, sj.CriticalPair
		for _, i := range res.Limiting {
			pr := res.Sim.Pairs[i]
			j.Limiting = append(j.Limiting, []string{before.System.Compounds[pr.First].Name, before.System.Compounds[pr.Second].Name})
		}
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(j); err != nil {
			return err
		}
	} else {
		writeComparison(stdout, m, before, after, afterSim, res, met)
		if wrote {
			fmt.Fprintf(stdout, "\nsaved the method with the optimized program to %s\n", textsafe.Inert(*out))
		} else if *out != "" {
			fmt.Fprintf(stdout, "\nnothing was written to %s: the target is not met (--write-best writes the best program anyway)\n", textsafe.Inert(*out))
		}
	}
	if !met {
		return exitError{exitNotReached}
	}
	return nil
}

// optimizeSearch is the search optimize runs (a variable for tests that
// must know whether it ran).
var optimizeSearch = optimizer.Optimize

// textWidth is the width the text output fits: an 80-column terminal.
const textWidth = 80

func writeComparison(w io.Writer, m *methodfile.Method, before *simulation, after *methodfile.Method, afterSim *simulation, res *optimizer.Result, met bool) {
	title := m.Title
	if title == "" {
		title = "method"
	}
	fmt.Fprintf(w, "%s\n", textsafe.Inert(title))
	writeWrapped(w, "", describeColumn(m), textWidth)
	fmt.Fprintln(w)
	// a program is too long for a table column at 80 columns: each on its
	// own lines, wrapped under its label
	writeWrapped(w, "program before: ", describeProgram(m.Oven), textWidth)
	writeWrapped(w, "program after:  ", describeProgram(after.Oven), textWidth)
	writeWrapped(w, "carrier before: ", describeCarrier(m.Carrier), textWidth)
	writeWrapped(w, "carrier after:  ", describeCarrier(after.Carrier), textWidth)
	fmt.Fprintln(w)
	writeBeforeAfter(w, [][3]string{
		{"run time (min)", fmt.Sprintf("%.2f", before.Result.RunTime/60), fmt.Sprintf("%.2f", afterSim.Result.RunTime/60)},
		{"cycle time (min)", fmt.Sprintf("%.2f", before.Result.CycleTime/60), fmt.Sprintf("%.2f", afterSim.Result.CycleTime/60)},
		{"min resolution", fmtRsGoal(before, m, true), fmtRsGoal(afterSim, m, met)},
		{"critical pair", critName(before), critName(afterSim)},
	}, textWidth)
	fmt.Fprintf(w, "\n%d evaluations in %.2f s (objective %s, target Rs %s)\n", res.Evaluations, res.Elapsed.Seconds(), m.Goal.Objective, format.Target(m.Goal.MinResolution))
	if line := describeRobust(res.Robust); line != "" {
		writeWrapped(w, "", line, textWidth)
	}
	if met {
		writeWrapped(w, "", "target met. Verify the new program with a standard injection before using it for samples.", textWidth)
	} else {
		writeWrapped(w, "", "target NOT met within the limits: "+textsafe.Inert(res.Explanation), textWidth)
	}
	for _, warn := range afterSim.warnings(after.ModelProgram()) {
		fmt.Fprintf(w, "warning: %s\n", textsafe.Inert(warn))
	}
}

// writeBeforeAfter prints rows of label, before and after as a table when
// it fits width; a row too wide for it is printed as two labelled lines
// ("label before: ...", "label after: ..."), wrapped at width.
func writeBeforeAfter(w io.Writer, rows [][3]string, width int) {
	var lw, bw, aw int
	for _, r := range rows {
		lw, bw, aw = max(lw, textLen(r[0])), max(bw, textLen(r[1])), max(aw, textLen(r[2]))
	}
	const gap = 2
	if lw+gap+bw+gap+aw <= width {
		pad := func(s string, n int) string { return s + strings.Repeat(" ", n-textLen(s)) }
		fmt.Fprintln(w, strings.TrimRight(pad("", lw)+"  "+pad("before", bw)+"  after", " "))
		for _, r := range rows {
			fmt.Fprintln(w, strings.TrimRight(pad(r[0], lw)+"  "+pad(r[1], bw)+"  "+r[2], " "))
		}
		return
	}
	lw = 0
	for _, r := range rows {
		lw = max(lw, textLen(r[0]+" before: "))
	}
	for _, r := range rows {
		b, a := r[0]+" before: ", r[0]+" after: "
		writeWrapped(w, b+strings.Repeat(" ", lw-textLen(b)), r[1], width)
		writeWrapped(w, a+strings.Repeat(" ", lw-textLen(a)), r[2], width)
	}
}

// wrapWords are the pieces writeWrapped may break between: a program's
// steps whole (an arrow ends its line, never starts one), elsewhere the
// words, a number kept with the unit after it ("1.20 mL/min", "−1 °C").
func wrapWords(text string) []string {
	if strings.Contains(text, " → ") {
		steps := strings.Split(text, " → ")
		for i := range steps[:len(steps)-1] {
			steps[i] += " →"
		}
		return steps
	}
	var words []string
	for _, f := range strings.Fields(text) {
		if n := len(words); n > 0 && unitAfterNumber(words[n-1], f) {
			words[n-1] += " " + f
			continue
		}
		words = append(words, f)
	}
	return words
}

// unitAfterNumber: next is a short unit-like word after a number.
func unitAfterNumber(prev, next string) bool {
	last, _ := utf8.DecodeLastRuneInString(prev)
	first, _ := utf8.DecodeRuneInString(next)
	return last >= '0' && last <= '9' && textLen(next) <= 8 && !(first >= '0' && first <= '9') && first != '(' && first != '−' && first != '-'
}

// textLen is the width of s on a terminal: its runes (the text output
// holds no wide characters of its own).
func textLen(s string) int { return utf8.RuneCountInString(s) }

// writeWrapped prints label and text, the text broken at spaces so that no
// line is wider than width, continuation lines indented under the text
// (by two spaces when there is no label). A word wider than the room left
// stays whole.
func writeWrapped(w io.Writer, label, text string, width int) {
	indent := strings.Repeat(" ", textLen(label))
	if label == "" {
		indent = "  "
	}
	line, n := label, textLen(label)
	empty := true
	words := wrapWords(text)
	for _, word := range words {
		if !empty && n+1+textLen(word) > width {
			fmt.Fprintln(w, line)
			line, n, empty = indent, textLen(indent), true
		}
		if !empty {
			line += " "
			n++
		}
		line += word
		n += textLen(word)
		empty = false
	}
	fmt.Fprintln(w, line)
}

func fmtRs(s *simulation, target float64) string {
	if s.Result.Critical < 0 {
		return "-"
	}
	r := &s.Result
	if missing := inertAll(s.System.NotElutedTargets(r)); len(missing) > 0 {
		return format.RsNumber(r.MinResolution, target) + " not met (" + format.NotEluted(missing) + ")"
	}
	return format.RsNumber(r.MinResolution, target) + " " + format.Verdict(r.MinResolution, target)
}

// fmtRsGoal is fmtRs that never says "met" where the goal is not: a
// first target below goal.min_first_k is named, and a program the verdict
// does not accept (met false) for another reason says so.
func fmtRsGoal(s *simulation, m *methodfile.Method, met bool) string {
	txt := fmtRs(s, m.Goal.MinResolution)
	if !strings.HasSuffix(txt, " "+format.Verdict(s.Result.MinResolution, m.Goal.MinResolution)) || s.Result.MinResolution < m.Goal.MinResolution || s.Result.Critical < 0 {
		return txt
	}
	rs := format.RsNumber(s.Result.MinResolution, m.Goal.MinResolution)
	if _, k, ok := checks.FirstTargetK(s.System, &s.Result); ok && k < m.Goal.MinFirstK {
		return fmt.Sprintf("%s, first k(Te) %.2f < %g not met", rs, k, m.Goal.MinFirstK)
	}
	if !met {
		return rs + ", target not met (see below)"
	}
	return txt
}

func critName(s *simulation) string {
	if s.Result.Critical < 0 {
		return "-"
	}
	cp := s.Result.Pairs[s.Result.Critical]
	return format.CriticalPair(textsafe.Inert(s.System.Compounds[cp.First].Name), textsafe.Inert(s.System.Compounds[cp.Second].Name))
}

// progressLineEvery is how often, in search time, a plain progress line
// is printed when stderr is not a terminal.
const progressLineEvery = 5 * time.Second

// progress reports the search on stderr. On a terminal it is one bar
// redrawn in place with a carriage return and erased at the end. Anywhere
// else (a file, a pipe) a carriage return would leave a stale line, so it
// prints complete lines only: none for a search shorter than
// progressLineEvery, then one every progressLineEvery of search time, and
// at the end a line saying the search is over (so the last line is never
// a stale "best" of an unfinished search).
type progress struct {
	w       io.Writer
	tty     bool
	next    time.Duration // search time of the next plain line
	drawn   bool          // a bar is on the terminal line
	printed bool          // a plain line was printed
}

func newProgress(stderr io.Writer) *progress {
	return &progress{w: stderr, tty: isTerminal(stderr), next: progressLineEvery}
}

func (pp *progress) update(p optimizer.Progress) {
	state := "searching for a program that meets the target"
	if p.Feasible {
		state = fmt.Sprintf("best so far %.2f min", p.Objective/60)
	}
	if pp.tty {
		n := int(p.Elapsed / (100 * time.Millisecond) % 20)
		bar := strings.Repeat("█", n) + strings.Repeat("░", 20-n)
		fmt.Fprintf(pp.w, "\r%s %7d evaluations · %s · Rs %.2f   ", bar, p.Evaluations, state, p.MinResolution)
		pp.drawn = true
		return
	}
	if p.Elapsed >= pp.next {
		pp.next = p.Elapsed + progressLineEvery
		pp.printed = true
		fmt.Fprintf(pp.w, "optimize: %d evaluations, %s, Rs %.2f\n", p.Evaluations, state, p.MinResolution)
	}
}

// end erases the bar, or closes the plain lines with the search's end.
func (pp *progress) end() {
	switch {
	case pp.drawn:
		fmt.Fprint(pp.w, "\r\033[K")
	case pp.printed:
		fmt.Fprintln(pp.w, "optimize: search over; the result follows on standard output")
	}
	pp.drawn, pp.printed = false, false
}

// isTerminal reports whether w is a terminal (a character device: a
// console on Windows too). Only os.File is ever one.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
