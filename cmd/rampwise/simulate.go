package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/report"
	"github.com/rampwise/rampwise/model/textsafe"
)

const simulateHelp = `Usage: rampwise simulate [FILE] [--json | --csv]

Predicts the chromatogram of the method's oven program: for every compound the
retention time, elution temperature, peak width at half height and the
resolution to the next peak; then the holdup (dead) time, run time, oven cycle
time (run + cool-down + equilibration), the minimum resolution over the pairs
that involve a target compound, and the critical pair. Without FILE the
built-in demo method is used. The column may be wall-coated, packed or
porous-layer ([column] kind); with [limits] coolant_c the oven may start
below ambient, and the cautions for the cryogenic coolant are printed.
A program beyond an instrument limit (max_rate_c_min, rate bands, the inlet
pressure limits, max_temp_c, max_isothermal_c, ambient or coolant_c) is
refused with file, line and key (exit 2); one that only breaks a search bound
(oven_min_c, max_hold_min, keypad steps, min_first_k) is simulated as it is,
with a warning. With --csv, standard output is the CSV alone and the
warnings and safety cautions go to standard error.

Flags:
`

type peakJSON struct {
	Name            string   `json:"name"`
	RetentionTime   *float64 `json:"retention_time_min"`
	Sigma           *float64 `json:"sigma_min"`
	ElutionTemp     float64  `json:"elution_temp_c"`
	RetentionFactor float64  `json:"retention_factor_at_elution"`
	Eluted          bool     `json:"eluted"`
	HalfWidth       *float64 `json:"half_height_width_min"`
	Target          bool     `json:"target"`
}

type pairJSON struct {
	First      string  `json:"first"`
	Second     string  `json:"second"`
	Resolution float64 `json:"resolution"`
	Counts     bool    `json:"counts"`
}

type simulateJSON struct {
	HoldupTime    float64    `json:"holdup_time_min"`
	RunTime       float64    `json:"run_time_min"`
	CycleTime     float64    `json:"cycle_time_min"`
	Peaks         []peakJSON `json:"peaks"`
	Pairs         []pairJSON `json:"pairs"`
	MinResolution *float64   `json:"min_resolution"`
	CriticalPair  []string   `json:"critical_pair"`
	// GoalMet: min_resolution reaches goal.min_resolution and every
	// target elutes within the program; TargetsNotEluted names the targets
	// that do not (min_resolution counts only the pairs that eluted).
	GoalMet          bool     `json:"goal_met"`
	TargetsNotEluted []string `json:"targets_not_eluted"`
	Warnings         []string `json:"warnings"`
}

func finiteOrNil(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) || x > 1e300 {
		return nil
	}
	return &x
}

// simulation is a method's system and the result of its program: the
// report's Sim, with what the commands print from it.
type simulation struct{ report.Sim }

func simulateMethod(m *methodfile.Method, name string) (*simulation, error) {
	sys, err := m.System()
	if err != nil {
		return nil, badf("%s: %v", name, strings.TrimPrefix(err.Error(), "model: "))
	}
	s := &simulation{report.Sim{Method: m, System: sys}}
	if err := sys.Simulate(m.ModelProgram(), &s.Result); err != nil {
		return nil, badf("%s: %v", name, strings.TrimPrefix(err.Error(), "model: "))
	}
	return s, nil
}

// warnings are the cautions a chromatographer needs with this result.
func (s *simulation) warnings(prog model.Program) []string {
	return checks.Cautions(s.Method, s.System, &s.Result)
}

func fmtMin(s float64) string {
	if math.IsInf(s, 0) || s > 1e12 {
		return "never"
	}
	return strconv.FormatFloat(s/60, 'f', 3, 64)
}

func (s *simulation) json(prog model.Program) simulateJSON {
	r := &s.Result
	out := simulateJSON{
		HoldupTime: r.HoldupTime / 60,
		RunTime:    round(r.RunTime/60, 4), // as optimize and compare: no binary noise
		CycleTime:  round(r.CycleTime/60, 4),
		Peaks:      []peakJSON{},
		Pairs:      []pairJSON{},
		Warnings:   s.warnings(prog),
	}
	if out.Warnings == nil {
		out.Warnings = []string{}
	}
	for _, pk := range r.Peaks {
		c := &s.System.Compounds[pk.Compound]
		out.Peaks = append(out.Peaks, peakJSON{
			Name:            c.Name,
			RetentionTime:   finiteOrNil(pk.RetentionTime / 60),
			Sigma:           finiteOrNil(pk.Sigma / 60),
			ElutionTemp:     pk.ElutionTemp - model.ZeroCelsius,
			RetentionFactor: pk.RetentionFactor,
			Eluted:          pk.Eluted,
			HalfWidth:       finiteOrNil(pk.HalfWidth() / 60),
			Target:          c.Target,
		})
	}
	for _, pr := range r.Pairs {
		out.Pairs = append(out.Pairs, pairJSON{
			First: s.System.Compounds[pr.First].Name, Second: s.System.Compounds[pr.Second].Name,
			Resolution: pr.Resolution, Counts: pr.Counts,
		})
	}
	if r.Critical >= 0 {
		v := r.MinResolution
		out.MinResolution = &v
		cp := r.Pairs[r.Critical]
		out.CriticalPair = []string{s.System.Compounds[cp.First].Name, s.System.Compounds[cp.Second].Name}
	}
	out.TargetsNotEluted = s.System.NotElutedTargets(r)
	if out.TargetsNotEluted == nil {
		out.TargetsNotEluted = []string{}
	}
	out.GoalMet = r.Critical >= 0 && format.MetAll(r.MinResolution, s.Method.Goal.MinResolution, r.TargetsNotEluted)
	return out
}

// resolutionAfter is the resolution of each peak to the next one, by peak
// position (NaN for the last eluted peak and for peaks after the run).
func resolutionAfter(r *model.Result) []float64 {
	out := make([]float64, len(r.Peaks))
	for i := range out {
		out[i] = math.NaN()
	}
	for i, pr := range r.Pairs {
		out[i] = pr.Resolution
	}
	return out
}

func (s *simulation) writeTable(w io.Writer, name string) {
	r := &s.Result
	m := s.Method
	title := m.Title
	if title == "" {
		title = name
	}
	fmt.Fprintf(w, "%s\n", textsafe.Inert(title))
	fmt.Fprintf(w, "%s\n%s\n\n", describeColumn(m), describeProgram(m.Oven))
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "compound\ttR (min)\tTe (°C)\tw½ (s)\tk(Te)\t%s\t%s\t\n", format.HeadRsNext, format.HeadTarget)
	rs := resolutionAfter(r)
	for i, pk := range r.Peaks {
		c := &s.System.Compounds[pk.Compound]
		rsText := ""
		if !math.IsNaN(rs[i]) {
			rsText = format.Pair(rs[i], m.Goal.MinResolution)
			if r.Critical == i {
				rsText = format.CriticalMark + " " + rsText
			}
		}
		tgt := ""
		if c.Target {
			tgt = "yes"
		}
		tr := fmtMin(pk.RetentionTime)
		if !pk.Eluted {
			tr += "*"
		}
		fmt.Fprintf(tw, "%s\t%s\t%.1f\t%.2f\t%.2f\t%s\t%s\t\n", textsafe.Inert(c.Name), tr, pk.ElutionTemp-model.ZeroCelsius, pk.HalfWidth(), pk.RetentionFactor, rsText, tgt)
	}
	tw.Flush()
	fmt.Fprintln(w)
	fmt.Fprintln(w, s.summary())
	for _, warn := range s.warnings(m.ModelProgram()) {
		fmt.Fprintf(w, "warning: %s\n", textsafe.Inert(warn))
	}
}

func (s *simulation) summary() string {
	r := &s.Result
	missing := inertAll(s.System.NotElutedTargets(r))
	crit := "no counted pair"
	if len(missing) > 0 {
		crit += ", not met: " + format.NotEluted(missing)
	}
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		crit = fmt.Sprintf("min Rs %s, critical pair %s", format.RsAll(r.MinResolution, s.Method.Goal.MinResolution, missing),
			format.CriticalPair(textsafe.Inert(s.System.Compounds[cp.First].Name), textsafe.Inert(s.System.Compounds[cp.Second].Name)))
	}
	return fmt.Sprintf("holdup %.3f min · run %.2f min · cycle %.2f min · %s", r.HoldupTime/60, r.RunTime/60, r.CycleTime/60, crit)
}

// inertAll is names shown inert (textsafe.Inert).
func inertAll(names []string) []string {
	out := make([]string, len(names))
	for i, n := range names {
		out[i] = textsafe.Inert(n)
	}
	return out
}

func describeColumn(m *methodfile.Method) string { return textsafe.Inert(m.Describe()) }

func describeProgram(o methodfile.Oven) string { return o.Describe() }

func round(x float64, digits int) float64 {
	p := math.Pow(10, float64(digits))
	return math.Round(x*p) / p
}

func fmtNum(x float64) string { return format.Num(x) }

func (s *simulation) writeCSV(w io.Writer) error {
	rs := s.Sim
	data, err := rs.CSV()
	if err != nil {
		return err
	}
	_, err = w.Write(data)
	return err
}

func runSimulate(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("simulate", simulateHelp, stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON (the format scripts rely on)")
	asCSV := fs.Bool("csv", false, "print the peak table as CSV")
	file, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if *asJSON && *asCSV {
		return badf("simulate: --json and --csv exclude each other")
	}
	m, name, err := loadMethod(file)
	if err != nil {
		return err
	}
	s, err := simulateMethod(m, name)
	if err != nil {
		return err
	}
	switch {
	case *asJSON:
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(s.json(m.ModelProgram()))
	case *asCSV:
		// stdout stays pure CSV: the cautions go to stderr
		for _, warn := range s.warnings(m.ModelProgram()) {
			fmt.Fprintf(stderr, "warning: %s\n", textsafe.Inert(warn))
		}
		return s.writeCSV(stdout)
	}
	s.writeTable(stdout, name)
	return nil
}
