package tui

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/optimizer"
)

// V reads a verification run (a peak table here), draws it below the
// predicted chromatogram with the matched peaks joined, and lists every
// compound's Δt and whether the measured run meets the target, as check
// judges it; esc takes it off the chart.
func TestVerificationRun(t *testing.T) {
	a, _ := newApp(t, 120, 40)
	plain := a.chart.View()
	run, _ := filepath.Abs("../testdata/lab/verify.csv")
	press(a, "V", run, "enter")
	d, ok := a.overlay.(*verifyDialog)
	if !ok {
		t.Fatalf("no verification dialog: %T %s", a.overlay, a.message)
	}
	ck := d.v.ck
	if len(ck.Compounds) != len(a.Method().Compounds) {
		t.Errorf("%d compounds judged, the method has %d", len(ck.Compounds), len(a.Method().Compounds))
	}
	s := screen(a)
	verdict := "target met as measured"
	if !ck.Met {
		verdict = "target NOT met as measured"
	}
	if !strings.Contains(s, verdict) || !strings.Contains(s, "Δt min") {
		t.Errorf("no verdict %q or Δt column:\n%s", verdict, s)
	}
	matched := 0
	for _, c := range ck.Compounds {
		if !math.IsNaN(c.DeltaMin) {
			matched++
			if want := strings.TrimSpace(num3(c.MeasuredMin)); !strings.Contains(strings.Join(d.body(), "\n"), want) {
				t.Errorf("measured %s of %s not shown", want, c.Name)
			}
		}
	}
	if matched == 0 || len(a.chart.meas.Matches) != matched {
		t.Fatalf("%d matched, %d joins", matched, len(a.chart.meas.Matches))
	}
	chart := a.chart.View()
	if chart == plain || !strings.Contains(chart, "below: measured verify.csv") {
		t.Errorf("the chart does not draw the measured run:\n%s", chart)
	}
	// joins: layerJoin cells between the two baselines
	joins := 0
	w, h := a.chart.c.cv.Size()
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			if a.chart.c.cv.At(c, r).Layers&(1<<layerJoin) != 0 {
				joins++
			}
		}
	}
	if joins < matched/2 {
		t.Errorf("%d join cells for %d matched peaks", joins, matched)
	}
	press(a, "pgdown")
	if d.off == 0 && len(d.body()) > d.rows() {
		t.Error("the list does not scroll")
	}
	t.Log(screen(a))
	press(a, "q")
	if a.overlay != nil || a.chart.meas != nil {
		t.Errorf("q left %T and the measured run on the chart", a.overlay)
	}
}

// A file that is not a peak table is refused with its name, nothing opens.
func TestVerificationRunBadFile(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	bad, _ := filepath.Abs("../testdata/demo.toml") // a method, not a runs file
	press(a, "V", bad, "enter")
	if _, ok := a.overlay.(*verifyDialog); ok || !strings.Contains(a.message, "demo.toml") {
		t.Errorf("a method file taken as a verification run: %T %q", a.overlay, a.message)
	}
}

// Names from the method and the run file reach the verification and plan
// dialogs inert (no raw control character on the screen).
func TestVerifyAndPlanTextInert(t *testing.T) {
	m := demoMethod(t)
	m.Compounds[0].Name = "x\x1b[2Jy"
	a, err := New(m, Options{NoColor: true, Optimizer: optimizer.Settings{Workers: 1, Starts: 2, Evaluations: 300}})
	if err != nil {
		t.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	csv := filepath.Join(t.TempDir(), "evil.csv")
	data, _ := os.ReadFile("../testdata/lab/verify.csv")
	data = []byte(strings.Replace(string(data), "Total", "20,1100.0,500.0,400.0,0.9,evil\x1b]0;owned\x07name\r\nTotal", 1))
	if err := os.WriteFile(csv, data, 0o600); err != nil {
		t.Fatal(err)
	}
	press(a, "V", csv, "enter")
	vd, ok := a.overlay.(*verifyDialog)
	if !ok {
		t.Fatalf("no verification: %s", a.message)
	}
	if b := strings.Join(vd.body(), "\n"); !strings.Contains(b, "evil") || !strings.Contains(b, "x\\x1b[2Jy") {
		t.Errorf("the file's names are not shown (escaped):\n%s", b)
	}
	for i := 0; i < 6; i++ {
		if v := a.View(); strings.ContainsRune(v, 0x1b) || strings.ContainsRune(v, 0x07) {
			t.Fatalf("a raw control character reached the screen: %q", v)
		}
		press(a, "pgdown")
	}
	press(a, "esc", "P")
	if _, ok := a.overlay.(*planDialog); !ok {
		t.Fatalf("no plan: %s", a.message)
	}
	for i := 0; i < 8; i++ {
		if v := a.View(); strings.ContainsRune(v, 0x1b) || strings.ContainsRune(v, 0x07) {
			t.Fatalf("a raw control character reached the plan: %q", v)
		}
		press(a, "pgdown")
	}
}

// A runs file's last run is checked against the prediction of its own
// program (shown in the chart), and a chromatogram file draws its trace.
func TestVerificationRunsFileAndTrace(t *testing.T) {
	a, _ := newApp(t, 120, 40)
	runs, _ := filepath.Abs("../testdata/lab/runs.toml")
	press(a, "V", runs, "enter")
	d, ok := a.overlay.(*verifyDialog)
	if !ok {
		t.Fatalf("no verification dialog: %s", a.message)
	}
	if !d.v.same {
		if res, _ := a.chart.shown(); res != &d.v.pred || !strings.Contains(a.chart.View(), "predicted for the run's program") {
			t.Error("the chart does not show the prediction of the run's own program")
		}
	}
	press(a, "esc")
	cdf, _ := filepath.Abs("../testdata/lab/scout-8.cdf")
	press(a, "V", cdf, "enter")
	if _, ok := a.overlay.(*verifyDialog); !ok {
		t.Fatalf("no verification dialog for a chromatogram: %s", a.message)
	}
	if m := a.chart.meas; m == nil || len(m.TraceT) == 0 {
		t.Fatal("the chromatogram's trace is not on the chart")
	}
	cells := 0
	w, h := a.chart.c.cv.Size()
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			if a.chart.c.cv.At(c, r).Layers&(1<<layerMeas) != 0 {
				cells++
			}
		}
	}
	if cells < w/2 {
		t.Errorf("the trace covers %d cells of a %d-wide chart", cells, w)
	}
}
