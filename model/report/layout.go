package report

import (
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// niceTicks are gonum's default tick positions labelled with as many
// decimals as the tick step needs and no more: 125, not 125.00; 0.5, 1, 1.5.
type niceTicks struct{}

func (niceTicks) Ticks(min, max float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(min, max)
	step := math.Inf(1)
	prev := math.NaN()
	for _, t := range ts {
		if t.Label == "" {
			continue
		}
		if !math.IsNaN(prev) {
			step = math.Min(step, t.Value-prev)
		}
		prev = t.Value
	}
	dec := 0
	if step > 0 && !math.IsInf(step, 0) {
		for dec < 6 && math.Abs(step*math.Pow(10, float64(dec))-math.Round(step*math.Pow(10, float64(dec)))) > 1e-9*math.Pow(10, float64(dec)) {
			dec++
		}
	}
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = strconv.FormatFloat(ts[i].Value, 'f', dec, 64)
			if ts[i].Label == "-0" {
				ts[i].Label = "0"
			}
		}
	}
	return ts
}

// useNiceTicks sets niceTicks on both axes of p.
func useNiceTicks(p *plot.Plot) {
	p.X.Tick.Marker = niceTicks{}
	p.Y.Tick.Marker = niceTicks{}
}

// alignX crops the canvases so that the data areas of the plots drawn in
// them start and end at the same x: the panels then share one time axis,
// every tick at the same position (what plot.Align does for a grid of
// equal tiles, here for panels of different heights).
func alignX(plots []*plot.Plot, cs []draw.Canvas) []draw.Canvas { return align(plots, cs, false) }

// alignY is alignX for plots side by side (a map and its colour bar).
func alignY(plots []*plot.Plot, cs []draw.Canvas) []draw.Canvas { return align(plots, cs, true) }

// align is alignX (vertical false) or alignY (vertical true).
func align(plots []*plot.Plot, cs []draw.Canvas, vertical bool) []draw.Canvas {
	span := func(c draw.Canvas) (lo, hi vg.Length) {
		if vertical {
			return c.Min.Y, c.Max.Y
		}
		return c.Min.X, c.Max.X
	}
	var low, high vg.Length
	for i, p := range plots {
		dlo, dhi := span(p.DataCanvas(cs[i]))
		clo, chi := span(cs[i])
		low = max(low, dlo-clo)
		high = max(high, chi-dhi)
	}
	out := make([]draw.Canvas, len(cs))
	for i, p := range plots {
		dlo, dhi := span(p.DataCanvas(cs[i]))
		clo, chi := span(cs[i])
		lo, hi := low-(dlo-clo), -(high - (chi - dhi))
		if vertical {
			out[i] = draw.Crop(cs[i], 0, 0, lo, hi)
		} else {
			out[i] = draw.Crop(cs[i], lo, hi, 0, 0)
		}
	}
	return out
}

// peakLabel is one label above a peak apex (data coordinates).
type peakLabel struct {
	x, y     float64
	text     string
	critical bool
}

// peakLabels draws vertical peak labels that never overlap: labels closer
// than one line apart are spread sideways, centred on their peaks, each tied
// to its apex by a leader line.
type peakLabels struct {
	labels []peakLabel
	size   vg.Length
}

func (pl *peakLabels) style(critical bool) text.Style {
	sty := text.Style{
		Font:     font.From(plotter.DefaultFont, pl.size),
		Handler:  plot.DefaultTextHandler,
		Rotation: math.Pi / 2,
		XAlign:   text.XLeft,
		YAlign:   text.YCenter,
		Color:    traceColor,
	}
	if critical {
		sty.Color = criticalColor
	}
	return sty
}

// spread places n items at least gap apart, each as near its wanted
// position as the others allow (clusters centred on their mean), within
// [lo, hi]. want must be sorted.
func spread(want []float64, gap, lo, hi float64) []float64 {
	type cluster struct {
		first, n int
		sum      float64
	}
	start := func(c cluster) float64 { return c.sum/float64(c.n) - float64(c.n-1)*gap/2 }
	var cs []cluster
	for i, w := range want {
		cs = append(cs, cluster{i, 1, w})
		for len(cs) > 1 {
			a, b := cs[len(cs)-2], cs[len(cs)-1]
			if start(a)+float64(a.n)*gap <= start(b) {
				break
			}
			cs = append(cs[:len(cs)-2], cluster{a.first, a.n + b.n, a.sum + b.sum})
		}
	}
	out := make([]float64, len(want))
	for _, c := range cs {
		s := start(c)
		for k := 0; k < c.n; k++ {
			out[c.first+k] = s + float64(k)*gap
		}
	}
	// keep inside the canvas: shift the overflowing ends in
	if n := len(out); n > 0 {
		if out[n-1] > hi {
			out[n-1] = hi
			for i := n - 2; i >= 0; i-- {
				out[i] = math.Min(out[i], out[i+1]-gap)
			}
		}
		if out[0] < lo {
			out[0] = lo
			for i := 1; i < n; i++ {
				out[i] = math.Max(out[i], out[i-1]+gap)
			}
		}
	}
	return out
}

// place computes where each label goes on canvas c: its apex, and the
// foot of its text.
func (pl *peakLabels) place(c draw.Canvas, p *plot.Plot) (apex, foot []vg.Point) {
	trX, trY := p.Transforms(&c)
	idx := make([]int, len(pl.labels))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return pl.labels[idx[a]].x < pl.labels[idx[b]].x })
	want := make([]float64, len(idx))
	for k, i := range idx {
		want[k] = float64(trX(pl.labels[i].x))
	}
	gap := float64(pl.style(false).FontExtents().Height) * 1.1
	got := spread(want, gap, float64(c.Min.X)+gap/2, float64(c.Max.X)-gap/2)
	apex = make([]vg.Point, len(pl.labels))
	foot = make([]vg.Point, len(pl.labels))
	rise := 3 * pl.size
	for k, i := range idx {
		a := vg.Point{X: vg.Length(want[k]), Y: trY(pl.labels[i].y) + pl.size/3}
		f := vg.Point{X: vg.Length(got[k]), Y: a.Y}
		if math.Abs(got[k]-want[k]) > 0.5 {
			f.Y += rise
		}
		apex[i], foot[i] = a, f
	}
	return apex, foot
}

// Plot implements plot.Plotter.
func (pl *peakLabels) Plot(c draw.Canvas, p *plot.Plot) {
	apex, foot := pl.place(c, p)
	for i, l := range pl.labels {
		sty := pl.style(l.critical)
		if foot[i] != apex[i] {
			c.StrokeLines(draw.LineStyle{Color: sty.Color, Width: vg.Points(0.4)}, []vg.Point{apex[i], {X: foot[i].X, Y: foot[i].Y - pl.size/3}})
		}
		c.FillText(sty, foot[i], l.text)
	}
}
