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

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
)

// Sim is a method with its system and the result of its program.
type Sim struct {
	Method *methodfile.Method
	System *model.System
	Result model.Result
	// Measured, when set, is drawn mirrored under the predicted
	// chromatogram with the matched peaks joined (overlay.go).
	Measured *Measured
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

func num(x float64) string { return format.Num(x) }

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
func Describe(m *methodfile.Method) string { return m.Describe() + " · " + m.Oven.Describe() }

// Program is the oven program in one line (methodfile.Oven.Describe).
func Program(o methodfile.Oven) string { return o.Describe() }

func round(x float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(x*p) / p
}

// signal is the detector signal at t s (model.Result.Signal).
func (s *Sim) signal(t float64) float64 { return s.Result.Signal(s.System.Compounds, t) }

var (
	traceColor    = color.RGBA{R: 0, G: 110, B: 100, A: 255}
	criticalColor = color.RGBA{R: 190, G: 30, B: 60, A: 255}
	ovenColor     = color.RGBA{R: 170, G: 100, B: 0, A: 255}
)

// Figure draws the chromatogram with numbered, named peaks (labels spread
// so that none overlaps, tied to their apex) and the critical pair in its
// colour and in the legend, and the oven program in a panel below on the
// same time axis (every tick at the same x in both panels).
// format is png, svg or pdf; for png, width and height are pixels (96 dpi),
// otherwise points.
func (s *Sim) Figure(format string, width, height int) ([]byte, error) {
	top, bottom, _, err := s.figurePlots()
	if err != nil {
		return nil, err
	}

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
	// a margin above the title, which would otherwise touch the top edge
	dc = draw.Crop(dc, 0, 0, 0, -vg.Points(8))
	upper, lower := panels(top, bottom, dc)
	top.Draw(upper)
	bottom.Draw(lower)
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// panels are the canvases of the chromatogram (the upper 72 %) and the oven
// panel, cropped so that both data areas span the same x.
func panels(top, bottom *plot.Plot, dc draw.Canvas) (upper, lower draw.Canvas) {
	h := dc.Max.Y - dc.Min.Y
	cs := alignX([]*plot.Plot{top, bottom}, []draw.Canvas{draw.Crop(dc, 0, 0, h*0.28, 0), draw.Crop(dc, 0, 0, 0, -h*0.74)})
	return cs[0], cs[1]
}

// figurePlots builds the two panels of the figure: the normalised trace
// with its peak labels and legend, and the oven temperature, both over
// [0, end] s (shown in min).
func (s *Sim) figurePlots() (top, bottom *plot.Plot, labels *peakLabels, err error) {
	trace, end, ymax := s.trace()
	r := &s.Result
	target := s.Method.Goal.MinResolution
	top = plot.New()
	// the method's title over its column and program; every string from
	// the file is drawn inert (a control character would make the SVG
	// invalid XML)
	top.Title.Text = textsafe.Inert(Describe(s.Method))
	if t := textsafe.Inert(s.Method.Title); t != "" {
		top.Title.Text = t + "\n" + top.Title.Text
	}
	top.Title.TextStyle.Font.Size = vg.Points(9)
	top.Title.Padding = vg.Points(4)
	top.Y.Label.Text = "signal (relative)"
	top.X.Min, top.X.Max = 0, end/60
	// headroom for the vertical labels above the tallest peak
	top.Y.Min, top.Y.Max = 0, 1.6
	useNiceTicks(top)
	line, err := plotter.NewLine(trace)
	if err != nil {
		return nil, nil, nil, err
	}
	line.Color = traceColor
	top.Add(line)
	crit := map[int]bool{}
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		crit[cp.First], crit[cp.Second] = true, true
	}
	labels = &peakLabels{size: vg.Points(6)}
	for i, pk := range r.Peaks {
		if !pk.Eluted {
			continue
		}
		labels.labels = append(labels.labels, peakLabel{
			x: pk.RetentionTime / 60, y: s.signal(pk.RetentionTime) / ymax,
			text: fmt.Sprintf("%d %s", i+1, textsafe.Inert(s.System.Compounds[pk.Compound].Name)), critical: crit[pk.Compound],
		})
	}
	top.Add(labels)
	if r.Critical >= 0 {
		cp := r.Pairs[r.Critical]
		mark, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 0, Y: 0}})
		mark.Color = criticalColor
		mark.Width = vg.Points(2)
		top.Legend.Add(fmt.Sprintf("critical pair %s / %s: min Rs %s", textsafe.Inert(s.System.Compounds[cp.First].Name), textsafe.Inert(s.System.Compounds[cp.Second].Name),
			format.RsAll(r.MinResolution, target, inertNames(s.System.NotElutedTargets(r)))), mark)
		top.Legend.Top = true
		top.Legend.TextStyle.Font.Size = vg.Points(7)
	}

	if s.Measured != nil {
		for _, p := range s.Measured.Peaks {
			end = math.Max(end, (p.TimeMin+3*p.WidthMin)*60)
		}
		top.X.Max = end / 60
		apex := func(tMin float64) float64 { return s.signal(tMin*60) / ymax }
		if err := s.Measured.draw(top, end/60, apex); err != nil {
			return nil, nil, nil, err
		}
	}

	bottom = plot.New()
	bottom.X.Label.Text = "time (min)"
	bottom.Y.Label.Text = "oven (°C)"
	bottom.X.Min, bottom.X.Max = 0, end/60
	useNiceTicks(bottom)
	prog := s.Method.ModelProgram()
	oven := make(plotter.XYs, 400)
	for i := range oven {
		t := end * float64(i) / float64(len(oven)-1)
		oven[i] = plotter.XY{X: t / 60, Y: prog.TempAt(t) - model.ZeroCelsius}
	}
	ol, err := plotter.NewLine(oven)
	if err != nil {
		return nil, nil, nil, err
	}
	ol.Color = ovenColor
	bottom.Add(ol)
	return top, bottom, labels, nil
}

// trace is the chromatogram sampled finely enough for the narrowest peak,
// normalised to the tallest apex (ymax before normalising), over [0, end] s.
func (s *Sim) trace() (trace plotter.XYs, end, ymax float64) {
	r := &s.Result
	end = r.RunTime
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
	trace = make(plotter.XYs, n)
	ymax = 0.0
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

	return trace, end, ymax
}
