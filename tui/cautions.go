package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/checks"
)

// cautions are the current method's cautions, the same list simulate
// prints (checks.Cautions), computed once per method (methods are
// replaced, never changed in place).
func (a *App) cautions() []string {
	if a.sh.method != a.cautionsOf || a.sh.sys == nil {
		a.cautionsOf = a.sh.method
		a.sh.cautions = nil
		if a.sh.sys != nil {
			for _, c := range checks.Cautions(a.sh.method, a.sh.sys, &a.res) {
				a.sh.cautions = append(a.sh.cautions, inert(c))
			}
		}
	}
	return a.sh.cautions
}

// cautionsDialog lists every current caution and the whole status
// message, scrollable: nothing the status line or a pane had to shorten
// is out of reach.
type cautionsDialog struct {
	sh    *shared
	keys  ListKeys
	top   int
	w, h  int
	body  []string
	lines []string
}

func newCautionsDialog(sh *shared) *cautionsDialog {
	k := scrollKeys(ListKeys{Reject: bind([]string{"esc", "!", "q"}, "esc/!", "close")})
	return &cautionsDialog{sh: sh, keys: k}
}

func (d *cautionsDialog) tall() bool                { return true }
func (d *cautionsDialog) ShortHelp() []key.Binding  { return d.keys.ShortHelp() }
func (d *cautionsDialog) FullHelp() [][]key.Binding { return d.keys.FullHelp() }
func (d *cautionsDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *cautionsDialog) SetSize(w, h int)          { d.w, d.h = w, h; d.build(); d.render() }

func (d *cautionsDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case refreshMsg:
		d.build()
	case tea.KeyMsg:
		page := max(1, d.h-2)
		switch {
		case key.Matches(msg, d.keys.Reject):
			d.sh.send(closeMsg{})
		case key.Matches(msg, d.keys.Up):
			d.top--
		case key.Matches(msg, d.keys.Down):
			d.top++
		case key.Matches(msg, d.keys.PageUp):
			d.top -= page
		case key.Matches(msg, d.keys.PageDown):
			d.top += page
		}
	}
	d.render()
	return d, nil
}

// build wraps the cautions and the status message to the width.
func (d *cautionsDialog) build() {
	st := d.sh.st
	var body []string
	if len(d.sh.cautions) == 0 {
		body = append(body, st.Good.Render(" no cautions for this method and program"))
	}
	for _, c := range d.sh.cautions {
		for i, l := range wrap("   "+c, d.w-2) {
			if i == 0 {
				l = " ⚠" + strings.TrimPrefix(l, "  ")
			} else {
				l = "  " + l
			}
			body = append(body, st.Warn.Render(l))
		}
	}
	if d.sh.status != "" {
		body = append(body, "", st.TableHead.Render(" last message"))
		for _, l := range wrap(" "+d.sh.status, d.w) {
			body = append(body, st.Info.Render(l))
		}
	}
	d.body = body
}

func (d *cautionsDialog) render() {
	rows := max(1, d.h-1)
	d.top = max(0, min(d.top, len(d.body)-rows))
	extra := fmt.Sprintf("  %d · esc closes", len(d.sh.cautions))
	if len(d.body) > rows {
		extra = fmt.Sprintf("  %d · lines %d–%d of %d · ↑/↓ pgdn/pgup scroll · esc closes", len(d.sh.cautions), d.top+1, min(d.top+rows, len(d.body)), len(d.body))
	}
	lines := []string{dialogTitle(d.sh.st, "cautions", extra, d.w)}
	lines = append(lines, d.body[d.top:min(len(d.body), d.top+rows)]...)
	d.lines = fill(lines, d.h)
}
