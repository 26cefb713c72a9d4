package tui

import "github.com/charmbracelet/bubbles/key"

// GlobalKeys work in every pane.
type GlobalKeys struct {
	Quit, Save, SaveAs, Undo, Redo, Optimize, Focus, FocusBack, Help, Cancel, Export, Fit, Compare key.Binding
}

// DefaultGlobalKeys are the global bindings.
func DefaultGlobalKeys() GlobalKeys {
	return GlobalKeys{
		Quit:      key.NewBinding(key.WithKeys("q", "ctrl+c"), key.WithHelp("q", "quit")),
		Save:      key.NewBinding(key.WithKeys("ctrl+s"), key.WithHelp("ctrl+s", "save")),
		SaveAs:    key.NewBinding(key.WithKeys("W"), key.WithHelp("W", "save as")),
		Undo:      key.NewBinding(key.WithKeys("u", "ctrl+z"), key.WithHelp("u", "undo")),
		Redo:      key.NewBinding(key.WithKeys("U", "ctrl+y"), key.WithHelp("U", "redo")),
		Optimize:  key.NewBinding(key.WithKeys("o"), key.WithHelp("o", "optimize")),
		Focus:     key.NewBinding(key.WithKeys("tab"), key.WithHelp("tab", "next pane")),
		FocusBack: key.NewBinding(key.WithKeys("shift+tab"), key.WithHelp("shift+tab", "previous pane")),
		Help:      key.NewBinding(key.WithKeys("?"), key.WithHelp("?", "all keys")),
		Cancel:    key.NewBinding(key.WithKeys("esc"), key.WithHelp("esc", "cancel")),
		Export:    key.NewBinding(key.WithKeys("e"), key.WithHelp("e", "export figure+sheet")),
		Fit:       key.NewBinding(key.WithKeys("F"), key.WithHelp("F", "fit from scouting runs")),
		Compare:   key.NewBinding(key.WithKeys("C"), key.WithHelp("C", "compare columns")),
	}
}

// FieldKeys edit a list of values (the program and the settings).
type FieldKeys struct {
	Prev, Next, Up, Down, BigUp, BigDown, Type, AddRamp, DelRamp, Sweep key.Binding
}

// DefaultProgramKeys are the program pane's bindings.
func DefaultProgramKeys() FieldKeys {
	return FieldKeys{
		Prev:    key.NewBinding(key.WithKeys("left", "h"), key.WithHelp("←/→", "value")),
		Next:    key.NewBinding(key.WithKeys("right", "l")),
		Up:      key.NewBinding(key.WithKeys("+", "=", "up", "k"), key.WithHelp("+/-", "step")),
		Down:    key.NewBinding(key.WithKeys("-", "_", "down", "j")),
		BigUp:   key.NewBinding(key.WithKeys("]", "pgup"), key.WithHelp("]/[", "big step")),
		BigDown: key.NewBinding(key.WithKeys("[", "pgdown")),
		Type:    key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "type value")),
		AddRamp: key.NewBinding(key.WithKeys("a"), key.WithHelp("a", "add ramp")),
		DelRamp: key.NewBinding(key.WithKeys("x", "delete"), key.WithHelp("x", "remove ramp")),
		Sweep:   key.NewBinding(key.WithKeys("s"), key.WithHelp("s", "sweep this value")),
	}
}

// DefaultSettingsKeys are the settings pane's bindings (up/down choose).
func DefaultSettingsKeys() FieldKeys {
	return FieldKeys{
		Prev:    key.NewBinding(key.WithKeys("up", "k"), key.WithHelp("↑/↓", "setting")),
		Next:    key.NewBinding(key.WithKeys("down", "j")),
		Up:      key.NewBinding(key.WithKeys("+", "=", "right", "l"), key.WithHelp("+/-", "step or choice")),
		Down:    key.NewBinding(key.WithKeys("-", "_", "left", "h")),
		BigUp:   key.NewBinding(key.WithKeys("]", "pgup"), key.WithHelp("]/[", "big step")),
		BigDown: key.NewBinding(key.WithKeys("[", "pgdown")),
		Type:    key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "type value")),
	}
}

// ChartKeys zoom and pan the chromatogram.
type ChartKeys struct {
	ZoomIn, ZoomOut, Left, Right, Reset key.Binding
}

// DefaultChartKeys are the chart pane's bindings.
func DefaultChartKeys() ChartKeys {
	return ChartKeys{
		ZoomIn:  key.NewBinding(key.WithKeys("+", "="), key.WithHelp("+/-", "zoom time")),
		ZoomOut: key.NewBinding(key.WithKeys("-", "_")),
		Left:    key.NewBinding(key.WithKeys("left", "h"), key.WithHelp("←/→", "pan")),
		Right:   key.NewBinding(key.WithKeys("right", "l")),
		Reset:   key.NewBinding(key.WithKeys("0"), key.WithHelp("0", "whole run")),
	}
}

// PeakKeys move in the peak table and edit compounds.
type PeakKeys struct {
	Up, Down, Column, ColumnBack, Toggle, Type key.Binding
}

// DefaultPeakKeys are the peak table's bindings.
func DefaultPeakKeys() PeakKeys {
	return PeakKeys{
		Up:         key.NewBinding(key.WithKeys("up", "k"), key.WithHelp("↑/↓", "compound")),
		Down:       key.NewBinding(key.WithKeys("down", "j")),
		Column:     key.NewBinding(key.WithKeys("right", "l"), key.WithHelp("←/→", "ΔH/ΔS")),
		ColumnBack: key.NewBinding(key.WithKeys("left", "h")),
		Toggle:     key.NewBinding(key.WithKeys(" ", "t"), key.WithHelp("t", "target on/off")),
		Type:       key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "edit ΔH/ΔS")),
	}
}

// DecisionKeys answer a question.
type DecisionKeys struct {
	Yes, No, Other key.Binding
}
