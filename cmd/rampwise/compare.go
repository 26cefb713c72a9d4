package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strconv"
	"strings"
	"syscall"
	"text/tabwriter"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
	"github.com/rampwise/rampwise/optimizer"
	"github.com/rampwise/rampwise/optimizer/methodsearch"
)

const compareHelp = `Usage: rampwise compare METHOD... [--length L,...] [--diameter D,...] [--film F,...]
                        [--gas G,...] [--json] [--csv F] [--seed N]

Each METHOD is the same compounds on one candidate stationary phase (their
parameters measured or fitted on that phase). Because distribution constants
do not depend on the column's dimensions, each can also be tried at other
lengths (m), internal diameters (mm), film thicknesses (µm) and carrier
gases (helium, hydrogen, nitrogen). Every candidate is optimized with its own
goal and limits, its carrier flow (or inlet pressure) optimized with the
program unless goal.lock names "flow", and the table ranks them:
those that reach the target first, fastest first, with the inlet pressure the
program needs at its start and end and the highest oven temperature it uses;
then those that cannot reach it, with their limiting pair. - reads one method from
standard input; @demo is the built-in demo.

The column kind is part of a candidate: methods on wall-coated, packed and
porous-layer columns are ranked together (a packed column with the same
liquid phase as a wall-coated one has the same distribution constants). A
length, diameter or film from the lists that is outside a kind's ranges
(packed: 0.3-10 m, 1-6 mm) is skipped for that method, with a note.

Flags:
`

type candidateJSON struct {
	Method        string            `json:"method"`
	Phase         string            `json:"phase"`
	Kind          string            `json:"kind"`
	Length        float64           `json:"length_m"`
	Diameter      float64           `json:"diameter_mm"`
	Film          float64           `json:"film_um"`
	Gas           string            `json:"gas"`
	Carrier       carrierJSON       `json:"carrier"`
	Robust        *robustJSON       `json:"robust,omitempty"`
	Feasible      bool              `json:"feasible"`
	Objective     string            `json:"objective"`
	target        float64           // the candidate's goal.min_resolution, for the table
	limits        methodfile.Limits // the candidate's keypad steps, for the table
	Time          float64           `json:"time_min"`
	RunTime       float64           `json:"run_time_min"`
	CycleTime     float64           `json:"cycle_time_min"`
	MinResolution *float64          `json:"min_resolution"`
	CriticalPair  []string          `json:"critical_pair"`
	InletStart    float64           `json:"inlet_kpa_start"`
	InletEnd      float64           `json:"inlet_kpa_end"`
	MaxTemp       float64           `json:"max_temp_c"`
	Program       programJSON       `json:"program"`
	Explanation   string            `json:"explanation,omitempty"`
	Error         string            `json:"error,omitempty"`
	// Cautions are the safety notes for this row's program and carrier
	// (checks.Safety), as simulate prints them.
	Cautions []string `json:"cautions,omitempty"`
}

func parseList(name, s string) ([]float64, error) {
	if s == "" {
		return nil, nil
	}
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil || !(v > 0) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("--%s: %q is not a positive number", name, f)
		}
		out = append(out, v)
	}
	return out, nil
}

func runCompare(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("compare", compareHelp, stderr)
	lengths := fs.String("length", "", "comma-separated column lengths to try (m)")
	diams := fs.String("diameter", "", "comma-separated internal diameters to try (mm)")
	films := fs.String("film", "", "comma-separated film thicknesses to try (µm)")
	gasList := fs.String("gas", "", "comma-separated carrier gases to try: helium, hydrogen, nitrogen")
	asJSON := fs.Bool("json", false, "print the ranking as JSON")
	csvF := fs.String("csv", "", "write the ranking as CSV to this `file`")
	seed := fs.Uint64("seed", 1, "seed of the optimizer's starting points")
	files, err := parseArgsN(fs, args, 1, 50, "METHOD...")
	if err != nil {
		return err
	}
	if err := checkWritable(*csvF); err != nil { // before the searches
		return err
	}
	ls, err := parseList("length", *lengths)
	if err != nil {
		return bad(err)
	}
	ds, err := parseList("diameter", *diams)
	if err != nil {
		return bad(err)
	}
	fl, err := parseList("film", *films)
	if err != nil {
		return bad(err)
	}
	var gases []model.Gas
	if *gasList != "" {
		for _, g := range strings.Split(*gasList, ",") {
			gas, err := model.ParseGas(strings.TrimSpace(g))
			if err != nil {
				return badf("--gas: %v", err)
			}
			gases = append(gases, gas)
		}
	}
	var cands []methodsearch.Candidate
	for _, file := range files {
		m, name, err := loadMethod(file)
		if err != nil {
			return err
		}
		lv, dv, fv := ls, ds, fl
		if lv == nil {
			lv = []float64{m.Column.LengthM}
		}
		if dv == nil {
			dv = []float64{m.Column.DiameterMM}
		}
		if fv == nil {
			fv = []float64{m.Column.FilmUM}
		}
		gv := gases
		if gv == nil {
			gv = []model.Gas{m.Carrier.Gas}
		}
		before := len(cands)
		var lastSkip error
		for _, l := range lv {
			for _, d := range dv {
				for _, df := range fv {
					for _, g := range gv {
						c := m.Clone()
						c.Column.LengthM, c.Column.DiameterMM, c.Column.FilmUM = l, d, df
						c.Carrier.Gas = g
						if err := c.Validate(); err != nil {
							if m.Column.Kind != kindOfLists {
								fmt.Fprintf(stderr, "compare: skipped %s at %g m × %g mm × %g µm: %v\n", name, l, d, df, err)
								lastSkip = err
								continue
							}
							return badf("%s at %g m × %g mm × %g µm, %s: %v", name, l, d, df, g, err)
						}
						cands = append(cands, methodsearch.Candidate{Source: name, Method: c})
					}
				}
			}
		}
		if len(cands) == before {
			return badf("%s: no length, diameter and film of the lists suits its %s column: %v", name, m.Column.Kind, lastSkip)
		}
	}
	if len(cands) > 200 {
		return badf("compare: %d candidates; 200 at most", len(cands))
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	out := methodsearch.Compare(ctx, cands, optimizer.Settings{Seed: *seed}, func(done, total int) {
		fmt.Fprintf(stderr, "compare: %d of %d candidates optimized\n", done, total)
	})
	var rows []candidateJSON
	for _, o := range out {
		m := o.Method
		j := candidateJSON{Method: o.Source, Phase: m.Column.Phase, Kind: kindName(m.Column.Kind), Length: m.Column.LengthM, Diameter: m.Column.DiameterMM, Film: m.Column.FilmUM, Gas: m.Carrier.Gas.String(), Objective: m.Goal.Objective.String(), target: m.Goal.MinResolution, limits: m.Limits, Carrier: carrierToJSON(m.Carrier)}
		if o.Err != nil {
			j.Error = o.Err.Error()
			rows = append(rows, j)
			continue
		}
		r := o.Result
		// report what optimize reports: the program and carrier as saved
		after := methodsearch.Apply(m, r)
		sys, err := after.System()
		if err != nil {
			return err
		}
		var sim model.Result
		if err := sys.Simulate(after.ModelProgram(), &sim); err != nil {
			return err
		}
		oven := after.Oven
		j.Cautions = checks.Safety(after)
		j.Carrier = carrierToJSON(after.Carrier)
		j.Robust = robustToJSON(r.Robust)
		j.Feasible = r.Feasible() && (sim.Critical < 0 || sim.MinResolution >= m.Goal.MinResolution)
		j.RunTime, j.CycleTime = round(sim.RunTime/60, 4), round(sim.CycleTime/60, 4)
		j.Time = j.RunTime
		if m.Goal.Objective == model.CycleTime {
			j.Time = j.CycleTime
		}
		if sim.Critical >= 0 {
			v := sim.MinResolution
			j.MinResolution = &v
			cp := sim.Pairs[sim.Critical]
			j.CriticalPair = []string{sys.Compounds[cp.First].Name, sys.Compounds[cp.Second].Name}
		}
		prog := methodfile.ProgramToModel(oven)
		j.InletStart, j.InletEnd = sys.Cond.InletGauge(prog.Initial)/1000, sys.Cond.InletGauge(prog.MaxTemp())/1000
		j.MaxTemp = prog.MaxTemp() - model.ZeroCelsius
		j.Program = programToJSON(oven)
		j.Explanation = r.Explanation
		rows = append(rows, j)
	}
	if *csvF != "" {
		recs := [][]string{{"rank", "method", "phase", "kind", "length_m", "diameter_mm", "film_um", "gas", "carrier_setting", "feasible", "objective", "time_min", "min_resolution", "critical_first", "critical_second", "inlet_kpa_start", "inlet_kpa_end", "max_temp_c", "explanation"}}
		for i, j := range rows {
			rs, c1, c2 := "", "", ""
			if j.MinResolution != nil {
				rs = fmtNum(*j.MinResolution)
			}
			if len(j.CriticalPair) == 2 {
				c1, c2 = j.CriticalPair[0], j.CriticalPair[1]
			}
			recs = append(recs, []string{strconv.Itoa(i + 1), textsafe.CSVCell(j.Method), textsafe.CSVCell(j.Phase), j.Kind, fmtNum(j.Length), fmtNum(j.Diameter), fmtNum(j.Film), j.Gas, carrierText(j.Carrier, j.limits), fmt.Sprint(j.Feasible), j.Objective,
				fmtNum(j.Time), rs, textsafe.CSVCell(c1), textsafe.CSVCell(c2), fmtNum(j.InletStart), fmtNum(j.InletEnd), fmtNum(j.MaxTemp), textsafe.CSVCell(j.Explanation + j.Error)})
		}
		if err := writeCSVFile(*csvF, recs, stderr); err != nil {
			return err
		}
	}
	// the safety notes of every listed program: each distinct one once,
	// with the rows it applies to
	var cautions []string
	cautionRows := map[string][]string{}
	for i, j := range rows {
		if j.Gas == "hydrogen" && j.Error != "" {
			j.Cautions = []string{model.HydrogenCaution}
		}
		for _, c := range j.Cautions {
			if _, ok := cautionRows[c]; !ok {
				cautions = append(cautions, c)
			}
			cautionRows[c] = append(cautionRows[c], strconv.Itoa(i+1))
		}
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		out := map[string]any{"candidates": rows}
		if len(cautions) > 0 {
			out["cautions"] = cautions
		}
		return enc.Encode(out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "#\tphase\tcolumn\tcarrier\tobjective: best time\tmin Rs\tcritical pair\tinlet kPa start→end\tmax °C\t")
	for i, j := range rows {
		col := fmt.Sprintf("%g m × %g mm × %g µm", j.Length, j.Diameter, j.Film)
		if j.Kind != kindOfLists.String() {
			col = j.Kind + " " + col
		}
		phase := textsafe.Inert(j.Phase)
		if phase == "" {
			phase = textsafe.Inert(j.Method)
		}
		if j.Error != "" {
			fmt.Fprintf(tw, "%d\t%s\t%s\t%s\terror: %s\t\t\t\t\t\n", i+1, phase, col, j.Gas, textsafe.Inert(j.Error))
			continue
		}
		rs, cp := "-", "-"
		if j.MinResolution != nil {
			rs = format.RsNumber(*j.MinResolution, j.target) + " " + format.Verdict(*j.MinResolution, j.target)
		}
		if len(j.CriticalPair) == 2 {
			cp = format.CriticalPair(textsafe.Inert(j.CriticalPair[0]), textsafe.Inert(j.CriticalPair[1]))
		}
		t := fmt.Sprintf("%s %.2f min", strings.ReplaceAll(j.Objective, "-", " "), j.Time) // each row names its own objective
		if !j.Feasible {
			t = "not reached"
		}
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s %s\t%s\t%s\t%s\t%.0f → %.0f\t%.0f\t\n", i+1, phase, col, j.Gas, carrierText(j.Carrier, j.limits), t, rs, cp, j.InletStart, j.InletEnd, j.MaxTemp)
	}
	tw.Flush()
	objectives := map[string]bool{}
	for _, j := range rows {
		if j.Error == "" {
			objectives[j.Objective] = true
		}
	}
	if len(objectives) > 1 {
		fmt.Fprintln(stdout, "note: the methods' goals differ (run time, cycle time): each row's time is its own objective's, so the ranking mixes the two")
	}
	for i, j := range rows {
		if !j.Feasible && j.Explanation != "" {
			fmt.Fprintf(stdout, "%d: %s\n", i+1, textsafe.Inert(j.Explanation))
		}
	}
	for _, c := range cautions {
		who := "rows " + strings.Join(cautionRows[c], ", ")
		if len(cautionRows[c]) == 1 {
			who = "row " + cautionRows[c][0]
		}
		if len(cautionRows[c]) == len(rows) {
			who = "all rows"
		}
		fmt.Fprintf(stdout, "caution (%s): %s\n", who, textsafe.Inert(c))
	}
	return nil
}

// carrierText is the carrier setting at the keypad step of l (the flow
// "1.20" beside "2.15", as the instrument takes them).
func carrierText(c carrierJSON, l methodfile.Limits) string {
	if c.InletKPa != nil {
		return format.OnStep(*c.InletKPa, l.Step(model.InletPressure)) + " kPa"
	}
	if c.FlowMLMin != nil {
		return format.OnStep(*c.FlowMLMin, l.Step(model.CarrierFlow)) + " mL/min"
	}
	return ""
}

// kindOfLists is the kind the dimension lists are written for: a list
// value outside another kind's ranges skips that candidate instead of
// failing the comparison.
const kindOfLists = model.WallCoated

func kindName(k model.ColumnKind) string { return k.String() }
