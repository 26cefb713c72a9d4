package tui

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/x/ansi"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/report"
	"github.com/rampwise/rampwise/model/sweep"
	"github.com/rampwise/rampwise/tui/canvas"
)

// sweepView is the window diagram of one program value: the minimum
// resolution over a range around the current value.
type sweepView struct {
	name    string
	unit    string
	current float64
	pts     []sweep.Point
}

// sweepRange is the range the view covers around the current value v.
func sweepRange(f field, v float64, m *methodfile.Method) (float64, float64) {
	switch f.pv.Kind {
	case model.InitialTemp:
		return math.Max(m.Limits.OvenMinC, v-40), math.Min(m.Column.MaxTempC-1, v+40)
	case model.RampFinal:
		return math.Max(m.Oven.InitialC+1, v-60), math.Min(m.Column.MaxTempC, v+60)
	case model.RampRate:
		return math.Max(0.5, v/4), math.Min(m.Limits.MaxRateCMin, v*3)
	}
	return 0, math.Max(2, v*3)
}

func (a *App) openSweep(f field) {
	name := f.pv.String()
	v := f.value(a.method)
	lo, hi := sweepRange(f, v, a.method)
	values := sweep.Steps(lo, hi, 60)
	values = append(values, v)
	pts, err := sweep.One(a.method, f.pv, sortedUnique(values), nil)
	if err != nil {
		a.say(msgError, "sweep: %v", err)
		return
	}
	a.sweepView = &sweepView{name: name, unit: f.unit, current: v, pts: pts}
	a.say(msgInfo, "window diagram of %s: minimum resolution across %.4g–%.4g %s · esc closes", name, lo, hi, f.unit)
}

func sortedUnique(v []float64) []float64 {
	out := append([]float64(nil), v...)
	for i := 1; i < len(out); i++ {
		for j := i; j > 0 && out[j] < out[j-1]; j-- {
			out[j], out[j-1] = out[j-1], out[j]
		}
	}
	u := out[:0]
	for i, x := range out {
		if i == 0 || x != out[i-1] {
			u = append(u, x)
		}
	}
	return u
}

// sweepLines draws the window diagram as a braille chart: minimum Rs
// against the value, the target as a dotted line, the current value as a
// vertical line.
func (a *App) sweepLines(w, h int) []string {
	sv := a.sweepView
	lines := []string{a.st.Focused.Render("▸window diagram ") + a.st.Dim.Render(fmt.Sprintf("min Rs vs %s (%s) · target %.2f · │ now %.4g · esc closes", sv.name, sv.unit, a.method.Goal.MinResolution, sv.current))}
	ph := h - 2
	pw := w - 8
	if ph < 2 || pw < 10 {
		return lines
	}
	cv := canvas.New(pw, ph)
	dw, dh := cv.DotSize()
	lo, hi := sv.pts[0].Value, sv.pts[len(sv.pts)-1].Value
	target := a.method.Goal.MinResolution
	ymax := target * 1.5
	for _, p := range sv.pts {
		if p.Valid && !math.IsNaN(p.MinRs) && p.MinRs > ymax {
			ymax = p.MinRs
		}
	}
	ymax = math.Min(ymax, target*4)
	xOf := func(v float64) int { return int(math.Round((v - lo) / (hi - lo) * float64(dw-1))) }
	yOf := func(r float64) int {
		return dh - 1 - int(math.Round(math.Min(r, ymax)/ymax*float64(dh-1)))
	}
	for x := 0; x < dw; x += 3 {
		cv.Set(x, yOf(target), layerTemp)
	}
	cx := xOf(sv.current)
	cv.VLine(cx, 0, dh-1, layerTemp)
	px, py := -1, 0
	for _, p := range sv.pts {
		if !p.Valid || math.IsNaN(p.MinRs) {
			px = -1
			continue
		}
		x, y := xOf(p.Value), yOf(p.MinRs)
		if px >= 0 {
			cv.Line(px, py, x, y, layerPeak)
		}
		px, py = x, y
	}
	for r := 0; r < ph; r++ {
		var b strings.Builder
		lab := "      "
		switch r {
		case 0:
			lab = fmt.Sprintf("%5.2f ", ymax)
		case ph - 1:
			lab = fmt.Sprintf("%5.2f ", 0.0)
		}
		b.WriteString(a.st.Axis.Render(lab + "│"))
		for col := 0; col < pw; col++ {
			c := cv.At(col, r)
			s := string(c.Rune)
			switch {
			case c.Layers&(1<<layerPeak) != 0:
				s = a.st.Peak.Render(s)
			case c.Layers&(1<<layerTemp) != 0:
				s = a.st.Temp.Render(s)
			}
			b.WriteString(s)
		}
		lines = append(lines, ansi.Truncate(b.String(), w, ""))
	}
	axis := fmt.Sprintf("       %-12.4g%*s%.4g %s", lo, pw-16, "", hi, sv.unit)
	lines = append(lines, a.st.Axis.Render(ansi.Truncate(axis, w, "")))
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines[:h]
}

// export writes the current method's figure (PNG) and method sheet beside
// the method file (or in the current folder for the demo).
func (a *App) export() {
	base := "rampwise-demo"
	if a.path != "" {
		base = strings.TrimSuffix(a.path, filepath.Ext(a.path))
	}
	s, err := report.Simulate(a.method)
	if err != nil {
		a.say(msgError, "export: %v", err)
		return
	}
	fig, err := s.Figure("png", 1200, 800)
	if err != nil {
		a.say(msgError, "export: %v", err)
		return
	}
	if err := methodfile.WriteAtomic(base+".png", fig); err != nil {
		a.say(msgError, "export: %v", err)
		return
	}
	if err := methodfile.WriteAtomic(base+".md", s.Sheet()); err != nil {
		a.say(msgError, "export: %v", err)
		return
	}
	a.say(msgGood, "exported %s.png (figure) and %s.md (method sheet)", base, base)
}
