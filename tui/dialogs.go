package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/cursor"
	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textinput"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
)

// Every dialog sits in the root's one overlay slot: it takes every key
// (ctrl+c excepted) and draws over the lower pane (a tall one over the
// chart too). It closes itself by sending closeMsg, and says what it
// decided with the messages it sends after that.

// title is a dialog's first line.
func dialogTitle(st *Styles, name, extra string, w int) string {
	return fitTitle(st.Focused.Render("▸"+name), st.Dim, extra, w)
}

// fitTitle is head followed by the " · "-separated items of extra that fit
// in w, whole: an item that does not fit is left out (the keys are in the
// footer and ? anyway), never cut in the middle.
func fitTitle(head string, style lipgloss.Style, extra string, w int) string {
	if ansi.StringWidth(head)+ansi.StringWidth(extra) <= w {
		return head + style.Render(extra)
	}
	items := strings.Split(extra, " · ")
	out := ""
	for i, it := range items {
		next := out + it
		if i > 0 {
			next = out + " · " + it
		}
		if ansi.StringWidth(head)+ansi.StringWidth(next) > w {
			break
		}
		out = next
	}
	if ansi.StringWidth(head) > w {
		return ansi.Truncate(head, w, "…")
	}
	return head + style.Render(out)
}

// --- confirm: a question with a few answers ---

type choice struct {
	keys  []string
	label string
	msgs  []tea.Msg
}

type confirmDialog struct {
	sh          *shared
	title, text string
	choices     []choice
	bindings    []key.Binding
	w, h        int
	lines       []string
}

func newConfirm(sh *shared, title, text string, choices []choice) *confirmDialog {
	d := &confirmDialog{sh: sh, title: title, text: text, choices: choices}
	for _, c := range choices {
		d.bindings = append(d.bindings, bind(c.keys, c.keys[0], c.label))
	}
	return d
}

func (d *confirmDialog) ShortHelp() []key.Binding  { return d.bindings }
func (d *confirmDialog) FullHelp() [][]key.Binding { return [][]key.Binding{d.bindings} }
func (d *confirmDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *confirmDialog) SetSize(w, h int)          { d.w, d.h = w, h; d.render() }

func (d *confirmDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok {
		for i, b := range d.bindings {
			if key.Matches(km, b) {
				d.sh.send(closeMsg{})
				d.sh.send(d.choices[i].msgs...)
				return d, nil
			}
		}
	}
	return d, nil
}

func (d *confirmDialog) render() {
	st := d.sh.st
	lines := []string{dialogTitle(st, d.title, "", d.w)}
	for _, l := range wrap(" "+d.text, d.w) {
		lines = append(lines, st.Info.Render(l))
	}
	lines = append(lines, "")
	for _, c := range d.choices {
		lines = append(lines, ansi.Truncate(st.HelpKey.Render(fmt.Sprintf("   %-6s", strings.Join(c.keys, "/")))+st.Value.Render(c.label), d.w, "…"))
	}
	d.lines = fill(lines, d.h)
}

// --- prompt: one line of text ---

type promptDialog struct {
	sh   *shared
	note string // how to type the value, shown whole under the title
	ti   textinput.Model
	// the text it opened with is selected: the first key typed replaces
	// it (backspace clears it), an arrow key starts editing it
	selected bool
	done     func(text string) tea.Msg
	keys     struct{ Enter, Cancel key.Binding }
	w, h     int
	lines    []string
}

// maxPrompt is the longest text a prompt takes (a path can be long).
const maxPrompt = 4096

func newPrompt(sh *shared, prompt, value string, done func(text string) tea.Msg) *promptDialog {
	d := &promptDialog{sh: sh, done: done}
	d.ti = textinput.New()
	d.ti.CharLimit = maxPrompt
	d.ti.Prompt = prompt
	d.ti.Cursor.SetMode(cursor.CursorStatic)
	d.ti.SetValue(value)
	d.ti.CursorEnd()
	d.ti.Focus()
	d.selected = value != ""
	d.keys.Enter = bind([]string{"enter"}, "enter", "set")
	d.keys.Cancel = bind([]string{"esc"}, "esc", "leave it")
	return d
}

func (d *promptDialog) ShortHelp() []key.Binding  { return []key.Binding{d.keys.Enter, d.keys.Cancel} }
func (d *promptDialog) FullHelp() [][]key.Binding { return [][]key.Binding{d.ShortHelp()} }
func (d *promptDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *promptDialog) SetSize(w, h int) {
	d.w, d.h = w, h
	d.ti.Width = max(10, w-lipgloss.Width(d.ti.Prompt)-2)
	d.render()
}

func (d *promptDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	var cmd tea.Cmd
	switch msg := msg.(type) {
	case tea.KeyMsg:
		switch {
		case key.Matches(msg, d.keys.Enter):
			d.sh.send(closeMsg{}, d.done(d.ti.Value()))
			return d, nil
		case key.Matches(msg, d.keys.Cancel):
			d.sh.send(closeMsg{}, sayMsg{msgInfo, "not changed"})
			return d, nil
		}
		if d.selected && !d.unselect(msg) {
			d.render()
			return d, nil
		}
		d.ti, cmd = d.ti.Update(msg)
	case refreshMsg:
	default:
		d.ti, cmd = d.ti.Update(msg)
	}
	d.render()
	return d, cmd
}

// unselect ends the selection of the text the prompt opened with, as a
// text field does: typed text (or a paste) replaces it, a key that deletes
// clears it, any other key (an arrow, home, end) starts editing it. It
// reports whether msg is still to be given to the input.
func (d *promptDialog) unselect(msg tea.KeyMsg) bool {
	d.selected = false
	switch msg.Type {
	case tea.KeyRunes, tea.KeySpace:
		d.ti.SetValue("")
		return true
	case tea.KeyBackspace, tea.KeyDelete, tea.KeyCtrlU, tea.KeyCtrlK, tea.KeyCtrlW, tea.KeyCtrlH:
		d.ti.SetValue("")
		return false
	}
	return true
}

// render shows the input line and, when the text is wider than the line,
// all of it wrapped below, so that a long path is never cut.
func (d *promptDialog) render() {
	st := d.sh.st
	title := strings.TrimSuffix(strings.TrimSpace(d.ti.Prompt), ":")
	lines := []string{dialogTitle(st, title, "  enter sets · esc leaves it", d.w)}
	if d.note != "" {
		for _, l := range wrap(d.note, d.w) { // how to type it, whole
			lines = append(lines, st.Dim.Render(l))
		}
	}
	if d.selected {
		// the text it opened with, marked as selected (brackets, so that
		// it shows without colour too), and what a key does to it
		lines = append(lines, ansi.Truncate(d.ti.PromptStyle.Render(d.ti.Prompt)+selected(st, inert(d.ti.Value())), d.w, "…"))
		lines = append(lines, st.Dim.Render(ansi.Truncate(" typing replaces it · ←/→ edit it · backspace clears it", d.w, "…")))
	} else {
		lines = append(lines, ansi.Truncate(d.ti.View(), d.w, "…"))
	}
	v := inert(d.ti.Value())
	if lipgloss.Width(v) > d.ti.Width {
		lines = append(lines, st.Dim.Render(" in full:"))
		for _, l := range hardWrap(v, d.w-2) {
			lines = append(lines, " "+st.Value.Render(l))
		}
	}
	d.lines = fill(lines, d.h)
}

// hardWrap cuts s into pieces of w columns (a path has no spaces to wrap at).
func hardWrap(s string, w int) []string {
	var out []string
	for ansi.StringWidth(s) > w {
		cut := ansi.Truncate(s, w, "")
		out = append(out, cut)
		s = s[len(cut):]
	}
	return append(out, s)
}

// --- progress: background work ---

type progressDialog struct {
	sh         *shared
	what, text string
	cancel     key.Binding
	w, h       int
	lines      []string
}

func newProgressDialog(sh *shared, what string) *progressDialog {
	return &progressDialog{sh: sh, what: what, cancel: bind([]string{"esc"}, "esc", "stop")}
}

func (d *progressDialog) ShortHelp() []key.Binding  { return []key.Binding{d.cancel} }
func (d *progressDialog) FullHelp() [][]key.Binding { return [][]key.Binding{{d.cancel}} }
func (d *progressDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *progressDialog) SetSize(w, h int)          { d.w, d.h = w, h; d.render() }

func (d *progressDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.KeyMsg:
		if key.Matches(msg, d.cancel) {
			d.sh.send(cancelMsg{})
		}
	case progressTextMsg:
		d.text = msg.text
		d.render()
	}
	return d, nil
}

func (d *progressDialog) render() {
	st := d.sh.st
	lines := []string{dialogTitle(st, d.what+"…", "  esc stops", d.w)}
	if d.text != "" {
		for _, l := range wrap(" "+d.text, d.w) {
			lines = append(lines, st.Info.Render(l))
		}
	}
	d.lines = fill(lines, d.h)
}

// --- help: every key, in titled columns, paged ---

type helpDialog struct {
	sh     *shared
	groups []helpGroup
	keys   ListKeys
	page   int
	w, h   int
	blocks []string // one per group: title and keys
	pages  [][]string
	lines  []string
}

type helpGroup struct {
	title    string
	bindings []key.Binding
}

func (d *helpDialog) tall() bool { return true }

func helpKeys() ListKeys {
	return ListKeys{
		PageDown: bind([]string{"pgdown", " ", "down", "j"}, "pgdn/pgup", "page"),
		PageUp:   bind([]string{"pgup", "up", "k"}, "pgup", "page up"),
		Reject:   bind([]string{"esc", "?", "q"}, "esc/?", "close"),
	}
}

// newDialogHelp lists the keys of an open dialog; closing it goes back to
// the dialog.
func newDialogHelp(sh *shared, hm *help.Model, open component, name string, g GlobalKeys) *helpDialog {
	d := &helpDialog{sh: sh, keys: helpKeys()}
	for _, grp := range open.FullHelp() {
		d.groups = append(d.groups, helpGroup{name, grp})
	}
	d.groups = append(d.groups, helpGroup{"everywhere", []key.Binding{g.Interrupt}})
	d.build(hm)
	return d
}

// dialogName is how the key list titles an open dialog.
func dialogName(d component) string {
	switch d.(type) {
	case *resultDialog:
		return "optimizer result"
	case *fitDialog:
		return "fit review"
	case *rankingDialog:
		return "column ranking"
	case *sweepDialog:
		return "window diagram"
	case *confirmDialog:
		return "question"
	case *progressDialog:
		return "background work"
	case *cautionsDialog:
	case *verifyDialog:
		return "verification run"
	case *planDialog:
		return "next run"
	}
	return "dialog"
}

// newHelpDialog lists the focused pane's keys first, then the global
// ones, then the other panes' and the dialogs'.
func newHelpDialog(sh *shared, hm *help.Model, focused component, name string, g GlobalKeys) *helpDialog {
	d := &helpDialog{sh: sh, keys: helpKeys()}
	for _, grp := range focused.FullHelp() {
		d.groups = append(d.groups, helpGroup{name + " (focused)", grp})
	}
	for i, grp := range g.FullHelp() {
		d.groups = append(d.groups, helpGroup{globalTitles[i], grp})
	}
	others := []struct {
		name string
		k    help.KeyMap
	}{
		{"program", DefaultProgramKeys()}, {"chromatogram", DefaultChartKeys()},
		{"peaks", DefaultPeakKeys()}, {"settings", DefaultSettingsKeys()},
	}
	for _, o := range others {
		if o.name == name {
			continue
		}
		for _, grp := range o.k.FullHelp() {
			d.groups = append(d.groups, helpGroup{o.name, grp})
		}
	}
	d.groups = append(d.groups, helpGroup{"in a dialog", []key.Binding{
		bind([]string{"y"}, "enter/y", "take (result, fit, ranking)"),
		bind([]string{"n"}, "n/esc/q", "close, keep the current method"),
		bind([]string{"v"}, "v", "old/new run in the chart"),
		bind([]string{"up"}, "↑/↓ pgdn", "scroll"),
		bind([]string{"esc"}, "esc", "stop work, close"),
		bind([]string{"?"}, "?", "the open dialog's keys"),
	}})
	d.build(hm)
	return d
}

// build lays the groups out in columns as wide as the screen allows.
func (d *helpDialog) build(hm *help.Model) {
	st := d.sh.st
	var blocks []string
	for _, g := range d.groups {
		body := hm.FullHelpView([][]key.Binding{g.bindings})
		blocks = append(blocks, st.TableHead.Render(g.title)+"\n"+body)
	}
	d.blocks = blocks
}

func (d *helpDialog) ShortHelp() []key.Binding  { return []key.Binding{d.keys.Reject, d.keys.PageDown} }
func (d *helpDialog) FullHelp() [][]key.Binding { return d.keys.FullHelp() }
func (d *helpDialog) View() string              { return strings.Join(d.lines, "\n") }
func (d *helpDialog) SetSize(w, h int)          { d.w, d.h = w, h; d.layout(); d.render() }

func (d *helpDialog) Update(msg tea.Msg) (component, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok {
		switch {
		case key.Matches(km, d.keys.Reject):
			d.sh.send(closeMsg{})
		case key.Matches(km, d.keys.PageDown):
			if d.page+1 < len(d.pages) {
				d.page++
			}
		case key.Matches(km, d.keys.PageUp):
			if d.page > 0 {
				d.page--
			}
		}
		d.render()
	}
	return d, nil
}

func (d *helpDialog) pageRows() int { return max(1, d.h-1) }

// layout packs the blocks left to right in rows of columns, and the rows
// into pages, a row never split unless it is taller than a page.
func (d *helpDialog) layout() {
	const gap = 3
	var rows [][]string
	var row []string
	used := 0
	flush := func() {
		if len(row) > 0 {
			joined := lipgloss.JoinHorizontal(lipgloss.Top, row...)
			var lines []string
			for _, l := range strings.Split(joined, "\n") {
				lines = append(lines, ansi.Truncate(strings.TrimRight(l, " "), d.w, "…"))
			}
			rows = append(rows, lines)
			row, used = nil, 0
		}
	}
	for _, b := range d.blocks {
		bw := lipgloss.Width(b) + gap
		if used+bw > d.w && len(row) > 0 {
			flush()
		}
		row = append(row, lipgloss.NewStyle().PaddingLeft(1).PaddingRight(gap-1).Render(b))
		used += bw
	}
	flush()
	n := d.pageRows()
	d.pages = nil
	var page []string
	for _, r := range rows {
		if len(page) > 0 && len(page)+1+len(r) > n {
			d.pages = append(d.pages, page)
			page = nil
		}
		if len(page) > 0 {
			page = append(page, "")
		}
		page = append(page, r...)
		for len(page) > n {
			d.pages = append(d.pages, page[:n])
			page = append([]string(nil), page[n:]...)
		}
	}
	if len(page) > 0 {
		d.pages = append(d.pages, page)
	}
	if d.page >= len(d.pages) {
		d.page = 0
	}
}

func (d *helpDialog) render() {
	st := d.sh.st
	extra := "  esc or ? closes"
	if len(d.pages) > 1 {
		extra = fmt.Sprintf("  page %d of %d · pgdn/pgup turn · esc or ? closes", d.page+1, len(d.pages))
	}
	lines := []string{dialogTitle(st, "keys", extra, d.w)}
	if d.page < len(d.pages) {
		lines = append(lines, d.pages[d.page]...)
	}
	d.lines = fill(lines, d.h)
}
