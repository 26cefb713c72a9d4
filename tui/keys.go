package tui

import "github.com/charmbracelet/bubbles/key"

func bind(keys []string, k, desc string) key.Binding {
	return key.NewBinding(key.WithKeys(keys...), key.WithHelp(k, desc))
}

// GlobalKeys work whenever no dialog is open (ctrl+c also with one open).
type GlobalKeys struct {
	Help, Cautions, Quit, Interrupt, Save, SaveAs, Undo, Redo, Optimize, Focus, FocusBack, Export, Fit, Compare, Verify, Plan key.Binding
}

// DefaultGlobalKeys are the global bindings.
func DefaultGlobalKeys() GlobalKeys {
	return GlobalKeys{
		Help:      bind([]string{"?"}, "?", "all keys"),
		Cautions:  bind([]string{"!"}, "!", "all cautions, last message"),
		Quit:      bind([]string{"q"}, "q", "quit"),
		Interrupt: bind([]string{"ctrl+c"}, "ctrl+c", "stop work, quit (asks too)"),
		Save:      bind([]string{"ctrl+s"}, "ctrl+s", "save"),
		SaveAs:    bind([]string{"W"}, "W", "save as"),
		Undo:      bind([]string{"u", "ctrl+z"}, "u", "undo"),
		Redo:      bind([]string{"U", "ctrl+y"}, "U", "redo"),
		Optimize:  bind([]string{"o"}, "o", "optimize"),
		Focus:     bind([]string{"tab"}, "tab", "next pane"),
		FocusBack: bind([]string{"shift+tab"}, "shift+tab", "previous pane"),
		Export:    bind([]string{"e"}, "e", "export figure+sheet"),
		Fit:       bind([]string{"F"}, "F", "fit from scouting runs"),
		Compare:   bind([]string{"C"}, "C", "compare columns"),
		Verify:    bind([]string{"V"}, "V", "verification run vs prediction"),
		Plan:      bind([]string{"P"}, "P", "plan the next run"),
	}
}

// ShortHelp is the part of the footer every pane shares.
func (k GlobalKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Optimize, k.Save, k.Undo, k.Focus, k.Quit}
}

// FullHelp groups the global keys for the key list.
func (k GlobalKeys) FullHelp() [][]key.Binding {
	return [][]key.Binding{
		// q and ctrl+c both ask when changes are unsaved (App.askQuit)
		{k.Help, k.Cautions, k.Focus, k.FocusBack, withHelp(k.Quit, "quit (asks when unsaved)"), k.Interrupt},
		{k.Optimize, k.Plan, k.Fit, k.Verify, k.Compare, k.Export},
		{k.Save, k.SaveAs, k.Undo, k.Redo},
	}
}

// globalTitles name the groups of GlobalKeys.FullHelp.
var globalTitles = []string{"everywhere", "work", "file and history"}

// FieldKeys edit a list of values (the program and the settings).
type FieldKeys struct {
	Prev, Next, Up, Down, BigUp, BigDown, Type, AddRamp, DelRamp, Sweep key.Binding
}

// DefaultProgramKeys are the program pane's bindings.
func DefaultProgramKeys() FieldKeys {
	return FieldKeys{
		Prev:    bind([]string{"left", "h"}, "←/→", "choose value"),
		Next:    bind([]string{"right", "l"}, "→", "next value"),
		Up:      bind([]string{"+", "=", "up", "k"}, "+/- ↑/↓", "step"),
		Down:    bind([]string{"-", "_", "down", "j"}, "-", "step down"),
		BigUp:   bind([]string{"]", "pgup"}, "]/[", "big step"),
		BigDown: bind([]string{"[", "pgdown"}, "[", "big step down"),
		Type:    bind([]string{"enter"}, "enter", "type value"),
		AddRamp: bind([]string{"a"}, "a", "add ramp"),
		DelRamp: bind([]string{"x", "delete"}, "x", "remove ramp"),
		Sweep:   bind([]string{"s"}, "s", "window diagram"),
	}
}

// DefaultSettingsKeys are the settings pane's bindings (up/down choose).
func DefaultSettingsKeys() FieldKeys {
	return FieldKeys{
		Prev:    bind([]string{"up", "k"}, "↑/↓", "choose setting"),
		Next:    bind([]string{"down", "j"}, "↓", "next setting"),
		Up:      bind([]string{"+", "=", "right", "l"}, "+/- ←/→", "step or choice"),
		Down:    bind([]string{"-", "_", "left", "h"}, "-", "step down"),
		BigUp:   bind([]string{"]", "pgup"}, "]/[", "big step"),
		BigDown: bind([]string{"[", "pgdown"}, "[", "big step down"),
		Type:    bind([]string{"enter"}, "enter", "type value"),
		Sweep:   bind([]string{"s"}, "s", "window diagram (flow, pressure)"),
	}
}

// ShortHelp is the footer of a field list.
func (k FieldKeys) ShortHelp() []key.Binding {
	b := []key.Binding{k.Prev, k.Up, k.Type}
	if k.AddRamp.Enabled() && len(k.AddRamp.Keys()) > 0 {
		b = append(b, k.AddRamp)
	}
	return b
}

// FullHelp is every key of a field list.
func (k FieldKeys) FullHelp() [][]key.Binding {
	// the second key of each pair (→, -, [) is named with the first
	b := []key.Binding{k.Prev, k.Up, k.BigUp, k.Type}
	for _, x := range []key.Binding{k.AddRamp, k.DelRamp, k.Sweep} {
		if len(x.Keys()) > 0 {
			b = append(b, x)
		}
	}
	return [][]key.Binding{b}
}

// ChartKeys zoom and pan the chromatogram.
type ChartKeys struct {
	ZoomIn, ZoomOut, Left, Right, Reset key.Binding
}

// DefaultChartKeys are the chart pane's bindings.
func DefaultChartKeys() ChartKeys {
	return ChartKeys{
		ZoomIn:  bind([]string{"+", "="}, "+/-", "zoom time"),
		ZoomOut: bind([]string{"-", "_"}, "-", "zoom out"),
		Left:    bind([]string{"left", "h"}, "←/→", "pan"),
		Right:   bind([]string{"right", "l"}, "→", "pan right"),
		Reset:   bind([]string{"0"}, "0", "whole run"),
	}
}

func (k ChartKeys) ShortHelp() []key.Binding { return []key.Binding{k.ZoomIn, k.Left, k.Reset} }
func (k ChartKeys) FullHelp() [][]key.Binding {
	return [][]key.Binding{{k.ZoomIn, k.Left, k.Reset}}
}

// PeakKeys move in the peak table and edit compounds.
type PeakKeys struct {
	Up, Down, Column, ColumnBack, Toggle, Type key.Binding
}

// DefaultPeakKeys are the peak table's bindings.
func DefaultPeakKeys() PeakKeys {
	return PeakKeys{
		Up:         bind([]string{"up", "k"}, "↑/↓", "compound"),
		Down:       bind([]string{"down", "j"}, "↓", "next compound"),
		Column:     bind([]string{"right", "l"}, "←/→", "ΔH/ΔS/ΔCp"),
		ColumnBack: bind([]string{"left", "h"}, "←", "previous column"),
		Toggle:     bind([]string{" ", "t"}, "t", "target on/off"),
		Type:       bind([]string{"enter"}, "enter", "edit value"),
	}
}

func (k PeakKeys) ShortHelp() []key.Binding { return []key.Binding{k.Up, k.Column, k.Toggle, k.Type} }
func (k PeakKeys) FullHelp() [][]key.Binding {
	return [][]key.Binding{{k.Up, k.Column, k.Toggle, k.Type}}
}

// ListKeys scroll a dialog's list and answer it.
type ListKeys struct {
	Up, Down, PageUp, PageDown, Accept, Reject, Toggle key.Binding
}

func (k ListKeys) ShortHelp() []key.Binding {
	var b []key.Binding
	for _, x := range []key.Binding{k.Accept, k.Reject, k.Toggle, k.Up, k.PageDown} {
		if len(x.Keys()) > 0 {
			b = append(b, x)
		}
	}
	return b
}

func (k ListKeys) FullHelp() [][]key.Binding {
	var b []key.Binding
	for _, x := range []key.Binding{k.Accept, k.Reject, k.Toggle, k.Up, k.PageDown} {
		if len(x.Keys()) > 0 {
			b = append(b, x)
		}
	}
	return [][]key.Binding{b}
}

func scrollKeys(k ListKeys) ListKeys {
	k.Up = bind([]string{"up", "k"}, "↑/↓", "scroll")
	k.Down = bind([]string{"down", "j"}, "↓", "scroll down")
	k.PageUp = bind([]string{"pgup"}, "pgup", "page up")
	k.PageDown = bind([]string{"pgdown", " "}, "pgdn/pgup", "page")
	return k
}

// withHelp is b with another description (the key list says more than the
// footer has room for).
func withHelp(b key.Binding, desc string) key.Binding {
	b.SetHelp(b.Help().Key, desc)
	return b
}
