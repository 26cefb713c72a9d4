package peaktable

import (
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzParsePeaks: no input makes the peak-table reader panic, and every
// accepted peak has a positive finite time in minutes.
func FuzzParsePeaks(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "peaktables", "*"))
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		tab, err := Parse("f.csv", data, Columns{})
		if err != nil {
			return
		}
		for _, p := range tab.Peaks {
			if !(p.TimeMin > 0) || math.IsInf(p.TimeMin, 0) || p.Line < 1 {
				t.Fatalf("bad peak %+v", p)
			}
		}
	})
}
