package tui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/charmbracelet/lipgloss"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/report"
	"github.com/rampwise/rampwise/tui/canvas"
)

const (
	layerPeak  = 0
	layerTemp  = 1
	layerUnder = 3 // the faint run beneath (layer 2 is the window diagram's)
	layerMeas  = 4 // a measured run, mirrored below
	layerJoin  = 5 // the lines joining matched peaks
	tempAxisW  = 7 // right margin for the temperature axis
)

// chartInput is what the chromatogram shows.
type chartInput struct {
	res   *model.Result
	prog  model.Program
	comps []model.Compound
	// visible time window, s
	t0, t1 float64
	// under is another run drawn faint and dotted beneath this one (the
	// current program's while the optimizer's waits), or nil
	under *model.Result
	// meas is a measured run drawn mirrored below, on the same time axis,
	// each matched peak joined to its prediction, or nil
	meas *report.Measured
}

// chart draws the simulated chromatogram: the summed Gaussian peaks as a
// braille curve, peak numbers in elution order (the critical pair in the
// critical style), the oven temperature on its own axis at the right, and
// the time axis in minutes below. It returns w-wide lines, h of them.
type chart struct {
	cv    *canvas.Canvas
	ys    []float64
	ms    []float64 // a measured run's apexes per dot column
	label []int8    // per cell: 0 none, 1 label, 2 critical label
}

func (c *chart) render(in chartInput, w, h int, st *Styles) []string {
	pw, ph := w-tempAxisW, h-1
	if pw < 10 || ph < 2 {
		return make([]string, h)
	}
	if c.cv == nil {
		c.cv = canvas.New(pw, ph)
	} else {
		c.cv.Resize(pw, ph)
	}
	if cap(c.label) < pw*ph {
		c.label = make([]int8, pw*ph)
	}
	c.label = c.label[:pw*ph]
	for i := range c.label {
		c.label[i] = 0
	}
	dw, dh := c.cv.DotSize()
	t0, t1 := in.t0, in.t1
	if !(t1 > t0) {
		t1 = t0 + 1
	}
	span := t1 - t0
	// signal per dot column
	if cap(c.ys) < dw {
		c.ys = make([]float64, dw)
	}
	c.ys = c.ys[:dw]
	ymax := 0.0
	for x := 0; x < dw; x++ {
		y := signalAt(in, t0+(float64(x)+0.5)/float64(dw)*span)
		// a peak narrower than a column still shows its apex
		ta, tb := t0+float64(x)/float64(dw)*span, t0+float64(x+1)/float64(dw)*span
		for _, pk := range in.res.Peaks {
			if pk.Eluted && pk.RetentionTime >= ta && pk.RetentionTime < tb {
				if ya := signalAt(in, pk.RetentionTime); ya > y {
					y = ya
				}
			}
		}
		c.ys[x] = y
		if y > ymax {
			ymax = y
		}
	}
	// peak apexes can fall between samples: scale by the true apex heights
	for _, pk := range in.res.Peaks {
		if pk.Eluted && pk.RetentionTime >= t0 && pk.RetentionTime <= t1 && pk.Sigma > 0 {
			if a := in.comps[pk.Compound].AreaOrOne() / pk.Sigma; a > ymax {
				ymax = a
			}
		}
	}
	var under []float64
	if in.under != nil {
		under = make([]float64, dw)
		for x := range under {
			under[x] = in.under.Signal(in.comps, t0+(float64(x)+0.5)/float64(dw)*span)
			ymax = math.Max(ymax, under[x])
		}
	}
	// base is the predicted run's baseline (dot row); with a measured run
	// the lower part of the plot holds it, upside down
	base := dh - 1
	if in.meas != nil {
		base = (ph*11/20)*4 - 1
	}
	row := func(y float64) int {
		if ymax <= 0 {
			return base
		}
		return base - int(math.Round(y/ymax*float64(base-1)))
	}
	// the run beneath: every other dot column, so that it reads as dotted
	// without colour too
	for x := 0; x < len(under); x += 2 {
		c.cv.Set(x, row(under[x]), layerUnder)
	}
	prev := row(c.ys[0])
	for x := 0; x < dw; x++ {
		r := row(c.ys[x])
		c.cv.VLine(x, prev, r, layerPeak)
		prev = r
	}
	// oven temperature
	tlo, thi := in.prog.Initial, in.prog.MaxTemp()
	pad := math.Max(5, (thi-tlo)*0.08)
	tlo, thi = tlo-pad, thi+pad
	trow := func(temp float64) int {
		return base - int(math.Round((temp-tlo)/(thi-tlo)*float64(base)))
	}
	px, py := -1, 0
	for x := 0; x < dw; x++ {
		t := t0 + (float64(x)+0.5)/float64(dw)*span
		y := trow(in.prog.TempAt(t))
		if px >= 0 {
			c.cv.Line(px, py, x, y, layerTemp)
		}
		px, py = x, y
	}
	if in.meas != nil {
		c.measured(in, base, dw, dh, t0, span, ymax)
	}
	// labels: elution-order numbers above the apexes
	crit := map[int]bool{}
	if in.res.Critical >= 0 {
		cp := in.res.Pairs[in.res.Critical]
		crit[cp.First], crit[cp.Second] = true, true
	}
	// the critical pair's labels first, so that crowding never hides them
	for pass := 0; pass < 2; pass++ {
		for i, pk := range in.res.Peaks {
			if !pk.Eluted || pk.RetentionTime < t0 || pk.RetentionTime > t1 || crit[pk.Compound] != (pass == 0) {
				continue
			}
			col := int((pk.RetentionTime - t0) / span * float64(pw))
			text := strconv.Itoa(i + 1)
			col -= (len(text) - 1) / 2
			if col < 0 || col+len(text) > pw {
				continue
			}
			apex := in.comps[pk.Compound].AreaOrOne() / pk.Sigma
			r := row(apex)/4 - 1
			if r < 0 {
				r = 0
			}
			// move up past labels already placed; give up at the top
			for r >= 0 && !c.free(r, col-1, col+len(text)+1, pw) {
				r--
			}
			if r < 0 {
				continue
			}
			c.cv.Text(col, r, text)
			kind := int8(1)
			if crit[pk.Compound] {
				kind = 2
			}
			for k := 0; k < len(text); k++ {
				c.label[r*pw+col+k] = kind
			}
		}
	}
	lines := make([]string, 0, h)
	baseRow := base / 4
	for r := 0; r < ph; r++ {
		var b strings.Builder
		c.row(&b, r, pw, st)
		// temperature axis
		var lab string
		switch r {
		case 0:
			lab = fmt.Sprintf(" %3.0f°C", thi-model.ZeroCelsius)
		case baseRow:
			lab = fmt.Sprintf(" %3.0f°C", tlo-model.ZeroCelsius)
		case (baseRow + 1) / 2:
			lab = fmt.Sprintf(" %3.0f°C", (thi+tlo)/2-model.ZeroCelsius)
		case baseRow + 2:
			if in.meas != nil {
				lab = " meas."
			}
		}
		b.WriteString(st.Temp.Render(padRight(lab, tempAxisW)))
		lines = append(lines, b.String())
	}
	lines = append(lines, st.Axis.Render(padRight(timeAxis(t0, t1, pw), w)))
	return lines
}

// measured draws the measured run upside down below the predicted one
// (baseline at dot row base), scaled as the figure scales it
// (report.Measured.Scale), and joins each matched peak's predicted time on
// the predicted baseline to its measured time on the measured one.
func (c *chart) measured(in chartInput, base, dw, dh int, t0, span, ymax float64) {
	top := base + 8 // a text row apart, for the joins
	if top >= dh-1 {
		top = base + 1 // a short chart (a dialog took its rows): right below
	}
	if top >= dh-1 {
		return
	}
	// on the prediction's scale: its trace at 1 for the tallest point shown
	scale := in.meas.Scale((t0+span)/60, func(tmin float64) float64 {
		if !(ymax > 0) {
			return 0
		}
		return signalAt(in, tmin*60) / ymax
	})
	mrow := func(v float64) int { return top + int(math.Round(v/1.2*float64(dh-1-top))) }
	prev := -1
	// a peak narrower than a dot column still shows its apex
	if cap(c.ms) < dw {
		c.ms = make([]float64, dw)
	}
	apex := c.ms[:dw]
	for i := range apex {
		apex[i] = math.NaN()
	}
	for _, p := range in.meas.Peaks {
		x := int((p.TimeMin*60 - t0) / span * float64(dw))
		if x >= 0 && x < dw {
			if y := in.meas.Signal(p.TimeMin); !(y <= apex[x]) {
				apex[x] = y
			}
		}
	}
	for x := 0; x < dw; x++ {
		y := in.meas.Signal((t0 + (float64(x)+0.5)/float64(dw)*span) / 60)
		if !math.IsNaN(apex[x]) && !(y >= apex[x]) {
			y = apex[x]
		}
		if math.IsNaN(y) {
			prev = -1
			continue
		}
		r := mrow(scale(y))
		if prev < 0 {
			prev = r
		}
		c.cv.VLine(x, prev, r, layerMeas)
		prev = r
	}
	xOf := func(tmin float64) int { return int(math.Round((tmin*60 - t0) / span * float64(dw-1))) }
	for _, j := range in.meas.Matches {
		xp, xm := xOf(j.PredictedMin), xOf(j.MeasuredMin)
		if (xp < 0 && xm < 0) || (xp >= dw && xm >= dw) {
			continue
		}
		c.cv.Line(xp, base+1, xm, top-1, layerJoin)
	}
}

// free reports whether cells a..b-1 of row r hold no label yet.
func (c *chart) free(r, a, b, pw int) bool {
	for k := a; k < b; k++ {
		if k >= 0 && k < pw && c.label[r*pw+k] != 0 {
			return false
		}
	}
	return true
}

// signalAt is the detector signal at time t (model.Result.Signal, the
// figure's too).
func signalAt(in chartInput, t float64) float64 { return in.res.Signal(in.comps, t) }

// row renders one canvas row, one style per run of like cells.
func (c *chart) row(b *strings.Builder, r, pw int, st *Styles) {
	var run strings.Builder
	cur := -1
	flush := func() {
		if run.Len() == 0 {
			return
		}
		s := run.String()
		switch cur {
		case 1:
			b.WriteString(st.Peak.Render(s))
		case 2:
			b.WriteString(st.Temp.Render(s))
		case 3:
			b.WriteString(st.PeakLabel.Render(s))
		case 4:
			b.WriteString(st.Critical.Render(s))
		case 5, 7:
			b.WriteString(st.Dim.Render(s))
		case 6:
			b.WriteString(st.Label.Render(s))
		default:
			b.WriteString(s)
		}
		run.Reset()
	}
	for col := 0; col < pw; col++ {
		cell := c.cv.At(col, r)
		kind := 0
		switch {
		case cell.Text && c.label[r*pw+col] == 2:
			kind = 4
		case cell.Text:
			kind = 3
		case cell.Layers&(1<<layerPeak) != 0:
			kind = 1
		case cell.Layers&(1<<layerTemp) != 0:
			kind = 2
		case cell.Layers&(1<<layerUnder) != 0:
			kind = 5
		case cell.Layers&(1<<layerMeas) != 0:
			kind = 6
		case cell.Layers&(1<<layerJoin) != 0:
			kind = 7
		}
		if kind != cur {
			flush()
			cur = kind
		}
		run.WriteRune(cell.Rune)
	}
	flush()
}

// timeAxis is a row of minute ticks for [t0, t1] s over w columns.
func timeAxis(t0, t1 float64, w int) string {
	span := (t1 - t0) / 60
	step := niceStep(span / math.Max(1, float64(w)/10))
	line := []rune(strings.Repeat("─", w))
	first := math.Ceil(t0/60/step) * step
	for v := first; v <= t1/60+1e-9; v += step {
		col := int(math.Round((v*60 - t0) / (t1 - t0) * float64(w-1)))
		txt := strconv.FormatFloat(v, 'f', decimalsFor(step), 64)
		if col+len(txt) >= w-4 {
			break
		}
		line[col] = '┴'
		for k, r := range txt {
			if col+1+k < w {
				line[col+1+k] = r
			}
		}
	}
	tail := []rune(" min")
	copy(line[w-len(tail):], tail)
	return string(line)
}

func niceStep(x float64) float64 {
	if x <= 0 {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= x {
			return m * p
		}
	}
	return 10 * p
}

func decimalsFor(step float64) int {
	if step >= 1 {
		return 0
	}
	return int(math.Ceil(-math.Log10(step)))
}

func padRight(s string, w int) string {
	if n := lipgloss.Width(s); n < w {
		return s + strings.Repeat(" ", w-n)
	}
	return s
}
