// Package tui is rampwise's terminal UI: the oven program editor, the live
// simulated chromatogram and peak table, the method settings, and the
// optimizer running in the background. It is a bubbletea v1 program.
package tui

import (
	"os"

	"github.com/charmbracelet/lipgloss"
)

// Styles are every style the UI uses, built once.
type Styles struct {
	Title, TitleDim, Modified     lipgloss.Style
	Label, Value, Selected, Dim   lipgloss.Style
	Focused, Blurred              lipgloss.Style // pane headings
	Peak, Temp, Axis, PeakLabel   lipgloss.Style
	Critical                      lipgloss.Style
	Good, Bad, Warn, Error, Info  lipgloss.Style
	TableHead, TableRow, TableSel lipgloss.Style
	Help, HelpKey                 lipgloss.Style
}

// colour pairs (light background, dark background): our own palette.
var (
	ink      = lipgloss.AdaptiveColor{Light: "#1d2b36", Dark: "#dfe7ec"}
	faint    = lipgloss.AdaptiveColor{Light: "#6b7c88", Dark: "#8a9aa6"}
	teal     = lipgloss.AdaptiveColor{Light: "#00736b", Dark: "#5fd7c7"}
	amber    = lipgloss.AdaptiveColor{Light: "#9a5b00", Dark: "#f0b45a"}
	rose     = lipgloss.AdaptiveColor{Light: "#b0173a", Dark: "#ff7a93"}
	leaf     = lipgloss.AdaptiveColor{Light: "#2f7d1f", Dark: "#9be07a"}
	slate    = lipgloss.AdaptiveColor{Light: "#dde6ec", Dark: "#25343f"}
	selectBg = lipgloss.AdaptiveColor{Light: "#c9e9e4", Dark: "#134a45"}
)

// DefaultStyles are the colour styles; with NO_COLOR set (or noColor true)
// only bold, underline and reverse are used.
func DefaultStyles(noColor bool) Styles {
	if noColor || os.Getenv("NO_COLOR") != "" {
		b := lipgloss.NewStyle()
		return Styles{
			Title: b.Bold(true), TitleDim: b, Modified: b.Bold(true),
			Label: b, Value: b, Selected: b.Reverse(true), Dim: b,
			Focused: b.Bold(true).Underline(true), Blurred: b,
			Peak: b, Temp: b, Axis: b, PeakLabel: b, Critical: b.Bold(true),
			Good: b, Bad: b.Bold(true), Warn: b.Bold(true), Error: b.Bold(true), Info: b,
			TableHead: b.Underline(true), TableRow: b, TableSel: b.Reverse(true),
			Help: b, HelpKey: b.Bold(true),
		}
	}
	b := lipgloss.NewStyle()
	return Styles{
		Title:     b.Bold(true).Foreground(ink).Background(slate),
		TitleDim:  b.Foreground(faint).Background(slate),
		Modified:  b.Bold(true).Foreground(amber).Background(slate),
		Label:     b.Foreground(faint),
		Value:     b.Foreground(ink),
		Selected:  b.Bold(true).Foreground(ink).Background(selectBg),
		Dim:       b.Foreground(faint),
		Focused:   b.Bold(true).Foreground(teal),
		Blurred:   b.Foreground(faint),
		Peak:      b.Foreground(teal),
		Temp:      b.Foreground(amber),
		Axis:      b.Foreground(faint),
		PeakLabel: b.Foreground(ink),
		Critical:  b.Bold(true).Foreground(rose),
		Good:      b.Foreground(leaf),
		Bad:       b.Bold(true).Foreground(rose),
		Warn:      b.Bold(true).Foreground(amber),
		Error:     b.Bold(true).Foreground(rose),
		Info:      b.Foreground(ink),
		TableHead: b.Bold(true).Foreground(faint),
		TableRow:  b.Foreground(ink),
		TableSel:  b.Foreground(ink).Background(selectBg),
		Help:      b.Foreground(faint),
		HelpKey:   b.Bold(true).Foreground(teal),
	}
}
