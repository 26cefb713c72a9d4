// Package report renders a simulated method for the world outside the
// terminal: the chromatogram figure (PNG, SVG, PDF) with the oven program in
// a panel below, the peak table as CSV, and a Markdown method sheet a
// colleague can set the instrument up from. It returns bytes; writing files
// is the caller's job.
package report

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
)

// Sim is a method with its system and the result of its program.
type Sim struct {
	Method *methodfile.Method
	System *model.System
	Result model.Result
}

// Simulate builds the system for m and simulates its program.
func Simulate(m *methodfile.Method) (*Sim, error) {
	sys, err := m.System()
	if err != nil {
		return nil, err
	}
	s := &Sim{Method: m, System: sys}
	if err := sys.Simulate(m.ModelProgram(), &s.Result); err != nil {
		return nil, err
	}
	return s, nil
}

func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// CSV is the peak table: name, retention time, elution temperature, sigma,
// half-height width, retention factor at elution, resolution to the next
// peak, target, eluted. Numbers are written in full (shortest round-trip
// form), so they equal simulate --json.
func (s *Sim) CSV() ([]byte, error) {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write([]string{"name", "retention_time_min", "elution_temp_c", "sigma_min", "half_height_width_min", "retention_factor_at_elution", "resolution_to_next", "target", "eluted"})
	r := &s.Result
	for i, pk := range r.Peaks {
		c := &s.System.Compounds[pk.Compound]
		rs := ""
		if i < len(r.Pairs) {
			rs = num(r.Pairs[i].Resolution)
		}
		w.Write([]string{textsafe.CSVCell(c.Name), num(pk.RetentionTime / 60), num(pk.ElutionTemp - model.ZeroCelsius), num(pk.Sigma / 60),
			num(pk.HalfWidth() / 60), num(pk.RetentionFactor), rs, strconv.FormatBool(c.Target), strconv.FormatBool(pk.Eluted)})
	}
	w.Flush()
	return b.Bytes(), w.Error()
}

// Describe is the column, carrier and program in one line.
func Describe(m *methodfile.Method) string {
	c, g := m.Column, m.Carrier
	flow := fmt.Sprintf("%s mL/min const. flow", num(g.FlowMLMin))
	if g.Mode == model.ConstantPressure {
		flow = fmt.Sprintf("%s kPa const. pressure", num(g.InletKPa))
	}
	return fmt.Sprintf("%s · %s %s · %s", c.Describe(), g.Gas, flow, Program(m.Oven))
}

// Program is the oven program in one line.
func Program(o methodfile.Oven) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s °C (%s min)", num(round(o.InitialC, 2)), num(round(o.InitialHoldMin, 3)))
	for _, r := range o.Ramps {
		fmt.Fprintf(&b, " → %s °C/min → %s °C (%s min)", num(round(r.RateCMin, 2)), num(round(r.FinalC, 2)), num(round(r.HoldMin, 3)))
	}
	return b.String()
}

func round(x float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(x*p) / p
}

// signal is the summed Gaussian detector signal (areas ∝ amount) at t s.
func (s *Sim) signal(t float64) float64 {
	y := 0.0
	for _, pk := range s.Result.Peaks {
		if !pk.Eluted || pk.Sigma <= 0 {
			continue
		}
		z := (t - pk.RetentionTime) / pk.Sigma
		if z > -8 && z < 8 {
			y += s.System.Compounds[pk.Compound].AreaOrOne() / pk.Sigma * math.Exp(-0.5*z*z)
		}
	}
	return y
}

var (
	traceColor    = color.RGBA{R: 0, G: 110, B: 100, A: 255}
	criticalColor = color.RGBA{R: 190, G: 30, B: 60, A: 255}
	ovenColor     = color.RGBA{R: 170, G: 100, B: 0, A: 255}
)

// Figure draws the chromatogram with numbered, named peaks and the critical
// pair marked, and the oven program in a panel below on the same time axis.
// format is png, svg or pdf; for png, width and height are pixels (96 dpi),
// otherwise points.
func (s *Sim) Figure(format string, width, height int) ([]byte, error) {
	r := &s.Result
	end := r.RunTime
	for _, pk := range r.Peaks {
		if pk.Eluted {
			end = math.Max(end, pk.RetentionTime+5*pk.Sigma)
		}
	}
	// sample finely enough to resolve the narrowest peak
	minSigma := end
	for _, pk := range r.Peaks {
		if pk.Eluted && pk.Sigma > 0 {
			minSigma = math.Min(minSigma, pk.Sigma)
		}
	}
	n := int(math.Min(200000, math.Max(2000, 8*end/minSigma)))
	trace := make(plotter.XYs, n)
	ymax := 0.0
	for i := range trace {
		t := end * float64(i) / float64(n-1)
		trace[i] = plotter.XY{X: t / 60, Y: s.signal(t)}
	}
	// exact apexes so no peak is clipped between samples
	for _, pk := range r.Peaks {
		if pk.Eluted {
			ymax = math.Max(ymax, s.signal(pk.RetentionTime))
		}
	}
	if ymax <= 0 {
		ymax = 1
	}
	for i := range trace {
		trace[i].Y /= ymax
	}

	top := plot.New()
	top.Title.Text = Describe(s.Method)
	top.Title.TextStyle.Font.Size = vg.Points(9)
	top.Y.Label.Text = "signal (relative)"
	top.X.Min, top.X.Max = 0, end/60
	top.Y.Min, top.Y.Max = 0, 1.25
	line, err := plotter.NewLine(trace)
	if err != nil {
		return nil, err
	}
	line.Color = traceColor
	top.Add(line)
	crit := map[int]bool{}
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		crit[cp.First], crit[cp.Second] = true, true
	}
	var lx plotter.XYs
	var lt []string
	var cx plotter.XYs
	var ct []string
	for i, pk := range r.Peaks {
		if !pk.Eluted {
			continue
		}
		name := s.System.Compounds[pk.Compound].Name
		pt := plotter.XY{X: pk.RetentionTime / 60, Y: s.signal(pk.RetentionTime)/ymax + 0.02}
		label := fmt.Sprintf("%d %s", i+1, name)
		if crit[pk.Compound] {
			cx, ct = append(cx, pt), append(ct, label+" (critical)")
		} else {
			lx, lt = append(lx, pt), append(lt, label)
		}
	}
	if len(lx) > 0 {
		labels, err := plotter.NewLabels(plotter.XYLabels{XYs: lx, Labels: lt})
		if err != nil {
			return nil, err
		}
		for i := range labels.TextStyle {
			labels.TextStyle[i].Font.Size = vg.Points(6)
			labels.TextStyle[i].Rotation = math.Pi / 2
		}
		top.Add(labels)
	}
	if len(cx) > 0 {
		labels, err := plotter.NewLabels(plotter.XYLabels{XYs: cx, Labels: ct})
		if err != nil {
			return nil, err
		}
		for i := range labels.TextStyle {
			labels.TextStyle[i].Font.Size = vg.Points(6)
			labels.TextStyle[i].Rotation = math.Pi / 2
			labels.TextStyle[i].Color = criticalColor
		}
		top.Add(labels)
	}
	if r.Critical >= 0 {
		top.Legend.Add(fmt.Sprintf("min Rs %.2f (target %.2f)", r.MinResolution, s.Method.Goal.MinResolution))
		top.Legend.Top = true
	}

	bottom := plot.New()
	bottom.X.Label.Text = "time (min)"
	bottom.Y.Label.Text = "oven (°C)"
	bottom.X.Min, bottom.X.Max = 0, end/60
	prog := s.Method.ModelProgram()
	oven := make(plotter.XYs, 400)
	for i := range oven {
		t := end * float64(i) / float64(len(oven)-1)
		oven[i] = plotter.XY{X: t / 60, Y: prog.TempAt(t) - model.ZeroCelsius}
	}
	ol, err := plotter.NewLine(oven)
	if err != nil {
		return nil, err
	}
	ol.Color = ovenColor
	bottom.Add(ol)

	w, h := vg.Length(width), vg.Length(height)
	var c vg.CanvasWriterTo
	switch format {
	case "png":
		w, h = w*vg.Inch/96, h*vg.Inch/96
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(96))}
	case "svg":
		c = vgsvg.New(w, h)
	case "pdf":
		c = vgpdf.New(w, h)
	default:
		return nil, fmt.Errorf("unknown figure format %q", format)
	}
	dc := draw.New(c.(vg.CanvasSizer))
	upper := draw.Crop(dc, 0, 0, h*0.28, 0)
	lower := draw.Crop(dc, 0, 0, 0, -h*0.74)
	top.Draw(upper)
	bottom.Draw(lower)
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
