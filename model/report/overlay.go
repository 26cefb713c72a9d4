package report

import (
	"image/color"
	"math"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"github.com/rampwise/rampwise/model/calibrate"
)

// Measured is a measured run to draw under the prediction, on the same
// time axis and mirrored below it: the detector trace of a chromatogram
// file, or Gaussians rebuilt from a peak table's times, widths and areas,
// and the matches that join each compound's predicted apex to its measured
// one. Everything the terminal UI needs to draw the same overlay is here.
type Measured struct {
	Label   string
	TraceT  []float64 // min; empty for a peak table
	TraceY  []float64 // detector signal, as measured
	Peaks   []MeasuredPeak
	Matches []Match
}

// MeasuredPeak is one measured peak (times and half-height width in min).
type MeasuredPeak struct {
	Name            string
	TimeMin         float64
	WidthMin, Area  float64
	Matched, Target bool
}

// Match joins a compound's predicted and measured apex.
type Match struct {
	Compound                  string
	PredictedMin, MeasuredMin float64
}

// MeasuredFromCheck takes a verification (calibrate.Verify) as an overlay.
func MeasuredFromCheck(ck *calibrate.Check) *Measured {
	m := &Measured{Label: ck.Run.Name}
	if tr := ck.Run.Trace; tr != nil {
		m.TraceT = make([]float64, len(tr.Values))
		m.TraceY = append([]float64(nil), tr.Values...)
		for i := range tr.Values {
			m.TraceT[i] = tr.Time(i)
		}
	}
	matched := map[float64]string{}
	for _, c := range ck.Compounds {
		if !math.IsNaN(c.MeasuredMin) {
			m.Matches = append(m.Matches, Match{c.Name, c.PredictedMin, c.MeasuredMin})
			matched[c.MeasuredMin] = c.Name
		}
	}
	for _, p := range ck.Run.Peaks {
		mp := MeasuredPeak{Name: p.Name, TimeMin: p.TimeMin, WidthMin: p.WidthMin, Area: p.Area}
		if n, ok := matched[p.TimeMin]; ok {
			mp.Matched, mp.Name = true, n
		}
		m.Peaks = append(m.Peaks, mp)
	}
	if len(m.Peaks) == 0 { // a runs-file run without peaks: its named times
		for _, x := range m.Matches {
			m.Peaks = append(m.Peaks, MeasuredPeak{Name: x.Compound, TimeMin: x.MeasuredMin, WidthMin: ck.Run.Widths[x.Compound], Matched: true})
		}
	}
	return m
}

var (
	measuredColor = color.RGBA{R: 60, G: 60, B: 160, A: 255}
	joinColor     = color.RGBA{R: 120, G: 120, B: 120, A: 255}
)

// signal of the measured run at t min, before scaling: the trace
// interpolated, or the peak table's Gaussians (area ∝ height × width; a
// width of 0.01 min and unit area where the table gives none).
func (m *Measured) signal(t float64) float64 {
	if n := len(m.TraceT); n > 1 {
		if t <= m.TraceT[0] || t >= m.TraceT[n-1] {
			return math.NaN()
		}
		dt := (m.TraceT[n-1] - m.TraceT[0]) / float64(n-1)
		f := (t - m.TraceT[0]) / dt
		i := int(f)
		if i >= n-1 {
			return m.TraceY[n-1]
		}
		return m.TraceY[i] + (f-float64(i))*(m.TraceY[i+1]-m.TraceY[i])
	}
	y := 0.0
	for _, p := range m.Peaks {
		w := p.WidthMin
		if !(w > 0) {
			w = 0.01
		}
		a := p.Area
		if !(a > 0) {
			a = 1
		}
		sig := w / 2.3548200450309493
		z := (t - p.TimeMin) / sig
		if z > -8 && z < 8 {
			y += a / sig * math.Exp(-0.5*z*z)
		}
	}
	return y
}

// drawMeasured adds the mirrored measured run and the joins to the
// chromatogram panel whose predicted trace is scaled to 1; endMin is the
// panel's time range.
func (m *Measured) draw(top *plot.Plot, endMin float64, predApex func(t float64) float64) error {
	n := m.samples()
	pts := make(plotter.XYs, 0, n)
	for i := 0; i < n; i++ {
		t := endMin * float64(i) / float64(n-1)
		y := m.signal(t)
		if math.IsNaN(y) {
			continue
		}
		pts = append(pts, plotter.XY{X: t, Y: y})
	}
	scale := m.Scale(endMin, predApex)
	for i := range pts {
		pts[i].Y = -scale(pts[i].Y)
	}
	if len(pts) > 1 {
		l, err := plotter.NewLine(pts)
		if err != nil {
			return err
		}
		l.Color = measuredColor
		top.Add(l)
		top.Legend.Add("measured "+m.Label+" (below)", l)
	}
	for _, x := range m.Matches {
		j, err := plotter.NewLine(plotter.XYs{{X: x.PredictedMin, Y: predApex(x.PredictedMin)}, {X: x.MeasuredMin, Y: -scale(m.signal(x.MeasuredMin))}})
		if err != nil {
			return err
		}
		j.Color = joinColor
		j.Width = vg.Points(0.4)
		j.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
		top.Add(j)
	}
	top.Y.Min = -1.25
	return nil
}

// samples is how many points draw and Scale take over the time range.
func (m *Measured) samples() int {
	if len(m.TraceT) > 0 {
		return max(2, min(len(m.TraceT), 200000))
	}
	return 4000
}

// Signal is the measured run at t min, before scaling (NaN outside a
// trace): what the figure draws and the terminal UI too.
func (m *Measured) Signal(t float64) float64 { return m.signal(t) }

// Scale maps the measured signal over 0..endMin min to the overlay's
// height, 0 at the baseline (a trace's lowest tenth) and at most 1.2, on
// the prediction's scale (the predicted trace scaled to 1, predApex its
// height at a time in min): the median matched apex of the measured run
// is drawn as tall as the median predicted one (a solvent peak would
// otherwise flatten the rest); with no match, the tallest point is 1. The
// figure and the terminal UI scale alike.
func (m *Measured) Scale(endMin float64, predApex func(t float64) float64) func(y float64) float64 {
	lo, hi := 0.0, math.Inf(-1)
	if len(m.TraceT) > 0 {
		lo = percentile(m.TraceY, 0.1)
	}
	n := m.samples()
	for i := 0; i < n; i++ {
		if y := m.signal(endMin * float64(i) / float64(n-1)); !math.IsNaN(y) {
			hi = math.Max(hi, y)
		}
	}
	if len(m.Matches) > 0 {
		var pm, mm []float64
		for _, x := range m.Matches {
			pm = append(pm, predApex(x.PredictedMin))
			mm = append(mm, m.signal(x.MeasuredMin)-lo)
		}
		sort.Float64s(pm)
		sort.Float64s(mm)
		if p, q := pm[len(pm)/2], mm[len(mm)/2]; p > 0 && q > 0 {
			hi = lo + q/p
		}
	}
	span := hi - lo
	if !(span > 0) {
		span = 1
	}
	return func(y float64) float64 { return math.Min(1.2, math.Max(0, (y-lo)/span)) }
}

func percentile(xs []float64, q float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	c := append([]float64(nil), xs...)
	// partial selection is enough; sort for simplicity (traces are short)
	sortFloats(c)
	return c[int(q*float64(len(c)-1))]
}

func sortFloats(x []float64) { sort.Float64s(x) }
