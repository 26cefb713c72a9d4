package tui

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
	"github.com/rampwise/rampwise/model/methodfile"
)

// pickSetting focuses the settings and selects the setting with key k.
func pickSetting(t *testing.T, a *App, k string) {
	t.Helper()
	a.setFocus(paneSettings)
	for i, f := range settingsFields(a.Method()) {
		if f.key == k {
			a.settings.list.sel = i
			a.refresh()
			return
		}
	}
	t.Fatalf("no setting %s", k)
}

// The settings edit the column kind and its keys; a kind switch starts
// from that kind's typical column, keys of another kind are never saved,
// and values outside the kind's ranges are refused with the method
// file's own message.
func TestSettingsColumnKind(t *testing.T) {
	a, path := newApp(t, 80, 24)
	pickSetting(t, a, "column.kind")
	press(a, "+")
	m := a.Method()
	if m.Column.Kind != model.Packed || m.Column.DiameterMM != 2 || !m.Column.HasParticle || m.Carrier.FlowMLMin != 25 {
		t.Fatalf("packed switch: %+v flow %v (%s)", m.Column, m.Carrier.FlowMLMin, a.message)
	}
	if err := m.Validate(); err != nil {
		t.Fatal(err)
	}
	pickSetting(t, a, "column.particle_um")
	if s := screen(a); !strings.Contains(s, "particle diameter") || !strings.Contains(s, "packed 3.0 m × 2.00 mm, 165 µm particles") {
		t.Errorf("packed keys not shown:\n%s", s)
	}
	press(a, "enter", "ctrl+u", "500", "enter")
	if a.Method().Column.ParticleUM != 165 || !strings.Contains(a.message, "column.particle_um") {
		t.Errorf("particle 500 µm taken or not named: %v %q", a.Method().Column.ParticleUM, a.message)
	}
	pickSetting(t, a, "column.porosity")
	press(a, "+")
	if a.Method().Column.Porosity != 0.41 {
		t.Errorf("porosity step: %v", a.Method().Column.Porosity)
	}
	pickSetting(t, a, "column.kind")
	press(a, "+")
	m = a.Method()
	if m.Column.Kind != model.PorousLayer || m.Column.HasParticle || m.Column.HasPorosity || m.Column.FilmUM != 10 {
		t.Fatalf("porous-layer switch: %+v", m.Column)
	}
	pickSetting(t, a, "column.film_um")
	if s := screen(a); !strings.Contains(s, "layer thickness") || strings.Contains(s, "particle") {
		t.Errorf("porous-layer settings:\n%s", s)
	}
	press(a, "ctrl+s")
	back, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatalf("saved porous-layer method does not read back: %v", err)
	}
	if back.Column.Kind != model.PorousLayer || back.Column.FilmUM != 10 {
		t.Errorf("saved %+v", back.Column)
	}
	press(a, "u", "u")
	if a.Method().Column.Kind != model.Packed {
		t.Errorf("undo did not take the kind back: %v", a.Method().Column.Kind)
	}
}

// With limits.coolant_c the program may start below ambient; adding a
// coolant opens the cryogen cautions (the text model.CryogenCaution has),
// and the settings say that a coolant is needed.
func TestCoolantAndCryogenCautions(t *testing.T) {
	a := newAppFrom(t, "commented.toml", 80, 24) // oven_min_c defaulted: it follows
	pickSetting(t, a, "limits.coolant_c")
	if s := screen(a); !strings.Contains(s, "oven coolant temperature") || !strings.Contains(s, "none") {
		t.Fatalf("coolant not shown as none:\n%s", s)
	}
	press(a, "-")
	m := a.Method()
	if !m.Limits.HasCoolant || m.Limits.CoolantC != defaultCoolantC || m.Limits.OvenMinC != defaultCoolantC+10 {
		t.Fatalf("coolant: %+v (%s)", m.Limits, a.message)
	}
	if _, ok := a.overlay.(*cautionsDialog); !ok {
		t.Fatalf("adding a coolant did not show the cautions: %T", a.overlay)
	}
	s := strings.Join(strings.Fields(screen(a)), " ")
	for _, want := range []string{"cold burns", "asphyxiate", "closed or poorly ventilated room", "instrument maker's guidance", "local codes"} {
		if !strings.Contains(s, want) {
			t.Errorf("caution lacks %q:\n%s", want, screen(a))
		}
	}
	press(a, "esc")
	a.setFocus(paneProgram)
	a.program.list.sel = 0
	press(a, "enter", "ctrl+u", "-20", "enter")
	if a.Method().Oven.InitialC != -20 {
		t.Fatalf("start -20 °C refused with a coolant: %s", a.message)
	}
	if !strings.Contains(a.message, "a coolant is needed") {
		t.Errorf("status does not say a coolant is needed: %q", a.message)
	}
	pickSetting(t, a, "limits.coolant_c")
	if s := strings.Join(strings.Fields(screen(a)), " "); !strings.Contains(s, "cold burns") || !strings.Contains(s, "asphyxiate") || !strings.Contains(s, "! shows") {
		t.Errorf("settings do not point to the cryogen cautions:\n%s", screen(a))
	}
	press(a, "!")
	if _, ok := a.overlay.(*cautionsDialog); !ok {
		t.Fatalf("! did not open the cautions: %T", a.overlay)
	}
	if s := strings.Join(strings.Fields(screen(a)), " "); !strings.Contains(s, "asphyxiate") || !strings.Contains(s, "a coolant is needed") {
		t.Errorf("the cautions lack the coolant:\n%s", screen(a))
	}
	press(a, "q")
	if a.overlay != nil {
		t.Fatalf("q did not close the cautions: %T", a.overlay)
	}
	// removing the coolant under a sub-ambient start is refused by the rules
	press(a, "enter", "ctrl+u", "none", "enter")
	if !a.Method().Limits.HasCoolant || !strings.Contains(a.message, "kept the last valid value") {
		t.Errorf("coolant removed under a -20 °C start: %+v %q", a.Method().Limits, a.message)
	}
	_ = filepath.Join
}

// q in the optimizer result, the fit review and the column ranking closes
// the dialog and keeps the current method (never quits), and the dialog's
// key list says so.
func TestQClosesDecisionDialogs(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	fastOptimizer(a)
	a.optSettings.Starts = 4
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	before := a.Method()
	for _, open := range [][]string{{"o"}, {"F", runs, "enter"}, {"C", "ctrl+u", "20,30", "enter"}} {
		press(a, open...)
		d := a.overlay
		switch d.(type) {
		case *resultDialog, *fitDialog, *rankingDialog:
		default:
			t.Fatalf("%v opened %T (%s)", open[0], d, a.message)
		}
		listed := false
		for _, g := range d.FullHelp() {
			for _, b := range g {
				for _, k := range b.Keys() {
					if k == "q" {
						listed = strings.Contains(b.Help().Desc, "keep")
					}
				}
			}
		}
		if !listed {
			t.Errorf("%T: q is not listed as closing", d)
		}
		if press(a, "q") {
			t.Fatalf("q in %T quit", d)
		}
		if a.overlay != nil || a.Method() != before {
			t.Errorf("q in %T: overlay %T, method changed %v", d, a.overlay, a.Method() != before)
		}
	}
}

// While the optimizer's result waits, the current run is drawn dotted
// beneath the new one on the new time axis.
func TestOldRunFaintUnderResult(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	fastOptimizer(a)
	plain := a.chart.View()
	press(a, "o")
	if _, ok := a.overlay.(*resultDialog); !ok {
		t.Fatalf("no result: %s", a.message)
	}
	in := chartInput{res: a.chart.prev, prog: a.chart.prevProg, comps: a.sh.sys.Compounds}
	in.t0, in.t1 = a.chart.window()
	var c chart
	alone := strings.Join(c.render(in, 80, a.chart.h-1, a.sh.st), "\n")
	if got := a.chart.View(); !strings.Contains(got, "dotted: the current run") || strings.Contains(got, alone) || got == plain {
		t.Errorf("the chart does not draw the old run beneath:\n%s", got)
	}
	press(a, "n")
	if a.chart.faint || a.chart.prev != nil {
		t.Error("the faint run stays after the result closed")
	}
}

// With [goal.robust] the optimizer result shows, at 80×24 and without
// scrolling, the nominal Rs, the worst corner's Rs and which corner, and
// the lowest Rs − z·σ, for the current and the optimized program, the
// figures the optimizer reports; Rs ± σ is a row further down.
func TestResultShowsRobustFigures(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	if rb := a.Method().Goal.Robust; rb.OvenOffsetC == 0 || rb.RetentionSigma == 0 {
		t.Fatalf("the demo's [goal.robust] is off: %+v", rb)
	}
	fastOptimizer(a)
	press(a, "o")
	d, ok := a.overlay.(*resultDialog)
	if !ok {
		t.Fatalf("no result: %s", a.message)
	}
	r := d.res.Robust
	if !r.On || math.IsNaN(r.Worst) || r.Corner == "" || !d.nowRob.On {
		t.Fatalf("robust report missing: %+v now %+v", r, d.nowRob)
	}
	s := screen(a)
	target := a.Method().Goal.MinResolution
	for _, want := range []string{"nominal Rs", "worst corner", "Rs − 2σ",
		format.RsNumber(r.Worst, target), format.RsNumber(r.LowZ, target), format.RsNumber(d.nowRob.LowZ, target),
		"worst at " + r.Corner} {
		if !strings.Contains(s, want) {
			t.Errorf("80×24 result lacks %q:\n%s", want, s)
		}
	}
	for i := 0; i < 8 && !strings.Contains(screen(a), "Rs ± σ"); i++ {
		press(a, "down")
	}
	s = screen(a)
	for _, want := range []string{fmt.Sprintf("%.2f ± %.2f", r.Nominal, r.Sigma), fmt.Sprintf("%.2f ± %.2f", d.nowRob.Nominal, d.nowRob.Sigma)} {
		if !strings.Contains(s, want) {
			t.Errorf("80×24 result lacks %q after scrolling:\n%s", want, s)
		}
	}
}
