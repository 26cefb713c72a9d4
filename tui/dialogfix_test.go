package tui

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// settingRowsShown counts the settings whose row is on the screen.
func settingRowsShown(a *App, s string) int {
	n := 0
	for _, f := range settingsFields(a.Method()) {
		if regexp.MustCompile(`(?m)^[ ›] ` + regexp.QuoteMeta(f.label) + `\s.*\s` + regexp.QuoteMeta(f.key) + `\s*$`).MatchString(s) {
			n++
		}
	}
	return n
}

// With hydrogen the settings show the selected setting and a few around
// it beside the whole hydrogen caution (or, with no room, a whole shorter
// sentence pointing to !), at 80×24 too and with a coolant's note above
// it; moving through every setting never hides the selection.
func TestHydrogenSettingsKeepRows(t *testing.T) {
	for _, c := range []struct {
		file string
		w, h int
	}{{"demo.toml", 80, 24}, {"demo-porous-layer.toml", 80, 24}, {"demo.toml", 120, 40}, {"demo-porous-layer.toml", 120, 40}} {
		name := fmt.Sprintf("%s %dx%d", c.file, c.w, c.h)
		a := newAppFrom(t, c.file, c.w, c.h)
		pickSetting(t, a, "carrier.gas")
		press(a, "+")
		if a.Method().Carrier.Gas != model.Hydrogen {
			t.Fatalf("%s: gas %s", name, a.Method().Carrier.Gas)
		}
		fs := settingsFields(a.Method())
		for i := 0; i < len(fs); i++ {
			press(a, "up")
		}
		for i := 0; i < len(fs); i++ {
			s := screen(a)
			sel := fs[a.settings.list.sel]
			if !regexp.MustCompile(`(?m)^› ` + regexp.QuoteMeta(sel.label) + `\s`).MatchString(s) {
				t.Fatalf("%s: the selected setting %s is not shown:\n%s", name, sel.key, s)
			}
			if n := settingRowsShown(a, s); n < minSettingRows {
				t.Fatalf("%s: %d setting rows beside the selection %s:\n%s", name, n, sel.key, s)
			}
			if u := unwrap(s); !strings.Contains(u, model.HydrogenCaution) && !strings.Contains(u, hydrogenShort) {
				t.Fatalf("%s: the hydrogen caution is not whole:\n%s", name, s)
			}
			noCut(t, name, s)
			if n := strings.Count(s, "\n") + 1; n != c.h {
				t.Fatalf("%s: %d lines", name, n)
			}
			press(a, "down")
		}
		// the demo at 80×24 has the room for the caution in full
		if c.file == "demo.toml" && !strings.Contains(unwrap(screen(a)), model.HydrogenCaution) {
			t.Errorf("%s: the hydrogen caution is not shown in full:\n%s", name, screen(a))
		}
	}
}

// At 80×24 the fit review, the verification run and the plan list at
// least 8 rows at once (the chart gives its rows), and have them back
// when the dialog closes.
func TestDialogsHaveRowsAt80x24(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	chartRowsNow := func() int { return len(strings.Split(a.chart.View(), "\n")) }
	before := chartRowsNow()
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	press(a, "F", runs, "enter")
	d, ok := a.overlay.(*fitDialog)
	if !ok {
		t.Fatalf("no fit review: %s", a.message)
	}
	if d.rows() < 8 {
		t.Errorf("the fit review lists %d rows at 80×24:\n%s", d.rows(), screen(a))
	}
	shown := 0
	for _, c := range d.order {
		if strings.Contains(screen(a), " "+c.Name+" ") {
			shown++
		}
	}
	if shown < 8 {
		t.Errorf("the fit review shows %d compounds:\n%s", shown, screen(a))
	}
	press(a, "n")
	if got := chartRowsNow(); got != before {
		t.Errorf("chart rows %d after the fit review, want %d", got, before)
	}

	run, _ := filepath.Abs("../testdata/lab/verify.csv")
	press(a, "V", run, "enter")
	v, ok := a.overlay.(*verifyDialog)
	if !ok {
		t.Fatalf("no verification: %s", a.message)
	}
	if n := len(regexp.MustCompile(`(?m)^ +\d+ \S`).FindAllString(screen(a), -1)); n < 8 || v.rows() < 8 {
		t.Errorf("the verification lists %d compounds (%d rows) at 80×24:\n%s", n, v.rows(), screen(a))
	}
	press(a, "esc")
	if got := chartRowsNow(); got != before {
		t.Errorf("chart rows %d after the verification, want %d", got, before)
	}

	a.optSettings.Starts, a.optSettings.Workers = 4, 1
	press(a, "P")
	p, ok := a.overlay.(*planDialog)
	if !ok {
		t.Fatalf("no plan: %s", a.message)
	}
	if p.rows() < 8 {
		t.Errorf("the plan shows %d lines at 80×24:\n%s", p.rows(), screen(a))
	}
	press(a, "esc")
	if got := chartRowsNow(); got != before {
		t.Errorf("chart rows %d after the plan, want %d", got, before)
	}
}

// scrollUncut scrolls the open dialog to its end one row at a time and
// checks that no line of any screen on the way is cut with "…".
func scrollUncut(t *testing.T, a *App, what string) []string {
	t.Helper()
	var screens []string
	for i := 0; i < 80; i++ {
		s := screen(a)
		noCut(t, what, s)
		screens = append(screens, s)
		press(a, "down")
		if screen(a) == s {
			break
		}
	}
	return screens
}

// The dialogs at 80×24 and 120×40, scrolled through: no line ends cut
// with "…"; the fit's warnings stand whole (they wrap), and the plan's
// title, made from a runs file, leaves the path out rather than cut it.
func TestDialogsUncutBothSizes(t *testing.T) {
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	for _, size := range [][2]int{{80, 24}, {120, 40}} {
		tag := fmt.Sprintf("%dx%d", size[0], size[1])
		a, _ := newApp(t, size[0], size[1])
		press(a, "F", runs, "enter")
		d, ok := a.overlay.(*fitDialog)
		if !ok {
			t.Fatalf("no fit review: %s", a.message)
		}
		screens := scrollUncut(t, a, tag+" fit review")
		for _, w := range d.fit.rep.Warnings {
			whole := false
			for _, s := range screens {
				if strings.Contains(unwrap(s), strings.Join(strings.Fields(inert(w)), " ")) {
					whole = true
				}
			}
			if !whole {
				t.Errorf("%s: fit warning not shown whole: %s", tag, w)
			}
		}
		press(a, "y")

		a.optSettings.Starts, a.optSettings.Workers = 4, 1
		press(a, "P")
		if _, ok := a.overlay.(*planDialog); !ok {
			t.Fatalf("no plan: %s", a.message)
		}
		if !strings.Contains(screen(a), "from 3 runs") {
			t.Errorf("%s: the plan's title does not say its runs:\n%s", tag, screen(a))
		}
		scrollUncut(t, a, tag+" plan")
		press(a, "esc")

		for _, f := range []string{"verify.csv", "scout-5.csv"} {
			run, _ := filepath.Abs("../testdata/lab/" + f)
			press(a, "V", run, "enter")
			if _, ok := a.overlay.(*verifyDialog); !ok {
				t.Fatalf("no verification: %s", a.message)
			}
			scrollUncut(t, a, tag+" verification "+f)
			press(a, "esc")
		}
	}
}

// The plan's counter says how many lines lie above and below the view,
// true at the top, after scrolling and at the end.
func TestPlanCounterTrue(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	a.optSettings.Starts, a.optSettings.Workers = 4, 1
	press(a, "P")
	d, ok := a.overlay.(*planDialog)
	if !ok {
		t.Fatalf("no plan: %s", a.message)
	}
	n, rows := len(d.body()), d.rows()
	if n <= rows {
		t.Fatalf("the plan fits (%d lines in %d rows): nothing to count", n, rows)
	}
	check := func(when string) {
		t.Helper()
		tl := d.lines[0]
		above, below := d.off, n-d.off-rows
		for _, c := range []struct {
			n    int
			text string
		}{{above, "↑ %d above"}, {below, "↓ %d below"}} {
			want := fmt.Sprintf(c.text, c.n)
			if c.n > 0 && !strings.Contains(tl, want) {
				t.Errorf("%s: title %q lacks %q", when, tl, want)
			}
			if c.n == 0 && strings.Contains(tl, strings.Fields(c.text)[0]) {
				t.Errorf("%s: title %q counts lines that are not there", when, tl)
			}
		}
	}
	check("at the top")
	press(a, "down", "down", "down")
	check("after three lines")
	for i := 0; i < 20; i++ {
		press(a, "pgdown")
	}
	if d.off != n-rows {
		t.Fatalf("not at the end: off %d of %d", d.off, n-rows)
	}
	check("at the end")
}

// The fit review shows each standard error as the fit saves it: the text
// shown parses to the value in the saved file, for every compound.
func TestFitReviewShowsSavedErrors(t *testing.T) {
	a, path := newApp(t, 120, 40)
	runs, _ := filepath.Abs("../testdata/scouting.toml")
	press(a, "F", runs, "enter")
	d, ok := a.overlay.(*fitDialog)
	if !ok {
		t.Fatalf("no fit review: %s", a.message)
	}
	shown := map[string][2]string{}
	pm := regexp.MustCompile(`±(\S+)`)
	for _, l := range d.body() {
		for _, c := range d.order {
			if strings.HasPrefix(l, fmt.Sprintf(" %-20s ", c.Name)) {
				if m := pm.FindAllStringSubmatch(l, -1); len(m) == 2 {
					shown[c.Name] = [2]string{m[0][1], m[1][1]}
				}
			}
		}
	}
	press(a, "y")
	if err := methodfile.WriteFile(path, a.Method()); err != nil {
		t.Fatal(err)
	}
	saved, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, c := range saved.Compounds {
		s, ok := shown[c.Name]
		if !ok || !c.HasSE {
			continue
		}
		for i, v := range []float64{c.DHSE, c.DSSE} {
			got, err := strconv.ParseFloat(s[i], 64)
			if err != nil || got != v {
				t.Errorf("%s: the review shows ±%s, the file holds %v", c.Name, s[i], v)
			}
		}
		checked++
	}
	if checked < 10 {
		t.Errorf("only %d compounds checked", checked)
	}
}

// The verification says which pair fails the target, and says that a run
// whose times are far from the prediction is maybe of another program.
func TestVerificationSaysWhatFails(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	run, _ := filepath.Abs("../testdata/lab/verify.csv")
	press(a, "V", run, "enter")
	s := unwrap(screen(a))
	if !strings.Contains(s, "NOT met as measured: beta-pinene / myrcene at Rs 1.12 < 1.50") {
		t.Errorf("the failing pair is not named:\n%s", screen(a))
	}
	if strings.Contains(s, "is this run of this program?") {
		t.Errorf("a run of this program called another's:\n%s", screen(a))
	}
	press(a, "esc")
	run, _ = filepath.Abs("../testdata/lab/scout-5.csv") // another program's run
	press(a, "V", run, "enter")
	s = unwrap(screen(a))
	if !regexp.MustCompile(`measured times differ from the prediction by up to \d+\.\d min .*is this run of this program\?`).MatchString(s) {
		t.Errorf("no hint that the run is of another program:\n%s", screen(a))
	}
	if !strings.Contains(s, "targets not found") {
		t.Errorf("what fails (targets not found) is not said:\n%s", screen(a))
	}
}

// The key list says that q asks about unsaved changes, as it does.
func TestHelpSaysQuitAsks(t *testing.T) {
	a, _ := newApp(t, 80, 24)
	press(a, "?")
	if !regexp.MustCompile(`(?m)\bq +quit \(asks when unsaved\)`).MatchString(screen(a)) {
		t.Errorf("the key list does not say q asks:\n%s", screen(a))
	}
	press(a, "esc", "-", "q")
	if a.overlay == nil || a.overlay != a.quitQ {
		t.Errorf("q with unsaved changes did not ask")
	}
}

// e exports the method on screen; when it is unsaved the message says so.
func TestExportSaysUnsaved(t *testing.T) {
	a, path := newApp(t, 80, 24)
	press(a, "e")
	if strings.Contains(a.message, "UNSAVED") || !strings.Contains(a.message, "exported") {
		t.Errorf("saved method: %q", a.message)
	}
	press(a, "-")
	press(a, "e")
	if _, ok := a.overlay.(*confirmDialog); ok {
		press(a, "y")
	}
	if !strings.Contains(a.message, "exported") || !strings.Contains(a.message, "UNSAVED") {
		t.Errorf("the export of an unsaved method does not say so: %q", a.message)
	}
	if _, err := os.Stat(strings.TrimSuffix(path, ".toml") + ".md"); err != nil {
		t.Error(err)
	}
}
