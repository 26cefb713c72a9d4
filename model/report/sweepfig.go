package report

import (
	"bytes"
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

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
	p.Legend.Add(fmt.Sprintf("target %.2f", target), tl)
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

// MapPNG draws the two-value sweep as a heat map of the minimum resolution
// (capped at three times the target).
func MapPNG(pts [][]sweep.Point, name, name2 string, target float64, width, height int) ([]byte, error) {
	if len(pts) < 2 || len(pts[0]) < 2 {
		return nil, fmt.Errorf("a map needs at least 2 steps of each value")
	}
	p := plot.New()
	p.Title.Text = fmt.Sprintf("minimum resolution (target %.2f)", target)
	p.X.Label.Text = name
	p.Y.Label.Text = name2
	h := plotter.NewHeatMap(grid{pts, target}, palette.Heat(16, 1))
	h.Min, h.Max = 0, 3*target
	p.Add(h)
	return renderPNG(p, width, height)
}
