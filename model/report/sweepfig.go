package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/sweep"
)

func renderPNG(p *plot.Plot, width, height int) ([]byte, error) {
	w, h := vg.Length(width)*vg.Inch/96, vg.Length(height)*vg.Inch/96
	c := vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(96))
	p.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// WindowPNG plots the minimum resolution against the varied value (the
// window diagram), with the target and the method's current value marked.
func WindowPNG(pts []sweep.Point, name string, current, target float64, width, height int) ([]byte, error) {
	p := plot.New()
	p.Title.Text = "window diagram: minimum resolution vs " + name
	p.X.Label.Text = name
	p.Y.Label.Text = "minimum Rs"
	useNiceTicks(p)
	var xy plotter.XYs
	for _, pt := range pts {
		if pt.Valid && !math.IsNaN(pt.MinRs) {
			xy = append(xy, plotter.XY{X: pt.Value, Y: pt.MinRs})
		}
	}
	if len(xy) == 0 {
		return nil, fmt.Errorf("no valid step to plot")
	}
	l, err := plotter.NewLine(xy)
	if err != nil {
		return nil, err
	}
	l.Color = traceColor
	p.Add(l)
	tl, _ := plotter.NewLine(plotter.XYs{{X: pts[0].Value, Y: target}, {X: pts[len(pts)-1].Value, Y: target}})
	tl.Color = criticalColor
	tl.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	p.Add(tl)
	p.Legend.Add("target "+format.Target(target), tl)
	lo, hi := xy[0].Y, xy[0].Y
	for _, q := range xy {
		lo, hi = math.Min(lo, q.Y), math.Max(hi, q.Y)
	}
	cl, _ := plotter.NewLine(plotter.XYs{{X: current, Y: math.Min(lo, target)}, {X: current, Y: math.Max(hi, target)}})
	cl.Color = ovenColor
	p.Add(cl)
	p.Legend.Add(fmt.Sprintf("current %g", current), cl)
	p.Legend.Top = true
	return renderPNG(p, width, height)
}

type grid struct {
	pts    [][]sweep.Point
	target float64
}

func (g grid) Dims() (c, r int) { return len(g.pts[0]), len(g.pts) }
func (g grid) X(c int) float64  { return g.pts[0][c].Value }
func (g grid) Y(r int) float64  { return g.pts[r][0].Value2 }
func (g grid) Z(c, r int) float64 {
	p := g.pts[r][c]
	if !p.Valid || math.IsNaN(p.MinRs) {
		return 0
	}
	return math.Min(p.MinRs, 3*g.target)
}

// MapPNG draws the two-value sweep as a map of the minimum resolution
// (capped at three times the target; an invalid program counts as 0), the
// target's contour over it, and a colour bar giving the scale.
func MapPNG(pts [][]sweep.Point, name, name2 string, target float64, width, height int) ([]byte, error) {
	if len(pts) < 2 || len(pts[0]) < 2 {
		return nil, fmt.Errorf("a map needs at least 2 steps of each value")
	}
	cm := moreland.SmoothBlueRed()
	cm.SetMin(0)
	cm.SetMax(3 * target)
	g := grid{pts, target}
	p := plot.New()
	p.Title.Text = "minimum resolution (target " + format.Target(target) + ")"
	p.X.Label.Text = name
	p.Y.Label.Text = name2
	useNiceTicks(p)
	h := plotter.NewHeatMap(g, cm.Palette(48))
	h.Min, h.Max = 0, 3*target
	p.Add(h)
	if lo, hi := zRange(g); lo < target && hi > target {
		c := plotter.NewContour(g, []float64{target}, onePalette{criticalColor})
		c.LineStyles = []draw.LineStyle{{Color: criticalColor, Width: vg.Points(2)}}
		p.Add(c)
		thumb, _ := plotter.NewLine(plotter.XYs{{}, {}})
		thumb.Color, thumb.Width = criticalColor, vg.Points(2)
		p.Legend.Add("Rs = target "+format.Target(target), thumb)
		p.Legend.Top = true
	}

	bar := plot.New()
	bar.HideX()
	bar.Y.Label.Text = "minimum Rs"
	bar.Y.Min, bar.Y.Max = 0, 3*target
	bar.Y.Tick.Marker = niceTicks{}
	bar.Add(&plotter.ColorBar{ColorMap: cm, Vertical: true})

	w, hh := vg.Length(width)*vg.Inch/96, vg.Length(height)*vg.Inch/96
	img := vgimg.NewWith(vgimg.UseWH(w, hh), vgimg.UseDPI(96))
	dc := draw.New(img)
	cs := alignY([]*plot.Plot{p, bar}, []draw.Canvas{draw.Crop(dc, 0, -w*0.16, 0, 0), draw.Crop(dc, w*0.86, 0, 0, 0)})
	p.Draw(cs[0])
	bar.Draw(cs[1])
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: img}).WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

func zRange(g grid) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	c, r := g.Dims()
	for i := 0; i < c; i++ {
		for j := 0; j < r; j++ {
			lo, hi = math.Min(lo, g.Z(i, j)), math.Max(hi, g.Z(i, j))
		}
	}
	return lo, hi
}

// onePalette is a palette of a single colour (the target contour's).
type onePalette struct{ c color.Color }

func (p onePalette) Colors() []color.Color { return []color.Color{p.c} }
