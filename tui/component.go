package tui

import (
	"github.com/charmbracelet/bubbles/help"
	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// component is the contract every pane and every dialog keeps (the shape
// of soft-serve's pkg/ui/common component): it takes messages, draws
// itself into the size it was given, and lists its keys for bubbles/help.
// View only joins strings that Update or SetSize computed.
type component interface {
	Update(msg tea.Msg) (component, tea.Cmd)
	View() string
	SetSize(width, height int)
	help.KeyMap
}

// shared is what the root owns and every component reads: the method as
// edited, its simulation and the styles. Components never change it: they
// send messages (an edit, a dialog to open, work to start) with send, and
// the root handles them in order as soon as the component's Update
// returns, so keys that arrive together are applied one after the other.
type shared struct {
	st     *Styles
	method *methodfile.Method
	sys    *model.System
	res    *model.Result
	focus  int // the focused pane
	outbox []tea.Msg
	// kept current by the root for the cautions list
	cautions []string // checks.Cautions of the method, made inert
	status   string   // the status message, whole
	// ovenMinGiven: limits.oven_min_c is the user's (in the file or set
	// here), not the default that follows the coolant
	ovenMinGiven bool
}

func (s *shared) send(msgs ...tea.Msg) { s.outbox = append(s.outbox, msgs...) }

// The messages components send to the root.
type (
	// editMsg asks the root to make m the method (validated, simulated and
	// pushed on the undo stack); what is said in the status line.
	editMsg struct {
		m    *methodfile.Method
		what string
		key  string // the one key edited, when known: only its rules are checked
	}
	// openMsg puts a dialog in the overlay slot.
	openMsg struct{ d component }
	// closeMsg closes the open dialog.
	closeMsg struct{}
	// sayMsg puts a message in the status line.
	sayMsg struct {
		kind msgKind
		text string
	}
	// quitMsg ends the program (the dialog that sends it has asked).
	quitMsg struct{}
	// refreshMsg tells a component that the shared state changed: it
	// re-renders its cached view.
	refreshMsg struct{}
	// previewMsg tells the chart which run to show beside the method's own
	// (the optimizer's best so far or its result); nil res shows the
	// method's run only.
	previewMsg struct {
		res    *model.Result
		prog   model.Program
		label  string
		showIt bool // draw the preview (true) or the method's run (false)
		faint  bool // draw the other run faint and dotted beneath
	}
)

// say is a shortcut for sending a status-line message.
func (s *shared) say(kind msgKind, text string) { s.send(sayMsg{kind: kind, text: text}) }

// fill pads lines to exactly h lines (cutting extra ones).
func fill(lines []string, h int) []string {
	if h < 0 {
		h = 0
	}
	if len(lines) > h {
		return lines[:h]
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines
}

// Every pane and dialog keeps the contract.
var (
	_ component = (*programPane)(nil)
	_ component = (*chartPane)(nil)
	_ component = (*peaksPane)(nil)
	_ component = (*settingsPane)(nil)
	_ component = (*resultDialog)(nil)
	_ component = (*fitDialog)(nil)
	_ component = (*rankingDialog)(nil)
	_ component = (*sweepDialog)(nil)
	_ component = (*confirmDialog)(nil)
	_ component = (*promptDialog)(nil)
	_ component = (*helpDialog)(nil)
	_ component = (*progressDialog)(nil)
	_ component = (*cautionsDialog)(nil)
	_ component = (*verifyDialog)(nil)
	_ component = (*planDialog)(nil)
)
