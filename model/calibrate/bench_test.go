package calibrate

import (
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// BenchmarkFitLabTables: four runs of 17 compounds from peak tables, all
// but one compound unnamed: assignment, fit, outlier screen, pooled errors.
func BenchmarkFitLabTables(b *testing.B) {
	t := &testing.T{}
	truth := hiddenTruth(t, 1)
	dir := b.TempDir()
	runs := []labRun{
		{"scout-5", "comma", ramp(40, 1, 5, 280), nil},
		{"scout-10", "semicolon", ramp(40, 1, 10, 280), nil},
		{"scout-20", "tab", ramp(40, 1, 20, 280), nil},
		{"scout-8", "comma", ramp(60, 0.5, 8, 280), nil},
	}
	path := writeLabRuns(t, hiddenHeader, dir, truth, runs, map[string]bool{"limonene": true}, 1, nil)
	m := demo(t)
	rs, err := methodfile.ReadRuns(path, m)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Fit(m, rs, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
