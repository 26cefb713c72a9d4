package tui

import (
	"fmt"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/methodfile"
)

// fiftyCompounds is the demo's column and program with 50 invented
// compounds following the demo's rule for a nonpolar phase.
func fiftyCompounds(t testing.TB) *methodfile.Method {
	m := demoMethod(t)
	m.Compounds = nil
	for i := 0; i < 50; i++ {
		n := 4 + 0.27*float64(i)
		m.Compounds = append(m.Compounds, methodfile.Compound{
			Name: fmt.Sprintf("analyte %02d", i+1), DHkJ: -(9 + 4.9*n), DS: -(44 + 6*n) + 0.3*float64(i%3),
			RefTempC: 100, Amount: 1, Target: true,
		})
	}
	return m
}

// BenchmarkEditRedraw: one keystroke that changes the program (a ramp-rate
// step), re-simulated and re-rendered, for 50 compounds on a 200×60
// terminal. Goal: ≤ 16 ms.
func BenchmarkEditRedraw(b *testing.B) {
	a, err := New(fiftyCompounds(b), Options{NoColor: true})
	if err != nil {
		b.Fatal(err)
	}
	a.Update(tea.WindowSizeMsg{Width: 200, Height: 60})
	press(a, "right", "right")
	up, down := keyRune('+'), keyRune('-')
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		k := up
		if i%2 == 1 {
			k = down
		}
		a.Update(k)
		_ = a.View()
	}
	b.StopTimer()
	if len(a.undo) == 0 {
		b.Fatal("edits were refused")
	}
}
