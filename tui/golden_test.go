package tui

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"
)

// screens are the states every golden test draws: each pane focused and
// each dialog open, reached with the keys a user would press.
var screens = []struct {
	name  string
	setup func(t *testing.T, a *App)
}{
	{"program", func(t *testing.T, a *App) {}},
	{"program-two-ramps", func(t *testing.T, a *App) { press(a, "a") }},
	{"chart", func(t *testing.T, a *App) { press(a, "tab", "+") }},
	{"peaks", func(t *testing.T, a *App) { press(a, "tab", "tab", "down", "right") }},
	{"settings", func(t *testing.T, a *App) { press(a, "shift+tab", "down") }},
	{"help", func(t *testing.T, a *App) { press(a, "?") }},
	{"help-page2", func(t *testing.T, a *App) { press(a, "?", "pgdown") }},
	{"prompt", func(t *testing.T, a *App) { press(a, "right", "right", "enter") }},
	{"save-as-long-path", func(t *testing.T, a *App) {
		press(a, "W", "ctrl+u", "/"+strings.Repeat("long-folder-name/", 11)+"method.toml")
	}},
	{"confirm-quit", func(t *testing.T, a *App) { press(a, "-", "q") }},
	{"progress", func(t *testing.T, a *App) {
		a.open(newProgressDialog(&a.sh, "optimizing"))
		a.toOverlay(progressTextMsg{text: "1200 evaluations · best 9.80 min · Rs 1.52 · 0.4 s"})
		a.refresh()
	}},
	{"optimizer-result", func(t *testing.T, a *App) {
		a.optSettings.Workers = 1
		press(a, "o")
		d, ok := a.overlay.(*resultDialog)
		if !ok {
			t.Fatalf("no result: %s", a.message)
		}
		d.res.Elapsed = 0 // the one value that differs per run
		a.refresh()
	}},
	{"optimizer-result-old-run", func(t *testing.T, a *App) {
		a.optSettings.Workers = 1
		press(a, "o", "v")
		a.overlay.(*resultDialog).res.Elapsed = 0
		a.refresh()
	}},
	{"fit-review", func(t *testing.T, a *App) {
		runs, _ := filepath.Abs("../testdata/scouting.toml")
		press(a, "F", runs, "enter")
		a.message = "fitted from scouting.toml" // the absolute path differs per machine
		a.refresh()
	}},
	{"column-ranking", func(t *testing.T, a *App) {
		a.optSettings.Starts, a.optSettings.Workers = 4, 1
		press(a, "C", "ctrl+u", "20,30 0.18,0.25", "enter")
		d, ok := a.overlay.(*rankingDialog)
		if !ok {
			t.Fatalf("no ranking: %s", a.message)
		}
		for i := range d.out {
			if d.out[i].Result != nil {
				d.out[i].Result.Elapsed = 0
			}
		}
		a.refresh()
	}},
	{"settings-packed", func(t *testing.T, a *App) {
		press(a, "shift+tab", "+") // the kind: packed
		pickSetting(t, a, "column.particle_um")
		a.message = "column.kind = packed"
	}},
	{"settings-porous-layer-coolant", func(t *testing.T, a *App) {
		press(a, "shift+tab", "+", "+") // porous-layer
		pickSetting(t, a, "limits.coolant_c")
		press(a, "-", "esc") // a coolant (its cautions open), then a start below ambient
		a.setFocus(paneProgram)
		a.program.list.sel = 0
		press(a, "enter", "ctrl+u", "-40", "enter")
		pickSetting(t, a, "limits.coolant_c")
	}},
	{"coolant-added-cautions", func(t *testing.T, a *App) {
		pickSetting(t, a, "limits.coolant_c")
		press(a, "-")
	}},
	{"plan", func(t *testing.T, a *App) {
		a.optSettings.Starts, a.optSettings.Workers = 4, 1
		press(a, "P")
		if _, ok := a.overlay.(*planDialog); !ok {
			t.Fatalf("no plan: %s", a.message)
		}
	}},
	{"verification-run", func(t *testing.T, a *App) {
		run, _ := filepath.Abs("../testdata/lab/verify.csv")
		press(a, "V", run, "enter")
		if _, ok := a.overlay.(*verifyDialog); !ok {
			t.Fatalf("no verification dialog: %s", a.message)
		}
	}},
	{"all-cautions", func(t *testing.T, a *App) {
		pickSetting(t, a, "carrier.gas")
		press(a, "+", "!")
	}},
	{"settings-hydrogen", func(t *testing.T, a *App) {
		pickSetting(t, a, "carrier.gas")
		press(a, "+")
	}},
	{"window-diagram", func(t *testing.T, a *App) { press(a, "right", "right", "s") }},
	{"window-diagram-flow", func(t *testing.T, a *App) { press(a, "shift+tab", "s") }},
}

// Every pane and dialog at 80×24 and 120×40, drawn without colour (as
// NO_COLOR asks): lines fit the width and end uncut, the screen has
// exactly the height.
func TestGoldenScreens(t *testing.T) {
	for _, sc := range screens {
		for _, size := range [][2]int{{80, 24}, {120, 40}} {
			t.Run(fmt.Sprintf("%s/%dx%d", sc.name, size[0], size[1]), func(t *testing.T) {
				a, _ := newApp(t, size[0], size[1])
				a.name = "demo.toml" // the temporary path differs per run
				sc.setup(t, a)
				a.refresh()
				out := screen(a)
				for i, line := range strings.Split(out, "\n") {
					if w := ansi.StringWidth(line); w > size[0] {
						t.Errorf("line %d is %d wide", i, w)
					}
				}
				if n := strings.Count(out, "\n") + 1; n != size[1] {
					t.Errorf("%d lines, want %d", n, size[1])
				}
				noCut(t, sc.name, out) // nothing ends cut with "…"
				golden.RequireEqual(t, []byte(out))
			})
		}
	}
}
