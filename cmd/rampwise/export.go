package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/checks"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/report"
	"github.com/rampwise/rampwise/model/sweep"
	"github.com/rampwise/rampwise/model/textsafe"
)

const exportHelp = `Usage: rampwise export METHOD [--png F] [--svg F] [--pdf F] [--csv F] [--sheet F] [--measured RUN]
                       [--width W] [--height H]

Writes the method's simulated chromatogram as a figure (PNG, SVG or PDF:
labelled peaks, the critical pair marked, the oven program in a panel below
on the same time axis), the peak table as CSV, and a Markdown method sheet
(column, carrier, heated zones, oven program, limits, expected retention,
critical pair, where the parameters come from, and the cautions). Every file
is written atomically. - as METHOD reads the method from standard input;
@demo uses the built-in demo.
--measured RUN (a peak table, an AIA/ANDI chromatogram, or a runs file's
last run, as check reads it) draws the measured run mirrored under the
predicted chromatogram on the same time axis, each compound's predicted
and measured apex joined by a dashed line.

Flags:
`

func runExport(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("export", exportHelp, stderr)
	pngF := fs.String("png", "", "write the figure as PNG to this `file`")
	svgF := fs.String("svg", "", "write the figure as SVG to this `file`")
	pdfF := fs.String("pdf", "", "write the figure as PDF to this `file`")
	csvF := fs.String("csv", "", "write the peak table as CSV to this `file`")
	sheetF := fs.String("sheet", "", "write the method sheet (Markdown) to this `file`")
	width := fs.Int("width", 1200, "figure width (pixels for PNG, points otherwise)")
	height := fs.Int("height", 800, "figure height")
	measured := fs.String("measured", "", "draw this measured `run` (peak table, chromatogram or runs file) under the prediction")
	files, err := parseArgsN(fs, args, 1, 1, "METHOD")
	if err != nil {
		return err
	}
	if *pngF == "" && *svgF == "" && *pdfF == "" && *csvF == "" && *sheetF == "" {
		return badf("export: nothing to write; give --png, --svg, --pdf, --csv or --sheet")
	}
	if *width < 200 || *width > 10000 || *height < 150 || *height > 10000 {
		return badf("export: --width must be 200..10000 and --height 150..10000")
	}
	if err := checkWritable(*pngF, *svgF, *pdfF, *csvF, *sheetF); err != nil {
		return err
	}
	m, name, err := loadMethod(files[0])
	if err != nil {
		return err
	}
	sim, err := simulateMethod(m, name)
	if err != nil {
		return err
	}
	rs := &sim.Sim
	if *measured != "" {
		run, _, err := readVerificationRun(m, *measured)
		if err != nil {
			return err
		}
		ck, err := calibrate.Verify(m, run)
		if err != nil {
			return badf("%s: %v", *measured, err)
		}
		// the prediction drawn is for the measured run's own program
		if rs, err = report.Simulate(m.RunMethod(run)); err != nil {
			return badf("%s: %v", *measured, err)
		}
		rs.Measured = report.MeasuredFromCheck(ck)
	}
	write := func(path string, data []byte) error {
		if err := methodfile.WriteAtomic(path, data); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "wrote %s\n", textsafe.Inert(path))
		return nil
	}
	for _, f := range []struct{ path, format string }{{*pngF, "png"}, {*svgF, "svg"}, {*pdfF, "pdf"}} {
		if f.path == "" {
			continue
		}
		data, err := rs.Figure(f.format, *width, *height)
		if err != nil {
			return fmt.Errorf("figure: %v", err)
		}
		if err := write(f.path, data); err != nil {
			return err
		}
	}
	if *csvF != "" {
		data, err := rs.CSV()
		if err != nil {
			return err
		}
		if err := write(*csvF, data); err != nil {
			return err
		}
	}
	if *sheetF != "" {
		if err := write(*sheetF, rs.Sheet()); err != nil {
			return err
		}
	}
	// the sheet carries the safety notes; the figure and the CSV cannot,
	// so they go to stderr (stdout lists only what was written)
	printCautions(stderr, m)
	return nil
}

// printCautions prints the safety notes of method m's program and carrier
// (checks.Safety), one "caution:" line each.
func printCautions(w io.Writer, m *methodfile.Method) {
	for _, c := range checks.Safety(m) {
		fmt.Fprintf(w, "caution: %s\n", textsafe.Inert(c))
	}
}

const sweepHelp = `Usage: rampwise sweep METHOD --vary NAME --from A --to B [--steps N]
                      [--vary2 NAME --from2 A --to2 B --steps2 N] [--csv F] [--png F]
                      [--max-points N]

Varies one program value (initial_c, initial_hold_min, rate_N, final_N,
hold_N, or the carrier's flow_ml_min or inlet_kpa) from A to B in N steps and
reports the minimum resolution, the critical pair and the run time at each: a
window diagram (Laub & Purnell 1975). With --vary2, a map of the minimum
resolution over two values (a text heat map here, an image with --png).
Steps where the program is not valid are listed with the reason. - as METHOD
reads the method from standard input; @demo uses the built-in demo. A sweep is at most 100000 points (steps ×
steps2) unless --max-points raises it; after a second, progress and an
estimate of the time left are shown on stderr.

Flags:
`

func runSweep(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("sweep", sweepHelp, stderr)
	vary := fs.String("vary", "", "the `value` to vary")
	from := fs.Float64("from", math.NaN(), "first value")
	to := fs.Float64("to", math.NaN(), "last value")
	steps := fs.Int("steps", 21, "number of steps, 2..2000")
	vary2 := fs.String("vary2", "", "a second `value` to vary (a map)")
	from2 := fs.Float64("from2", math.NaN(), "first value of the second")
	to2 := fs.Float64("to2", math.NaN(), "last value of the second")
	steps2 := fs.Int("steps2", 11, "number of steps of the second, 2..500")
	csvF := fs.String("csv", "", "write the steps as CSV to this `file`")
	pngF := fs.String("png", "", "write the window diagram or map as PNG to this `file`")
	maxPoints := fs.Int("max-points", defaultMaxPoints, "refuse a sweep of more points than this (steps × steps2)")
	files, err := parseArgsN(fs, args, 1, 1, "METHOD")
	if err != nil {
		return err
	}
	if *vary == "" || math.IsNaN(*from) || math.IsNaN(*to) || math.IsInf(*from, 0) || math.IsInf(*to, 0) {
		return badf("sweep: give --vary NAME --from A --to B (finite numbers)")
	}
	if *steps < 2 || *steps > 2000 {
		return badf("sweep: --steps must be 2..2000")
	}
	if *maxPoints < 1 {
		return badf("sweep: --max-points must be at least 1")
	}
	if *vary2 == "" && *steps > *maxPoints {
		return badf("sweep: %d points is more than --max-points %d; use fewer steps or raise --max-points", *steps, *maxPoints)
	}
	if err := checkWritable(*csvF, *pngF); err != nil { // before the sweep
		return err
	}
	m, name, err := loadMethod(files[0])
	if err != nil {
		return err
	}
	pv, err := sweepValue(m, *vary)
	if err != nil {
		return err
	}
	current, _ := m.Value(pv)
	start := time.Now()
	progress := func(done, total int) {
		if el := time.Since(start); el > time.Second && (done%50 == 0 || done == total) {
			left := time.Duration(float64(el) / float64(done) * float64(total-done))
			fmt.Fprintf(stderr, "sweep: %d of %d steps, about %s left\n", done, total, left.Round(time.Second))
		}
	}
	if *vary2 != "" {
		if math.IsNaN(*from2) || math.IsNaN(*to2) || *steps2 < 2 || *steps2 > 500 {
			return badf("sweep: --vary2 needs --from2, --to2 and --steps2 (2..500)")
		}
		if n := *steps * *steps2; n > *maxPoints {
			return badf("sweep: %d × %d = %d points is more than --max-points %d (each point is one simulation); use fewer steps or raise --max-points", *steps, *steps2, n, *maxPoints)
		}
		pv2, err := sweepValue(m, *vary2)
		if err != nil {
			return err
		}
		grid, err := sweep.Two(m, pv, keypadSteps(m, pv, *from, *to, *steps), pv2, keypadSteps(m, pv2, *from2, *to2, *steps2), progress)
		if err != nil {
			return badf("sweep: %v", err)
		}
		writeHeatMap(stdout, grid, *vary, *vary2, m.Goal.MinResolution)
		if *csvF != "" {
			var rows [][]string
			rows = append(rows, []string{*vary, *vary2, "valid", "min_resolution", "critical_first", "critical_second", "run_time_min", "reason"})
			for _, row := range grid {
				for _, p := range row {
					rows = append(rows, pointRow(p, true))
				}
			}
			if err := writeCSVFile(*csvF, rows, stdout); err != nil {
				return err
			}
		}
		if *pngF != "" {
			data, err := report.MapPNG(grid, *vary, *vary2, m.Goal.MinResolution, 1000, 800)
			if err != nil {
				return fmt.Errorf("map: %v", err)
			}
			if err := methodfile.WriteAtomic(*pngF, data); err != nil {
				return err
			}
			fmt.Fprintf(stdout, "wrote %s\n", textsafe.Inert(*pngF))
		}
		printCautions(stdout, m)
		return nil
	}
	pts, err := sweep.One(m, pv, keypadSteps(m, pv, *from, *to, *steps), progress)
	if err != nil {
		return badf("sweep: %v", err)
	}
	step := m.Limits.Step(pv.Kind)
	fmt.Fprintf(stdout, "%s: sweep of %s (now %s)\n\n", textsafe.Inert(name), *vary, format.OnStep(current, step))
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintf(tw, "%s\tmin Rs\tcritical pair\trun (min)\t\n", *vary)
	for _, p := range pts {
		if !p.Valid {
			fmt.Fprintf(tw, "%s\t-\tnot a valid program: %s\t\t\n", format.OnStep(p.Value, step), textsafe.Inert(p.Reason))
			continue
		}
		rs, pair := "–", "no counted pair"
		if !math.IsNaN(p.MinRs) {
			rs = format.RsNumber(p.MinRs, m.Goal.MinResolution) + " " + format.VerdictAll(p.MinRs, m.Goal.MinResolution, len(p.NotEluted))
			pair = format.CriticalPair(textsafe.Inert(p.Critical[0]), textsafe.Inert(p.Critical[1]))
		}
		if len(p.NotEluted) > 0 {
			pair += "; " + format.NotEluted(inertAll(p.NotEluted))
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.2f\t\n", format.OnStep(p.Value, step), rs, pair, p.RunTime)
	}
	tw.Flush()
	if *csvF != "" {
		rows := [][]string{{*vary, "valid", "min_resolution", "critical_first", "critical_second", "run_time_min", "reason"}}
		for _, p := range pts {
			rows = append(rows, pointRow(p, false))
		}
		if err := writeCSVFile(*csvF, rows, stdout); err != nil {
			return err
		}
	}
	if *pngF != "" {
		data, err := report.WindowPNG(pts, *vary, current, m.Goal.MinResolution, 1000, 600)
		if err != nil {
			return fmt.Errorf("window diagram: %v", err)
		}
		if err := methodfile.WriteAtomic(*pngF, data); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "wrote %s\n", textsafe.Inert(*pngF))
	}
	printCautions(stdout, m)
	return nil
}

// keypadSteps are n values from a to b, each on the value's keypad step
// (what the oven takes: 236.7 °C, not 236.66666666666666), repeats left
// out when the steps are finer than the keypad.
func keypadSteps(m *methodfile.Method, pv model.ProgramValue, a, b float64, n int) []float64 {
	step := m.Limits.Step(pv.Kind)
	var out []float64
	for _, x := range sweep.Steps(a, b, n) {
		x = methodfile.OnStep(x, step)
		if len(out) == 0 || x != out[len(out)-1] {
			out = append(out, x)
		}
	}
	return out
}

// defaultMaxPoints bounds a sweep's size unless --max-points raises it: a
// map of 10⁵ points is already far finer than a plot shows.
const defaultMaxPoints = 100000

// sweepValue reads the name of a value to vary and checks m has it.
func sweepValue(m *methodfile.Method, name string) (model.ProgramValue, error) {
	pv, err := model.ParseProgramValue(name)
	if err == nil {
		err = sweep.Check(m, pv)
	}
	if err != nil {
		var names []string
		for _, v := range m.Values() {
			names = append(names, v.String())
		}
		hint := ""
		if near := methodfile.Suggest(name, names); near != "" {
			hint = "did you mean " + near + "? "
		}
		return pv, badf("sweep: %v (%sthis method has %s)", err, hint, model.ValueNames(m.Values()))
	}
	return pv, nil
}

func pointRow(p sweep.Point, two bool) []string {
	row := []string{fmtNum(p.Value)}
	if two {
		row = append(row, fmtNum(p.Value2))
	}
	rs := ""
	if !math.IsNaN(p.MinRs) {
		rs = fmtNum(p.MinRs)
	}
	run := ""
	if p.Valid {
		run = fmtNum(p.RunTime)
	}
	return append(row, fmt.Sprint(p.Valid), rs, textsafe.CSVCell(p.Critical[0]), textsafe.CSVCell(p.Critical[1]), run, textsafe.CSVCell(p.Reason))
}

func writeCSVFile(path string, rows [][]string, stdout io.Writer) error {
	var b strings.Builder
	w := csv.NewWriter(&b)
	w.WriteAll(rows)
	if err := methodfile.WriteAtomic(path, []byte(b.String())); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "wrote %s\n", textsafe.Inert(path))
	return nil
}

// writeHeatMap prints the map of minimum resolution: rows are the second
// value, columns the first; shading from below half the target (blank) to
// above it (█).
func writeHeatMap(w io.Writer, grid [][]sweep.Point, name, name2 string, target float64) {
	shades := []rune(" ░▒▓█")
	fmt.Fprintf(w, "minimum resolution: %s across, %s down; ' ' < %.2f ≤ ░ < %.2f ≤ ▒ < %.2f ≤ ▓ < %.2f ≤ █, × invalid\n\n",
		name, name2, target*0.5, target*0.75, target*0.9, target)
	for j := len(grid) - 1; j >= 0; j-- {
		row := grid[j]
		fmt.Fprintf(w, "%10.4g │", row[0].Value2)
		for _, p := range row {
			r := '×'
			if p.Valid {
				x := p.MinRs
				switch {
				case math.IsNaN(x) || x >= target:
					r = shades[4]
				case x >= 0.9*target:
					r = shades[3]
				case x >= 0.75*target:
					r = shades[2]
				case x >= 0.5*target:
					r = shades[1]
				default:
					r = shades[0]
				}
			}
			fmt.Fprintf(w, "%c%c", r, r)
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "%10s └%s\n", "", strings.Repeat("──", len(grid[0])))
	fmt.Fprintf(w, "%10s  %-10.4g%*s%.4g\n", "", grid[0][0].Value, 2*len(grid[0])-12, "", grid[0][len(grid[0])-1].Value)
}
